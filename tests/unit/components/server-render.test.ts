/**
 * The React components rendered to HTML on the server (react-dom/server, no DOM needed): they render
 * without throwing and carry the labels and ARIA attributes the pages and browser tests rely on.
 */
import { describe, expect, it } from 'vitest';
import { createElement as h } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { ChannelPicker } from '@/components/charts/ChannelPicker';
import { ErrorBoundChart } from '@/components/charts/ErrorBoundChart';
import { PoleMap } from '@/components/charts/PoleMap';
import { Caution } from '@/components/workspace/Caution';
import { CAUTION_TEXT } from '@/lib/caution';
import { FiguresTable } from '@/components/workspace/FiguresTable';
import { ModesTable } from '@/components/workspace/ModesTable';
import { OrderSlider } from '@/components/workspace/OrderSlider';
import { ProgressBar } from '@/components/workspace/ProgressBar';

const noop = () => undefined;

describe('server-rendered components', () => {
  it('ProgressBar exposes role, values and stage text, and a failed job its error and retry', () => {
    const html = renderToStaticMarkup(h(ProgressBar, { status: 'running', stage: 'Computing gramians', fraction: 0.43, label: 'Analysis of v2' }));
    expect(html).toContain('role="progressbar"');
    expect(html).toContain('aria-valuenow="43"');
    expect(html).toContain('aria-valuemin="0"');
    expect(html).toContain('aria-valuemax="100"');
    expect(html).toContain('aria-valuetext="Computing gramians, 43\u00a0%"');
    const failed = renderToStaticMarkup(h(ProgressBar, { status: 'failed', stage: 'Reading file', error: 'A: row 3 has 4 entries, expected 5', onRetry: noop }));
    expect(failed).toContain('role="alert"');
    expect(failed).toContain('A: row 3 has 4 entries, expected 5');
    expect(failed).toMatch(/<button[^>]*>Retry<\/button>/);
    const indeterminate = renderToStaticMarkup(h(ProgressBar, { status: 'queued', stage: '' }));
    expect(indeterminate).not.toContain('aria-valuenow');
  });

  it('OrderSlider labels both inputs, snaps the shown value and reads out the figures', () => {
    const html = renderToStaticMarkup(
      h(OrderSlider, {
        orders: [2, 4, 6],
        value: 5,
        onChange: noop,
        figures: { 6: { errorBound: 1e-3, keptUnstable: 0, keptMarginal: 2, stiffnessRatio: 40, maxStableStepEuler: 0.02, maxStableStepRk4: 0.056 } },
      }),
    );
    const ids = [...html.matchAll(/<label for="([^"]+)"/g)].map((m) => m[1]);
    expect(ids).toHaveLength(2);
    for (const id of ids) expect(html).toContain(`id="${id}"`);
    expect(html).toMatch(/type="range"[^>]*/);
    expect(html).toContain('value="2"'); // index of order 6 in [2, 4, 6]
    expect(html).toContain('aria-valuetext="order 6, error bound 1e-3, 2 kept exactly for unstable or marginal poles');
    expect(html).toContain('2 (0 + 2)');
    const bad = renderToStaticMarkup(h(OrderSlider, { orders: [], value: 1, onChange: noop }));
    expect(bad).toContain('role="alert"');
  });

  it('ModesTable shows sortable headers with aria-sort, and an empty state', () => {
    const html = renderToStaticMarkup(h(ModesTable, { modes: [{ re: -3, im: 4, dominance: 1 }, { re: -1, im: 0, dominance: 2 }] }));
    expect(html).toContain('aria-sort="descending"'); // default: dominance, largest first
    expect((html.match(/aria-sort="none"/g) ?? []).length).toBe(5);
    expect(html.indexOf('>-1<')).toBeLessThan(html.indexOf('>-3 + 4j<'));
    const empty = renderToStaticMarkup(h(ModesTable, { modes: [], emptyText: 'Nothing yet' }));
    expect(empty).toContain('Nothing yet');
    expect(empty).not.toContain('<table');
  });

  it('ChannelPicker labels its selects, and a SISO model shows its channel as text', () => {
    const html = renderToStaticMarkup(h(ChannelPicker, { inputCount: 2, outputCount: 3, outputLabels: ['x1'], value: { input: 1, output: 2 }, onChange: noop }));
    expect(html).toMatch(/<label for="[^"]+"[^>]*>Input<\/label>/);
    expect(html).toMatch(/<label for="[^"]+"[^>]*>Output<\/label>/);
    expect(html).toContain('<option value="2" selected="">3 · y3</option>');
    expect(html).toContain('1 · x1');
    const siso = renderToStaticMarkup(h(ChannelPicker, { inputCount: 1, outputCount: 1, value: { input: 0, output: 0 }, onChange: noop }));
    expect(siso).toContain('u1 → y1');
    expect(siso).not.toContain('<select');
  });

  it('FiguresTable and Caution render their text', () => {
    const html = renderToStaticMarkup(
      h(FiguresTable, {
        figures: {
          fullOrder: 400, reducedOrder: 12, hInfinityError: 2e-3, hInfinityErrorRelative: 0.01, errorBound: 5e-3, h2Error: 1e-3,
          zeroFrequencyGainError: 0, peakStepError: 4e-3, stiffnessRatioFull: 1e4, stiffnessRatioReduced: 20,
          simulation: {
            full: { solver: 'stiff', steps: 900, pointsStored: 501, wallMs: 80 },
            reduced: { solver: 'stiff', steps: 300, pointsStored: 501, wallMs: 2 },
          },
        },
      }),
    );
    expect(html).toContain('400 → 12');
    expect(html).toContain('40×');
    expect(renderToStaticMarkup(h(Caution))).toContain(CAUTION_TEXT.replace(/'/g, '&#x27;'));
  });

  it('chart wrappers render their frame, switches and verdict; bad data becomes a message', () => {
    const pole = renderToStaticMarkup(h(PoleMap, { re: [-1, -2], im: [0, 0] }));
    expect(pole).toMatch(/aria-pressed="true"[^>]*>Symmetric log/);
    expect(pole).toContain('data-testid="pole-map"');
    const acceptance = { status: 'pass' as const, minFrequency: 1, maxFrequency: 10, maxError: 1e-3, worstError: 2e-4, worstFrequency: 10, pointsChecked: 2, computedRange: [1, 10] as [number, number] };
    const err = renderToStaticMarkup(h(ErrorBoundChart, { frequencies: [1, 10], error: [1e-4, 2e-4], bound: 1e-3, acceptance }));
    expect(err).toContain('data-status="pass"');
    // Written once (the canvas carries no copy), from the stored verdict.
    expect(err.match(/PASS: largest error 2e-4 at 10\u00a0rad\/s is within 1e-3 over 1–10\u00a0rad\/s/g)).toHaveLength(1);
    const broken = renderToStaticMarkup(h(PoleMap, { re: [-1, 2], im: [0] }));
    expect(broken).toContain('role="alert"');
    expect(broken).toContain('PoleMap: im must have as many entries as re');
  });
});
