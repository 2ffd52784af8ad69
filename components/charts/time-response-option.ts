/**
 * Option builder for a time response of one output channel: full model solid graphite and reduced dashed
 * teal on the upper grid, the absolute error |y - yr| on the lower grid sharing the time axis (linear, or
 * log to see small errors across decades).
 */
import { axisInk, baseOption, plotGrid, escapeHtml, legendBox, tooltipBox } from './chart-base';
import { formatNumber, formatTime } from '@/lib/format';
import type { ChartOption, LineSeriesOption } from './option-types';
import { decadeRange } from './series-checks';
import { DEFAULT_CHART_THEME, FULL_LINE, OKABE_ITO, REDUCED_LINE, type ChartTheme } from './theme';
import { absoluteErrorOnGrid, checkTimeSeries, peakError, type TimeSeries } from './time-data';

export type ResponseKind = 'step' | 'impulse' | 'input';

export interface TimeResponseChartData {
  readonly kind: ResponseKind;
  readonly full: TimeSeries;
  readonly reduced?: TimeSeries;
  readonly timeBase?: string;
  /** e.g. "u1 → y2"; shown in the description */
  readonly channelLabel?: string;
  readonly errorScale?: 'linear' | 'log';
}

const CHART = 'TimeResponseChart';
export const FULL_RESPONSE = 'full model';
export const REDUCED_RESPONSE = 'reduced model';
export const ERROR_SERIES = '|y - yr|';

const KIND_WORDS: Record<ResponseKind, string> = {
  step: 'Step response',
  impulse: 'Impulse response',
  input: 'Response to the uploaded input',
};

function responseLine(which: 'full' | 'reduced', s: TimeSeries): LineSeriesOption {
  const style = which === 'full' ? FULL_LINE : REDUCED_LINE;
  return {
    type: 'line',
    name: which === 'full' ? FULL_RESPONSE : REDUCED_RESPONSE,
    xAxisIndex: 0,
    yAxisIndex: 0,
    data: s.t.map((t, i) => [t, s.y[i]]),
    showSymbol: false,
    symbol: 'none',
    lineStyle: { ...style },
    itemStyle: { color: style.color },
    sampling: 'lttb',
  };
}

export function buildTimeResponseOption(data: TimeResponseChartData, theme: ChartTheme = DEFAULT_CHART_THEME): ChartOption {
  checkTimeSeries(CHART, 'full', data.full);
  if (data.reduced) checkTimeSeries(CHART, 'reduced', data.reduced);
  const timeBase = data.timeBase ?? 's';
  const errorScale = data.errorScale ?? 'linear';
  const error = data.reduced ? absoluteErrorOnGrid(data.full, data.reduced) : null;
  const peak = error ? peakError(data.full.t, error) : null;
  // A log error axis needs a positive error somewhere; an exact match falls back to a linear axis.
  const errorRange = errorScale === 'log' && error ? decadeRange(error.filter((e): e is number => e !== null)) : null;
  const logError = errorRange !== null;
  const ink = axisInk(theme);
  const tEnd = Math.max(data.full.t[data.full.t.length - 1] ?? 1, data.reduced?.t[data.reduced.t.length - 1] ?? 0);
  const tStart = Math.min(data.full.t[0] ?? 0, data.reduced?.t[0] ?? Infinity);

  const series: LineSeriesOption[] = [responseLine('full', data.full)];
  if (data.reduced) series.push(responseLine('reduced', data.reduced));
  if (error) {
    series.push({
      type: 'line',
      name: ERROR_SERIES,
      xAxisIndex: 1,
      yAxisIndex: 1,
      data: data.full.t.map((t, i) => {
        const e = error[i];
        return [t, e === null || (logError && e <= 0) ? null : e];
      }),
      showSymbol: false,
      symbol: 'none',
      connectNulls: false,
      lineStyle: { color: OKABE_ITO.blue, type: 'solid', width: 1.4 },
      itemStyle: { color: OKABE_ITO.blue },
      sampling: 'lttb',
      ...(peak
        ? {
            markLine: {
              silent: true,
              symbol: 'none',
              lineStyle: { color: OKABE_ITO.blue, type: 'dotted', width: 1 },
              label: {
                formatter: `peak ${formatNumber(peak.error)} at ${formatTime(peak.t, timeBase)}`,
                fontFamily: theme.fontMono,
                color: OKABE_ITO.blue,
                position: 'insideEndTop',
              },
              data: [{ xAxis: peak.t }],
            },
          }
        : {}),
    });
  }

  const timeAxis = (gridIndex: number, showName: boolean) => ({
    ...ink,
    type: 'value' as const,
    gridIndex,
    min: tStart,
    max: tEnd,
    name: showName ? `time t (${timeBase})` : '',
    nameGap: 28,
    axisLabel: { ...ink.axisLabel, show: showName, formatter: (v: number) => formatNumber(v, { significant: 3 }) },
  });
  const channel = data.channelLabel ? ` for ${data.channelLabel}` : '';
  const peakText = peak ? ` Peak absolute error ${formatNumber(peak.error)} at ${formatTime(peak.t, timeBase)}.` : '';

  return {
    ...baseOption(theme, `${KIND_WORDS[data.kind]}${channel} of the full${data.reduced ? ' and reduced' : ''} model.${peakText}`),
    legend: legendBox(theme),
    axisPointer: { link: [{ xAxisIndex: 'all' }] },
    tooltip: {
      ...tooltipBox(theme),
      trigger: 'axis',
      formatter: (params: unknown) => {
        const list = params as { seriesName: string; value: [number, number | null] }[];
        if (list.length === 0) return '';
        const lines = [`t = ${formatTime(list[0].value[0], timeBase)}`];
        for (const p of list) lines.push(`${escapeHtml(p.seriesName)} ${p.value[1] === null ? '—' : formatNumber(p.value[1], { significant: 4 })}`);
        return lines.join('<br/>');
      },
    },
    grid: error
      ? [
          plotGrid({ top: 40, height: '48%' }),
          plotGrid({ top: '70%', bottom: 52 }),
        ]
      : [plotGrid({ top: 40, bottom: 52 })],
    xAxis: error ? [timeAxis(0, false), timeAxis(1, true)] : [timeAxis(0, true)],
    yAxis: [
      {
        ...ink,
        type: 'value',
        gridIndex: 0,
        scale: true,
        name: `output y (${data.kind})`,
        nameGap: 52,
        axisLabel: { ...ink.axisLabel, formatter: (v: number) => formatNumber(v, { significant: 3 }) },
      },
      ...(error
        ? [
            {
              ...ink,
              type: logError ? ('log' as const) : ('value' as const),
              gridIndex: 1,
              ...(errorRange ? { min: errorRange.min, max: errorRange.max } : { min: 0 }),
              name: 'absolute error',
              nameGap: 52,
              axisLabel: { ...ink.axisLabel, formatter: (v: number) => formatNumber(v, { significant: 2 }) },
            },
          ]
        : []),
    ],
    dataZoom: [{ type: 'inside', xAxisIndex: error ? [0, 1] : [0], filterMode: 'none' }],
    series,
  };
}
