/**
 * Modal figures of a pole as the pole map and the modes table show them. For λ = σ + jω:
 *   natural frequency ωn = |λ|, damping ratio ζ = -σ/|λ|, time constant τ = 1/|σ|
 * (the standard second-order parametrisation λ = -ζωn ± jωn√(1-ζ²); G. F. Franklin, J. D. Powell and
 * A. Emami-Naeini, "Feedback Control of Dynamic Systems", §3.3, cited from memory). For a growing pole
 * (σ > 0) τ is the e-folding growth time and `growing` is set; for σ = 0 it is infinite.
 *
 * The engine reports its own stable/marginal/unstable split; `classifyPoles` is only the fallback when a
 * page has poles without that split, and follows the same idea: a pole is marginal when |Re λ| is within
 * a relative tolerance of the spectral radius, because rounding in the eigenvalue solver scales with ‖A‖
 * (common practice).
 */
import { ChartDataError, powerOfTen, requireFinite, requireSameLength } from './series-checks';

export type PoleStability = 'stable' | 'marginal' | 'unstable';

export interface ModalFigures {
  readonly naturalFrequency: number;
  /** NaN for λ = 0, where damping is undefined */
  readonly dampingRatio: number;
  readonly timeConstant: number;
  readonly growing: boolean;
}

export function modalFigures(re: number, im: number): ModalFigures {
  const naturalFrequency = Math.hypot(re, im);
  return {
    naturalFrequency,
    dampingRatio: naturalFrequency > 0 ? -re / naturalFrequency : NaN,
    timeConstant: re === 0 ? Infinity : 1 / Math.abs(re),
    growing: re > 0,
  };
}

export const DEFAULT_STABILITY_TOLERANCE = 1e-9;

export function classifyPoles(
  re: readonly number[],
  im: readonly number[],
  relativeTolerance = DEFAULT_STABILITY_TOLERANCE,
): PoleStability[] {
  requireSameLength('classifyPoles', 're', re, 'im', im);
  requireFinite('classifyPoles', 're', re);
  requireFinite('classifyPoles', 'im', im);
  if (!(relativeTolerance >= 0)) {
    throw new ChartDataError('classifyPoles', 'relativeTolerance', `must be a non-negative number (got ${relativeTolerance})`);
  }
  let radius = 0;
  for (let i = 0; i < re.length; i++) radius = Math.max(radius, Math.hypot(re[i], im[i]));
  const threshold = relativeTolerance * radius;
  return re.map((r) => (Math.abs(r) <= threshold ? 'marginal' : r < 0 ? 'stable' : 'unstable'));
}

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
