/**
 * Option builder for the pole map: poles in the complex plane, Re λ across, Im λ up.
 *
 * Two views. `linear`: plain value axes through the origin. `symlog`: both axes through the symmetric-log
 * transform of pole-data.ts (linear within one threshold of zero, then one unit per decade), so a slow pole
 * at -1 and fast ones past -1000 are both readable and the sign of Re λ (which side of the stability
 * boundary) is never lost, which a log of |Re λ| alone would hide. Tick labels show the untransformed value.
 *
 * Stability is carried by marker shape and legend words (circle stable, diamond marginal, triangle
 * unstable), colour only repeats it; kept modes are filled, truncated ones hollow.
 */
import { axisInk, baseOption, plotGrid, emptyTitle, escapeHtml, legendBox, tooltipBox } from './chart-base';
import { formatComplex, formatFrequency, formatNumber, formatTime } from '@/lib/format';
import type { ChartOption, ScatterSeriesOption } from './option-types';
import { symlog, symlogInverse, symlogThreshold } from './pole-data';
import { classifyPoles, modalFigures, type PoleStability } from '@/reduction/poles';
import { ChartDataError, requireFinite, requireSameLength } from './series-checks';
import { DEFAULT_CHART_THEME, INK, STABILITY_STYLE, type ChartTheme } from './theme';

export type PoleMapScale = 'linear' | 'symlog';

export interface PoleMapData {
  readonly re: readonly number[];
  readonly im: readonly number[];
  /** the engine's split; computed with a relative tolerance when absent */
  readonly stability?: readonly PoleStability[];
  /** true where the reduced model keeps the mode */
  readonly kept?: readonly boolean[];
  readonly scale?: PoleMapScale;
  /** model time unit; frequencies are then rad per that unit */
  readonly timeBase?: string;
}

export const POLE_SYMBOL: Record<PoleStability, 'circle' | 'diamond' | 'triangle'> = {
  stable: STABILITY_STYLE.stable.symbol,
  marginal: STABILITY_STYLE.marginal.symbol,
  unstable: STABILITY_STYLE.unstable.symbol,
};

const POLE_COLOR: Record<PoleStability, string> = {
  stable: STABILITY_STYLE.stable.color,
  marginal: STABILITY_STYLE.marginal.color,
  unstable: STABILITY_STYLE.unstable.color,
};

const STABILITY_ORDER: readonly PoleStability[] = ['stable', 'marginal', 'unstable'];
const CHART = 'PoleMap';

export function poleSeriesName(stability: PoleStability, kept: boolean | undefined): string {
  return kept === undefined ? stability : `${stability}, ${kept ? 'kept' : 'truncated'}`;
}

/** The tooltip text of one pole, as HTML lines (also used by tests to check the figures shown). */
export function poleTooltipLines(
  re: number,
  im: number,
  stability: PoleStability,
  kept: boolean | undefined,
  timeBase = 's',
): string[] {
  const m = modalFigures(re, im, stability);
  const tau = m.timeConstant === null ? '∞' : `${formatTime(m.timeConstant, timeBase)}${m.growing ? ' (growth)' : ''}`;
  return [
    `λ = ${formatComplex(re, im)}`,
    `ωn = ${formatFrequency(m.naturalFrequency, timeBase)}`,
    `ζ = ${m.dampingRatio === null ? '—' : formatNumber(m.dampingRatio)}`,
    `τ = ${tau}`,
    poleSeriesName(stability, kept),
  ];
}

function checkData(data: PoleMapData): PoleStability[] {
  requireSameLength(CHART, 're', data.re, 'im', data.im);
  requireFinite(CHART, 're', data.re);
  requireFinite(CHART, 'im', data.im);
  if (data.kept) requireSameLength(CHART, 're', data.re, 'kept', data.kept);
  if (data.stability) {
    requireSameLength(CHART, 're', data.re, 'stability', data.stability);
    data.stability.forEach((s, i) => {
      if (!STABILITY_ORDER.includes(s)) {
        throw new ChartDataError(CHART, 'stability', `entries must be stable, marginal or unstable (entry ${i} is ${String(s)})`);
      }
    });
    return [...data.stability];
  }
  return [...classifyPoles({ re: data.re, im: data.im }).stability];
}

function symlogAxis(values: readonly number[], c: number) {
  let lo = 0;
  let hi = 0;
  for (const v of values) {
    const u = symlog(v, c);
    lo = Math.min(lo, u);
    hi = Math.max(hi, u);
  }
  return {
    type: 'value' as const,
    min: Math.min(-1, Math.floor(lo)),
    max: Math.max(1, Math.ceil(hi)),
    interval: 1,
  };
}

function tickLabel(scale: PoleMapScale, c: number) {
  return scale === 'symlog'
    ? (u: number) => formatNumber(symlogInverse(u, c), { significant: 2 })
    : (v: number) => formatNumber(v, { significant: 2 });
}

export function buildPoleMapOption(data: PoleMapData, theme: ChartTheme = DEFAULT_CHART_THEME): ChartOption {
  const stability = checkData(data);
  const scale = data.scale ?? 'linear';
  const timeBase = data.timeBase ?? 's';
  const n = data.re.length;
  const cRe = symlogThreshold(data.re);
  const cIm = symlogThreshold(data.im);
  const toX = (x: number) => (scale === 'symlog' ? symlog(x, cRe) : x);
  const toY = (y: number) => (scale === 'symlog' ? symlog(y, cIm) : y);
  const symbolSize = n > 500 ? 6 : 9;

  const keptStates: readonly (boolean | undefined)[] = data.kept ? [true, false] : [undefined];
  const series: ScatterSeriesOption[] = [];
  for (const s of STABILITY_ORDER) {
    for (const k of keptStates) {
      const points: [number, number, number][] = [];
      for (let i = 0; i < n; i++) {
        if (stability[i] === s && (k === undefined || data.kept![i] === k)) points.push([toX(data.re[i]), toY(data.im[i]), i]);
      }
      if (points.length === 0) continue;
      const hollow = k === false;
      series.push({
        type: 'scatter',
        name: poleSeriesName(s, k),
        symbol: POLE_SYMBOL[s],
        symbolSize,
        data: points,
        itemStyle: hollow
          ? { color: INK.paper, borderColor: POLE_COLOR[s], borderWidth: 1.4 }
          : { color: POLE_COLOR[s], borderColor: INK.graphite, borderWidth: 0.6 },
        emphasis: { scale: 1.4 },
      });
    }
  }

  const base = baseOption(theme, `Pole map of ${n} poles, ${scale === 'symlog' ? 'symmetric-log' : 'linear'} axes.`);
  const ink = axisInk(theme, true);
  const reUnit = `1/${timeBase}`;
  const imUnit = `rad/${timeBase}`;
  const xAxis = {
    ...ink,
    ...(scale === 'symlog' ? symlogAxis(data.re, cRe) : { type: 'value' as const, scale: false }),
    name: scale === 'symlog' ? `Re λ (${reUnit}), symmetric log` : `Re λ (${reUnit})`,
    nameGap: 28,
    axisLabel: { ...ink.axisLabel, formatter: tickLabel(scale, cRe) },
  };
  const yAxis = {
    ...ink,
    ...(scale === 'symlog' ? symlogAxis(data.im, cIm) : { type: 'value' as const, scale: false }),
    name: scale === 'symlog' ? `Im λ (${imUnit}), symmetric log` : `Im λ (${imUnit})`,
    nameGap: 52,
    axisLabel: { ...ink.axisLabel, formatter: tickLabel(scale, cIm) },
  };

  if (series.length === 0) {
    return { ...base, title: emptyTitle(theme, 'No poles to show'), xAxis, yAxis, series: [] };
  }
  // The stability boundary Re λ = 0 (transformed 0 is 0 in both views).
  series[0] = {
    ...series[0],
    markLine: {
      silent: true,
      symbol: 'none',
      lineStyle: { color: INK.graphiteMuted, type: 'dashed', width: 1 },
      label: { formatter: 'Re λ = 0', color: INK.graphiteMuted, fontFamily: theme.fontMono },
      data: [{ xAxis: 0 }],
    },
  };

  return {
    ...base,
    legend: legendBox(theme),
    grid: plotGrid({ top: 40, bottom: 52 }),
    tooltip: {
      ...tooltipBox(theme),
      trigger: 'item',
      formatter: (params: unknown) => {
        const value = (params as { value?: unknown }).value;
        if (!Array.isArray(value)) return '';
        const i = value[2] as number;
        return poleTooltipLines(data.re[i], data.im[i], stability[i], data.kept?.[i], timeBase)
          .map(escapeHtml)
          .join('<br/>');
      },
    },
    dataZoom: [
      { type: 'inside', xAxisIndex: 0, filterMode: 'none' },
      { type: 'inside', yAxisIndex: 0, filterMode: 'none' },
    ],
    xAxis,
    yAxis,
    series,
  };
}
