/**
 * Frequency-limited balanced truncation (W. Gawronski & J.-N. Juang, "Model reduction in limited time and
 * frequency intervals", Int. J. Systems Sci. 21(2), 1990) of a large sparse model, in two steps:
 *
 *   1. low-rank square-root balanced truncation (`balanced.ts`) to every Hankel singular value the gramian
 *      factors resolve above 1e-12·σ₁ (at most 200): a small dense stable model Gk whose distance from the
 *      full model is at most 2Σσ(k+1..) — estimated, since the values past the factors' rank are not
 *      computed (Antoulas, "Approximation of Large-Scale Dynamical Systems", SIAM 2005, Theorem 7.9);
 *   2. the dense frequency-limited method on Gk (`../frequency-limited.ts`: the band gramians in closed form
 *      with the matrix logarithm) to the order asked.
 *
 * The reduced model is then within ‖G − Gk‖∞ of what the dense method would make of the full model's
 * intermediate; the step-1 tail is reported beside it. No a-priori bound applies to the method itself, so
 * the errors inside and outside the band are measured against the full model by sparse sweeps
 * (`frequency.ts`). This is a two-step scheme of ours on published pieces; the low-rank projection of
 * Benner, Kürschner & Saak (SIAM J. Sci. Comput. 38(5), 2016) computes the band gramians' factors directly
 * and would replace step 1 where the full model's Hankel singular values decay too slowly for it.
 */
import { ModelError } from '../errors';
import { largestSingularValue, logFrequencyGrid, frequencyResponse } from '../frequency';
import { BAND_ERRORS_MEASURED_NOTE, checkBand, frequencyLimitedTruncation, type Band } from '../frequency-limited';
import type { StateSpaceModel } from '../model';
import { lowRankGramians, type AdiOptions, type AdiResult } from './adi';
import { lowRankBalancedRealization, sparseBalancedReduction } from './balanced';
import { balancedErrorBound } from '../balanced';
import { sparseFrequencyResponse } from './frequency';
import type { SparseStateSpaceModel } from './model';

/** Hankel singular values below this share of σ₁ are left out of the intermediate model (a choice of ours). */
const INTERMEDIATE_RELATIVE_HSV = 1e-12;
const INTERMEDIATE_MAX_ORDER = 200;

export interface SparseFrequencyLimitedResult {
  readonly method: 'frequency-limited';
  readonly band: Band;
  readonly model: StateSpaceModel;
  readonly order: number;
  /** Order of the intermediate balanced model, and its estimated distance 2Σσ(k+1..) from the full model. */
  readonly intermediateOrder: number;
  readonly intermediateBound: number;
  /** Frequency-limited Hankel singular values of the intermediate model, descending. */
  readonly singularValues: Float64Array;
  /** Measured max σ_max(G − Gr) against the full model on log grids inside and outside the band. */
  readonly inBandError: number;
  readonly inBandErrorFrequency: number;
  readonly outOfBandError: number;
  readonly outOfBandErrorFrequency: number;
  readonly reducedStable: boolean;
  readonly gramians: AdiResult;
  readonly notes: readonly string[];
}

export interface SparseFrequencyLimitedOptions {
  readonly band: Band;
  readonly order: number;
  readonly adi?: AdiOptions;
  /** Points of each measuring grid, inside and outside the band (default 40). */
  readonly points?: number;
}

export function sparseFrequencyLimitedReduction(model: SparseStateSpaceModel, options: SparseFrequencyLimitedOptions): SparseFrequencyLimitedResult {
  const { band, order } = options;
  const points = options.points ?? 40;
  if (!Number.isInteger(order) || order < 1) throw new ModelError('invalid_option', 'order', `--order must be a whole number ≥ 1, got ${order}`);
  checkBand(band);
  const gramians = lowRankGramians(model, options.adi);
  // Step 1: the resolved Hankel singular values decide the intermediate order.
  const hsv = lowRankBalancedRealization(model, gramians).realization.hankelSingularValues;
  let k = 0;
  while (k < hsv.length && k < INTERMEDIATE_MAX_ORDER && hsv[k] > INTERMEDIATE_RELATIVE_HSV * hsv[0]) k++;
  if (order >= k) {
    throw new ModelError(
      'order_too_large',
      'order',
      `--order ${order} is not below the ${k} Hankel singular values the low-rank gramians resolve above 1e-12·σ₁; choose a smaller order`,
    );
  }
  const intermediate = sparseBalancedReduction(model, { method: 'balanced', order: k, adi: options.adi, gramians });
  const intermediateBound = balancedErrorBound(hsv, k);
  // Step 2: the dense method on the intermediate model.
  const fl = frequencyLimitedTruncation(intermediate.model, { band, order });
  const notes = [
    `${BAND_ERRORS_MEASURED_NOTE} against the full model`,
    `computed in two steps: low-rank balanced truncation to ${k} states (estimated distance ${intermediateBound.toExponential(2)} from the full model${
      k === hsv.length ? ': every Hankel singular value the factors resolve was kept, and those past them are not computed' : ''
    }), then frequency-limited balanced truncation of that model`,
    ...fl.notes.filter((n) => n !== BAND_ERRORS_MEASURED_NOTE),
  ];
  // Measured errors against the full model, by sparse sweeps on log grids inside and outside the band.
  const lo = band[0] > 0 ? band[0] : band[1] / 1e4;
  const inGrid = [...(band[0] > 0 ? [] : [0]), ...logFrequencyGrid(lo, band[1], points)];
  const outGrid = [...(band[0] > 0 ? Array.from(logFrequencyGrid(band[0] / 100, band[0], points)).slice(0, -1) : []), ...Array.from(logFrequencyGrid(band[1], band[1] * 100, points)).slice(1)];
  const grid = [...inGrid, ...outGrid];
  const full = sparseFrequencyResponse(model, grid, options.adi?.memoryBudgetBytes ?? Infinity).response;
  const reduced = frequencyResponse(fl.model, Float64Array.from(grid)).response;
  const peak = (from: number, to: number) => {
    let value = 0, at = NaN;
    for (let i = from; i < to; i++) {
      const d = {
        re: { ...full[i].re, data: full[i].re.data.map((x, e) => x - reduced[i].re.data[e]) },
        im: { ...full[i].im, data: full[i].im.data.map((x, e) => x - reduced[i].im.data[e]) },
      };
      const s = largestSingularValue(d);
      if (s > value) {
        value = s;
        at = grid[i];
      }
    }
    return { value, at };
  };
  const inside = peak(0, inGrid.length);
  const outside = peak(inGrid.length, grid.length);
  return {
    method: 'frequency-limited',
    band,
    model: fl.model,
    order: fl.order,
    intermediateOrder: k,
    intermediateBound,
    singularValues: fl.singularValues,
    inBandError: inside.value,
    inBandErrorFrequency: inside.at,
    outOfBandError: outside.value,
    outOfBandErrorFrequency: outside.at,
    reducedStable: fl.reducedStable,
    gramians,
    notes,
  };
}
