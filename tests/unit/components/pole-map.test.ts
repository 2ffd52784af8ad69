import { describe, expect, it } from 'vitest';
import {
  buildPoleMapOption,
  POLE_SYMBOL,
  poleTooltipLines,
  type PoleMapData,
} from '@/components/charts/pole-map-option';
import { symlog, symlogInverse, symlogThreshold } from '@/components/charts/pole-data';
import { INK } from '@/components/charts/theme';

type AnySeries = { name: string; symbol: string; data: [number, number, number][]; itemStyle: { color: string; borderColor: string }; markLine?: { data: { xAxis: number }[] } };
type AnyAxis = { type: string; min?: number; max?: number; interval?: number; name: string; axisLabel: { formatter: (v: number) => string } };

function seriesOf(data: PoleMapData): AnySeries[] {
  return buildPoleMapOption(data).series as unknown as AnySeries[];
}

describe('symmetric-log transform', () => {
  it('is linear inside the threshold and one unit per decade outside', () => {
    expect(symlog(0.5, 1)).toBeCloseTo(0.5, 15);
    expect(symlog(1, 1)).toBe(1);
    expect(symlog(10, 1)).toBeCloseTo(2, 15);
    expect(symlog(-1000, 1)).toBeCloseTo(-4, 14);
    expect(symlog(0.03, 0.01)).toBeCloseTo(1 + Math.log10(3), 14);
  });

  it('is inverted exactly by symlogInverse', () => {
    for (const x of [-12345, -1, -0.3, 0, 0.04, 7, 8.5e6]) {
      expect(symlogInverse(symlog(x, 0.1), 0.1)).toBeCloseTo(x, 6);
    }
  });

  it('puts the threshold at the power of ten below the smallest non-zero magnitude', () => {
    expect(symlogThreshold([-0.034, -250, 0])).toBe(0.01);
    expect(symlogThreshold([0, 0])).toBe(1);
    expect(symlogThreshold([-1000])).toBe(1000);
  });
});

describe('buildPoleMapOption', () => {
  const poles: PoleMapData = {
    re: [-1000, -1, -0.5, -0.5, 0, 0.2],
    im: [0, 0, 12.3, -12.3, 0, 0],
  };

  it('shows stability by marker shape: circle, diamond, triangle', () => {
    const series = seriesOf(poles);
    expect(series.map((s) => [s.name, s.symbol])).toEqual([
      ['stable', 'circle'],
      ['marginal', 'diamond'],
      ['unstable', 'triangle'],
    ]);
    expect(POLE_SYMBOL).toEqual({ stable: 'circle', marginal: 'diamond', unstable: 'triangle' });
    expect(series[0].data.map((p) => p[2])).toEqual([0, 1, 2, 3]);
  });

  it('uses the engine split when one is given', () => {
    const series = seriesOf({ ...poles, stability: ['stable', 'stable', 'stable', 'stable', 'stable', 'marginal'] });
    expect(series.map((s) => s.name)).toEqual(['stable', 'marginal']);
    expect(() => seriesOf({ ...poles, stability: ['stable'] })).toThrow(/stability/);
  });

  it('draws kept modes filled and truncated modes hollow, each in its own legend entry', () => {
    const series = seriesOf({ ...poles, kept: [false, true, true, true, true, true] });
    const names = series.map((s) => s.name);
    expect(names).toEqual(['stable, kept', 'stable, truncated', 'marginal, kept', 'unstable, kept']);
    const truncated = series[1];
    expect(truncated.data.map((p) => p[2])).toEqual([0]);
    expect(truncated.itemStyle.color).toBe(INK.paper);
    expect(series[0].itemStyle.color).not.toBe(INK.paper);
    expect(truncated.itemStyle.borderColor).toBe(series[0].itemStyle.color);
  });

  it('marks the stability boundary Re λ = 0', () => {
    expect(seriesOf(poles)[0].markLine?.data).toEqual([{ xAxis: 0 }]);
  });

  it('keeps plain value axes in the linear view', () => {
    const option = buildPoleMapOption(poles);
    const x = option.xAxis as unknown as AnyAxis;
    expect(x.type).toBe('value');
    expect(x.interval).toBeUndefined();
    expect(x.name).toBe('Re λ (1/s)');
    expect(seriesOf(poles)[0].data[0].slice(0, 2)).toEqual([-1000, 0]);
  });

  it('uses symmetric-log axes with decade ticks labelled in real units when asked', () => {
    const option = buildPoleMapOption({ ...poles, scale: 'symlog' });
    const x = option.xAxis as unknown as AnyAxis;
    const y = option.yAxis as unknown as AnyAxis;
    // smallest non-zero |Re| is 0.2 → threshold 0.1; -1000 → -(1 + log10(1e4)) = -5
    expect(x).toMatchObject({ type: 'value', min: -5, max: 2, interval: 1 });
    expect(x.name).toContain('symmetric log');
    expect(x.axisLabel.formatter(-5)).toBe('-1000');
    expect(x.axisLabel.formatter(-1)).toBe('-0.1');
    expect(x.axisLabel.formatter(0)).toBe('0');
    expect(seriesOf({ ...poles, scale: 'symlog' })[0].data[0][0]).toBeCloseTo(-5, 12);
    // Im: smallest non-zero 12.3 → threshold 10; 12.3 → 1 + log10(1.23)
    expect(y.min).toBe(-2);
    expect(y.max).toBe(2);
    expect(y.axisLabel.formatter(2)).toBe('100');
  });

  it('writes the pole, ωn, ζ and τ with units in the tooltip', () => {
    expect(poleTooltipLines(-3, 4, 'stable', true)).toEqual([
      'λ = -3 + 4j',
      'ωn = 5\u00a0rad/s',
      'ζ = 0.6',
      'τ = 0.333\u00a0s',
      'stable, kept',
    ]);
    expect(poleTooltipLines(0.5, 0, 'unstable', undefined, 'h')[3]).toBe('τ = 2\u00a0h (growth)');
    expect(poleTooltipLines(0, 0, 'marginal', undefined)[3]).toBe('τ = ∞');
    const option = buildPoleMapOption(poles);
    const formatter = (option.tooltip as { formatter: (p: unknown) => string }).formatter;
    expect(formatter({ value: [-0.5, 12.3, 2] })).toContain('ωn = 12.3\u00a0rad/s');
  });

  it('shows an empty state for a model without poles', () => {
    const option = buildPoleMapOption({ re: [], im: [] });
    expect((option.title as { text: string }).text).toBe('No poles to show');
    expect(option.series).toEqual([]);
  });

  it('rejects bad input with the field named', () => {
    expect(() => buildPoleMapOption({ re: [1, 2], im: [0] })).toThrow(/PoleMap: im must have as many entries as re/);
    expect(() => buildPoleMapOption({ re: [Infinity], im: [0] })).toThrow(/PoleMap: re must hold finite numbers/);
    expect(() => buildPoleMapOption({ re: [-1], im: [0], kept: [] })).toThrow(/PoleMap: kept/);
  });
});
