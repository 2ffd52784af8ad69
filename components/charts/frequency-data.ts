/**
 * Magnitude and phase of a sampled frequency response G(jω) = re + j·im, for Bode plots.
 *
 * Phase is unwrapped along the frequency grid: each step is moved by a multiple of 360° so it changes by
 * at most 180° (a jump of exactly 180° is left alone), the rule of numpy.unwrap with its default
 * discontinuity π, applied in degrees. The reduced model's phase is then
 * shifted by a whole multiple of 360° so it starts within 180° of the full model's, so the two curves are
 * compared on the same branch.
 */
import { ChartDataError, requireFinite, requireSameLength } from './series-checks';

export interface ComplexSamples {
  readonly re: readonly number[];
  readonly im: readonly number[];
}

export function checkComplexSamples(chart: string, field: string, g: ComplexSamples, length: number): void {
  if (!g || !Array.isArray(g.re) || !Array.isArray(g.im)) {
    throw new ChartDataError(chart, field, 'must be { re: number[], im: number[] }');
  }
  requireSameLength(chart, `${field}.re`, g.re, `${field}.im`, g.im);
  if (g.re.length !== length) {
    throw new ChartDataError(chart, field, `must have one sample per frequency (${length}, got ${g.re.length})`);
  }
  requireFinite(chart, `${field}.re`, g.re);
  requireFinite(chart, `${field}.im`, g.im);
}

export function magnitude(g: ComplexSamples): number[] {
  return g.re.map((r, i) => Math.hypot(r, g.im[i]));
}

/** 20·log10|G|; zero gain has no decibel value and is returned as null (a gap in the curve). */
export function magnitudeDb(g: ComplexSamples): (number | null)[] {
  return magnitude(g).map((m) => (m > 0 ? 20 * Math.log10(m) : null));
}

export function unwrapDegrees(wrapped: readonly number[]): number[] {
  const out: number[] = [];
  let offset = 0;
  for (let i = 0; i < wrapped.length; i++) {
    if (i > 0) {
      const step = wrapped[i] + offset - out[i - 1];
      if (Math.abs(step) > 180) offset -= 360 * Math.round(step / 360);
    }
    out.push(wrapped[i] + offset);
  }
  return out;
}

export function phaseDegrees(g: ComplexSamples): number[] {
  return unwrapDegrees(g.re.map((r, i) => (Math.atan2(g.im[i], r) * 180) / Math.PI));
}

/** Moves `phase` by k·360° so its first sample is within 180° of `reference[0]`. */
export function alignPhase(phase: readonly number[], reference: readonly number[]): number[] {
  if (phase.length === 0 || reference.length === 0) return [...phase];
  const k = Math.round((reference[0] - phase[0]) / 360);
  return phase.map((p) => p + 360 * k);
}
