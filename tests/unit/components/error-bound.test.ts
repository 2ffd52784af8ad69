import { describe, expect, it } from 'vitest';
import { acceptanceVerdict } from '@/components/charts/acceptance';
import { ACCEPTANCE_LABEL, buildErrorBoundOption, DEFAULT_BOUND_LABEL, DEFAULT_ERROR_LABEL } from '@/components/charts/error-bound-option';
import { INK, VERDICT_COLORS } from '@/components/charts/theme';

type Series = {
  name: string;
  data: [number, number | null][];
  areaStyle?: { color: string; origin: string };
  lineStyle: { color: string };
  markArea?: { data: [{ coord: [number, number] }, { coord: [number, number] }][]; itemStyle: { borderColor: string; borderType: string } };
  markPoint?: { data: { coord: [number, number] }[] };
};
type Axis = { type: string; min: number; max: number };

// Sampled error curve used throughout; every verdict below is worked out by hand.
const W = [1, 10, 100, 1000];
const ERR = [1e-4, 5e-4, 2e-3, 1e-2];

describe('acceptanceVerdict', () => {
  it('fails when a sample in the band exceeds the maximum error', () => {
    // samples in [1, 100]: 1e-4, 5e-4, 2e-3 → worst 2e-3 at 100 > 1e-3, margin -1e-3
    const v = acceptanceVerdict(W, ERR, { minFrequency: 1, maxFrequency: 100, maxError: 1e-3 });
    expect(v.status).toBe('fail');
    expect(v.worstError).toBe(2e-3);
    expect(v.worstFrequency).toBe(100);
    expect(v.margin).toBeCloseTo(-1e-3, 15);
    expect(v.samplesChecked).toBe(3);
    expect(v.text).toBe('FAIL: error 2e-3 at 100\u00a0rad/s exceeds 1e-3 in the band 1–100\u00a0rad/s');
  });

  it('interpolates the error at a band edge between samples (linear in log ω) and passes below the limit', () => {
    // edge 20 between 10 and 100: s = log10(2) = 0.30103, err = 5e-4 + 0.30103·(2e-3 - 5e-4) = 9.51545e-4 ≤ 1e-3
    const v = acceptanceVerdict(W, ERR, { minFrequency: 1, maxFrequency: 20, maxError: 1e-3 });
    expect(v.status).toBe('pass');
    expect(v.worstFrequency).toBe(20);
    expect(v.worstError!).toBeCloseTo(9.51545e-4, 9);
    expect(v.samplesChecked).toBe(3);
    expect(v.text.startsWith('PASS: largest error 9.52e-4 at 20\u00a0rad/s is within 1e-3')).toBe(true);
    // edge 50: s = log10(5) = 0.69897, err = 5e-4 + 0.69897·1.5e-3 = 1.548455e-3 > 1e-3
    const f = acceptanceVerdict(W, ERR, { minFrequency: 1, maxFrequency: 50, maxError: 1e-3 });
    expect(f.status).toBe('fail');
    expect(f.worstError!).toBeCloseTo(1.548455e-3, 9);
  });

  it('passes at exactly the maximum error (the limit is inclusive)', () => {
    expect(acceptanceVerdict(W, ERR, { minFrequency: 1, maxFrequency: 10, maxError: 5e-4 }).status).toBe('pass');
  });

  it('checks a band that lies between two samples through both interpolated edges', () => {
    // [2, 5] inside (1, 10): err(2) = 1e-4 + 0.30103·4e-4 = 2.20412e-4, err(5) = 1e-4 + 0.69897·4e-4 = 3.79588e-4
    const v = acceptanceVerdict(W, ERR, { minFrequency: 2, maxFrequency: 5, maxError: 1e-3 });
    expect(v.status).toBe('pass');
    expect(v.samplesChecked).toBe(2);
    expect(v.worstFrequency).toBe(5);
    expect(v.worstError!).toBeCloseTo(3.79588e-4, 9);
  });

  it('does not pass a band that reaches beyond the computed frequencies', () => {
    const v = acceptanceVerdict(W, ERR, { minFrequency: 0.1, maxFrequency: 10, maxError: 1e-3 });
    expect(v.status).toBe('not-covered');
    expect(v.text).toMatch(/^NOT CHECKED: the error was computed over 1–1000\u00a0rad\/s/);
    const none = acceptanceVerdict(W, ERR, { minFrequency: 2000, maxFrequency: 5000, maxError: 1 });
    expect(none).toMatchObject({ status: 'not-covered', samplesChecked: 0, worstError: null });
  });

  it('still fails a partly covered band when a covered sample exceeds the limit', () => {
    expect(acceptanceVerdict(W, ERR, { minFrequency: 0.1, maxFrequency: 10, maxError: 3e-4 }).status).toBe('fail');
  });

  it('rejects bad input with the field named', () => {
    expect(() => acceptanceVerdict(W, ERR, { minFrequency: 10, maxFrequency: 10, maxError: 1 })).toThrow(/band.maxFrequency/);
    expect(() => acceptanceVerdict(W, ERR, { minFrequency: 0, maxFrequency: 10, maxError: 1 })).toThrow(/band.minFrequency/);
    expect(() => acceptanceVerdict(W, ERR, { minFrequency: 1, maxFrequency: 10, maxError: 0 })).toThrow(/band.maxError/);
    expect(() => acceptanceVerdict(W, [1, 2, NaN, 3], { minFrequency: 1, maxFrequency: 10, maxError: 1 })).toThrow(/error must hold finite numbers \(entry 2/);
    expect(() => acceptanceVerdict(W, [1, 2], { minFrequency: 1, maxFrequency: 10, maxError: 1 })).toThrow(/error must have as many entries as frequencies/);
  });
});

describe('buildErrorBoundOption', () => {
  const band = { minFrequency: 1, maxFrequency: 100, maxError: 1e-3 };

  it('draws the bound as a line over a shaded band and the error on a log-log plot', () => {
    const option = buildErrorBoundOption({ frequencies: W, error: ERR, bound: 0.05 });
    const series = option.series as unknown as Series[];
    const bound = series.find((s) => s.name === DEFAULT_BOUND_LABEL)!;
    expect(bound.areaStyle).toEqual({ color: INK.tealBand, origin: 'start', opacity: 1 });
    expect(bound.lineStyle.color).toBe(INK.teal);
    // constant bound spans the whole axis
    expect(bound.data).toEqual([[1, 0.05], [1000, 0.05]]);
    expect(series.find((s) => s.name === DEFAULT_ERROR_LABEL)!.data).toHaveLength(4);
    expect((option.xAxis as unknown as Axis).type).toBe('log');
    expect(option.yAxis as unknown as Axis).toMatchObject({ type: 'log', min: 1e-4, max: 0.1 });
  });

  it('accepts a bound per frequency', () => {
    const option = buildErrorBoundOption({ frequencies: W, error: ERR, bound: [1, 1, 0.1, 0.1] });
    expect((option.series as unknown as Series[])[0].data).toEqual([[1, 1], [10, 1], [100, 0.1], [1000, 0.1]]);
    expect(() => buildErrorBoundOption({ frequencies: W, error: ERR, bound: [1] })).toThrow(/bound must have as many entries/);
  });

  it('draws the acceptance band as a rectangle up to its maximum error and writes the verdict', () => {
    const option = buildErrorBoundOption({ frequencies: W, error: ERR, bound: 0.05, acceptance: band });
    const err = (option.series as unknown as Series[]).find((s) => s.name === DEFAULT_ERROR_LABEL)!;
    expect(err.markArea!.data).toEqual([[{ coord: [1, 1e-4] }, { coord: [100, 1e-3] }]]);
    expect(err.markArea!.itemStyle).toMatchObject({ borderType: 'dashed', borderColor: VERDICT_COLORS.fail });
    expect(err.markPoint!.data[0].coord).toEqual([100, 2e-3]);
    const title = option.title as { text: string };
    expect(title.text.startsWith('FAIL')).toBe(true);
    expect(JSON.stringify(err.markArea)).toContain(ACCEPTANCE_LABEL);
  });

  it('writes PASS and no failure marker when the band is met', () => {
    const option = buildErrorBoundOption({ frequencies: W, error: ERR, acceptance: { ...band, maxError: 5e-3 } });
    expect((option.title as { text: string }).text.startsWith('PASS')).toBe(true);
    const err = (option.series as unknown as Series[])[0];
    expect(err.markPoint).toBeUndefined();
    expect(err.markArea!.itemStyle.borderColor).toBe(VERDICT_COLORS.pass);
  });

  it('leaves out the title when no band was set', () => {
    expect(buildErrorBoundOption({ frequencies: W, error: ERR }).title).toBeUndefined();
  });
});
