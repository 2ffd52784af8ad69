/**
 * ‖G‖∞ of a large sparse model from below: the largest σ_max(G(iω)) over a frequency grid and candidate
 * frequencies (the imaginary parts of dominant poles, where lightly damped modes peak), then each of the
 * highest local maxima refined by golden-section search on log ω between its grid neighbours (J. Kiefer,
 * "Sequential minimax search for a maximum", Proc. AMS 4, 1953). G(iω) = C (iωE − A)⁻¹ B + D costs one
 * numeric complex UMFPACK factorization on one symbolic analysis of the union pattern of A and E and m
 * solves. The result is a value G attains, so a lower bound on ‖G‖∞; nothing here certifies that no
 * higher peak lies between the frequencies tried (the dense path's Hamiltonian test does that).
 */
import { zeros } from '../linalg/index';
import { largestSingularValue, logFrequencyGrid, type ComplexMatrix } from '../frequency';
import { SparseLu } from '../linalg/sparse';
import { throwIfStopped, type StopSignal } from '../stop';
import { checkFactorBudget } from './budget';
import { shiftPattern, shiftedValues, type ShiftPattern, type SparseStateSpaceModel } from './model';

/** G(iω) of a sparse model, one numeric factorization per frequency on one kept symbolic analysis. */
export class SparseFrequencyEvaluator {
  private readonly sp: ShiftPattern;
  private lu: SparseLu | null = null;
  private readonly bCols: Float64Array[] = [];
  evaluations = 0;

  constructor(
    private readonly model: SparseStateSpaceModel,
    private readonly memoryBudgetBytes = Infinity,
  ) {
    this.sp = shiftPattern(model.A, model.E);
    const { B } = model, n = model.A.n, m = B.cols;
    for (let c = 0; c < m; c++) {
      const v = new Float64Array(n);
      for (let i = 0; i < n; i++) v[i] = B.data[i * m + c];
      this.bCols.push(v);
    }
  }

  at(w: number): ComplexMatrix {
    const { C, D } = this.model;
    const n = this.model.A.n, m = this.model.B.cols, p = C.rows;
    const { values, imag } = shiftedValues(this.sp, 0, w === 0 ? Number.MIN_VALUE : w);
    const im0 = imag ?? new Float64Array(values.length);
    if (!this.lu) {
      this.lu = SparseLu.analyze({ ...this.sp.pattern, values, imag: im0 }, 'A − iωE');
      checkFactorBudget(this.lu, this.memoryBudgetBytes, 'A − iωE');
    }
    this.lu.factor(values, im0);
    this.evaluations++;
    const gr = zeros(p, m), gi = zeros(p, m);
    for (let c = 0; c < m; c++) {
      // (iωE − A) x = b  ⇔  (A − iωE) x = −b
      const { re, im } = this.lu.solveComplex(this.bCols[c], null);
      for (let r = 0; r < p; r++) {
        let sr = 0, si = 0;
        const off = r * n;
        for (let i = 0; i < n; i++) {
          sr += C.data[off + i] * re[i];
          si += C.data[off + i] * im[i];
        }
        gr.data[r * m + c] = D.data[r * m + c] - sr;
        gi.data[r * m + c] = -si;
      }
    }
    return { re: gr, im: gi };
  }

  dispose(): void {
    this.lu?.dispose();
    this.lu = null;
  }
}

/**
 * A logarithmic sweep grid from the model's pole magnitudes: a decade below the slowest |λ| to the fastest
 * (at most six decades past the slowest, at least one): where a stable model's gain varies.
 */
export function sweepGridFromPoles(slowest: number, fastest: number, points: number): Float64Array {
  const hi0 = Number.isFinite(fastest) && fastest > 0 ? fastest : 1;
  const lo0 = Number.isFinite(slowest) && slowest > 0 ? slowest : hi0 * 1e-3;
  const lo = lo0 / 10, hi = Math.min(Math.max(hi0, lo0 * 10), lo0 * 1e6);
  return logFrequencyGrid(lo, hi, Math.max(2, points));
}

export interface HInfinityLowerBound {
  /** The largest σ_max(G(iω)) found: a lower bound on ‖G‖∞. */
  readonly value: number;
  readonly frequency: number;
  /** Frequencies evaluated (each one numeric factorization). */
  readonly evaluations: number;
  /** The local maxima of σ_max over the grid and candidates, highest first (before refinement). */
  readonly peaks: readonly number[];
}

/**
 * The sweep and refinement of the file header. `grid` ascending (ω ≥ 0); `candidates` are added to it;
 * `refine` local maxima (highest first) get `refineSteps` golden-section steps each.
 */
export function hInfinityLowerBound(
  model: SparseStateSpaceModel,
  options: {
    readonly grid: ArrayLike<number>;
    readonly candidates?: readonly number[];
    readonly refine?: number;
    readonly refineSteps?: number;
    readonly memoryBudgetBytes?: number;
    readonly signal?: StopSignal;
  },
): HInfinityLowerBound {
  const asked = [...Array.from(options.grid), ...(options.candidates ?? [])].filter((w) => Number.isFinite(w) && w >= 0);
  asked.sort((a, b) => a - b);
  const ws: number[] = [];
  for (const w of asked) if (ws.length === 0 || w > ws[ws.length - 1] * (1 + 1e-12)) ws.push(w);
  const ev = new SparseFrequencyEvaluator(model, options.memoryBudgetBytes);
  try {
    const sigma = (w: number) => {
      throwIfStopped(options.signal, 'the H∞ sweep');
      return largestSingularValue(ev.at(w));
    };
    const s = ws.map(sigma);
    let best = 0, bestW = NaN;
    for (let k = 0; k < s.length; k++) if (s[k] > best) [best, bestW] = [s[k], ws[k]];
    // Local maxima, highest first.
    const peaks: number[] = [];
    for (let k = 0; k < s.length; k++) {
      const l = k === 0 ? -Infinity : s[k - 1], r = k === s.length - 1 ? -Infinity : s[k + 1];
      if (s[k] >= l && s[k] >= r) peaks.push(k);
    }
    peaks.sort((a, b) => s[b] - s[a]);
    const steps = options.refineSteps ?? 14;
    const g = (Math.sqrt(5) - 1) / 2;
    for (const k of peaks.slice(0, options.refine ?? 2)) {
      const lo = k > 0 ? ws[k - 1] : ws[k] / 2, hi = k < ws.length - 1 ? ws[k + 1] : ws[k] * 2;
      if (!(lo > 0 && hi > lo)) continue;
      // Golden-section search for a maximum of σ_max on t = log ω in [log lo, log hi].
      let a = Math.log(lo), b = Math.log(hi);
      let x1 = b - g * (b - a), x2 = a + g * (b - a);
      let f1 = sigma(Math.exp(x1)), f2 = sigma(Math.exp(x2));
      for (let it = 0; it < steps; it++) {
        if (f1 >= f2) {
          b = x2;
          x2 = x1;
          f2 = f1;
          x1 = b - g * (b - a);
          f1 = sigma(Math.exp(x1));
        } else {
          a = x1;
          x1 = x2;
          f1 = f2;
          x2 = a + g * (b - a);
          f2 = sigma(Math.exp(x2));
        }
        for (const [f, x] of [[f1, x1], [f2, x2]]) if (f > best) [best, bestW] = [f, Math.exp(x)];
      }
    }
    return { value: best, frequency: bestW, evaluations: ev.evaluations, peaks: peaks.map((k) => ws[k]) };
  } finally {
    ev.dispose();
  }
}
