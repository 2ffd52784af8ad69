/**
 * The absolute error between a full and a reduced time response. Adaptive solvers put their output points
 * where they like, so the reduced response is interpolated linearly onto the full model's time points;
 * where the grids agree (the engine's dense output at given times) no interpolation happens. Full-model
 * points outside the reduced response's time span get no error value (null), never an extrapolated one.
 */
import { ChartDataError, requireFinite, requireGrid, requireSameLength } from './series-checks';

export interface TimeSeries {
  /** time points in the model's time unit, strictly increasing */
  readonly t: readonly number[];
  /** one output's values at those points */
  readonly y: readonly number[];
}

export function checkTimeSeries(chart: string, field: string, s: TimeSeries): void {
  if (!s || !Array.isArray(s.t) || !Array.isArray(s.y)) {
    throw new ChartDataError(chart, field, 'must be { t: number[], y: number[] }');
  }
  requireGrid(chart, `${field}.t`, s.t, false);
  requireSameLength(chart, `${field}.t`, s.t, `${field}.y`, s.y);
  requireFinite(chart, `${field}.y`, s.y);
}

export function interpolateLinear(t: readonly number[], y: readonly number[], at: number): number | null {
  const n = t.length;
  if (n === 0 || at < t[0] || at > t[n - 1]) return null;
  let lo = 0;
  let hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (t[mid] <= at) lo = mid;
    else hi = mid;
  }
  if (t[lo] === at || lo === hi) return y[lo];
  if (t[hi] === at) return y[hi];
  const s = (at - t[lo]) / (t[hi] - t[lo]);
  return y[lo] + s * (y[hi] - y[lo]);
}

export function absoluteErrorOnGrid(full: TimeSeries, reduced: TimeSeries): (number | null)[] {
  checkTimeSeries('absoluteErrorOnGrid', 'full', full);
  checkTimeSeries('absoluteErrorOnGrid', 'reduced', reduced);
  return full.t.map((ti, i) => {
    const yr = interpolateLinear(reduced.t, reduced.y, ti);
    return yr === null ? null : Math.abs(full.y[i] - yr);
  });
}

/** Largest error and where it occurs; null when no point has an error value. */
export function peakError(t: readonly number[], error: readonly (number | null)[]): { t: number; error: number } | null {
  let best: { t: number; error: number } | null = null;
  error.forEach((e, i) => {
    if (e !== null && (best === null || e > best.error)) best = { t: t[i], error: e };
  });
  return best;
}
