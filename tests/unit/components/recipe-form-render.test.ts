// The recipe form rendered on the server (react-dom/server) for frequency-limited balanced truncation
// (issue 15): the band's fields with a unit choice (Hz only where the model's time unit has a known
// length), the band started from a controller project's acceptance band, the order by number only, and the
// order slider without its bound figure but with the sentence saying why.
import { describe, expect, it, vi } from 'vitest';

vi.mock('next/navigation', () => ({ useRouter: () => ({ push: () => undefined, refresh: () => undefined }) }));

import { createElement as h } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { RecipeForm, type RecipeFormProps } from '@/components/source-models/RecipeForm';
import type { AnalysisRecord, OrderFigureTable } from '@/lib/engine-tasks/records';

const figures = (bound: number) => ({ errorBound: bound, keptUnstable: 0, keptMarginal: 0, stiffnessRatio: 5, maxStableStepEuler: 0.1, maxStableStepRk4: 0.2 });
const table: OrderFigureTable = { available: true, orders: [2, 4, 6], figures: { 2: figures(0.5), 4: figures(0.05), 6: figures(0.001) }, limitNote: null };
const analysis = {
  states: 8,
  frequencyBand: [0.1, 500],
  stablePartHInfinityNorm: 12,
  marginalPoles: 0,
  unstablePoles: 0,
  orderFigures: { balanced: table, residualization: table, modalDominance: table, modalSlowest: table },
} as unknown as AnalysisRecord;

function render(overrides: Partial<RecipeFormProps>): string {
  const props: RecipeFormProps = {
    analysis,
    timeBaseSeconds: 1,
    sourceVersionId: '00000000-0000-4000-8000-000000000000',
    sourceName: 'Structure',
    versionNumber: 1,
    timeBase: 's',
    canRun: true,
    reducedModels: [],
    method: 'frequency-limited',
    onMethod: () => undefined,
    selection: 'dominance',
    onSelection: () => undefined,
    order: 4,
    onOrder: () => undefined,
    ...overrides,
  };
  return renderToStaticMarkup(h(QueryClientProvider, { client: new QueryClient() }, h(RecipeForm, props)));
}

describe('RecipeForm, frequency-limited balanced truncation', () => {
  it('asks for the band with a unit, by order only, and says the slider has no bound', () => {
    const html = render({});
    expect(html).toContain('data-testid="limited-band"');
    expect(html).toMatch(/<option value="rad"[^>]*>rad\/s<\/option>/);
    expect(html).toMatch(/<option value="hz"[^>]*>Hz<\/option>/);
    expect(html).toContain('data-testid="order-slider-no-bound"');
    expect(html).toContain('has no a-priori error bound');
    expect(html).not.toContain('>Error bound<');
    expect(html).not.toContain('name="orderRule"');
    expect(html).toContain('Run frequency-limited balanced truncation');
  });

  it('offers no Hz for a time unit of unknown length', () => {
    const html = render({ timeBaseSeconds: null, timeBase: 'sample' });
    expect(html).toContain('rad/sample');
    expect(html).not.toContain('value="hz"');
  });

  it('starts the band and the acceptance check from a controller project', () => {
    const html = render({ seed: { projectName: 'Zone 3 loop', projectSlug: 'zone-3-loop', minFrequency: 10, maxFrequency: 60, maxError: 0.05 } });
    expect(html).toContain('data-testid="limited-band-seed"');
    expect(html).toContain('href="/projects/zone-3-loop"');
    expect(html).toMatch(/value="10"/);
    expect(html).toMatch(/value="60"/);
    expect(html).toMatch(/value="0.05"/); // the acceptance check's largest error
  });

  it('keeps the bound figure and the order rule for balanced truncation', () => {
    const html = render({ method: 'balanced' });
    expect(html).not.toContain('data-testid="limited-band"');
    expect(html).toContain('>Error bound<');
    expect(html).toContain('name="orderRule"');
  });
});
