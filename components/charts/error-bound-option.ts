/**
 * Option builder for the error against its bound: the error magnitude |G - Gr|(jω) (or σmax of the error
 * system for MIMO) over a log frequency axis, under the a-priori bound drawn as a line with the admissible
 * region below it shaded. An acceptance band, when set, is drawn as a dashed rectangle from the axis floor
 * to its maximum error over its frequency range, and the verdict of `acceptanceVerdict` is written as the
 * chart title in words (PASS / FAIL / NOT CHECKED); its colour only repeats the word.
 */
import { acceptanceVerdict, type AcceptanceBand } from './acceptance';
import { axisInk, baseOption, plotGrid, escapeHtml, legendBox, tooltipBox } from './chart-base';
import { formatFrequency, formatNumber, frequencyUnit } from './format';
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
  readonly acceptance?: AcceptanceBand;
  readonly timeUnit?: string;
}

const CHART = 'ErrorBoundChart';
export const DEFAULT_ERROR_LABEL = '|G - Gr|';
export const DEFAULT_BOUND_LABEL = 'a-priori bound';
export const ACCEPTANCE_LABEL = 'acceptance band';

export function buildErrorBoundOption(
  data: ErrorBoundChartData,
  theme: ChartTheme = DEFAULT_CHART_THEME,
): ChartOption {
  const w = data.frequencies;
  requireGrid(CHART, 'frequencies', w, true);
  if (w.length === 0) throw new ChartDataError(CHART, 'frequencies', 'must hold at least one frequency');
  requireSameLength(CHART, 'frequencies', w, 'error', data.error);
  requireNonNegative(CHART, 'error', data.error);
  const timeUnit = data.timeUnit ?? 's';
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
  const verdict = data.acceptance ? acceptanceVerdict(w, data.error, data.acceptance, timeUnit) : undefined;

  const yRange = decadeRange([...data.error, ...(boundValues ?? []), ...(data.acceptance ? [data.acceptance.maxError] : [])]) ?? {
    min: 1e-6,
    max: 1,
  };
  const xRange = decadeRange([...w, ...(data.acceptance ? [data.acceptance.minFrequency, data.acceptance.maxFrequency] : [])])!;
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
  if (data.acceptance && verdict) {
    const a = data.acceptance;
    const color = verdict.status === 'pass' ? VERDICT_COLORS.pass : verdict.status === 'fail' ? VERDICT_COLORS.fail : VERDICT_COLORS.notCovered;
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

  const verdictColor =
    verdict?.status === 'pass' ? VERDICT_COLORS.pass : verdict?.status === 'fail' ? VERDICT_COLORS.fail : VERDICT_COLORS.notCovered;
  return {
    ...baseOption(theme, `Error magnitude over frequency against its bound.${verdict ? ' ' + verdict.text : ''}`),
    ...(verdict
      ? {
          title: {
            text: verdict.text,
            left: 80,
            top: 22,
            textStyle: { color: verdictColor, fontFamily: theme.fontMono, fontSize: 12, fontWeight: 'bold' as const },
          },
        }
      : {}),
    legend: legendBox(theme),
    grid: plotGrid({ top: verdict ? 56 : 40, bottom: 52 }),
    tooltip: {
      ...tooltipBox(theme),
      trigger: 'axis',
      formatter: (params: unknown) => {
        const list = params as { seriesName: string; value: [number, number | null] }[];
        if (list.length === 0) return '';
        const lines = [formatFrequency(list[0].value[0], timeUnit)];
        for (const p of list) lines.push(`${escapeHtml(p.seriesName)} ${p.value[1] === null ? '—' : formatNumber(p.value[1])}`);
        return lines.join('<br/>');
      },
    },
    xAxis: {
      ...ink,
      type: 'log',
      min: xRange.min,
      max: xRange.max,
      name: `frequency ω (${frequencyUnit(timeUnit)})`,
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
