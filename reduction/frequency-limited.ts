/**
 * Frequency-limited balanced truncation for a band [ω₁, ω₂] on dense models.
 *
 * Method: W. Gawronski & J.-N. Juang, "Model reduction in limited time and frequency intervals",
 * Int. J. Systems Science 21(2):349–376, 1990. For a stable A the gramians restricted to the frequencies
 * ω₁ ≤ |ν| ≤ ω₂ are
 *
 *   P_Ω = (1/2π) ∫_{ω₁≤|ν|≤ω₂} (jνI − A)⁻¹ B Bᵀ (jνI − A)⁻ᴴ dν = S P + P Sᵀ,
 *   Q_Ω = Sᵀ Q + Q S,          S = S(ω₂) − S(ω₁),
 *
 * with P, Q the ordinary gramians (A P + P Aᵀ + B Bᵀ = 0, Aᵀ Q + Q A + Cᵀ C = 0) and the closed form
 *
 *   S(ω) = (1/2π) ∫_{−ω}^{ω} (jνI − A)⁻¹ dν = Re( (j/π) · log(−A − jωI) ),
 *
 * which is the paper's (j/2π)·ln((A + jωI)(A − jωI)⁻¹) written with one principal logarithm of a matrix
 * whose spectrum lies in the open right half-plane (a form also used by Benner, Kürschner & Saak, SIAM J.
 * Sci. Comput. 38(5), 2016, as recalled). For a scalar a < 0 it gives arctan(ω/|a|)/π, which tends to ½ as
 * ω → ∞, so that P_Ω → P for the whole axis.
 *
 * The matrix logarithm is computed on the real 2n×2n form [[X, −Y], [Y, X]] of X + jY (its principal
 * logarithm is the real form of the complex one) by inverse scaling and squaring (Kenney & Laub 1989;
 * Higham, "Functions of Matrices", SIAM 2008, §11.5): a scalar shift of log by the geometric mean of the
 * eigenvalue moduli, square roots by the determinantally scaled Denman–Beavers iteration (Higham 2008,
 * eq. 6.28 as recalled) until ‖M − I‖₁ ≤ ¼, then the [8/8] Padé approximant of log(I + X) in its
 * partial-fraction form, Σ wⱼ X (I + tⱼ X)⁻¹ with the Gauss–Legendre nodes and weights on [0, 1]
 * (Higham, "Evaluating Padé approximants of the matrix logarithm", SIAM J. Matrix Anal. Appl. 22(4), 2001).
 *
 * Balancing is the square-root method of `balanced.ts` on factors of P_Ω and Q_Ω (from their symmetric
 * eigendecompositions: P_Ω is semidefinite but its factor need not be of full rank). No a-priori error
 * bound holds, and the reduced model need not be stable; both are reported rather than assumed.
 * Marginal and unstable poles are kept exactly, as by the other methods (`reduce.ts`).
 */
import { ModelError } from './errors';
import {
  type Matrix,
  block,
  identity,
  inverse,
  luFactor,
  luLogDeterminant,
  matmul,
  norm1,
  solve,
  svd,
  symmetricEig,
  transpose,
  zeros,
} from './linalg/index';
import type { StateSpaceModel } from './model';
import { controllabilityGramian, observabilityGramian } from './gramians';
import { errorSystem, leadingStates, blockDiagonal, stackRows, stackColumns, symmetricPart } from './realization';
import { splitStableUnstable, modelPoles, DEFAULT_STABILITY_TOLERANCE } from './spectral-split';
import { frequencyEvaluator, largestSingularValue, logFrequencyGrid } from './frequency';
import { hInfinityNorm } from './norms';

/** Gauss–Legendre nodes and weights on [0, 1] (Newton's method on Pₘ; Golub & Welsch's values to rounding). */
export function gaussLegendre01(m: number): { nodes: Float64Array; weights: Float64Array } {
  const nodes = new Float64Array(m);
  const weights = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    let x = Math.cos((Math.PI * (i + 0.75)) / (m + 0.5));
    let dp = 1;
    for (let it = 0; it < 100; it++) {
      // P_m(x) and P_m'(x) by the three-term recurrence.
      let p0 = 1;
      let p1 = x;
      for (let k = 2; k <= m; k++) {
        const p2 = ((2 * k - 1) * x * p1 - (k - 1) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      const pm = m === 1 ? x : p1;
      const pm1 = m === 1 ? 1 : p0;
      dp = (m * (x * pm - pm1)) / (x * x - 1);
      const dx = pm / dp;
      x -= dx;
      if (Math.abs(dx) < 1e-16) break;
    }
    nodes[i] = (1 - x) / 2; // map [-1, 1] → [0, 1], ascending
    weights[i] = 1 / ((1 - x * x) * dp * dp); // 2/((1−x²)P'²) halved for [0, 1]
  }
  return { nodes, weights };
}

const PADE_DEGREE = 8;
const SQRT_TARGET = 0.25;
const MAX_SQUARE_ROOTS = 60;

function addScaledIdentity(m: Matrix, s: number): Matrix {
  const out = { rows: m.rows, cols: m.cols, data: Float64Array.from(m.data) };
  for (let i = 0; i < m.rows; i++) out.data[i * m.cols + i] += s;
  return out;
}

function lincomb(a: Matrix, wa: number, b: Matrix, wb: number): Matrix {
  const out = zeros(a.rows, a.cols);
  for (let k = 0; k < out.data.length; k++) out.data[k] = wa * a.data[k] + wb * b.data[k];
  return out;
}

/** The principal square root of M (no eigenvalue on the closed negative real axis): scaled Denman–Beavers. */
function squareRoot(m: Matrix): Matrix {
  const n = m.rows;
  let y = m;
  let z = identity(n);
  let scaling = true;
  for (let k = 0; k < 100; k++) {
    let mu = 1;
    const fy = luFactor(y);
    const fz = luFactor(z);
    if (fy.zeroPivot >= 0 || fz.zeroPivot >= 0) throw new ModelError('unstable', 'A', 'the matrix logarithm met a singular square-root iterate');
    if (scaling) {
      const ld = luLogDeterminant(fy).logAbs + luLogDeterminant(fz).logAbs;
      mu = Math.exp(-ld / (2 * n));
    }
    const yInv = inverse(y);
    const zInv = inverse(z);
    const yNext = lincomb(y, mu / 2, zInv, 1 / (2 * mu));
    const zNext = lincomb(z, mu / 2, yInv, 1 / (2 * mu));
    const change = norm1(lincomb(yNext, 1, y, -1)) / norm1(yNext);
    y = yNext;
    z = zNext;
    if (change < 1e-2) scaling = false; // the last steps unscaled and quadratically convergent
    if (!scaling && change < 1e-14) break;
  }
  return y;
}

/**
 * The principal logarithm of a real matrix with no eigenvalue on the closed negative real axis (see the
 * file header). Throws ModelError when the square roots do not approach I.
 */
export function matrixLogarithm(m: Matrix): Matrix {
  const n = m.rows;
  const f = luFactor(m);
  if (f.zeroPivot >= 0) throw new ModelError('unstable', 'A', 'the matrix logarithm needs a nonsingular matrix');
  // log M = ln(c)·I + log(M/c), c the geometric mean of the eigenvalue moduli: centres the spectrum on 1.
  const lnC = luLogDeterminant(f).logAbs / n;
  let y = lincomb(m, Math.exp(-lnC), m, 0);
  let roots = 0;
  while (norm1(addScaledIdentity(y, -1)) > SQRT_TARGET) {
    if (roots >= MAX_SQUARE_ROOTS) {
      throw new ModelError('invalid_option', 'band', 'the matrix logarithm did not converge (square roots did not approach I)');
    }
    y = squareRoot(y);
    roots++;
  }
  const x = addScaledIdentity(y, -1);
  const { nodes, weights } = gaussLegendre01(PADE_DEGREE);
  const log = zeros(n, n);
  for (let j = 0; j < PADE_DEGREE; j++) {
    // X (I + tX)⁻¹ = (I + tX)⁻¹ X: X commutes with I + tX.
    const term = solve(addScaledIdentity(lincomb(x, nodes[j], x, 0), 1), x);
    for (let k = 0; k < log.data.length; k++) log.data[k] += weights[j] * term.data[k];
  }
  const scale = 2 ** roots;
  for (let k = 0; k < log.data.length; k++) log.data[k] *= scale;
  for (let i = 0; i < n; i++) log.data[i * n + i] += lnC;
  return log;
}

/** S(ω) = Re((j/π)·log(−A − jωI)) for a stable A (see the file header); S(0) = 0. */
export function bandIntegral(A: Matrix, omega: number): Matrix {
  const n = A.rows;
  if (omega === 0) return zeros(n, n);
  // Real form of Z = −A − jωI: [[−A, ωI], [−ωI, −A]]; Im log Z is its lower-left block.
  const M = zeros(2 * n, 2 * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const v = -A.data[i * n + j];
      M.data[i * 2 * n + j] = v;
      M.data[(n + i) * 2 * n + n + j] = v;
    }
    M.data[i * 2 * n + n + i] = omega;
    M.data[(n + i) * 2 * n + i] = -omega;
  }
  const L = matrixLogarithm(M);
  const S = block(L, n, 2 * n, 0, n);
  for (let k = 0; k < S.data.length; k++) S.data[k] = -S.data[k] / Math.PI;
  return S;
}

export type Band = readonly [number, number];

export function checkBand(band: Band): void {
  const [lo, hi] = band;
  if (!(Number.isFinite(lo) && Number.isFinite(hi) && lo >= 0 && hi > lo)) {
    throw new ModelError('invalid_option', 'band', `band must be two frequencies w1,w2 with 0 ≤ w1 < w2 (rad per time unit), got ${lo},${hi}`);
  }
}

export interface FrequencyLimitedGramians {
  readonly controllability: Matrix;
  readonly observability: Matrix;
  /** S(ω₂) − S(ω₁). */
  readonly bandIntegral: Matrix;
}

/** P_Ω and Q_Ω of a stable model for the band (see the file header). */
export function frequencyLimitedGramians(stable: StateSpaceModel, band: Band): FrequencyLimitedGramians {
  checkBand(band);
  const { A } = stable;
  const S = bandIntegral(A, band[1]);
  if (band[0] > 0) {
    const S1 = bandIntegral(A, band[0]);
    for (let k = 0; k < S.data.length; k++) S.data[k] -= S1.data[k];
  }
  const P = controllabilityGramian(stable);
  const Q = observabilityGramian(stable);
  const SP = matmul(S, P);
  const QS = matmul(Q, S);
  const PO = zeros(P.rows, P.cols);
  const QO = zeros(Q.rows, Q.cols);
  const n = A.rows;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      PO.data[i * n + j] = SP.data[i * n + j] + SP.data[j * n + i]; // S P + P Sᵀ = S P + (S P)ᵀ
      QO.data[i * n + j] = QS.data[i * n + j] + QS.data[j * n + i]; // Sᵀ Q + Q S = (Q S)ᵀ + Q S
    }
  }
  return { controllability: symmetricPart(PO), observability: symmetricPart(QO), bandIntegral: S };
}

/** L with L Lᵀ ≈ G for a symmetric semidefinite G, dropping eigenvalues ≤ tol·λmax (negatives are rounding). */
function semidefiniteFactor(g: Matrix, tol: number): Matrix {
  const { values, vectors } = symmetricEig(g);
  const n = g.rows;
  let top = 0;
  for (let i = 0; i < n; i++) top = Math.max(top, values[i]);
  const keep: number[] = [];
  for (let i = 0; i < n; i++) if (values[i] > tol * top) keep.push(i);
  const L = zeros(n, keep.length);
  keep.forEach((col, c) => {
    const s = Math.sqrt(values[col]);
    for (let i = 0; i < n; i++) L.data[i * keep.length + c] = vectors.data[i * n + col] * s;
  });
  return L;
}

export interface FrequencyLimitedRealization {
  /** Frequency-limited Hankel singular values √λ(P_Ω Q_Ω), descending (length = numerical rank). */
  readonly singularValues: Float64Array;
  /** The balanced realization of the stable part (D carried). */
  readonly balanced: StateSpaceModel;
}

/** Square-root balancing of the stable part on its frequency-limited gramians. */
export function frequencyLimitedRealization(stable: StateSpaceModel, band: Band, rankTolerance = 1e-12): FrequencyLimitedRealization {
  const g = frequencyLimitedGramians(stable, band);
  const Lc = semidefiniteFactor(g.controllability, rankTolerance);
  const Lo = semidefiniteFactor(g.observability, rankTolerance);
  const m = stable.B.cols;
  const p = stable.C.rows;
  if (Lc.cols === 0 || Lo.cols === 0) {
    return { singularValues: new Float64Array(0), balanced: { A: zeros(0, 0), B: zeros(0, m), C: zeros(p, 0), D: stable.D } };
  }
  const { U, s, V } = svd(matmul(transpose(Lo), Lc));
  let k = 0;
  while (k < s.length && s[k] > rankTolerance * s[0]) k++;
  const T = zeros(Lc.rows, k);
  const W = zeros(Lo.rows, k);
  const Vk = matmul(Lc, block(V, 0, V.rows, 0, k));
  const Uk = matmul(Lo, block(U, 0, U.rows, 0, k));
  for (let i = 0; i < T.rows; i++) {
    for (let j = 0; j < k; j++) {
      const w = 1 / Math.sqrt(s[j]);
      T.data[i * k + j] = Vk.data[i * k + j] * w;
      W.data[i * k + j] = Uk.data[i * k + j] * w;
    }
  }
  const Wt = transpose(W);
  return {
    singularValues: Float64Array.from(s.subarray(0, k)),
    balanced: { A: matmul(matmul(Wt, stable.A), T), B: matmul(Wt, stable.B), C: matmul(stable.C, T), D: stable.D },
  };
}

export interface BandErrors {
  /** max σ_max(G − Gr) over a grid inside the band (and at its edges). */
  readonly inBand: number;
  /** max σ_max(G − Gr) over a grid outside the band, from a decade below the slowest pole to a decade above the fastest. */
  readonly outOfBand: number;
  /** Grid frequencies where the two maxima were found. */
  readonly inBandPeakFrequency: number;
  readonly outOfBandPeakFrequency: number;
}

/** Measured σ_max(G(jω) − Gr(jω)) inside and outside the band, on log grids (200 points each). */
export function bandErrors(full: StateSpaceModel, reduced: StateSpaceModel, band: Band, points = 200): BandErrors {
  const evaluator = frequencyEvaluator(errorSystem(full, reduced));
  const poles = modelPoles(full.A);
  let lo = Infinity;
  let hi = 0;
  for (let i = 0; i < poles.re.length; i++) {
    const r = Math.hypot(poles.re[i], poles.im[i]);
    if (r > 0) {
      lo = Math.min(lo, r);
      hi = Math.max(hi, r);
    }
  }
  if (!(hi > 0)) {
    lo = 1e-2;
    hi = 1e2;
  }
  const wMin = Math.min(lo / 10, band[1] / 100);
  const wMax = Math.max(hi * 10, band[1] * 100);
  const inGrid = [...(band[0] > 0 ? Array.from(logFrequencyGrid(band[0], band[1], points)) : [0, ...Array.from(logFrequencyGrid(band[1] / 1e4, band[1], points))])];
  const below = band[0] > 0 ? Array.from(logFrequencyGrid(Math.min(wMin, band[0] / 10), band[0], points)).slice(0, -1) : [];
  const above = Array.from(logFrequencyGrid(band[1], wMax, points)).slice(1);
  const peak = (grid: number[]) => {
    let best = -1;
    let at = NaN;
    for (const w of grid) {
      const v = largestSingularValue(evaluator.at(w));
      if (v > best) {
        best = v;
        at = w;
      }
    }
    return { best: Math.max(best, 0), at };
  };
  const inside = peak(inGrid);
  const outside = peak([...below, ...above]);
  return { inBand: inside.best, outOfBand: outside.best, inBandPeakFrequency: inside.at, outOfBandPeakFrequency: outside.at };
}

/** The accuracy note every frequency-limited reduction carries (its first note), and the bound's absence in words. */
export const BAND_ERRORS_MEASURED_NOTE = 'frequency-limited balanced truncation has no a-priori error bound; the errors inside and outside the band are measured';
export const NO_BAND_BOUND = 'no a-priori bound applies to frequency-limited balanced truncation';

export interface FrequencyLimitedResult {
  readonly method: 'frequency-limited';
  readonly band: Band;
  readonly model: StateSpaceModel;
  readonly stablePart: StateSpaceModel;
  readonly order: number;
  readonly stableOrder: number;
  readonly unstableStatesKept: number;
  readonly singularValues: Float64Array;
  readonly errors: BandErrors;
  /** Measured ‖G − Gr‖∞ over all frequencies, or null when the reduced stable part is not stable. */
  readonly hInfinityError: number | null;
  /** Whether every pole of the reduced stable part is in the open left half-plane. */
  readonly reducedStable: boolean;
  readonly notes: readonly string[];
}

/** The reduction without its measured errors, and the full model's stable part it was made from. */
export type FrequencyLimitedTruncation = Omit<FrequencyLimitedResult, 'errors' | 'hInfinityError'> & { readonly fullStablePart: StateSpaceModel };

/**
 * Reduce to `order` states in total (states kept for marginal and unstable poles included) by
 * frequency-limited balanced truncation on `band` (rad per time unit), without measuring the errors (the
 * callers that measure them against another model, or with other tools, start here). Throws ModelError on
 * a bad band or order.
 */
export function frequencyLimitedTruncation(
  model: StateSpaceModel,
  options: { band: Band; order: number; stabilityTolerance?: number },
): FrequencyLimitedTruncation {
  checkBand(options.band);
  const split = splitStableUnstable(model, { tolerance: options.stabilityTolerance ?? DEFAULT_STABILITY_TOLERANCE });
  const nu = split.unstableStates;
  const order = options.order;
  if (!Number.isInteger(order) || order < nu || order > model.A.rows) {
    throw new ModelError(
      'invalid_option',
      'order',
      `order must be a whole number from ${nu} (the states kept for marginal and unstable poles) to ${model.A.rows}, got ${order}`,
    );
  }
  const real = frequencyLimitedRealization(split.stable, options.band);
  const notes = [BAND_ERRORS_MEASURED_NOTE];
  let r = order - nu;
  if (r > real.singularValues.length) {
    notes.push(`the stable part is numerically of order ${real.singularValues.length} on this band, so only that many states are formed`);
    r = real.singularValues.length;
  }
  const stablePart = leadingStates(real.balanced, r);
  const reducedPoles = modelPoles(stablePart.A);
  const reducedStable = Array.from(reducedPoles.re).every((v) => v < 0);
  if (!reducedStable) notes.push('the reduced stable part has poles in the closed right half-plane (possible for this method); no H∞ error is reported');
  if (nu > 0) notes.push(`${nu} state(s) kept exactly for marginal and unstable poles`);
  const full =
    nu === 0
      ? stablePart
      : {
          A: blockDiagonal(stablePart.A, split.unstable.A),
          B: stackRows(stablePart.B, split.unstable.B),
          C: stackColumns(stablePart.C, split.unstable.C),
          D: stablePart.D,
        };
  return {
    method: 'frequency-limited',
    band: options.band,
    model: full,
    stablePart,
    fullStablePart: split.stable,
    order: full.A.rows,
    stableOrder: stablePart.A.rows,
    unstableStatesKept: nu,
    singularValues: real.singularValues,
    reducedStable,
    notes,
  };
}

/** frequencyLimitedTruncation with its errors measured: inside and outside the band, and ‖G − Gr‖∞ when the reduced model is stable. */
export function frequencyLimitedReduction(
  model: StateSpaceModel,
  options: { band: Band; order: number; stabilityTolerance?: number },
): FrequencyLimitedResult {
  const t = frequencyLimitedTruncation(model, options);
  const errors = bandErrors(t.fullStablePart, t.stablePart, options.band);
  let hInfinityError: number | null = null;
  if (t.reducedStable) {
    const h = hInfinityNorm(errorSystem(t.fullStablePart, t.stablePart));
    hInfinityError = h.finite ? h.value : null;
  }
  return { ...t, errors, hInfinityError };
}
