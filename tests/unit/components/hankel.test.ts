import { describe, expect, it } from 'vitest';
import { balancedTruncationBound, cumulativeEnergy } from '@/components/charts/hankel-data';
import { BOUND_SERIES, buildHankelOption, ENERGY_SERIES, floorInView, FLOOR_LABEL, hankelTooltipLines, HSV_SERIES, OPENING_MAX_VALUES, openingView } from '@/components/charts/hankel-option';
import { BOUND_LINE } from '@/components/charts/theme';

type Series = { name: string; yAxisIndex: number; data: [number, number | null][]; lineStyle: { color: string; type: string }; markLine?: { data: { xAxis: number }[]; label: { formatter: string } } };
type Axis = { type: string; min?: number; max?: number };

// A small list of Hankel singular values, figures computed by hand:
//   bound(r) = 2 Σ_{i>r} σi (Enns 1984; Glover 1984): r=0: 2·7.5 = 15, r=1: 2·3.5 = 7, r=2: 2·1.5 = 3, r=3: 2·0.5 = 1, r=4: 0
//   squared energy: σ² = 16, 4, 1, 0.25, total 21.25 → 16/21.25, 20/21.25, 21/21.25, 1
//   linear energy: 4/7.5, 6/7.5, 7/7.5, 1
const HSV = [4, 2, 1, 0.5];

describe('figures from Hankel singular values', () => {
  it('gives the balanced-truncation bound 2Σσ(r+1..n) for every order, computed by hand', () => {
    expect(balancedTruncationBound(HSV)).toEqual([15, 7, 3, 1, 0]);
    expect(balancedTruncationBound([])).toEqual([0]);
  });

  it('gives the cumulative energy of σ² in percent, computed by hand', () => {
    const e = cumulativeEnergy(HSV);
    const expected = [16 / 21.25, 20 / 21.25, 21 / 21.25, 1].map((f) => 100 * f);
    e.forEach((v, i) => expect(v).toBeCloseTo(expected[i], 12));
    expect(e[0]).toBeCloseTo(75.2941176, 6);
  });

  it('gives the linear share Σσ/Σσ when asked, computed by hand', () => {
    const e = cumulativeEnergy(HSV, 'linear');
    [53.3333333, 80, 93.3333333, 100].forEach((v, i) => expect(e[i]).toBeCloseTo(v, 6));
  });

  it('refuses values that are negative, not finite or out of order', () => {
    expect(() => cumulativeEnergy([1, -0.1])).toThrow(/hankelSingularValues must not be negative \(entry 1/);
    expect(() => balancedTruncationBound([1, 2])).toThrow(/non-increasing order \(entry 1 exceeds entry 0\)/);
    expect(() => balancedTruncationBound([NaN])).toThrow(/finite/);
  });
});

describe('buildHankelOption', () => {
  const option = buildHankelOption({ hankelSingularValues: HSV, order: 2 });
  const series = option.series as unknown as Series[];
  const yAxes = option.yAxis as unknown as Axis[];

  it('puts σ and the bound on a log axis and the energy on a 0–100 % axis', () => {
    expect(yAxes[0].type).toBe('log');
    expect(yAxes[1]).toMatchObject({ type: 'value', min: 0, max: 100 });
    const byName = Object.fromEntries(series.map((s) => [s.name, s]));
    expect(byName[HSV_SERIES].yAxisIndex).toBe(0);
    expect(byName[BOUND_SERIES].yAxisIndex).toBe(0);
    expect(byName[ENERGY_SERIES].yAxisIndex).toBe(1);
  });

  it('plots σi at index i and the bound at order r', () => {
    const byName = Object.fromEntries(series.map((s) => [s.name, s]));
    expect(byName[HSV_SERIES].data).toEqual([[1, 4], [2, 2], [3, 1], [4, 0.5]]);
    expect(byName[BOUND_SERIES].data).toEqual([[0, 15], [1, 7], [2, 3], [3, 1]]);
    expect(byName[BOUND_SERIES].lineStyle.color).toBe(BOUND_LINE.color);
  });

  it('draws the order marker at r with the bound there', () => {
    const marker = series.find((s) => s.markLine)!.markLine!;
    expect(marker.data).toEqual([{ xAxis: 2 }]);
    expect(marker.label.formatter).toBe('r = 2, bound 3');
    expect(buildHankelOption({ hankelSingularValues: HSV }).series).toSatisfy((s: Series[]) => s.every((x) => !x.markLine));
  });

  it('pins the log axis to whole decades around the data', () => {
    expect(yAxes[0].min).toBe(0.1);
    expect(yAxes[0].max).toBe(100);
  });

  it('uses the engine bound when one is stored', () => {
    const stored = buildHankelOption({ hankelSingularValues: HSV, errorBound: [9, 5, 2, 0.6, 0], order: 1 });
    const s = stored.series as unknown as Series[];
    expect(s.find((x) => x.name === BOUND_SERIES)!.data[1]).toEqual([1, 5]);
    expect(() => buildHankelOption({ hankelSingularValues: HSV, errorBound: [1, 2] })).toThrow(/errorBound must hold one value per order/);
  });

  it('leaves gaps for exact zeros rather than breaking the log axis', () => {
    const s = buildHankelOption({ hankelSingularValues: [1, 0] }).series as unknown as Series[];
    expect(s[0].data[1]).toEqual([2, null]);
  });

  it('rejects an order outside 0..n', () => {
    expect(() => buildHankelOption({ hankelSingularValues: HSV, order: 5 })).toThrow(/order must be an integer from 0 to 4/);
    expect(() => buildHankelOption({ hankelSingularValues: HSV, order: 1.5 })).toThrow(/order/);
  });

  it('shows an empty state without stable dynamics', () => {
    expect((buildHankelOption({ hankelSingularValues: [] }).title as { text: string }).text).toMatch(/No Hankel singular values/);
  });

  it('says in the tooltip what keeping r states means', () => {
    const energy = cumulativeEnergy(HSV, 'linear');
    expect(hankelTooltipLines(2, HSV, [15, 7, 3, 1, 0], energy)).toEqual(['r = 2', 'σ2 = 2', 'bound = 3', 'energy kept = 80\u00a0%']);
  });
});

describe('the opening view of a large model', () => {
  // 1000 values falling geometrically from 1 to 1e-17: σi = 10^(-17(i-1)/999). Above σ1·1e-12 are those with
  // 17(i-1)/999 < 12, i.e. i − 1 < 705.2: 706 values; the opening view keeps the first 100 of them.
  const n = 1000;
  const hsv = Array.from({ length: n }, (_, i) => 10 ** ((-17 * i) / (n - 1)));
  type Zoom = { type: string; startValue: number; endValue: number };
  type Area = { data: [{ yAxis: number }, { yAxis: number }][]; label: { formatter: string } };

  it('opens on the meaningful values, at most the first hundred, always showing the chosen order', () => {
    expect(openingView(hsv)).toBe(OPENING_MAX_VALUES);
    expect(openingView(hsv, 150)).toBe(151);
    // a small model whose values all matter: all of them
    expect(openingView([4, 2, 1, 0.5])).toBe(4);
    // values falling fast: σ3 = 1e-13 is under σ1·1e-12, so the view stops at 2
    expect(openingView([1, 1e-3, 1e-13, 1e-16])).toBe(2);
  });

  it('sets the zoom window and the log axis to that view, with a slider for the rest', () => {
    const option = buildHankelOption({ hankelSingularValues: hsv, order: 20 });
    const zoom = option.dataZoom as unknown as Zoom[];
    expect(zoom.map((z) => z.type)).toEqual(['inside', 'slider']);
    expect(zoom.every((z) => z.startValue === 0 && z.endValue === 100)).toBe(true);
    // σ100 = 10^(-17·99/999) = 10^-1.685, the bound near it is larger: the axis stops at the decade 1e-2, not 1e-17
    expect((option.yAxis as unknown as { min: number }[])[0].min).toBe(0.01);
    expect((option.xAxis as unknown as { max: number }).max).toBe(n);
  });

  it('shades the rounding floor σ1·n·ε and names it', () => {
    // values reaching below the floor in the opening view: σ1·n·ε = 1·4·2.2e-16 = 8.9e-16
    const deep = [1, 1e-5, 1e-11, 1e-17];
    const option = buildHankelOption({ hankelSingularValues: deep, order: 3 });
    const area = (option.series as unknown as (Series & { markArea?: Area })[])[0].markArea!;
    const floor = 4 * Number.EPSILON;
    expect(area.data[0][1].yAxis).toBe(floor);
    // the axis goes down to the floor's decade (1e-16), not to 1e-17
    expect((option.yAxis as unknown as { min: number }[])[0].min).toBe(1e-16);
    expect(area.data[0][0].yAxis).toBe(1e-16);
    expect(area.label.formatter).toBe(`${FLOOR_LABEL} = 8.88e-16`);
    expect(floorInView(deep, 3)).toBe(true);
  });

  it('leaves the floor unshaded when the view stops above it', () => {
    // the 1000 values' opening view ends near 1e-2, far above σ1·n·ε = 2.2e-13
    const option = buildHankelOption({ hankelSingularValues: hsv, order: 20 });
    expect((option.series as unknown as { markArea?: unknown }[])[0].markArea).toBeUndefined();
    expect(floorInView(hsv, 20)).toBe(false);
  });
});

