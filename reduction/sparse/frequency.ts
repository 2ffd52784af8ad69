/**
 * Frequency response of a large sparse model, G(iω) = C (iωE − A)⁻¹ B + D, by one complex sparse LU per
 * frequency (UMFPACK, `reduction/linalg/sparse.ts`) on the union pattern of A and E: one symbolic analysis
 * serves every frequency, each frequency costs a numeric factorization and m solves. Nothing forms E⁻¹A or
 * a dense n×n matrix.
 */
import { zeros } from '../linalg/index';
import type { StateSpaceModel } from '../model';
import { frequencyResponse, largestSingularValue, type ComplexMatrix } from '../frequency';
import { SparseLu } from '../linalg/sparse';
import { checkFactorBudget } from './budget';
import { shiftPattern, shiftedValues, type SparseStateSpaceModel } from './model';
import { throwIfStopped, type LoopHooks } from '../stop';

export interface SparseFrequencyResponse {
  /** Frequencies in rad per time unit. */
  readonly frequencies: Float64Array;
  /** G(iω) per frequency, p×m. */
  readonly response: ComplexMatrix[];
}

/** `hooks`: a stop flag looked at before each frequency, and a report after each (`done` of `total`). */
export function sparseFrequencyResponse(
  model: SparseStateSpaceModel,
  frequencies: ArrayLike<number>,
  memoryBudgetBytes = Infinity,
  hooks: LoopHooks<{ done: number; total: number }> = {},
): SparseFrequencyResponse {
  const { B, C, D } = model;
  const n = model.A.n, m = B.cols, p = C.rows;
  const sp = shiftPattern(model.A, model.E);
  const response: ComplexMatrix[] = [];
  let lu: SparseLu | null = null;
  const cols: Float64Array[] = [];
  for (let c = 0; c < m; c++) {
    const v = new Float64Array(n);
    for (let i = 0; i < n; i++) v[i] = B.data[i * m + c];
    cols.push(v);
  }
  try {
    for (let f = 0; f < frequencies.length; f++) {
      throwIfStopped(hooks.signal, 'the frequency sweep');
      const w = frequencies[f];
      // A − iωE (a tiny imaginary part at ω = 0 keeps the analysis complex for the frequencies after it).
      const { values, imag } = shiftedValues(sp, 0, w === 0 ? Number.MIN_VALUE : w);
      const im0 = imag ?? new Float64Array(values.length);
      if (!lu) {
        lu = SparseLu.analyze({ ...sp.pattern, values, imag: im0 }, 'A − iωE');
        checkFactorBudget(lu, memoryBudgetBytes, 'A − iωE');
      }
      lu.factor(values, im0);
      const gr = zeros(p, m), gi = zeros(p, m);
      for (let c = 0; c < m; c++) {
        // (iωE − A) x = b  ⇔  (A − iωE) x = −b
        const { re, im } = lu.solveComplex(cols[c], null);
        for (let r = 0; r < p; r++) {
          let sr = 0, si = 0;
          const off = r * n;
          for (let i = 0; i < n; i++) {
            sr += C.data[off + i] * re[i];
            si += C.data[off + i] * im[i];
          }
          gr.data[r * m + c] = -sr + D.data[r * m + c];
          gi.data[r * m + c] = -si;
        }
      }
      response.push({ re: gr, im: gi });
      hooks.onStep?.({ done: f + 1, total: frequencies.length });
    }
  } finally {
    lu?.dispose();
  }
  return { frequencies: Float64Array.from(frequencies), response };
}

/**
 * The largest error max_ω σ_max(G(iω) − Gr(iω)) over a frequency grid, the full model by sparse solves and
 * the reduced (dense, small) one by `reduction/frequency.ts`: a lower bound on ‖G − Gr‖∞.
 */
export function sampledErrorPeak(
  full: SparseStateSpaceModel | SparseFrequencyResponse,
  reduced: StateSpaceModel,
  frequencies: ArrayLike<number>,
  memoryBudgetBytes = Infinity,
): { value: number; frequency: number } {
  const g = 'response' in full ? full : sparseFrequencyResponse(full, frequencies, memoryBudgetBytes);
  if (g.frequencies.length !== frequencies.length || g.frequencies.some((w, k) => w !== frequencies[k])) {
    throw new Error('sampledErrorPeak: the frequencies differ from those of the given full-model response');
  }
  const gr = frequencyResponse(reduced, g.frequencies).response;
  let value = 0, frequency = NaN;
  for (let k = 0; k < g.frequencies.length; k++) {
    const gk = g.response[k];
    const d: ComplexMatrix = {
      re: { rows: gk.re.rows, cols: gk.re.cols, data: gk.re.data.map((x, i) => x - gr[k].re.data[i]) },
      im: { rows: gk.im.rows, cols: gk.im.cols, data: gk.im.data.map((x, i) => x - gr[k].im.data[i]) },
    };
    const s = largestSingularValue(d);
    if (s > value) {
      value = s;
      frequency = g.frequencies[k];
    }
  }
  return { value, frequency };
}
