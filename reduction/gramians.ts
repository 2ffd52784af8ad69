/**
 * Controllability and observability gramians of a stable model and their square-root factors.
 *
 *   A P + P Aᵀ + B Bᵀ = 0,   Aᵀ Q + Q A + Cᵀ C = 0   (Moore 1981, "Principal component analysis in linear
 *   systems: controllability, observability, and model reduction", IEEE Trans. AC 26(1)).
 *
 * Dense gramians (for the H2 norm and for checks) and the factors P = Lc Lcᵀ, Q = Lo Loᵀ (for balancing)
 * both come from the linear-algebra surface's matrix sign-function solvers (Roberts 1971). The factors
 * come from one iteration for both equations, with columns compressed to the numerical rank as they
 * go: they never need a Cholesky factorisation, which would fail on the semidefinite gramians of
 * non-minimal models, and they carry no direction below the rounding level.
 */
import { type Matrix, lyapunov, lowRankGramianFactors, matmul, transpose, zeros } from './linalg/index';
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

export interface GramianFactors {
  /** P ≈ Lc Lcᵀ, n × (numerical rank of P). */
  readonly controllability: Matrix;
  /** Q ≈ Lo Loᵀ, n × (numerical rank of Q). */
  readonly observability: Matrix;
}

export function gramianFactors(model: StateSpaceModel): GramianFactors {
  const n = model.A.rows;
  if (n === 0) return { controllability: zeros(0, 0), observability: zeros(0, 0) };
  const { controllability, observability } = lowRankGramianFactors(model.A, model.B, model.C);
  return { controllability, observability };
}
