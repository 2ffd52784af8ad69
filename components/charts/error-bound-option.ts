/**
 * Option builder for the error against its bound: the error magnitude |G - Gr|(jω) (or σmax of the error
 * system for MIMO) over a log frequency axis, under the a-priori bound drawn as a line with the admissible
 * region below it shaded. An acceptance band, when set, is drawn as a dashed rectangle from the axis floor
 * to its maximum error over its frequency range, coloured by the stored verdict (decided by the worker,
 * lib/acceptance.ts; never recomputed here), with a pin on the worst error when it failed. The verdict's
 * sentence is written once, by ErrorBoundChart, inside the chart's frame above the plot area: `grid.top`
 * leaves that row free.
 */
import type { StoredAcceptance } from '@/lib/acceptance';
import { axisInk, baseOption, plotGrid, escapeHtml, legendBox, tooltipBox } from './chart-base';
import { formatFrequency, formatNumber, frequencyUnit } from '@/lib/format';
import type { ChartOption, LineSeriesOption } from './option-types';
import { ChartDataError, decadeRange, requireGrid, requireNonNegative, requireSameLength } from './series-checks';
import { BOUND_LINE, DEFAULT_CHART_THEME, INK, OKABE_ITO, VERDICT_COLORS, type ChartTheme } from './theme';

export interface ErrorBoundChartData {
  readonly frequencies: readonly number[];
  /** error magnitude per frequency, absolute gain */
  readonly error: readonly number[];
  /** a-priori bound: one number (an H∞ bound holds at every frequency) or one value per frequency */
  readonly bound?: number | readonly number[];
  readonly boundLabel?: string;
  readonly errorLabel?: string;
  /** the stored verdict of the recipe's acceptance band, with the band itself */
  readonly acceptance?: StoredAcceptance;
  readonly timeBase?: string;
}

const CHART = 'ErrorBoundChart';
export const DEFAULT_ERROR_LABEL = '|G - Gr|';
export const DEFAULT_BOUND_LABEL = 'a-priori bound';
export const ACCEPTANCE_LABEL = 'acceptance band';
/** Top of the plot area: the legend, then a row for the verdict's sentence when a band is set (pixels). */
export const PLOT_TOP = 40;
export const PLOT_TOP_WITH_VERDICT = 72;

/** The band of a stored verdict, when the report kept it. */
function bandOf(v: StoredAcceptance | undefined): { minFrequency: number; maxFrequency: number; maxError: number } | null {
  return v && v.minFrequency !== null && v.maxFrequency !== null && v.maxError !== null && v.minFrequency > 0
    ? { minFrequency: v.minFrequency, maxFrequency: v.maxFrequency, maxError: v.maxError }
    : null;
}

export function buildErrorBoundOption(
  data: ErrorBoundChartData,
  theme: ChartTheme = DEFAULT_CHART_THEME,
): ChartOption {
  const w = data.frequencies;
  requireGrid(CHART, 'frequencies', w, true);
  if (w.length === 0) throw new ChartDataError(CHART, 'frequencies', 'must hold at least one frequency');
  requireSameLength(CHART, 'frequencies', w, 'error', data.error);
  requireNonNegative(CHART, 'error', data.error);
  const timeBase = data.timeBase ?? 's';
  const errorLabel = data.errorLabel ?? DEFAULT_ERROR_LABEL;
  const boundLabel = data.boundLabel ?? DEFAULT_BOUND_LABEL;

  let boundValues: number[] | null = null;
  if (typeof data.bound === 'number') {
    requireNonNegative(CHART, 'bound', [data.bound]);
    boundValues = w.map(() => data.bound as number);
  } else if (data.bound) {
    requireSameLength(CHART, 'frequencies', w, 'bound', data.bound);
    requireNonNegative(CHART, 'bound', data.bound);
    boundValues = [...data.bound];
  }
  const verdict = data.acceptance;
  const band = bandOf(verdict);

  const yRange = decadeRange([...data.error, ...(boundValues ?? []), ...(band ? [band.maxError] : [])]) ?? {
    min: 1e-6,
    max: 1,
  };
  const xRange = decadeRange([...w, ...(band ? [band.minFrequency, band.maxFrequency] : [])])!;
  const ink = axisInk(theme);

  const series: LineSeriesOption[] = [];
  if (boundValues) {
    // A constant bound is drawn edge to edge of the axis; a per-frequency bound along the grid.
    const points: [number, number | null][] =
      typeof data.bound === 'number'
        ? [
            [xRange.min, data.bound > 0 ? data.bound : null],
            [xRange.max, data.bound > 0 ? data.bound : null],
          ]
        : w.map((x, i) => [x, boundValues![i] > 0 ? boundValues![i] : null]);
    series.push({
      type: 'line',
      name: boundLabel,
      data: points,
      showSymbol: false,
      symbol: 'none',
      lineStyle: { ...BOUND_LINE },
      itemStyle: { color: BOUND_LINE.color },
      // opacity 1: the band's alpha is in INK.tealBand (ECharts would otherwise scale it by 0.7)
      areaStyle: { color: INK.tealBand, origin: 'start', opacity: 1 },
      z: 1,
    });
  }
  const errorSeries: LineSeriesOption = {
    type: 'line',
    name: errorLabel,
    data: w.map((x, i) => [x, data.error[i] > 0 ? data.error[i] : null]),
    showSymbol: false,
    symbol: 'none',
    lineStyle: { color: OKABE_ITO.blue, type: 'solid', width: 1.6 },
    itemStyle: { color: OKABE_ITO.blue },
    sampling: 'lttb',
    z: 3,
  };
  if (verdict && band) {
    const a = band;
    const color = VERDICT_COLORS[verdict.status];
    errorSeries.markArea = {
      silent: true,
      itemStyle: { color: 'rgba(0, 0, 0, 0)', borderColor: color, borderWidth: 1.5, borderType: 'dashed' },
      label: { show: true, position: 'insideTop', formatter: `${ACCEPTANCE_LABEL} ≤ ${formatNumber(a.maxError)}`, color, fontFamily: theme.fontMono },
      data: [[{ coord: [a.minFrequency, yRange.min] }, { coord: [a.maxFrequency, a.maxError] }]],
    };
    if (verdict.status === 'fail' && verdict.worstFrequency !== null && verdict.worstError !== null) {
      errorSeries.markPoint = {
        silent: true,
        symbol: 'pin',
        symbolSize: 28,
        itemStyle: { color: VERDICT_COLORS.fail },
        label: { show: true, formatter: '!', color: INK.paper },
        data: [{ name: 'worst error in band', coord: [verdict.worstFrequency, verdict.worstError] }],
      };
    }
  }
  series.push(errorSeries);

  return {
    ...baseOption(theme, 'Error magnitude over frequency against its bound.'),
    legend: legendBox(theme),
    grid: plotGrid({ top: verdict ? PLOT_TOP_WITH_VERDICT : PLOT_TOP, bottom: 52 }),
    tooltip: {
      ...tooltipBox(theme),
      trigger: 'axis',
      formatter: (params: unknown) => {
        const list = params as { seriesName: string; value: [number, number | null] }[];
        if (list.length === 0) return '';
        const lines = [formatFrequency(list[0].value[0], timeBase)];
        for (const p of list) lines.push(`${escapeHtml(p.seriesName)} ${p.value[1] === null ? '—' : formatNumber(p.value[1])}`);
        return lines.join('<br/>');
      },
    },
    xAxis: {
      ...ink,
      type: 'log',
      min: xRange.min,
      max: xRange.max,
      name: `frequency ω (${frequencyUnit(timeBase)})`,
      nameGap: 28,
      axisLabel: { ...ink.axisLabel, formatter: (v: number) => formatNumber(v, { significant: 2 }) },
    },
    yAxis: {
      ...ink,
      type: 'log',
      min: yRange.min,
      max: yRange.max,
      name: 'error magnitude (gain)',
      nameGap: 52,
      axisLabel: { ...ink.axisLabel, formatter: (v: number) => formatNumber(v, { significant: 2 }) },
    },
    dataZoom: [{ type: 'inside', xAxisIndex: 0, filterMode: 'none' }],
    series,
  };
}
