/**
 * Zero-order-hold discretisation of ẋ = Ax + Bu at a sample time ts:
 *
 *   x[k+1] = Φ x[k] + Γ u[k],   Φ = e^{A ts},   Γ = ∫₀^ts e^{Aσ} dσ · B,
 *
 * exact when u is constant on each sample interval. Φ and Γ come from one exponential of the augmented
 * matrix, following C. F. Van Loan, "Computing integrals involving the matrix exponential", IEEE Trans.
 * Automat. Control 23(3):395–404, 1978, Theorem 1:
 *
 *   exp( [A B; 0 0]·ts ) = [Φ Γ; 0 I],
 *
 * so no inverse of A is needed (A may be singular: integrators, rigid-body modes). The exponential is
 * Higham's scaling and squaring (`linalg/expm.ts`). Discrete poles are e^{λ ts} of the continuous ones;
 * `discretePoles` computes them as eigenvalues of Φ, which is what a controller designer sees.
 */
import { ModelError } from './errors';
import { type Matrix, type ComplexVector, zeros, eigenvalues } from './linalg/index';
import { expmWithInfo } from './linalg/expm';
import type { ModelLabels, StateSpaceModel } from './model';

export interface ZohMatrices {
  /** Φ = e^{A ts}, n×n. */
  readonly Phi: Matrix;
  /** Γ = ∫₀^ts e^{Aσ}dσ·G for the input matrix G given (B, or B·u for a fixed input direction). */
  readonly Gamma: Matrix;
  /** Padé degree and squarings of the one exponential, for cost reports. */
  readonly padeDegree: number;
  readonly squarings: number;
}

/**
 * Φ and Γ for the pair (A, G) at step ts by the augmented exponential (Van Loan 1978). G may be B or a
 * single column B·u when the input direction is fixed (a step), which keeps the exponential (n+1)×(n+1).
 */
export function zohMatrices(A: Matrix, G: Matrix, ts: number): ZohMatrices {
  const n = A.rows;
  const m = G.cols;
  const N = n + m;
  const M = zeros(N, N);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) M.data[i * N + j] = A.data[i * n + j] * ts;
    for (let j = 0; j < m; j++) M.data[i * N + n + j] = G.data[i * m + j] * ts;
  }
  const e = expmWithInfo(M);
  const Phi = zeros(n, n);
  const Gamma = zeros(n, m);
  for (let i = 0; i < n; i++) {
    Phi.data.set(e.value.data.subarray(i * N, i * N + n), i * n);
    Gamma.data.set(e.value.data.subarray(i * N + n, i * N + N), i * m);
  }
  return { Phi, Gamma, padeDegree: e.padeDegree, squarings: e.squarings };
}

export interface DiscreteModel {
  readonly Ad: Matrix;
  readonly Bd: Matrix;
  readonly Cd: Matrix;
  readonly Dd: Matrix;
  readonly ts: number;
  readonly labels?: ModelLabels;
  readonly timeBase?: string;
}

/** Throws invalid_option on a sample time that is not a positive finite number. */
export function requireSampleTime(ts: number, field = 'ts'): void {
  if (!(typeof ts === 'number' && Number.isFinite(ts) && ts > 0)) {
    throw new ModelError('invalid_option', field, `sample time ${field} must be a positive number, got ${String(ts)}`);
  }
}

/** The zero-order-hold equivalent at sample time ts: (Φ, Γ, C, D). */
export function discretizeZoh(model: StateSpaceModel, ts: number): DiscreteModel {
  requireSampleTime(ts);
  const { Phi, Gamma } = zohMatrices(model.A, model.B, ts);
  return {
    Ad: Phi,
    Bd: Gamma,
    Cd: model.C,
    Dd: model.D,
    ts,
    ...(model.labels ? { labels: model.labels } : {}),
    ...(model.timeBase ? { timeBase: model.timeBase } : {}),
  };
}

/** Eigenvalues of Φ: the discrete poles (inside the unit circle for a stable continuous model). */
export function discretePoles(d: DiscreteModel): ComplexVector {
  return eigenvalues(d.Ad);
}
