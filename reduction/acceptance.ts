/**
 * The verdict of an acceptance band: the controller team's demand that the error magnitude
 * σmax(G(jω) − Gr(jω)) stay at or below `maxError` over the frequencies [minFrequency, maxFrequency].
 * One pure function, run by the worker on the error curve it computed; the stored verdict is what the
 * comparison chart, the review sheet, the exports and the pull API show.
 *
 * The check runs on the sampled error curve. Every sample inside the band counts, and where a band edge
 * falls between two samples the error there is interpolated linearly in log ω (the grids are log-spaced),
 * so a band edge is never skipped. Verdicts:
 *   - fail: some checked point exceeds maxError (the limit is inclusive), even when the band is only
 *     partly covered: a measured excess is a failure wherever the rest of the band lies;
 *   - not-checked: no point failed, but the band reaches beyond the computed frequencies (or no sample
 *     falls in it), so passing cannot be claimed;
 *   - pass: the computed frequencies cover the band and every checked point is within maxError.
 * A peak between samples can be missed; the worker samples the band densely and adds the H∞ error's
 * peak frequency to the grid (lib/engine-tasks/reduction-task.ts).
 */
import { ModelError } from './errors';

export interface AcceptanceBand {
  /** rad per model time unit, > 0 (the check interpolates in log ω) */
  readonly minFrequency: number;
  readonly maxFrequency: number;
  /** largest allowed error magnitude, same unit as the error curve (a gain) */
  readonly maxError: number;
}

export type AcceptanceStatus = 'pass' | 'fail' | 'not-checked';

export interface AcceptanceVerdict {
  readonly status: AcceptanceStatus;
  /** largest error among the checked points (null when no point lies in the band) */
  readonly worstError: number | null;
  readonly worstFrequency: number | null;
  /** maxError − worstError: positive is headroom, negative the excess */
  readonly margin: number | null;
  /** grid samples in the band plus interpolated band edges */
  readonly pointsChecked: number;
  /** first and last computed frequency (null for an empty grid) */
  readonly computedRange: readonly [number, number] | null;
}

/** Throws ModelError naming `band.minFrequency`, `band.maxFrequency` or `band.maxError` when the band is not a band. */
export function checkAcceptanceBand(band: AcceptanceBand): void {
  const { minFrequency, maxFrequency, maxError } = band;
  if (!Number.isFinite(minFrequency) || minFrequency <= 0) {
    throw new ModelError('invalid_option', 'band.minFrequency', `band.minFrequency must be a positive finite frequency (got ${minFrequency})`);
  }
  if (!Number.isFinite(maxFrequency) || maxFrequency <= minFrequency) {
    throw new ModelError('invalid_option', 'band.maxFrequency', `band.maxFrequency must be finite and above band.minFrequency (got ${maxFrequency})`);
  }
  if (!Number.isFinite(maxError) || maxError <= 0) {
    throw new ModelError('invalid_option', 'band.maxError', `band.maxError must be a positive finite error (got ${maxError})`);
  }
}

function checkCurve(frequencies: ArrayLike<number>, error: ArrayLike<number>): void {
  if (frequencies.length !== error.length) {
    throw new ModelError('dimension_mismatch', 'error', `error must have as many entries as frequencies (${frequencies.length}), got ${error.length}`);
  }
  for (let i = 0; i < frequencies.length; i++) {
    const w = frequencies[i];
    if (!Number.isFinite(w) || w <= 0) throw new ModelError('invalid_option', 'frequencies', `frequencies must be positive finite numbers (entry ${i} is ${w})`);
    if (i > 0 && !(w > frequencies[i - 1])) throw new ModelError('invalid_option', 'frequencies', `frequencies must be strictly increasing (entry ${i} is ${w})`);
    const e = error[i];
    if (!Number.isFinite(e) || e < 0) throw new ModelError('non_finite', 'error', `error must hold finite non-negative numbers (entry ${i} is ${e})`);
  }
}

/** The error at `at` strictly between two samples, linear in log ω; null outside the sampled range or on a sample. */
function interpolateLogFrequency(w: ArrayLike<number>, err: ArrayLike<number>, at: number): number | null {
  for (let i = 0; i + 1 < w.length; i++) {
    if (w[i] < at && at < w[i + 1]) {
      const s = Math.log(at / w[i]) / Math.log(w[i + 1] / w[i]);
      return err[i] + s * (err[i + 1] - err[i]);
    }
  }
  return null;
}

/** The verdict of `band` on the error curve sampled at `frequencies` (see the file header). */
export function acceptanceVerdict(frequencies: ArrayLike<number>, error: ArrayLike<number>, band: AcceptanceBand): AcceptanceVerdict {
  checkCurve(frequencies, error);
  checkAcceptanceBand(band);
  const { minFrequency: w1, maxFrequency: w2, maxError } = band;
  const n = frequencies.length;
  const computedRange = n > 0 ? ([frequencies[0], frequencies[n - 1]] as const) : null;

  const points: [number, number][] = [];
  for (let i = 0; i < n; i++) {
    if (frequencies[i] >= w1 && frequencies[i] <= w2) points.push([frequencies[i], error[i]]);
  }
  for (const edge of [w1, w2]) {
    const e = interpolateLogFrequency(frequencies, error, edge);
    if (e !== null) points.push([edge, e]);
  }
  if (points.length === 0) {
    return { status: 'not-checked', worstError: null, worstFrequency: null, margin: null, pointsChecked: 0, computedRange };
  }
  let [worstFrequency, worstError] = points[0];
  for (const [wi, ei] of points) {
    if (ei > worstError) [worstFrequency, worstError] = [wi, ei];
  }
  const covered = computedRange !== null && computedRange[0] <= w1 && computedRange[1] >= w2;
  const status = worstError > maxError ? 'fail' : covered ? 'pass' : 'not-checked';
  return { status, worstError, worstFrequency, margin: maxError - worstError, pointsChecked: points.length, computedRange };
}
