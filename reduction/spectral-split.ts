/**
 * Stable / unstable split of a state-space model: G = Gs + Gu, where Gs holds the poles with
 * Re λ < −tol·scale (reduced later) and Gu the marginal and unstable ones (rigid-body modes, integrators,
 * unstable modes), which reduction keeps exactly.
 *
 * Method: the spectral projector onto the stable invariant subspace from the matrix sign function,
 * P = (I − sign(A − σI))/2 (Roberts 1971, "Linear model reduction and solution of the algebraic Riccati
 * equation by use of the sign function", Int. J. Control 32(4), 1980 reprint of the 1971 report), with the
 * Newton iteration X ← (cX + (cX)⁻¹)/2 and Frobenius-norm scaling c = √(‖X⁻¹‖/‖X‖) (Higham, "Functions of
 * Matrices", SIAM 2008, §5.5, scaling the Newton iteration). Orthonormal bases of the two invariant subspaces (range of
 * P and of I − P) come from singular value decompositions, and T = [Vs Vu] block-diagonalises A
 * exactly in exact arithmetic: T⁻¹AT = diag(As, Au).
 *
 * Why the sign function rather than eigenvectors: a rigid-body mode is a double pole at 0 with a
 * Jordan block, whose eigenvector matrix is singular, so eigenvector-based splitting fails there; the
 * sign function only needs the spectrum to stay off the line Re s = σ. σ is put in the middle of the gap
 * between the rightmost stable pole and the leftmost kept pole, so that line is as far from both as the
 * spectrum allows (the sign iteration converges fast and accurately when no eigenvalue is near the line,
 * Higham 2008, ch. 5).
 */
import {
  type Matrix,
  type ComplexVector,
  eigenvalues,
  inverse,
  matmul,
  svd,
  identity,
  zeros,
  block,
  frobeniusNorm,
  normInf,
} from './linalg/index';
import type { StateSpaceModel } from './model';
import { ModelError } from './errors';
import { stackColumns } from './realization';
import { classifyPoles, DEFAULT_STABILITY_TOLERANCE, type PoleClassification as GenericPoleClassification } from './poles';

/** Pole classification and its tolerance live in poles.ts (one rule for the engine and the pages). */
export { classifyPoles, DEFAULT_STABILITY_TOLERANCE, type PoleStability } from './poles';
export type PoleClassification = GenericPoleClassification<ComplexVector>;

/** A relative tolerance option: a number in [0, 1), or the default when absent (throws ModelError on `field`). */
export function relativeToleranceOption(value: number | undefined, fallback: number, field: string): number {
  if (value === undefined) return fallback;
  if (!Number.isFinite(value) || value < 0 || value >= 1) {
    throw new ModelError('invalid_option', field, `${field} must be a relative tolerance in [0, 1), got ${value}`);
  }
  return value;
}

export function modelPoles(A: Matrix): ComplexVector {
  if (A.rows === 0) return { re: new Float64Array(0), im: new Float64Array(0) };
  return eigenvalues(A);
}

export interface SpectralSplit {
  /** The stable part Gs (carries the model's D); `stableStates` states. */
  readonly stable: StateSpaceModel;
  /** The marginal and unstable part Gu (D = 0); kept exactly by every reduction. */
  readonly unstable: StateSpaceModel;
  readonly stableStates: number;
  readonly unstableStates: number;
  readonly marginalPoles: number;
  readonly unstablePoles: number;
  readonly classification: PoleClassification;
  /** σ of the dividing line Re s = σ (null when no split was needed). */
  readonly splitAbscissa: number | null;
  /** ‖off-diagonal blocks of T⁻¹AT‖_F / ‖A‖_F: how well the two parts decouple (0 when no split was needed). */
  readonly couplingResidual: number;
}

export interface SplitOptions {
  readonly tolerance?: number;
  /** Poles already computed for this A (saves an eigenvalue computation). */
  readonly poles?: ComplexVector;
}

/** Newton iteration for sign(X) with Frobenius-norm scaling (Higham 2008, §5.5). */
export function matrixSign(start: Matrix): Matrix {
  const n = start.rows;
  let x = start;
  let scaling = true;
  for (let it = 0; it < 100; it++) {
    const xi = inverse(x);
    const c = scaling ? Math.sqrt(frobeniusNorm(xi) / frobeniusNorm(x)) : 1;
    const next = zeros(n, n);
    for (let k = 0; k < next.data.length; k++) next.data[k] = 0.5 * (c * x.data[k] + xi.data[k] / c);
    let diff = 0;
    for (let k = 0; k < next.data.length; k++) diff += (next.data[k] - x.data[k]) ** 2;
    const rel = Math.sqrt(diff) / frobeniusNorm(next);
    x = next;
    // Scaling speeds the early phase; switched off near convergence so the final steps are
    // the unscaled, quadratically convergent Newton steps (common practice; Higham 2008, ch. 5).
    if (rel < 1e-2) scaling = false;
    if (rel < 1e3 * n * Number.EPSILON || (!scaling && rel < 1e-14)) return x;
  }
  return x;
}

/** Orthonormal basis (n×k) of the range of X: its first k left singular vectors. */
function rangeBasis(x: Matrix, k: number): Matrix {
  return block(svd(x).U, 0, x.rows, 0, k);
}

function emptyPart(model: StateSpaceModel, withD: boolean): StateSpaceModel {
  return {
    A: zeros(0, 0),
    B: zeros(0, model.B.cols),
    C: zeros(model.C.rows, 0),
    D: withD ? model.D : zeros(model.D.rows, model.D.cols),
  };
}

/**
 * Split G into its stable part and its marginal/unstable part (see the file header). The stable part
 * carries D; Gs + Gu equals G up to the similarity's rounding (reported as `couplingResidual`).
 */
export function splitStableUnstable(model: StateSpaceModel, options: SplitOptions = {}): SpectralSplit {
  const tolerance = options.tolerance ?? DEFAULT_STABILITY_TOLERANCE;
  const poles = options.poles ?? modelPoles(model.A);
  const classification = classifyPoles(poles, tolerance);
  const n = model.A.rows;
  let stableCount = 0;
  let marginal = 0;
  let unstable = 0;
  let rightmostStable = -Infinity;
  let leftmostKept = Infinity;
  classification.stability.forEach((s, i) => {
    if (s === 'stable') {
      stableCount++;
      rightmostStable = Math.max(rightmostStable, poles.re[i]);
    } else {
      if (s === 'marginal') marginal++;
      else unstable++;
      leftmostKept = Math.min(leftmostKept, poles.re[i]);
    }
  });
  const base = { marginalPoles: marginal, unstablePoles: unstable, classification };
  if (stableCount === n) {
    return {
      ...base,
      stable: model,
      unstable: emptyPart(model, false),
      stableStates: n,
      unstableStates: 0,
      splitAbscissa: null,
      couplingResidual: 0,
    };
  }
  if (stableCount === 0) {
    return {
      ...base,
      stable: emptyPart(model, true),
      unstable: { ...model, D: zeros(model.D.rows, model.D.cols) },
      stableStates: 0,
      unstableStates: n,
      splitAbscissa: null,
      couplingResidual: 0,
    };
  }

  const sigma = 0.5 * (rightmostStable + leftmostKept);
  const shifted = zeros(n, n);
  shifted.data.set(model.A.data);
  for (let i = 0; i < n; i++) shifted.data[i * n + i] -= sigma;
  const sign = matrixSign(shifted);
  const id = identity(n);
  const pStable = zeros(n, n);
  const pKept = zeros(n, n);
  for (let k = 0; k < sign.data.length; k++) {
    pStable.data[k] = 0.5 * (id.data[k] - sign.data[k]);
    pKept.data[k] = 0.5 * (id.data[k] + sign.data[k]);
  }
  // The projector's trace is its rank; it and the eigenvalue count agree unless a pole sits right at
  // the tolerance line, where the projector (the invariant subspace actually separated) decides.
  let tr = 0;
  for (let i = 0; i < n; i++) tr += pStable.data[i * n + i];
  const ns = Math.min(n - 1, Math.max(1, Math.round(tr)));
  const vs = rangeBasis(pStable, ns);
  const vu = rangeBasis(pKept, n - ns);
  const t = stackColumns(vs, vu);
  const tInv = inverse(t);
  const at = matmul(matmul(tInv, model.A), t);
  const bt = matmul(tInv, model.B);
  const ct = matmul(model.C, t);
  const coupling = Math.hypot(frobeniusNorm(block(at, 0, ns, ns, n)), frobeniusNorm(block(at, ns, n, 0, ns)));
  const scaleA = frobeniusNorm(model.A) || normInf(model.A) || 1;
  return {
    ...base,
    stable: {
      A: block(at, 0, ns, 0, ns),
      B: block(bt, 0, ns, 0, bt.cols),
      C: block(ct, 0, ct.rows, 0, ns),
      D: model.D,
    },
    unstable: {
      A: block(at, ns, n, ns, n),
      B: block(bt, ns, n, 0, bt.cols),
      C: block(ct, 0, ct.rows, ns, n),
      D: zeros(model.D.rows, model.D.cols),
    },
    stableStates: ns,
    unstableStates: n - ns,
    splitAbscissa: sigma,
    couplingResidual: coupling / scaleA,
  };
}
