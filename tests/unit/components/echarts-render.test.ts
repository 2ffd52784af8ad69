/**
 * Every option builder's output drawn by the real ECharts 6 (server-side SVG renderer, no DOM): the
 * options are accepted, our tick formatters run, and the drawn paths carry the look of components/charts/theme.ts
 * (full model solid graphite, reduced model dashed teal, the bound band filled).
 */
import { describe, expect, it } from 'vitest';
import * as echarts from 'echarts/core';
import { SVGRenderer } from 'echarts/renderers';
import { CHART_MODULES } from '@/components/charts/echarts-modules';
import { buildBodeOption, buildSingularValueOption } from '@/components/charts/bode-option';
import { buildErrorBoundOption } from '@/components/charts/error-bound-option';
import { buildHankelOption } from '@/components/charts/hankel-option';
import type { ChartOption } from '@/components/charts/option-types';
import { buildPoleMapOption } from '@/components/charts/pole-map-option';
import { INK } from '@/components/charts/theme';
import { buildTimeResponseOption } from '@/components/charts/time-response-option';

echarts.use([...CHART_MODULES, SVGRenderer]);

function renderSvg(option: ChartOption): string {
  const chart = echarts.init(null, null, { renderer: 'svg', ssr: true, width: 800, height: 480 });
  try {
    chart.setOption(option);
    return chart.renderToSVGString();
  } finally {
    chart.dispose();
  }
}

interface DrawnPath {
  stroke: string | null;
  dashed: boolean;
  fill: string | null;
  segments: number;
}

function paths(svg: string): DrawnPath[] {
  return [...svg.matchAll(/<path\b([^>]*)>/g)].map((m) => {
    const attrs = m[1];
    const get = (name: string) => new RegExp(`\\s${name}="([^"]*)"`).exec(attrs)?.[1] ?? null;
    return {
      stroke: get('stroke'),
      dashed: get('stroke-dasharray') !== null,
      fill: get('fill'),
      segments: (get('d') ?? '').split('L').length,
    };
  });
}

/** Curves are the long paths; legend icons and ticks are a few segments. */
function curves(svg: string, stroke: string): DrawnPath[] {
  return paths(svg).filter((p) => p.stroke === stroke && p.segments > 20);
}

function texts(svg: string): string[] {
  return [...svg.matchAll(/<text\b[^>]*>([^<]*)<\/text>/g)].map((m) => m[1]);
}

const W = Array.from({ length: 120 }, (_, i) => 10 ** (-2 + (4 * i) / 119));
function lag(a: number) {
  // G(jω) = a/(jω + a)
  return { re: W.map((w) => (a * a) / (a * a + w * w)), im: W.map((w) => (-a * w) / (a * a + w * w)) };
}

describe('charts drawn by ECharts', () => {
  it('Bode: full solid graphite and reduced dashed teal in both magnitude and phase', () => {
    const svg = renderSvg(buildBodeOption({ frequencies: W, full: lag(1), reduced: lag(1.1) }));
    const full = curves(svg, INK.graphite);
    const reduced = curves(svg, INK.teal);
    expect(full).toHaveLength(2);
    expect(full.every((p) => !p.dashed)).toBe(true);
    expect(reduced).toHaveLength(2);
    expect(reduced.every((p) => p.dashed)).toBe(true);
    expect(texts(svg)).toEqual(expect.arrayContaining(['0.01', '100', '-90°', 'frequency ω (rad/s)']));
  });

  it('σmax plot draws both models', () => {
    const g = lag(2);
    const sigma = W.map((_, i) => Math.hypot(g.re[i], g.im[i]));
    const svg = renderSvg(buildSingularValueOption({ frequencies: W, full: sigma, reduced: sigma.map((s) => s * 1.02) }));
    expect(curves(svg, INK.graphite)).toHaveLength(1);
    expect(curves(svg, INK.teal).filter((p) => p.dashed)).toHaveLength(1);
  });

  it('error against bound: the admissible band is filled, the acceptance band drawn, and no verdict text on the canvas', () => {
    const full = lag(1);
    const red = lag(1.1);
    const err = W.map((_, i) => Math.hypot(full.re[i] - red.re[i], full.im[i] - red.im[i]));
    const acceptance = { status: 'fail' as const, minFrequency: 0.1, maxFrequency: 10, maxError: 0.01, worstError: 0.05, worstFrequency: 1, pointsChecked: 40, computedRange: [W[0], W[W.length - 1]] as [number, number] };
    const svg = renderSvg(buildErrorBoundOption({ frequencies: W, error: err, bound: 0.2, acceptance }));
    expect(paths(svg).some((p) => p.fill === 'rgb(12,91,95)')).toBe(true);
    expect(texts(svg).some((t) => t.startsWith('acceptance band ≤ 0.01'))).toBe(true);
    // The verdict's sentence is page text written once by ErrorBoundChart; drawing it here too was the duplicate.
    expect(texts(svg).some((t) => /^(PASS|FAIL|NOT CHECKED)/.test(t))).toBe(false);
    expect(texts(svg)).toEqual(expect.arrayContaining(['1e-3', '0.1']));
  });

  it('Hankel chart draws σ, bound and energy with the order marker label', () => {
    const hsv = Array.from({ length: 30 }, (_, i) => 2 * 0.6 ** i);
    const svg = renderSvg(buildHankelOption({ hankelSingularValues: hsv, order: 6 }));
    expect(texts(svg).some((t) => t.startsWith('r = 6, bound'))).toBe(true);
    expect(curves(svg, INK.graphite).length).toBeGreaterThanOrEqual(1);
    expect(curves(svg, INK.teal).length).toBeGreaterThanOrEqual(1);
  });

  it('pole map draws in both views with decade labels in the log view', () => {
    const data = { re: [-1000, -10, -0.5, -0.5, 0], im: [0, 0, 3, -3, 0], kept: [false, true, true, true, true] };
    expect(() => renderSvg(buildPoleMapOption({ ...data, scale: 'linear' }))).not.toThrow();
    const svg = renderSvg(buildPoleMapOption({ ...data, scale: 'symlog' }));
    expect(texts(svg)).toEqual(expect.arrayContaining(['-1000', '-10', '0', 'stable, truncated', 'marginal, kept']));
  });

  it('time response draws full solid, reduced dashed and the error below', () => {
    const t = Array.from({ length: 200 }, (_, i) => i * 0.05);
    const y = t.map((x) => 1 - Math.exp(-x));
    const yr = t.map((x) => 1 - Math.exp(-1.05 * x));
    const svg = renderSvg(buildTimeResponseOption({ kind: 'step', full: { t, y }, reduced: { t, y: yr } }));
    expect(curves(svg, INK.graphite).filter((p) => !p.dashed)).toHaveLength(1);
    expect(curves(svg, INK.teal).filter((p) => p.dashed)).toHaveLength(1);
    expect(texts(svg).some((t) => t.startsWith('peak '))).toBe(true);
  });
});
