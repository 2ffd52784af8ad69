/**
 * Input checks shared by the chart option builders. Charts receive plain arrays from server components;
 * a wrong array must fail with a message that names the chart and the field, not draw a silent blank.
 */

export class ChartDataError extends Error {
  constructor(
    readonly chart: string,
    readonly field: string,
    problem: string,
  ) {
    super(`${chart}: ${field} ${problem}`);
    this.name = 'ChartDataError';
  }
}

export function requireFinite(chart: string, field: string, values: readonly number[]): void {
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      throw new ChartDataError(chart, field, `must hold finite numbers (entry ${i} is ${String(v)})`);
    }
  }
}

export function requireSameLength(
  chart: string,
  fieldA: string,
  a: readonly unknown[],
  fieldB: string,
  b: readonly unknown[],
): void {
  if (a.length !== b.length) {
    throw new ChartDataError(chart, fieldB, `must have as many entries as ${fieldA} (${b.length} vs ${a.length})`);
  }
}

/** Frequency or time grids: finite, strictly increasing, and for log axes strictly positive. */
export function requireGrid(chart: string, field: string, values: readonly number[], positive: boolean): void {
  requireFinite(chart, field, values);
  for (let i = 0; i < values.length; i++) {
    if (positive && values[i] <= 0) {
      throw new ChartDataError(chart, field, `must be positive for a log axis (entry ${i} is ${values[i]})`);
    }
    if (i > 0 && values[i] <= values[i - 1]) {
      throw new ChartDataError(chart, field, `must be strictly increasing (entry ${i} is not above entry ${i - 1})`);
    }
  }
}

export function requireNonNegative(chart: string, field: string, values: readonly number[]): void {
  requireFinite(chart, field, values);
  for (let i = 0; i < values.length; i++) {
    if (values[i] < 0) {
      throw new ChartDataError(chart, field, `must not be negative (entry ${i} is ${values[i]})`);
    }
  }
}

/**
 * 10^k as the correctly rounded double of the decimal 1ek (JS `10 ** -4` gives 0.00009999999999999999,
 * which would show in axis bounds and labels).
 */
export function powerOfTen(k: number): number {
  return Number(`1e${k}`);
}

/** Lowest and highest decades that hold every positive value; used to pin log axes so bands fill them. */
export function decadeRange(values: readonly number[]): { min: number; max: number } | null {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) {
    if (Number.isFinite(v) && v > 0) {
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
  }
  if (lo === Infinity) return null;
  let min = powerOfTen(Math.floor(Math.log10(lo)));
  let max = powerOfTen(Math.ceil(Math.log10(hi)));
  if (max <= min) max = min * 10;
  // 10 ** floor(log10(v)) can land a hair above v through rounding; step down a decade if so.
  if (min > lo) min /= 10;
  if (max < hi) max *= 10;
  return { min, max };
}
