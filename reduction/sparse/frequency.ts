/**
 * Frequency response of a large sparse model, G(iω) = C (iωE − A)⁻¹ B + D, by one complex sparse LU per
 * frequency (UMFPACK, `reduction/linalg/sparse.ts`) on the union pattern of A and E: one symbolic analysis
 * serves every frequency, each frequency costs a numeric factorization and m solves, and the frequencies
 * are spread over the cores (native threads sharing the analysis). Nothing forms E⁻¹A or a dense n×n
 * matrix.
 */
import { linalgThreads, zeros } from '../linalg/index';
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

/**
 * `hooks`: a stop flag looked at between batches of frequencies, and a report after each (`done` of
 * `total`). The frequencies of a batch are spread over the engine's threads (`linalgThreads()`,
 * MODESHELF_LINALG_THREADS), each with its own numeric factorization, as many as the memory budget allows.
 */
export function sparseFrequencyResponse(
  model: SparseStateSpaceModel,
  frequencies: ArrayLike<number>,
  memoryBudgetBytes = Infinity,
  hooks: LoopHooks<{ done: number; total: number }> = {},
): SparseFrequencyResponse {
  const { B, C, D } = model;
  const m = B.cols, p = C.rows;
  const w = Float64Array.from(frequencies);
  const response: ComplexMatrix[] = [];
  if (w.length === 0) return { frequencies: w, response };
  const sp = shiftPattern(model.A, model.E);
  // E on the union pattern: the imaginary part of A − iωE is −ω times it.
  const eValues = new Float64Array(sp.pattern.values.length);
  for (let q = 0; q < sp.eAt.length; q++) eValues[sp.eAt[q]] += sp.eValues[q];
  const first = shiftedValues(sp, 0, w[0] === 0 ? Number.MIN_VALUE : w[0]);
  const lu = SparseLu.analyze({ ...sp.pattern, values: first.values, imag: first.imag ?? new Float64Array(eValues.length) }, 'A − iωE');
  try {
    checkFactorBudget(lu, memoryBudgetBytes, 'A − iωE');
    const perFactor = lu.analysis.peakMemoryBytes;
    const threads = Math.max(1, Math.min(linalgThreads(), Number.isFinite(memoryBudgetBytes) && perFactor > 0 ? Math.floor(memoryBudgetBytes / perFactor) : Infinity));
    const batch = 2 * threads;
    const size = p * m;
    for (let from = 0; from < w.length; from += batch) {
      throwIfStopped(hooks.signal, 'the frequency sweep');
      const part = w.subarray(from, Math.min(w.length, from + batch));
      const out = { re: new Float64Array(part.length * size), im: new Float64Array(part.length * size) };
      lu.sweep(sp.pattern.values, eValues, part, B, C, out, threads);
      for (let f = 0; f < part.length; f++) {
        const gr = zeros(p, m), gi = zeros(p, m);
        for (let k = 0; k < size; k++) {
          gr.data[k] = out.re[f * size + k] + D.data[k];
          gi.data[k] = out.im[f * size + k];
        }
        response.push({ re: gr, im: gi });
      }
      hooks.onStep?.({ done: from + part.length, total: w.length });
    }
  } finally {
    lu.dispose();
  }
  return { frequencies: w, response };
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
