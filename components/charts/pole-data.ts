/**
 * Axis helpers of the pole map. The modal figures of a pole and the stable / marginal / unstable rule with
 * its tolerance are the engine's (reduction/poles.ts), shared with the worker and the modes table.
 */
import { powerOfTen } from './series-checks';

/**
 * Symmetric-log transform for axes that span many decades on both sides of zero: linear inside
 * |x| ≤ c, logarithmic outside, continuous at ±c, one unit per decade so integer ticks fall on c, 10c,
 * 100c, … A linear-near-zero log scale is common practice for such data; this exact mapping is our own
 * choice, written out here so the axis labels can invert it.
 */
export function symlog(x: number, c: number): number {
  const a = Math.abs(x);
  return a <= c ? x / c : Math.sign(x) * (1 + Math.log10(a / c));
}

export function symlogInverse(u: number, c: number): number {
  const a = Math.abs(u);
  return a <= 1 ? u * c : Math.sign(u) * c * 10 ** (a - 1);
}

/**
 * Linear threshold: the largest power of ten not above the smallest non-zero |value|, so every non-zero
 * value falls in the logarithmic part and only exact zeros (rigid-body modes, real poles) sit on the axis.
 */
export function symlogThreshold(values: readonly number[]): number {
  let smallest = Infinity;
  for (const v of values) {
    const a = Math.abs(v);
    if (a > 0 && a < smallest) smallest = a;
  }
  if (smallest === Infinity) return 1;
  let c = powerOfTen(Math.floor(Math.log10(smallest)));
  if (c > smallest) c /= 10;
  return c;
}
