/**
 * Option builders for the frequency-domain comparison of a full and a reduced model:
 *  - `buildBodeOption`: magnitude (dB or absolute) and phase (degrees) of one input→output channel on two
 *    stacked grids sharing a log frequency axis;
 *  - `buildSingularValueOption`: the largest singular value σmax(G(jω)) over frequency, the MIMO gain whose peak
 *    is the H∞ norm.
 * Full model solid graphite, reduced model dashed teal (theme.ts).
 */
import { axisInk, baseOption, plotGrid, escapeHtml, legendBox, tooltipBox } from './chart-base';
import { formatDecibel, formatDegrees, formatFrequency, formatNumber, frequencyUnit } from '@/lib/format';
import { alignPhase, checkComplexSamples, magnitude, magnitudeDb, phaseDegrees, type ComplexSamples } from './frequency-data';
import type { ChartOption, LineSeriesOption } from './option-types';
import { ChartDataError, decadeRange, requireGrid, requireNonNegative, requireSameLength } from './series-checks';
import { DEFAULT_CHART_THEME, FULL_LINE, REDUCED_LINE, type ChartTheme } from './theme';

export type MagnitudeScale = 'dB' | 'absolute';

export const FULL_SERIES = 'full model';
export const REDUCED_SERIES = 'reduced model';

export interface BodeChartData {
  /** angular frequencies, rad per model time unit, strictly increasing and positive */
  readonly frequencies: readonly number[];
  readonly full: ComplexSamples;
  readonly reduced?: ComplexSamples;
  readonly magnitudeScale?: MagnitudeScale;
  readonly timeBase?: string;
  /** e.g. "force F1 → displacement x3"; shown in the accessible description */
  readonly channelLabel?: string;
}

export interface SingularValueChartData {
  readonly frequencies: readonly number[];
  /** σmax(G(jω)) of the full model, absolute gain */
  readonly full: readonly number[];
  readonly reduced?: readonly number[];
  readonly magnitudeScale?: MagnitudeScale;
  readonly timeBase?: string;
}

function modelLine(which: 'full' | 'reduced', xAxisIndex: number, yAxisIndex: number, data: [number, number | null][]): LineSeriesOption {
  const style = which === 'full' ? FULL_LINE : REDUCED_LINE;
  return {
    type: 'line',
    name: which === 'full' ? FULL_SERIES : REDUCED_SERIES,
    xAxisIndex,
    yAxisIndex,
    data,
    showSymbol: false,
    symbol: 'none',
    connectNulls: false,
    lineStyle: { ...style },
    itemStyle: { color: style.color },
    // Dense grids of a stiff model run to thousands of points; thin them for drawing only.
    sampling: 'lttb',
  };
}

function frequencyAxis(theme: ChartTheme, w: readonly number[], gridIndex: number, timeBase: string, showName: boolean) {
  const ink = axisInk(theme);
  const range = decadeRange(w) ?? { min: 0.1, max: 10 };
  return {
    ...ink,
    type: 'log' as const,
    logBase: 10,
    gridIndex,
    min: range.min,
    max: range.max,
    name: showName ? `frequency ω (${frequencyUnit(timeBase)})` : '',
    nameGap: 28,
    axisLabel: { ...ink.axisLabel, show: showName, formatter: (v: number) => formatNumber(v, { significant: 2 }) },
  };
}

function magnitudeAxis(theme: ChartTheme, scale: MagnitudeScale, values: readonly (number | null)[], gridIndex: number, name: string) {
  const ink = axisInk(theme);
  if (scale === 'dB') {
    return {
      ...ink,
      type: 'value' as const,
      scale: true,
      gridIndex,
      name: `${name} (dB)`,
      nameGap: 48,
      axisLabel: { ...ink.axisLabel, formatter: (v: number) => formatNumber(v, { significant: 3 }) },
    };
  }
  const range = decadeRange(values.filter((v): v is number => v !== null)) ?? { min: 0.1, max: 10 };
  return {
    ...ink,
    type: 'log' as const,
    gridIndex,
    min: range.min,
    max: range.max,
    name,
    nameGap: 48,
    axisLabel: { ...ink.axisLabel, formatter: (v: number) => formatNumber(v, { significant: 2 }) },
  };
}

/** Phase axis ticks on multiples of 90° (or of 180°, 360°… when the phase winds far), at most ~6 steps. */
export function phaseAxisRange(values: readonly number[]): { min: number; max: number; interval: number } {
  if (values.length === 0) return { min: -180, max: 180, interval: 90 };
  const lo = Math.min(...values);
  const hi = Math.max(...values);
  const interval = 90 * Math.max(1, Math.ceil((hi - lo) / 90 / 6));
  let min = Math.floor(lo / interval) * interval + 0;
  let max = Math.ceil(hi / interval) * interval + 0; // + 0 turns -0 into 0 for the tick label
  if (max === min) {
    min -= interval;
    max += interval;
  }
  return { min, max, interval };
}

function toMagnitude(scale: MagnitudeScale, g: ComplexSamples): (number | null)[] {
  return scale === 'dB' ? magnitudeDb(g) : magnitude(g).map((m) => (m > 0 ? m : null));
}

export function buildBodeOption(data: BodeChartData, theme: ChartTheme = DEFAULT_CHART_THEME): ChartOption {
  const chart = 'BodeChart';
  const w = data.frequencies;
  requireGrid(chart, 'frequencies', w, true);
  if (w.length === 0) throw new ChartDataError(chart, 'frequencies', 'must hold at least one frequency');
  checkComplexSamples(chart, 'full', data.full, w.length);
  if (data.reduced) checkComplexSamples(chart, 'reduced', data.reduced, w.length);
  const scale = data.magnitudeScale ?? 'dB';
  const timeBase = data.timeBase ?? 's';

  const fullMag = toMagnitude(scale, data.full);
  const fullPhase = phaseDegrees(data.full);
  const reducedMag = data.reduced ? toMagnitude(scale, data.reduced) : null;
  const reducedPhase = data.reduced ? alignPhase(phaseDegrees(data.reduced), fullPhase) : null;
  const pairs = (ys: readonly (number | null)[]) => w.map((x, i): [number, number | null] => [x, ys[i]]);

  const series: LineSeriesOption[] = [modelLine('full', 0, 0, pairs(fullMag))];
  if (reducedMag) series.push(modelLine('reduced', 0, 0, pairs(reducedMag)));
  series.push(modelLine('full', 1, 1, pairs(fullPhase)));
  if (reducedPhase) series.push(modelLine('reduced', 1, 1, pairs(reducedPhase)));

  const phaseRange = phaseAxisRange([...fullPhase, ...(reducedPhase ?? [])]);
  const ink = axisInk(theme);
  const channel = data.channelLabel ? ` for ${data.channelLabel}` : '';
  const unitOf = (v: number, isPhase: boolean) =>
    isPhase ? formatDegrees(v) : scale === 'dB' ? formatDecibel(v) : formatNumber(v);

  return {
    ...baseOption(theme, `Bode plot${channel}: magnitude and phase of the full${data.reduced ? ' and reduced' : ''} model.`),
    legend: { ...legendBox(theme), data: data.reduced ? [FULL_SERIES, REDUCED_SERIES] : [FULL_SERIES] },
    axisPointer: { link: [{ xAxisIndex: 'all' }] },
    tooltip: {
      ...tooltipBox(theme),
      trigger: 'axis',
      formatter: (params: unknown) => {
        const list = params as { seriesName: string; axisIndex?: number; value: [number, number | null]; seriesIndex: number }[];
        if (list.length === 0) return '';
        const lines = [formatFrequency(list[0].value[0], timeBase)];
        for (const p of list) {
          const isPhase = (series[p.seriesIndex]?.yAxisIndex ?? 0) === 1;
          const y = p.value[1];
          lines.push(`${escapeHtml(p.seriesName)} ${isPhase ? '∠G' : '|G|'} ${y === null ? '—' : unitOf(y, isPhase)}`);
        }
        return lines.join('<br/>');
      },
    },
    grid: [
      plotGrid({ top: 40, height: '40%' }),
      plotGrid({ top: '60%', bottom: 52 }),
    ],
    xAxis: [frequencyAxis(theme, w, 0, timeBase, false), frequencyAxis(theme, w, 1, timeBase, true)],
    yAxis: [
      magnitudeAxis(theme, scale, [...fullMag, ...(reducedMag ?? [])], 0, 'magnitude |G|'),
      {
        ...ink,
        type: 'value',
        gridIndex: 1,
        ...phaseRange,
        name: 'phase (°)',
        nameGap: 48,
        axisLabel: { ...ink.axisLabel, formatter: (v: number) => formatDegrees(v) },
      },
    ],
    dataZoom: [{ type: 'inside', xAxisIndex: [0, 1], filterMode: 'none' }],
    series,
  };
}

export function buildSingularValueOption(data: SingularValueChartData, theme: ChartTheme = DEFAULT_CHART_THEME): ChartOption {
  const chart = 'SingularValueChart';
  const w = data.frequencies;
  requireGrid(chart, 'frequencies', w, true);
  if (w.length === 0) throw new ChartDataError(chart, 'frequencies', 'must hold at least one frequency');
  requireSameLength(chart, 'frequencies', w, 'full', data.full);
  requireNonNegative(chart, 'full', data.full);
  if (data.reduced) {
    requireSameLength(chart, 'frequencies', w, 'reduced', data.reduced);
    requireNonNegative(chart, 'reduced', data.reduced);
  }
  const scale = data.magnitudeScale ?? 'dB';
  const timeBase = data.timeBase ?? 's';
  const convert = (s: readonly number[]) =>
    s.map((v) => (v > 0 ? (scale === 'dB' ? 20 * Math.log10(v) : v) : null));
  const full = convert(data.full);
  const reduced = data.reduced ? convert(data.reduced) : null;
  const pairs = (ys: readonly (number | null)[]) => w.map((x, i): [number, number | null] => [x, ys[i]]);

  const series = [modelLine('full', 0, 0, pairs(full))];
  if (reduced) series.push(modelLine('reduced', 0, 0, pairs(reduced)));
  return {
    ...baseOption(theme, `Largest singular value over frequency of the full${reduced ? ' and reduced' : ''} model.`),
    legend: legendBox(theme),
    tooltip: {
      ...tooltipBox(theme),
      trigger: 'axis',
      formatter: (params: unknown) => {
        const list = params as { seriesName: string; value: [number, number | null] }[];
        if (list.length === 0) return '';
        const lines = [formatFrequency(list[0].value[0], timeBase)];
        for (const p of list) {
          const y = p.value[1];
          lines.push(`${escapeHtml(p.seriesName)} σmax ${y === null ? '—' : scale === 'dB' ? formatDecibel(y) : formatNumber(y)}`);
        }
        return lines.join('<br/>');
      },
    },
    grid: plotGrid({ top: 40, bottom: 52 }),
    xAxis: frequencyAxis(theme, w, 0, timeBase, true),
    yAxis: magnitudeAxis(theme, scale, [...full, ...(reduced ?? [])], 0, 'largest singular value σmax'),
    dataZoom: [{ type: 'inside', xAxisIndex: 0, filterMode: 'none' }],
    series,
  };
}
