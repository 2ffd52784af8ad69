/**
 * Controllability and observability gramians of a stable model and their square-root factors.
 *
 *   A P + P Aᵀ + B Bᵀ = 0,   Aᵀ Q + Q A + Cᵀ C = 0   (Moore 1981, "Principal component analysis in linear
 *   systems: controllability, observability, and model reduction", IEEE Trans. AC 26(1)).
 *
 * Dense gramians (for checks) come from the matrix sign-function solver (Roberts 1971). The factors
 * P = Lc Lcᵀ, Q = Lo Loᵀ (for balancing and the H2 norm) come from whichever route is faster on the active
 * backend for balancing, both measured in the README's benchmark and both tested against SciPy (the H2
 * norm keeps the factored sign iteration on every backend: see `norms.ts`):
 *   native    Bartels & Stewart (1972) on one real Schur form shared by both equations, factors by
 *             pivoted Cholesky at the numerical rank (`linalg/lyapunov-schur.ts`);
 *   portable  one coupled sign iteration for both equations with columns compressed to the numerical
 *             rank as they go (`linalg/lyapunov.ts`).
 * Neither needs a plain Cholesky factorisation, which would fail on the semidefinite gramians of
 * non-minimal models, and neither carries a direction below the rounding level.
 */
import { type Matrix, lyapunov, lowRankGramianFactors, matmul, transpose, zeros, kernels } from './linalg/index';
import { schurGramianFactors } from './linalg/lyapunov-schur';
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
  const { controllability, observability } =
    kernels().name === 'native' ? schurGramianFactors(model.A, model.B, model.C) : lowRankGramianFactors(model.A, model.B, model.C);
  return { controllability, observability };
}

