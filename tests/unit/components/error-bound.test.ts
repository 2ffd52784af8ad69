import { describe, expect, it } from 'vitest';
import type { StoredAcceptance } from '@/lib/acceptance';
import { ACCEPTANCE_LABEL, buildErrorBoundOption, DEFAULT_BOUND_LABEL, DEFAULT_ERROR_LABEL, PLOT_TOP, PLOT_TOP_WITH_VERDICT } from '@/components/charts/error-bound-option';
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

// Sampled error curve used throughout. The chart draws the verdict it is given (decided by the worker,
// reduction/acceptance.ts, tested in tests/unit/engine/acceptance.test.ts); it never decides one itself.
const W = [1, 10, 100, 1000];
const ERR = [1e-4, 5e-4, 2e-3, 1e-2];

describe('buildErrorBoundOption', () => {
  const band = { minFrequency: 1, maxFrequency: 100, maxError: 1e-3 };
  const stored = (status: StoredAcceptance['status'], maxError = 1e-3): StoredAcceptance => ({
    status,
    ...band,
    maxError,
    worstError: 2e-3,
    worstFrequency: 100,
    pointsChecked: 3,
    computedRange: [1, 1000],
  });

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

  it('draws the acceptance band as a rectangle up to its maximum error, coloured and pinned by the stored verdict', () => {
    const option = buildErrorBoundOption({ frequencies: W, error: ERR, bound: 0.05, acceptance: stored('fail') });
    const err = (option.series as unknown as Series[]).find((s) => s.name === DEFAULT_ERROR_LABEL)!;
    expect(err.markArea!.data).toEqual([[{ coord: [1, 1e-4] }, { coord: [100, 1e-3] }]]);
    expect(err.markArea!.itemStyle).toMatchObject({ borderType: 'dashed', borderColor: VERDICT_COLORS.fail });
    expect(err.markPoint!.data[0].coord).toEqual([100, 2e-3]);
    expect(JSON.stringify(err.markArea)).toContain(ACCEPTANCE_LABEL);
  });

  it('draws the stored verdict, not one of its own: a stored pass stays a pass on a curve that exceeds the band', () => {
    // ERR reaches 2e-3 inside [1, 100], above 1e-3; the chart still shows what the worker stored.
    const option = buildErrorBoundOption({ frequencies: W, error: ERR, acceptance: stored('pass') });
    const err = (option.series as unknown as Series[])[0];
    expect(err.markPoint).toBeUndefined();
    expect(err.markArea!.itemStyle.borderColor).toBe(VERDICT_COLORS.pass);
    expect(buildErrorBoundOption({ frequencies: W, error: ERR, acceptance: stored('not-checked') }).series).toSatisfy((s: Series[]) =>
      s.some((x) => x.markArea?.itemStyle.borderColor === VERDICT_COLORS['not-checked']),
    );
  });

  it('writes no verdict on the canvas (ErrorBoundChart writes it once, in the row kept free above the plot)', () => {
    const withBand = buildErrorBoundOption({ frequencies: W, error: ERR, acceptance: stored('fail') });
    expect(withBand.title).toBeUndefined();
    expect(JSON.stringify(withBand)).not.toMatch(/FAIL|PASS|NOT CHECKED/);
    expect((withBand.grid as { top: number }).top).toBe(PLOT_TOP_WITH_VERDICT);
    expect((buildErrorBoundOption({ frequencies: W, error: ERR }).grid as { top: number }).top).toBe(PLOT_TOP);
  });
});
