/**
 * The pages' side of the large-model path: the analysis figures labelled exact or estimated as the engine
 * listed them (components/source-models/AnalysisFigures.tsx, on a real analysis of the demo's hearth plate at
 * 10 × 10 nodes with its E), the methods and order rule the recipe form offers (recipe-choices.ts), the form's
 * request body when the order is by number only, and the server's schema for IRKA.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { createElement as h } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import { zodResolver } from '@hookform/resolvers/zod';
import { hearthPlate } from '@/db/seeds/demo/plate';
import { runAnalysis } from '@/lib/engine-tasks/analysis-task';
import type { AnalysisRecord } from '@/lib/engine-tasks/records';
import { AnalysisFigures } from '@/components/source-models/AnalysisFigures';
import { orderByNumberOnly, storedTable } from '@/components/source-models/recipe-choices';
import { recipeFormSchema, type RecipeFormContext } from '@/components/source-models/recipe-form-schema';
import { recipeSchema } from '@/lib/reduced-models/schemas';

const dir = mkdtempSync(path.join(tmpdir(), 'modeshelf-large-pages-'));
const plate = hearthPlate(10);
for (const k of ['A', 'B', 'C', 'E'] as const) writeFileSync(path.join(dir, `${k}.mtx`), plate[k]);
const analysis = runAnalysis(
  (['A', 'B', 'C', 'E'] as const).map((role) => ({ role, name: `${role}.mtx`, path: path.join(dir, `${role}.mtx`) })),
  'test',
  () => {},
);
const dense = { ...analysis, path: 'dense', sparse: undefined } as AnalysisRecord;

/** The basis tag of the table row whose label is `label`. */
function basisOfRow(html: string, label: string): string | null {
  const row = html.split('<tr').find((r) => r.includes(`>${label}</th>`));
  if (!row) throw new Error(`no row "${label}"`);
  return /data-testid="figure-basis">(\w+)</.exec(row)?.[1] ?? null;
}

describe('the analysis page of a model on the large-model path', () => {
  it('labels each figure exact or estimated, as the engine listed it', () => {
    const html = renderToStaticMarkup(h(AnalysisFigures, { analysis, timeBase: 's' }));
    expect(html).toContain('data-testid="sparse-analysis"');
    expect(basisOfRow(html, 'States, inputs, outputs')).toBe('exact');
    expect(basisOfRow(html, 'Stiffness ratio')).toBe('estimated');
    expect(basisOfRow(html, 'H∞ norm ‖G‖∞')).toBe('estimated');
    expect(basisOfRow(html, 'H2 norm ‖G‖2')).toBe('estimated');
    expect(basisOfRow(html, 'Hankel singular values resolved')).toBe('estimated');
    expect(html).toMatch(/DC gain G\(0\) <span[^>]*data-testid="figure-basis">exact</);
    expect(html).toContain(`${analysis.poles.re.length} of 100`);
  });

  it('a dense analysis carries no such labels', () => {
    const html = renderToStaticMarkup(h(AnalysisFigures, { analysis: dense, timeBase: 's' }));
    expect(html).not.toContain('figure-basis');
    expect(html).not.toContain('sparse-analysis');
  });
});

describe('the recipe form on the large-model path', () => {
  it('offers the order by number only, and frequency-limited orders below the resolved values', () => {
    const limited = storedTable(analysis, 'frequency-limited', 'dominance');
    expect(limited?.available && limited.orders.length).toBe(analysis.hankelSingularValues.length - 1);
    expect(limited?.available && Object.values(limited.figures).every((f) => f.errorBound === null)).toBe(true);
    expect(orderByNumberOnly(analysis, 'balanced')).toBe(true);
    expect(orderByNumberOnly(dense, 'balanced')).toBe(false);
    expect(orderByNumberOnly(dense, 'irka')).toBe(true);
    const balanced = storedTable(analysis, 'balanced', 'dominance');
    expect(balanced?.available && balanced.orders.length).toBe(analysis.hankelSingularValues.length);
    const irka = storedTable(analysis, 'irka', 'dominance');
    expect(irka?.available && Object.values(irka.figures).every((f) => f.errorBound === null)).toBe(true);
  });

  it('sends the order, not a tolerance, when the order is by number only', async () => {
    const ctx: RecipeFormContext = {
      sourceVersionId: '00000000-0000-4000-8000-000000000000',
      method: 'balanced',
      selection: 'dominance',
      order: 7,
      hzAllowed: true,
      numberOnly: true,
    };
    const v = {
      orderRule: 'tolerance' as const,
      tolerance: '',
      band: { from: '', to: '' },
      limitedBand: { from: '', to: '', unit: 'rad' as const },
      withAcceptance: false,
      acceptance: { from: '', to: '', maxError: '' },
      target: 'new',
      name: 'Plate, reduced',
      description: '',
    };
    const result = await zodResolver(recipeFormSchema(ctx))(v, ctx, { fields: {}, shouldUseNativeValidation: false });
    expect(result.errors).toEqual({});
    expect((result.values as { recipe: unknown }).recipe).toEqual({ method: 'balanced', orderRule: 'order', order: 7, modalSelection: 'dominance' });
  });

  it('the server’s schema takes IRKA by order and refuses it by tolerance, naming the order rule', () => {
    expect(recipeSchema.safeParse({ method: 'irka', orderRule: 'order', order: 8 }).success).toBe(true);
    const refused = recipeSchema.safeParse({ method: 'irka', orderRule: 'tolerance', tolerance: 0.01 });
    expect(refused.success).toBe(false);
    expect(refused.error!.issues[0]).toMatchObject({ path: ['orderRule'], message: expect.stringMatching(/IRKA has no a-priori error bound/) });
  });
});
