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

/** Work arrays for `solveShiftedHessenberg`, reusable across frequencies of one evaluator. */
export interface HessenbergWorkspace {
  readonly mr: Float64Array;
  readonly mi: Float64Array;
  readonly xr: Float64Array;
  readonly xi: Float64Array;
}

export function hessenbergWorkspace(n: number, m: number): HessenbergWorkspace {
  return {
    mr: new Float64Array(n * n),
    mi: new Float64Array(n * n),
    xr: new Float64Array(n * m),
    xi: new Float64Array(n * m),
  };
}

/**
 * Solve (jωI − H) X = F for upper Hessenberg H and real right-hand sides F (n×m), by Gaussian elimination
 * with adjacent-row partial pivoting (Golub & Van Loan 2013, ch. 4); O(n²) for the elimination and
 * O(n²·m) for back substitution. Returns X as (re, im), each n×m row-major, in the workspace's arrays
 * (overwritten by the next call with the same workspace).
 */
export function solveShiftedHessenberg(
  H: Matrix,
  w: number,
  F: Matrix,
  work: HessenbergWorkspace = hessenbergWorkspace(H.rows, F.cols),
): { re: Float64Array; im: Float64Array } {
  const n = H.rows;
  const m = F.cols;
  const { mr, mi, xr, xi } = work;
  const h = H.data;
  // M = jωI − H on and above the subdiagonal; entries below it are never read.
  for (let i = 0; i < n; i++) {
    const row = i * n;
    for (let j = i === 0 ? 0 : i - 1; j < n; j++) {
      mr[row + j] = -h[row + j];
      mi[row + j] = 0;
    }
    mi[row + i] = w;
  }
  xr.set(F.data);
  xi.fill(0);
  for (let k = 0; k < n - 1; k++) {
    const rk = k * n;
    const rs = rk + n;
    if (Math.abs(mr[rs + k]) + Math.abs(mi[rs + k]) > Math.abs(mr[rk + k]) + Math.abs(mi[rk + k])) {
      for (let j = k; j < n; j++) {
        let t = mr[rk + j];
        mr[rk + j] = mr[rs + j];
        mr[rs + j] = t;
        t = mi[rk + j];
        mi[rk + j] = mi[rs + j];
        mi[rs + j] = t;
      }
      for (let j = 0; j < m; j++) {
        const a = k * m + j;
        const b = a + m;
        let t = xr[a];
        xr[a] = xr[b];
        xr[b] = t;
        t = xi[a];
        xi[a] = xi[b];
        xi[b] = t;
      }
    }
    const sr = mr[rs + k];
    const si = mi[rs + k];
    if (sr === 0 && si === 0) continue;
    // l = M[k+1][k] / M[k][k]
    const pr = mr[rk + k];
    const pi = mi[rk + k];
    const den = pr * pr + pi * pi;
    const lr = (sr * pr + si * pi) / den;
    const li = (si * pr - sr * pi) / den;
    mr[rs + k] = 0;
    mi[rs + k] = 0;
    for (let j = k + 1; j < n; j++) {
      const ar = mr[rk + j];
      const ai = mi[rk + j];
      mr[rs + j] -= lr * ar - li * ai;
      mi[rs + j] -= lr * ai + li * ar;
    }
    for (let j = 0; j < m; j++) {
      const a = k * m + j;
      const ar = xr[a];
      const ai = xi[a];
      xr[a + m] -= lr * ar - li * ai;
      xi[a + m] -= lr * ai + li * ar;
    }
  }
  // Back substitution row by row: x_i = (f_i − Σ_{k>i} M_ik x_k) / M_ii, all m columns at once.
  for (let i = n - 1; i >= 0; i--) {
    const row = i * n;
    const xo = i * m;
    for (let k = i + 1; k < n; k++) {
      const ar = mr[row + k];
      const ai = mi[row + k];
      const ko = k * m;
      for (let j = 0; j < m; j++) {
        const yr = xr[ko + j];
        const yi = xi[ko + j];
        xr[xo + j] -= ar * yr - ai * yi;
        xi[xo + j] -= ar * yi + ai * yr;
      }
    }
    const dr = mr[row + i];
    const di = mi[row + i];
    const den = dr * dr + di * di;
    for (let j = 0; j < m; j++) {
      const sr = xr[xo + j];
      const si = xi[xo + j];
      xr[xo + j] = (sr * dr + si * di) / den;
      xi[xo + j] = (si * dr - sr * di) / den;
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
  const work = hessenbergWorkspace(form.H.rows, F.cols);
  return {
    form: 'hessenberg',
    at(w: number): ComplexMatrix {
      const x = solveShiftedHessenberg(form.H, w, F, work);
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
