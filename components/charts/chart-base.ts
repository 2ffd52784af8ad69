/**
 * Pieces every Modeshelf chart shares: the sheet's text style, axis ink, tooltip box and legend. Kept as
 * plain functions of the theme so the option builders stay pure and testable without a DOM.
 */
import { INK, type ChartTheme } from './theme';

export function baseOption(theme: ChartTheme, description: string) {
  return {
    backgroundColor: 'transparent',
    // Screenshots and review comparisons need the same picture every time; no entry animation.
    animation: false,
    textStyle: { fontFamily: theme.fontSans, color: INK.graphite, fontSize: 12 },
    aria: { enabled: true, label: { description } },
  } as const;
}

/**
 * Axis ink. `onZero` draws the axis line through the other axis's zero: right for the pole map (the
 * real and imaginary axes), wrong for Bode or time plots, where it would cut through the curves at 0 dB.
 */
export function axisInk(theme: ChartTheme, onZero = false) {
  return {
    axisLine: { show: true, onZero, lineStyle: { color: INK.graphiteMuted, width: 1 } },
    axisTick: { show: true, lineStyle: { color: INK.graphiteMuted } },
    axisLabel: { color: INK.graphite, fontFamily: theme.fontMono, fontSize: 11 },
    splitLine: { show: true, lineStyle: { color: INK.rule, width: 1 } },
    nameTextStyle: { color: INK.graphite, fontFamily: theme.fontSans, fontSize: 12 },
    nameLocation: 'middle' as const,
  };
}

/**
 * A plot area at fixed margins. ECharts 6 otherwise shrinks each grid to fit its own tick labels, so two
 * stacked grids (magnitude over phase, response over error) would not share the same frequency or time
 * positions. The margins leave room for the widest labels our formatter writes ("-1.5e-10").
 */
export function plotGrid(box: { top: number | string; bottom?: number | string; height?: number | string; left?: number; right?: number }) {
  return { left: 80, right: 28, ...box, outerBoundsMode: 'none' as const };
}

export function tooltipBox(theme: ChartTheme) {
  return {
    backgroundColor: INK.paper,
    borderColor: INK.graphiteMuted,
    borderWidth: 1,
    textStyle: { color: INK.graphite, fontFamily: theme.fontMono, fontSize: 12 },
    confine: true,
  };
}

export function legendBox(theme: ChartTheme) {
  return {
    top: 0,
    left: 'center' as const,
    itemWidth: 28,
    textStyle: { color: INK.graphite, fontFamily: theme.fontSans, fontSize: 12 },
  };
}

/** Escapes text placed into tooltip HTML (channel and state names come from uploaded files). */
export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

/** An empty-state title, centred, for a chart with nothing to draw. */
export function emptyTitle(theme: ChartTheme, text: string) {
  return {
    text,
    left: 'center' as const,
    top: 'middle' as const,
    textStyle: { color: INK.graphiteMuted, fontFamily: theme.fontSans, fontSize: 13, fontWeight: 'normal' as const },
  };
}
