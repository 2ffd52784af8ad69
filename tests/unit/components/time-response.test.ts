import { describe, expect, it } from 'vitest';
import { buildTimeResponseOption, ERROR_SERIES, FULL_RESPONSE, REDUCED_RESPONSE } from '@/components/charts/time-response-option';
import { absoluteErrorOnGrid, interpolateLinear, peakError } from '@/components/charts/time-data';
import { INK } from '@/components/charts/theme';

type Series = { name: string; xAxisIndex: number; yAxisIndex: number; data: [number, number | null][]; lineStyle: { color: string; type: string }; markLine?: { data: { xAxis: number }[]; label: { formatter: string } } };
type Axis = { type: string; gridIndex: number; min?: number };

// Hand-computed case: full y = t on t = 0..3; reduced sampled at t = 0, 2, 4 with y = 0, 1.8, 4.
// Reduced interpolated at t = 1: 0.9; at t = 2: 1.8; at t = 3: 1.8 + (4 - 1.8)/2 = 2.9.
// Absolute errors: 0, 0.1, 0.2, 0.1.
const FULL = { t: [0, 1, 2, 3], y: [0, 1, 2, 3] };
const REDUCED = { t: [0, 2, 4], y: [0, 1.8, 4] };

describe('absolute error between responses on different time grids', () => {
  it('interpolates the reduced response linearly onto the full time points, computed by hand', () => {
    const e = absoluteErrorOnGrid(FULL, REDUCED);
    [0, 0.1, 0.2, 0.1].forEach((v, i) => expect(e[i]!).toBeCloseTo(v, 14));
    expect(peakError(FULL.t, e)).toEqual({ t: 2, error: expect.closeTo(0.2, 14) });
  });

  it('gives no error value outside the reduced response, never an extrapolated one', () => {
    expect(absoluteErrorOnGrid({ t: [0, 5], y: [0, 5] }, REDUCED)).toEqual([0, null]);
    expect(interpolateLinear([0, 1], [3, 4], -0.5)).toBeNull();
    expect(interpolateLinear([0, 1], [3, 4], 1)).toBe(4);
    expect(interpolateLinear([0, 1, 2], [3, 4, 10], 1.5)).toBe(7);
  });

  it('rejects unordered times or mismatched values with the field named', () => {
    expect(() => absoluteErrorOnGrid({ t: [0, 2, 1], y: [0, 0, 0] }, REDUCED)).toThrow(/full.t must be strictly increasing/);
    expect(() => absoluteErrorOnGrid(FULL, { t: [0, 1], y: [0] })).toThrow(/reduced.y must have as many entries as reduced.t/);
  });
});

describe('buildTimeResponseOption', () => {
  const option = buildTimeResponseOption({ kind: 'step', full: FULL, reduced: REDUCED, timeBase: 's' });
  const series = option.series as unknown as Series[];

  it('draws full solid graphite and reduced dashed teal on the upper grid', () => {
    const full = series.find((s) => s.name === FULL_RESPONSE)!;
    const red = series.find((s) => s.name === REDUCED_RESPONSE)!;
    expect(full).toMatchObject({ xAxisIndex: 0, yAxisIndex: 0 });
    expect(full.lineStyle).toMatchObject({ color: INK.graphite, type: 'solid' });
    expect(red.lineStyle).toMatchObject({ color: INK.teal, type: 'dashed' });
    expect(red.data).toEqual([[0, 0], [2, 1.8], [4, 4]]);
  });

  it('draws the absolute error on a second grid with its peak marked', () => {
    const err = series.find((s) => s.name === ERROR_SERIES)!;
    expect(err).toMatchObject({ xAxisIndex: 1, yAxisIndex: 1 });
    expect(err.markLine!.data).toEqual([{ xAxis: 2 }]);
    expect(err.markLine!.label.formatter).toBe('peak 0.2 at 2\u00a0s');
    expect((option.grid as unknown[]).length).toBe(2);
    expect((option.yAxis as unknown as Axis[])[1]).toMatchObject({ type: 'value', gridIndex: 1, min: 0 });
  });

  it('uses a log error axis when asked and drops exact zeros from it', () => {
    const log = buildTimeResponseOption({ kind: 'impulse', full: FULL, reduced: REDUCED, errorScale: 'log' });
    expect((log.yAxis as unknown as Axis[])[1].type).toBe('log');
    const err = (log.series as unknown as Series[]).find((s) => s.name === ERROR_SERIES)!;
    expect(err.data[0]).toEqual([0, null]);
  });

  it('draws one grid when there is no reduced response', () => {
    const alone = buildTimeResponseOption({ kind: 'step', full: FULL });
    expect((alone.series as unknown[]).length).toBe(1);
    expect((alone.grid as unknown[]).length).toBe(1);
  });
});
