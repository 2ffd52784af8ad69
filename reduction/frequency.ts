/**
 * Frequency response G(jω) = C (jωI − A)⁻¹ B + D on a grid of frequencies, with magnitude, phase and the
 * largest singular value per frequency.
 *
 * Method: the Hessenberg approach of Laub ("Efficient multivariable frequency response computations",
 * IEEE Trans. Automatic Control 26(2), 1981): transform once, A = Q H Qᵀ with H upper Hessenberg and Q
 * orthogonal, so that G(jω) = (CQ)(jωI − H)⁻¹(QᵀB) + D; each frequency then costs one O(n²) complex
 * elimination of the Hessenberg matrix jωI − H (Gaussian elimination with partial pivoting between
 * adjacent rows, which is all the pivoting a Hessenberg matrix needs: Golub & Van Loan, "Matrix
 * Computations", 4th ed. 2013, ch. 4, Hessenberg LU) instead of an O(n³) dense solve.
 *
 * The Hessenberg form itself (Householder reduction) comes from the linear-algebra surface.
 */
import { type Matrix, zeros, matmul, svd, transpose, hessenberg } from './linalg/index';
import type { StateSpaceModel } from './model';

/** A complex p×m matrix as two real matrices. */
export interface ComplexMatrix {
  readonly re: Matrix;
  readonly im: Matrix;
}

export interface FrequencyEvaluator {
  /** G(jω) for one frequency ω in rad per time unit. */
  at(w: number): ComplexMatrix;
  /** How each frequency is computed: on a Hessenberg form, or a model without states (G = D). */
  readonly form: 'hessenberg' | 'static';
}

export interface HessenbergForm {
  /** Upper Hessenberg H with A = Q H Qᵀ. */
  readonly H: Matrix;
  readonly Q: Matrix;
}

/**
 * Solve (jωI − H) X = F for upper Hessenberg H and real right-hand sides F (n×m), by Gaussian elimination
 * with adjacent-row partial pivoting (Golub & Van Loan 2013, ch. 4); O(n²) for the elimination and
 * O(n²) per column of F for back substitution. Returns X as (re, im), each n×m.
 */
export function solveShiftedHessenberg(H: Matrix, w: number, F: Matrix): { re: Float64Array; im: Float64Array } {
  const n = H.rows;
  const m = F.cols;
  const mr = new Float64Array(n * n);
  const mi = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    const j0 = i === 0 ? 0 : i - 1;
    for (let j = j0; j < n; j++) mr[i * n + j] = -H.data[i * n + j];
    mi[i * n + i] = w;
  }
  const xr = new Float64Array(F.data);
  const xi = new Float64Array(n * m);
  for (let k = 0; k < n - 1; k++) {
    const kk = k * n + k;
    const sk = (k + 1) * n + k;
    const pivotMag = Math.abs(mr[kk]) + Math.abs(mi[kk]);
    const subMag = Math.abs(mr[sk]) + Math.abs(mi[sk]);
    if (subMag > pivotMag) {
      for (let j = k; j < n; j++) {
        const a = k * n + j;
        const b = (k + 1) * n + j;
        let t = mr[a];
        mr[a] = mr[b];
        mr[b] = t;
        t = mi[a];
        mi[a] = mi[b];
        mi[b] = t;
      }
      for (let j = 0; j < m; j++) {
        const a = k * m + j;
        const b = (k + 1) * m + j;
        let t = xr[a];
        xr[a] = xr[b];
        xr[b] = t;
        t = xi[a];
        xi[a] = xi[b];
        xi[b] = t;
      }
    }
    if (mr[sk] === 0 && mi[sk] === 0) continue;
    // l = M[k+1][k] / M[k][k]
    const pr = mr[kk];
    const pi = mi[kk];
    const den = pr * pr + pi * pi;
    const lr = (mr[sk] * pr + mi[sk] * pi) / den;
    const li = (mi[sk] * pr - mr[sk] * pi) / den;
    mr[sk] = 0;
    mi[sk] = 0;
    for (let j = k + 1; j < n; j++) {
      const a = k * n + j;
      const b = (k + 1) * n + j;
      mr[b] -= lr * mr[a] - li * mi[a];
      mi[b] -= lr * mi[a] + li * mr[a];
    }
    for (let j = 0; j < m; j++) {
      const a = k * m + j;
      const b = (k + 1) * m + j;
      xr[b] -= lr * xr[a] - li * xi[a];
      xi[b] -= lr * xi[a] + li * xr[a];
    }
  }
  for (let i = n - 1; i >= 0; i--) {
    const dr = mr[i * n + i];
    const di = mi[i * n + i];
    const den = dr * dr + di * di;
    for (let j = 0; j < m; j++) {
      let sr = xr[i * m + j];
      let si = xi[i * m + j];
      for (let k = i + 1; k < n; k++) {
        const ar = mr[i * n + k];
        const ai = mi[i * n + k];
        const yr = xr[k * m + j];
        const yi = xi[k * m + j];
        sr -= ar * yr - ai * yi;
        si -= ar * yi + ai * yr;
      }
      xr[i * m + j] = (sr * dr + si * di) / den;
      xi[i * m + j] = (si * dr - sr * di) / den;
    }
  }
  return { re: xr, im: xi };
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

/** An evaluator on a given Hessenberg form A = Q H Qᵀ: the per-frequency work is O(n²·m). */
export function hessenbergEvaluator(model: StateSpaceModel, form: HessenbergForm): FrequencyEvaluator {
  const Qt = transpose(form.Q);
  const F = matmul(Qt, model.B);
  const CQ = matmul(model.C, form.Q);
  return {
    form: 'hessenberg',
    at(w: number): ComplexMatrix {
      const x = solveShiftedHessenberg(form.H, w, F);
      return outputMap(CQ, model.D, x.re, x.im);
    },
  };
}

/** The evaluator for a model: a one-time transform, then cheap evaluations at any frequency. */
export function frequencyEvaluator(model: StateSpaceModel): FrequencyEvaluator {
  if (model.A.rows === 0) {
    const im = zeros(model.D.rows, model.D.cols);
    return { form: 'static', at: () => ({ re: model.D, im }) };
  }
  return hessenbergEvaluator(model, hessenberg(model.A));
}

export interface FrequencyResponse {
  /** Frequencies in rad per time unit. */
  readonly w: Float64Array;
  /** G(jω) per frequency, p×m. */
  readonly H: readonly ComplexMatrix[];
}

export function frequencyResponse(model: StateSpaceModel, w: ArrayLike<number>): FrequencyResponse {
  const evaluator = frequencyEvaluator(model);
  const freqs = Float64Array.from(w);
  return { w: freqs, H: Array.from(freqs, (wk) => evaluator.at(wk)) };
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
  readonly w: Float64Array;
  /** magnitude[i][j][k]: |G_ij(jω_k)| (output i, input j). */
  readonly magnitude: Float64Array[][];
  /** Phase in degrees, unwrapped along the grid so a curve has no 360° jumps. */
  readonly phaseDegrees: Float64Array[][];
  /** Largest singular value of G(jω_k). */
  readonly largestSingularValue: Float64Array;
}

/** Magnitude and unwrapped phase per input→output channel and σ_max per frequency. */
export function bodeData(model: StateSpaceModel, w: ArrayLike<number>): BodeData {
  const response = frequencyResponse(model, w);
  const p = model.D.rows;
  const m = model.D.cols;
  const K = response.w.length;
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
        const re = response.H[k].re.data[i * m + j];
        const im = response.H[k].im.data[i * m + j];
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
    w: response.w,
    magnitude,
    phaseDegrees,
    largestSingularValue: Float64Array.from(response.H, (h) => largestSingularValue(h)),
  };
}
