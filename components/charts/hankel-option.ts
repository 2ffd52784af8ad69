/**
 * Option builder for the Hankel singular value chart: σi of the stable part on a log axis against index
 * i, the a-priori error bound against order r on the same axis (both are gains), and the cumulative energy
 * in % on a second axis. The chosen order r is a vertical marker; with σi plotted at i and the bound at r,
 * the bound at the marker is twice the sum of the values to its right.
 *
 * A large model has hundreds of values, most of them at rounding level (down to 1e-17·σ1), which would
 * squeeze the few that matter into the left edge. The chart therefore opens on the meaningful values: those
 * above the engine's rank tolerance σ1·1e-12 (reduction/hankel-figures.ts, numericalOrder), at most the
 * first OPENING_MAX_VALUES, always including the chosen order; a slider and the mouse wheel (dataZoom) show
 * the rest. The log axis reaches down to the smallest value in that view, or to the rounding floor σ1·n·ε
 * (common practice; reduction/hankel-figures.ts, roundingFloor), which is shaded and labelled: values
 * under it cannot be told from the rounding of the computation that produced them.
 *
 * Index and order here count states of the stable part only; the page adds the unstable and marginal
 * states it keeps exactly.
 */
import { numericalOrder, roundingFloor } from '@/reduction/hankel-figures';
import { axisInk, baseOption, plotGrid, emptyTitle, legendBox, tooltipBox } from './chart-base';
import { formatNumber, formatPercent } from '@/lib/format';
import { balancedTruncationBound, checkHankelSingularValues, cumulativeEnergy, type EnergyMeasure } from './hankel-data';
import type { ChartOption, LineSeriesOption } from './option-types';
import { ChartDataError, decadeRange, powerOfTen, requireNonNegative } from './series-checks';
import { BOUND_LINE, DEFAULT_CHART_THEME, INK, OKABE_ITO, type ChartTheme } from './theme';

export interface HankelChartData {
  readonly hankelSingularValues: readonly number[];
  /** number of stable states kept; draws the marker when given */
  readonly order?: number;
  /** bound per order r = 0..n as stored by the engine; computed as 2Σσ(r+1..n) when absent */
  readonly errorBound?: readonly number[];
  readonly energyMeasure?: EnergyMeasure;
}

const CHART = 'HankelChart';
export const HSV_SERIES = 'Hankel singular value σi';
export const BOUND_SERIES = 'error bound 2Σσ(r+1..n)';
export const ENERGY_SERIES = 'cumulative energy';

export const FLOOR_LABEL = 'rounding floor σ1·n·ε';
/** The opening view shows at most this many values (common practice for a readable index axis); zoom shows the rest. */
export const OPENING_MAX_VALUES = 100;

/**
 * The last index the chart opens on: the meaningful values (above σ1·1e-12), at most OPENING_MAX_VALUES,
 * and at least one past the chosen order so its marker and the next value show.
 */
export function openingView(hsv: readonly number[], order?: number): number {
  const n = hsv.length;
  let end = Math.min(Math.max(numericalOrder(hsv), 1), OPENING_MAX_VALUES);
  if (order !== undefined) end = Math.max(end, order + 1);
  return Math.min(end, n);
}

const decadeBelow = (v: number) => powerOfTen(Math.floor(Math.log10(v)));

/** The log axis of the opening view: its values set it; below the rounding floor only the floor's decade is kept. */
function logAxisOfView(hsv: readonly number[], bound: readonly number[], end: number) {
  const inView = [...hsv.slice(0, end), ...bound.slice(0, end)].filter((v) => v > 0);
  const range = decadeRange(inView)!;
  return { range, yMin: Math.max(range.min, decadeBelow(roundingFloor(hsv))) };
}

/** Whether the rounding floor lies above the bottom of the opening view's axis (and so is shaded). */
export function floorInView(hsv: readonly number[], order?: number, errorBound?: readonly number[]): boolean {
  if (hsv.length === 0 || !(hsv[0] > 0)) return false;
  const bound = errorBound ?? balancedTruncationBound(hsv);
  return roundingFloor(hsv) > logAxisOfView(hsv, bound, openingView(hsv, order)).yMin;
}

export function buildHankelOption(data: HankelChartData, theme: ChartTheme = DEFAULT_CHART_THEME): ChartOption {
  const hsv = data.hankelSingularValues;
  checkHankelSingularValues(CHART, hsv);
  const n = hsv.length;
  const bound = data.errorBound ? [...data.errorBound] : balancedTruncationBound(hsv);
  if (data.errorBound) {
    requireNonNegative(CHART, 'errorBound', bound);
    if (bound.length !== n + 1) {
      throw new ChartDataError(CHART, 'errorBound', `must hold one value per order 0..n (${n + 1} entries, got ${bound.length})`);
    }
  }
  if (data.order !== undefined && (!Number.isInteger(data.order) || data.order < 0 || data.order > n)) {
    throw new ChartDataError(CHART, 'order', `must be an integer from 0 to ${n} (got ${data.order})`);
  }
  const base = baseOption(theme, `Hankel singular values of ${n} stable states with cumulative energy and error bound.`);
  const ink = axisInk(theme);
  if (n === 0 || hsv[0] === 0) {
    return { ...base, title: emptyTitle(theme, 'No Hankel singular values (no stable, controllable and observable part)'), series: [] };
  }
  const energy = cumulativeEnergy(hsv, data.energyMeasure ?? 'squared');
  const end = openingView(hsv, data.order);
  const floor = roundingFloor(hsv);
  const { range, yMin } = logAxisOfView(hsv, bound, end);
  const positive = (v: number) => (v > 0 ? v : null);

  const hsvSeries: LineSeriesOption = {
    type: 'line',
    name: HSV_SERIES,
    yAxisIndex: 0,
    data: hsv.map((s, i) => [i + 1, positive(s)]),
    lineStyle: { color: INK.graphite, width: 1.2, type: 'solid' },
    itemStyle: { color: INK.graphite },
    symbol: 'circle',
    symbolSize: 5,
    showSymbol: n <= 200,
    connectNulls: false,
  };
  // Shaded only where the view reaches it; a floor under the axis needs no shade (the note below says so).
  if (floor > yMin) {
    hsvSeries.markArea = {
      silent: true,
      itemStyle: { color: INK.rule, opacity: 1 },
      label: { show: true, position: 'insideTopRight', formatter: `${FLOOR_LABEL} = ${formatNumber(floor)}`, color: INK.graphiteMuted, fontFamily: theme.fontMono, fontSize: 11 },
      data: [[{ yAxis: yMin }, { yAxis: floor }]],
    };
  }
  if (data.order !== undefined) {
    hsvSeries.markLine = {
      silent: true,
      symbol: 'none',
      lineStyle: { color: INK.teal, type: 'solid', width: 1.5 },
      label: {
        formatter: `r = ${data.order}, bound ${formatNumber(bound[data.order])}`,
        color: INK.teal,
        fontFamily: theme.fontMono,
        position: 'insideEndTop',
      },
      data: [{ xAxis: data.order }],
    };
  }
  const boundSeries: LineSeriesOption = {
    type: 'line',
    name: BOUND_SERIES,
    yAxisIndex: 0,
    data: bound.slice(0, n).map((b, r) => [r, positive(b)]),
    lineStyle: { ...BOUND_LINE },
    itemStyle: { color: BOUND_LINE.color },
    symbol: 'rect',
    symbolSize: 4,
    showSymbol: n <= 200,
  };
  const energySeries: LineSeriesOption = {
    type: 'line',
    name: ENERGY_SERIES,
    yAxisIndex: 1,
    data: energy.map((e, i) => [i + 1, e]),
    lineStyle: { color: OKABE_ITO.blue, type: 'dotted', width: 1.6 },
    itemStyle: { color: OKABE_ITO.blue },
    symbol: 'none',
  };

  return {
    ...base,
    legend: legendBox(theme),
    // Room for the legend's two rows at a narrow width.
    grid: plotGrid({ right: 64, top: 60, bottom: 76 }),
    tooltip: {
      ...tooltipBox(theme),
      trigger: 'axis',
      formatter: (params: unknown) => {
        const list = params as { axisValue?: number }[];
        const at = Math.round(Number(list[0]?.axisValue));
        return hankelTooltipLines(at, hsv, bound, energy).join('<br/>');
      },
    },
    dataZoom: [
      { type: 'inside', xAxisIndex: 0, filterMode: 'none', startValue: 0, endValue: end },
      {
        type: 'slider',
        xAxisIndex: 0,
        filterMode: 'none',
        startValue: 0,
        endValue: end,
        height: 16,
        bottom: 4,
        showDetail: false,
        borderColor: INK.rule,
        textStyle: { color: INK.graphite, fontFamily: theme.fontMono, fontSize: 11 },
      },
    ],
    xAxis: {
      ...ink,
      type: 'value',
      min: 0,
      max: n,
      minInterval: 1,
      name: 'index i / order r (stable states)',
      nameGap: 28,
      axisLabel: { ...ink.axisLabel, formatter: (v: number) => String(v) },
    },
    yAxis: [
      {
        ...ink,
        type: 'log',
        min: yMin,
        max: range.max,
        name: 'σi and bound (gain)',
        nameGap: 52,
        axisLabel: { ...ink.axisLabel, formatter: (v: number) => formatNumber(v, { significant: 2 }) },
      },
      {
        ...ink,
        type: 'value',
        min: 0,
        max: 100,
        interval: 20,
        name: 'cumulative energy (%)',
        nameGap: 40,
        splitLine: { show: false },
        axisLabel: { ...ink.axisLabel, formatter: (v: number) => `${v}` },
      },
    ],
    series: [hsvSeries, boundSeries, energySeries],
  };
}

/** Tooltip lines at order/index k: what keeping k stable states means. */
export function hankelTooltipLines(
  k: number,
  hsv: readonly number[],
  bound: readonly number[],
  energy: readonly number[],
): string[] {
  const lines = [`r = ${k}`];
  if (k >= 1 && k <= hsv.length) lines.push(`σ${k} = ${formatNumber(hsv[k - 1])}`);
  if (k >= 0 && k < bound.length) lines.push(`bound = ${formatNumber(bound[k])}`);
  lines.push(`energy kept = ${formatPercent(k >= 1 && k <= energy.length ? energy[k - 1] / 100 : 0)}`);
  return lines;
}
