/**
 * Frequency response G(jω) = C (jωI − A)⁻¹ B + D on a grid of frequencies, with magnitude, phase and the
 * largest singular value per frequency.
 *
 * Two forms, chosen per model:
 *   modal       A = V Λ V⁻¹ with Λ real block diagonal (1×1 blocks for real poles, 2×2 for complex
 *               pairs), so G(jω) = (CV)(jωI − Λ)⁻¹(V⁻¹B) + D costs O(n·m·p) per frequency after one
 *               eigendecomposition. Its rounding error grows with the condition number κ(V) of the
 *               eigenvector matrix (Golub & Van Loan, "Matrix Computations", 4th ed. 2013, §7.2.2, the
 *               Bauer–Fike bound), so it is used only when κ₁(V) ≤ MODAL_CONDITION_LIMIT.
 *   hessenberg  Laub ("Efficient multivariable frequency response computations", IEEE Trans. Automatic
 *               Control 26(2), 1981): A = Q H Qᵀ once, then one O(n²) complex elimination of jωI − H per
 *               frequency (`linalg/hessenberg-solve.ts`), backward stable for any A.
 */
import {
  type Matrix,
  zeros,
  matmul,
  svd,
  transpose,
  hessenberg,
  eig,
  luFactor,
  luSolve,
  luReciprocalCondition,
  norm1,
  kernels,
} from './linalg/index';
import type { StateSpaceModel } from './model';

/** A complex p×m matrix as two real matrices. */
export interface ComplexMatrix {
  readonly re: Matrix;
  readonly im: Matrix;
}

export interface FrequencyEvaluator {
  /** G(jω) for one frequency ω in rad per time unit. */
  at(w: number): ComplexMatrix;
  /** G(jω) at many frequencies at once (the Hessenberg form batches them in one native call). */
  many(w: ArrayLike<number>): ComplexMatrix[];
  /** How each frequency is computed: modal form, Hessenberg form, or a model without states (G = D). */
  readonly form: 'modal' | 'hessenberg' | 'static';
}

export interface HessenbergForm {
  /** Upper Hessenberg H with A = Q H Qᵀ. */
  readonly H: Matrix;
  readonly Q: Matrix;
}

/** Y = C·X + D for complex X given as (re, im) n×m arrays. */
function outputMap(C: Matrix, D: Matrix, xr: Float64Array, xi: Float64Array): ComplexMatrix {
  const p = C.rows;
  const n = C.cols;
  const m = D.cols;
  const re = zeros(p, m);
  const im = zeros(p, m);
  re.data.set(D.data);
  for (let i = 0; i < p; i++) {
    for (let k = 0; k < n; k++) {
      const c = C.data[i * n + k];
      if (c === 0) continue;
      for (let j = 0; j < m; j++) {
        re.data[i * m + j] += c * xr[k * m + j];
        im.data[i * m + j] += c * xi[k * m + j];
      }
    }
  }
  return { re, im };
}

function unpack(re: Float64Array, im: Float64Array, count: number, p: number, m: number): ComplexMatrix[] {
  const out: ComplexMatrix[] = [];
  for (let f = 0; f < count; f++) {
    const o = f * p * m;
    out.push({
      re: { rows: p, cols: m, data: re.slice(o, o + p * m) },
      im: { rows: p, cols: m, data: im.slice(o, o + p * m) },
    });
  }
  return out;
}

/** An evaluator on a given Hessenberg form A = Q H Qᵀ: the per-frequency work is O(n²·m). */
export function hessenbergEvaluator(model: StateSpaceModel, form: HessenbergForm): FrequencyEvaluator {
  const Qt = transpose(form.Q);
  const F = matmul(Qt, model.B);
  const CQ = matmul(model.C, form.Q);
  const p = model.C.rows, m = model.B.cols;
  const many = (w: ArrayLike<number>): ComplexMatrix[] => {
    const ws = Float64Array.from(w);
    const r = kernels().hessenbergResponse(form.H, F, CQ, model.D, ws);
    return unpack(r.re, r.im, ws.length, p, m);
  };
  return { form: 'hessenberg', many, at: (w: number) => many([w])[0] };
}

/**
 * κ₁(V) above which the modal form is not used where small differences of responses matter (norms,
 * error systems): with κ ≤ 10⁴ the modal response keeps about twelve significant digits of ‖G‖
 * (common practice, from the Bauer–Fike bound κ·ε).
 */
export const MODAL_CONDITION_LIMIT = 1e4;

/**
 * The looser limit for response curves (`frequencyResponse`): κ ≤ 10¹⁰ still leaves about six
 * significant digits of ‖G‖ (a thousandth of a decibel), beyond what a Bode or singular-value plot or a
 * tabulated response needs (common practice); past it the Hessenberg form is used.
 */
export const RESPONSE_CONDITION_LIMIT = 1e10;

/**
 * The modal evaluator, or null when A's eigenvector matrix is too ill-conditioned (κ₁(V) above `limit`,
 * e.g. a defective or nearly defective A) for the modal form to be accurate.
 */
export function modalEvaluator(model: StateSpaceModel, limit = MODAL_CONDITION_LIMIT): FrequencyEvaluator | null {
  const n = model.A.rows;
  const p = model.C.rows, m = model.B.cols;
  const { values, vectors } = eig(model.A);
  const f = luFactor(vectors);
  if (f.zeroPivot >= 0) return null;
  const rcond = luReciprocalCondition(f, norm1(vectors));
  if (!(rcond * limit >= 1)) return null;
  // Real block-diagonal modal form: for a pair λ = a ± ib with vector x ± iy, A·[x y] = [x y]·[[a, b], [−b, a]].
  const VB = luSolve(f, model.B);
  const CV = matmul(model.C, vectors);
  const re = values.re, im = values.im;
  const pm = p * m;
  // Residues, so each frequency is a sum of p×m terms with scalar weights: a real pole λ contributes
  // R/(jω − λ) with R = CV[:,k]·VB[k,:]; a pair contributes s/(s² + b²)·S₁ + b/(s² + b²)·S₂ (s = jω − a)
  // with S₁ = x̂·uᵀ + ŷ·vᵀ and S₂ = x̂·vᵀ − ŷ·uᵀ, from (jωI − M)⁻¹ = (s² + b²)⁻¹·[[s, b], [−b, s]].
  const residues = new Float64Array(2 * n * pm);
  for (let k = 0; k < n; k++) {
    const pair = im[k] > 0 && k + 1 < n;
    const o = 2 * k * pm;
    for (let i = 0; i < p; i++) {
      const x = CV.data[i * n + k], y = pair ? CV.data[i * n + k + 1] : 0;
      for (let j = 0; j < m; j++) {
        const u = VB.data[k * m + j], v = pair ? VB.data[(k + 1) * m + j] : 0;
        residues[o + i * m + j] = pair ? x * u + y * v : x * u;
        if (pair) residues[o + pm + i * m + j] = x * v - y * u;
      }
    }
    if (pair) k++;
  }
  const many = (w: ArrayLike<number>): ComplexMatrix[] => {
    const out: ComplexMatrix[] = [];
    for (let f2 = 0; f2 < w.length; f2++) {
      const wk = w[f2];
      const gr = new Float64Array(model.D.data), gi = new Float64Array(pm);
      for (let k = 0; k < n; k++) {
        const o = 2 * k * pm;
        if (im[k] > 0 && k + 1 < n) {
          const a = re[k], b = im[k];
          const sr = -a, si = wk;
          const dr = sr * sr - si * si + b * b, di = 2 * sr * si;
          const den = dr * dr + di * di;
          const ir = dr / den, ii = -di / den; // 1/(s² + b²)
          const pr = sr * ir - si * ii, pi = sr * ii + si * ir; // s/(s² + b²)
          const qr = b * ir, qi = b * ii; // b/(s² + b²)
          for (let t = 0; t < pm; t++) {
            const s1 = residues[o + t], s2 = residues[o + pm + t];
            gr[t] += pr * s1 + qr * s2;
            gi[t] += pi * s1 + qi * s2;
          }
          k++;
        } else {
          // 1/(jω − λ) for a real λ.
          const sr = -re[k], si = wk;
          const den = sr * sr + si * si;
          const ir = sr / den, ii = -si / den;
          for (let t = 0; t < pm; t++) {
            const r = residues[o + t];
            gr[t] += ir * r;
            gi[t] += ii * r;
          }
        }
      }
      out.push({ re: { rows: p, cols: m, data: gr }, im: { rows: p, cols: m, data: gi } });
    }
    return out;
  };
  return { form: 'modal', many, at: (w: number) => many([w])[0] };
}

/**
 * The evaluator for a model: a one-time transform, then cheap evaluations at any frequency. The modal
 * form where it is accurate (see MODAL_CONDITION_LIMIT), the Hessenberg form otherwise or on request.
 */
export function frequencyEvaluator(
  model: StateSpaceModel,
  options: { form?: 'modal' | 'hessenberg'; conditionLimit?: number } = {},
): FrequencyEvaluator {
  if (model.A.rows === 0) {
    const im = zeros(model.D.rows, model.D.cols);
    const at = () => ({ re: model.D, im });
    return { form: 'static', at, many: (w) => Array.from({ length: w.length }, at) };
  }
  if (options.form !== 'hessenberg') {
    const modal = modalEvaluator(model, options.form === 'modal' ? Infinity : (options.conditionLimit ?? MODAL_CONDITION_LIMIT));
    if (modal) return modal;
  }
  return hessenbergEvaluator(model, hessenberg(model.A));
}

export interface FrequencyResponse {
  /** Frequencies in rad per time unit. */
  readonly frequencies: Float64Array;
  /** G(jω) per frequency, p×m. */
  readonly response: readonly ComplexMatrix[];
}

export function frequencyResponse(model: StateSpaceModel, w: ArrayLike<number>): FrequencyResponse {
  const frequencies = Float64Array.from(w);
  return { frequencies, response: frequencyEvaluator(model, { conditionLimit: RESPONSE_CONDITION_LIMIT }).many(frequencies) };
}

/** `points` frequencies spaced evenly in log10 from wMin to wMax inclusive. */
export function logFrequencyGrid(wMin: number, wMax: number, points: number): Float64Array {
  const out = new Float64Array(points);
  const a = Math.log10(wMin);
  const b = Math.log10(wMax);
  for (let k = 0; k < points; k++) out[k] = 10 ** (points === 1 ? a : a + ((b - a) * k) / (points - 1));
  return out;
}

/**
 * A band that shows every pole's corner: from a decade below the slowest nonzero |λ| to a decade above
 * the fastest (common practice for Bode plots). [0.01, 100] for a model without nonzero poles.
 */
export function defaultFrequencyBand(poles: { re: ArrayLike<number>; im: ArrayLike<number> }): [number, number] {
  let lo = Infinity;
  let hi = 0;
  for (let i = 0; i < poles.re.length; i++) {
    const r = Math.hypot(poles.re[i], poles.im[i]);
    if (r > 0) {
      lo = Math.min(lo, r);
      hi = Math.max(hi, r);
    }
  }
  if (hi === 0) return [0.01, 100];
  return [lo / 10, hi * 10];
}

/**
 * Singular values of a complex p×m matrix, descending. Computed from the real embedding
 * [Re −Im; Im Re], whose singular values are those of G, each twice: the embedding is unitarily equivalent
 * to diag(G, conj(G)).
 */
export function complexSingularValues(g: ComplexMatrix): Float64Array {
  const p = g.re.rows;
  const m = g.re.cols;
  if (p === 0 || m === 0) return new Float64Array(0);
  if (p === 1 || m === 1) {
    let s = 0;
    for (let k = 0; k < g.re.data.length; k++) s += g.re.data[k] ** 2 + g.im.data[k] ** 2;
    return Float64Array.of(Math.sqrt(s));
  }
  const big = zeros(2 * p, 2 * m);
  const M = 2 * m;
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < m; j++) {
      const r = g.re.data[i * m + j];
      const im = g.im.data[i * m + j];
      big.data[i * M + j] = r;
      big.data[i * M + m + j] = -im;
      big.data[(p + i) * M + j] = im;
      big.data[(p + i) * M + m + j] = r;
    }
  }
  const s = svd(big).s;
  const out = new Float64Array(Math.min(p, m));
  for (let k = 0; k < out.length; k++) out[k] = s[2 * k];
  return out;
}

export function largestSingularValue(g: ComplexMatrix): number {
  const s = complexSingularValues(g);
  return s.length > 0 ? s[0] : 0;
}

export interface BodeData {
  /** Frequencies in rad per time unit. */
  readonly frequencies: Float64Array;
  /** magnitude[i][j][k]: |G_ij(jω_k)| (output i, input j). */
  readonly magnitude: Float64Array[][];
  /** Phase in degrees, unwrapped along the grid so a curve has no 360° jumps. */
  readonly phaseDegrees: Float64Array[][];
  /** Largest singular value of G(jω_k). */
  readonly largestSingularValue: Float64Array;
}

/** Magnitude and unwrapped phase per input→output channel and σ_max per frequency. */
export function bodeData(model: StateSpaceModel, w: ArrayLike<number>): BodeData {
  const { frequencies, response } = frequencyResponse(model, w);
  const p = model.D.rows;
  const m = model.D.cols;
  const K = frequencies.length;
  const magnitude: Float64Array[][] = [];
  const phaseDegrees: Float64Array[][] = [];
  for (let i = 0; i < p; i++) {
    const magRow: Float64Array[] = [];
    const phaseRow: Float64Array[] = [];
    for (let j = 0; j < m; j++) {
      const mag = new Float64Array(K);
      const phase = new Float64Array(K);
      let previous = 0;
      for (let k = 0; k < K; k++) {
        const re = response[k].re.data[i * m + j];
        const im = response[k].im.data[i * m + j];
        mag[k] = Math.hypot(re, im);
        let ph = (Math.atan2(im, re) * 180) / Math.PI;
        if (k > 0) ph += 360 * Math.round((previous - ph) / 360);
        phase[k] = ph;
        previous = ph;
      }
      magRow.push(mag);
      phaseRow.push(phase);
    }
    magnitude.push(magRow);
    phaseDegrees.push(phaseRow);
  }
  return {
    frequencies,
    magnitude,
    phaseDegrees,
    largestSingularValue: Float64Array.from(response, (h) => largestSingularValue(h)),
  };
}
