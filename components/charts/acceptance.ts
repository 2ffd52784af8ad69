/**
 * The pass/fail of an acceptance band: the controller team's demand that the error magnitude stay at or
 * below `maxError` over the frequency range [minFrequency, maxFrequency].
 *
 * The check runs on the sampled error curve. Where a band edge falls between two samples the error there
 * is interpolated linearly in log ω (the grids are log-spaced), so a band edge is never skipped. A band
 * that reaches beyond the sampled range cannot pass: the verdict is then "not covered" unless a sample
 * already fails. A peak between samples can be missed; the page should hand in a grid that is dense in
 * the band (the engine's H∞ peak frequency added to it, for instance).
 */
import { formatFrequency, formatNumber } from './format';
import { ChartDataError, requireGrid, requireNonNegative, requireSameLength } from './series-checks';

export interface AcceptanceBand {
  /** rad per model time unit */
  readonly minFrequency: number;
  readonly maxFrequency: number;
  /** largest allowed error magnitude, same unit as the error curve */
  readonly maxError: number;
}

export type AcceptanceStatus = 'pass' | 'fail' | 'not-covered';

export interface AcceptanceVerdict {
  readonly status: AcceptanceStatus;
  /** largest error found in the band (null when no sample lies in it) */
  readonly worstError: number | null;
  readonly worstFrequency: number | null;
  /** maxError - worstError: positive is headroom, negative the excess */
  readonly margin: number | null;
  /** grid samples in the band plus interpolated band edges */
  readonly samplesChecked: number;
  readonly text: string;
}

const CHART = 'acceptanceVerdict';

export function checkAcceptanceBand(chart: string, band: AcceptanceBand): void {
  const { minFrequency, maxFrequency, maxError } = band;
  if (!Number.isFinite(minFrequency) || minFrequency <= 0) {
    throw new ChartDataError(chart, 'band.minFrequency', `must be a positive finite frequency (got ${minFrequency})`);
  }
  if (!Number.isFinite(maxFrequency) || maxFrequency <= minFrequency) {
    throw new ChartDataError(chart, 'band.maxFrequency', `must be finite and above band.minFrequency (got ${maxFrequency})`);
  }
  if (!Number.isFinite(maxError) || maxError <= 0) {
    throw new ChartDataError(chart, 'band.maxError', `must be a positive finite error (got ${maxError})`);
  }
}

function interpolateLogFrequency(w: readonly number[], err: readonly number[], at: number): number | null {
  for (let i = 0; i + 1 < w.length; i++) {
    if (w[i] < at && at < w[i + 1]) {
      const s = Math.log(at / w[i]) / Math.log(w[i + 1] / w[i]);
      return err[i] + s * (err[i + 1] - err[i]);
    }
  }
  return null;
}

export function acceptanceVerdict(
  frequencies: readonly number[],
  error: readonly number[],
  band: AcceptanceBand,
  timeUnit = 's',
): AcceptanceVerdict {
  requireGrid(CHART, 'frequencies', frequencies, true);
  requireSameLength(CHART, 'frequencies', frequencies, 'error', error);
  requireNonNegative(CHART, 'error', error);
  checkAcceptanceBand(CHART, band);
  const { minFrequency: w1, maxFrequency: w2, maxError } = band;

  const points: [number, number][] = [];
  for (let i = 0; i < frequencies.length; i++) {
    if (frequencies[i] >= w1 && frequencies[i] <= w2) points.push([frequencies[i], error[i]]);
  }
  for (const edge of [w1, w2]) {
    const e = interpolateLogFrequency(frequencies, error, edge);
    if (e !== null) points.push([edge, e]);
  }

  const range = `${formatNumber(w1)}–${formatFrequency(w2, timeUnit)}`;
  const n = frequencies.length;
  const covered = n > 0 && frequencies[0] <= w1 && frequencies[n - 1] >= w2;
  if (points.length === 0) {
    return {
      status: 'not-covered',
      worstError: null,
      worstFrequency: null,
      margin: null,
      samplesChecked: 0,
      text: `NOT CHECKED: no error sample lies in the band ${range}`,
    };
  }
  let [worstFrequency, worstError] = points[0];
  for (const [wi, ei] of points) {
    if (ei > worstError) [worstFrequency, worstError] = [wi, ei];
  }
  const margin = maxError - worstError;
  const at = `${formatNumber(worstError)} at ${formatFrequency(worstFrequency, timeUnit)}`;
  const common = { worstError, worstFrequency, margin, samplesChecked: points.length };
  if (worstError > maxError) {
    return { ...common, status: 'fail', text: `FAIL: error ${at} exceeds ${formatNumber(maxError)} in the band ${range}` };
  }
  if (!covered) {
    const sampled = `${formatNumber(frequencies[0])}–${formatFrequency(frequencies[n - 1], timeUnit)}`;
    return {
      ...common,
      status: 'not-covered',
      text: `NOT CHECKED: the error was computed over ${sampled}, the band is ${range}`,
    };
  }
  return { ...common, status: 'pass', text: `PASS: largest error ${at} is within ${formatNumber(maxError)} over ${range}` };
}
