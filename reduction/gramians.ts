/**
 * Controllability and observability gramians of a stable model and their low-rank square-root factors.
 *
 *   A P + P Aᵀ + B Bᵀ = 0,   Aᵀ Q + Q A + Cᵀ C = 0   (Moore 1981, "Principal component analysis in linear
 *   systems: controllability, observability, and model reduction", IEEE Trans. AC 26(1)).
 *
 * The Lyapunov equations are solved by the linear-algebra surface. The factors L with P = L Lᵀ come from
 * the symmetric eigendecomposition P = V Λ Vᵀ, L = V_k Λ_k^½ over the eigenvalues above n·ε·λ_max: unlike
 * a Cholesky factorisation this never fails on the semidefinite gramians of non-minimal models (a
 * computed gramian of an uncontrollable model has eigenvalues at rounding level, some of them negative),
 * and it drops those directions instead of dividing by them.
 */
import { type Matrix, lyapunov, matmul, transpose, symmetricEig, zeros } from './linalg/index';
import type { StateSpaceModel } from './model';
import { symmetricPart } from './realization';

/** P with A P + P Aᵀ + B Bᵀ = 0 (A stable). */
export function controllabilityGramian(model: StateSpaceModel): Matrix {
  if (model.A.rows === 0) return zeros(0, 0);
  return symmetricPart(lyapunov(model.A, matmul(model.B, transpose(model.B))));
}

/** Q with Aᵀ Q + Q A + Cᵀ C = 0 (A stable). */
export function observabilityGramian(model: StateSpaceModel): Matrix {
  if (model.A.rows === 0) return zeros(0, 0);
  const Ct = transpose(model.C);
  return symmetricPart(lyapunov(transpose(model.A), matmul(Ct, model.C)));
}

/** L (n×k) with X ≈ L Lᵀ for a symmetric positive semidefinite X; k is X's numerical rank. */
export function gramianFactor(x: Matrix): Matrix {
  const n = x.rows;
  if (n === 0) return zeros(0, 0);
  const { values, vectors } = symmetricEig(symmetricPart(x));
  let largest = 0;
  for (let i = 0; i < n; i++) largest = Math.max(largest, values[i]);
  const cut = n * Number.EPSILON * largest;
  const keep: number[] = [];
  for (let i = n - 1; i >= 0; i--) if (values[i] > cut) keep.push(i);
  const L = zeros(n, keep.length);
  for (let r = 0; r < n; r++) {
    for (let c = 0; c < keep.length; c++) {
      L.data[r * keep.length + c] = vectors.data[r * n + keep[c]] * Math.sqrt(values[keep[c]]);
    }
  }
  return L;
}

export interface GramianFactors {
  /** P ≈ Lc Lcᵀ. */
  readonly controllability: Matrix;
  /** Q ≈ Lo Loᵀ. */
  readonly observability: Matrix;
}

export function gramianFactors(model: StateSpaceModel): GramianFactors {
  return {
    controllability: gramianFactor(controllabilityGramian(model)),
    observability: gramianFactor(observabilityGramian(model)),
  };
}
