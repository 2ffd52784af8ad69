// The recipe schema (lib/reduced-models/schemas.ts) for frequency-limited balanced truncation (issue 15): a band
// 0 ≤ w1 < w2, finite, in rad per time unit or Hz; refused bands name their field, as the route answers
// (lib/http.ts validationError); the order is by number only (the method has no a-priori bound), and the
// Hz conversion is ω = 2π f × (seconds per time unit), the definition of the hertz.
import { describe, expect, it } from 'vitest';
import { limitedBandInRadians, recipeSchema, reductionRequestSchema } from '@/lib/reduced-models';
import { validationError } from '@/lib/http';
import { checkLimitedBand, frequencyLimitedTable } from '@/components/source-models/recipe-choices';
import type { OrderFigureTable } from '@/lib/engine-tasks/records';

const base = { method: 'frequency-limited', orderRule: 'order', order: 4 } as const;

/** The field the route would name for this recipe, or null when the recipe is accepted. */
function refusedField(recipe: Record<string, unknown>): { field: string | undefined; message: string } | null {
  const parsed = reductionRequestSchema.safeParse({
    sourceVersionId: '00000000-0000-4000-8000-000000000000',
    recipe,
    target: { kind: 'new', name: 'x' },
  });
  if (parsed.success) return null;
  const err = validationError(parsed.error);
  return { field: err.field, message: err.message };
}

describe('recipe schema: frequency-limited balanced truncation', () => {
  it('accepts a band from 0, and one in Hz, keeping the unit', () => {
    const a = recipeSchema.parse({ ...base, limitedBand: { minFrequency: 0, maxFrequency: 8 } });
    expect(a.limitedBand).toEqual({ minFrequency: 0, maxFrequency: 8, unit: 'rad' });
    const b = recipeSchema.parse({ ...base, limitedBand: { minFrequency: 1.5, maxFrequency: 10, unit: 'hz' } });
    expect(b.limitedBand).toEqual({ minFrequency: 1.5, maxFrequency: 10, unit: 'hz' });
  });

  it.each([
    ['w1 above w2', { minFrequency: 10, maxFrequency: 1 }, 'recipe.limitedBand.maxFrequency', /upper edge must be above its lower edge/],
    ['w1 equal to w2', { minFrequency: 5, maxFrequency: 5 }, 'recipe.limitedBand.maxFrequency', /upper edge must be above its lower edge/],
    ['a negative w1', { minFrequency: -1, maxFrequency: 5 }, 'recipe.limitedBand.minFrequency', /lower edge must be 0 or above/],
    ['w2 = 0', { minFrequency: 0, maxFrequency: 0 }, 'recipe.limitedBand.maxFrequency', /upper edge must be above 0/],
    ['an infinite w2 (1e400 in JSON)', { minFrequency: 0, maxFrequency: JSON.parse('1e400') as number }, 'recipe.limitedBand.maxFrequency', /finite/],
    ['a text w1', { minFrequency: 'low', maxFrequency: 5 }, 'recipe.limitedBand.minFrequency', /must be a finite number/],
    ['an unknown unit', { minFrequency: 0, maxFrequency: 5, unit: 'rpm' }, 'recipe.limitedBand.unit', /rad .* or hz/],
  ])('refuses %s, naming the field', (_what, limitedBand, field, message) => {
    const refused = refusedField({ ...base, limitedBand });
    expect(refused).not.toBeNull();
    expect(refused!.field).toBe(field);
    expect(refused!.message).toMatch(message);
    expect(refused!.message.startsWith(`${field}: `)).toBe(true);
  });

  it('refuses a missing band, a tolerance rule, and a band on another method, each naming its field', () => {
    expect(refusedField({ ...base })).toMatchObject({ field: 'recipe.limitedBand', message: expect.stringMatching(/needs the band/) });
    expect(refusedField({ method: 'frequency-limited', orderRule: 'tolerance', tolerance: 1e-3, limitedBand: { minFrequency: 0, maxFrequency: 5 } })).toMatchObject({
      field: 'recipe.orderRule',
      message: expect.stringMatching(/no a-priori error bound/),
    });
    expect(refusedField({ method: 'balanced', orderRule: 'order', order: 2, limitedBand: { minFrequency: 0, maxFrequency: 5 } })).toMatchObject({
      field: 'recipe.limitedBand',
      message: expect.stringMatching(/frequency-limited balanced truncation only/),
    });
    expect(refusedField({ ...base, method: 'hankel-norm', limitedBand: { minFrequency: 0, maxFrequency: 5 } })).toMatchObject({ field: 'recipe.method' });
  });

  it('leaves the other methods as they were', () => {
    expect(refusedField({ method: 'balanced', orderRule: 'tolerance', tolerance: 1e-3 })).toBeNull();
    expect(refusedField({ method: 'modal', orderRule: 'order', order: 2, modalSelection: 'band' })).toMatchObject({ field: 'recipe.band' });
  });
});

describe('limitedBandInRadians', () => {
  it('keeps rad, and turns Hz into rad per time unit (ω = 2πf·seconds per unit)', () => {
    expect(limitedBandInRadians({ minFrequency: 1, maxFrequency: 8, unit: 'rad' }, 's')).toEqual({ minFrequency: 1, maxFrequency: 8 });
    const s = limitedBandInRadians({ minFrequency: 1, maxFrequency: 10, unit: 'hz' }, 's');
    expect(s.minFrequency).toBeCloseTo(2 * Math.PI, 14);
    expect(s.maxFrequency).toBeCloseTo(20 * Math.PI, 13);
    // 50 Hz in a model whose time unit is the millisecond: 2π·50·0.001 = 0.1π rad/ms.
    expect(limitedBandInRadians({ minFrequency: 0, maxFrequency: 50, unit: 'hz' }, 'ms').maxFrequency).toBeCloseTo(0.1 * Math.PI, 14);
  });

  it('refuses Hz for a time unit of unknown length, and a band that overflows, naming the field (400)', () => {
    expect(() => limitedBandInRadians({ minFrequency: 0, maxFrequency: 5, unit: 'hz' }, 'step')).toThrow(
      expect.objectContaining({ status: 400, field: 'recipe.limitedBand.unit', message: expect.stringMatching(/rad\/step/) }),
    );
    expect(() => limitedBandInRadians({ minFrequency: 0, maxFrequency: 1e308, unit: 'hz' }, 'h')).toThrow(
      expect.objectContaining({ status: 400, field: 'recipe.limitedBand.maxFrequency' }),
    );
  });
});

describe('the recipe form agrees with the server', () => {
  it.each([
    ['10', '1', 'recipe.limitedBand.maxFrequency'],
    ['5', '5', 'recipe.limitedBand.maxFrequency'],
    ['-1', '5', 'recipe.limitedBand.minFrequency'],
    ['abc', '5', 'recipe.limitedBand.minFrequency'],
    ['0', '1e400', 'recipe.limitedBand.maxFrequency'],
    ['0', '', 'recipe.limitedBand.maxFrequency'],
  ])('the form refuses from=%j to=%j beside the field the route names (%s)', (from, to, field) => {
    const checked = checkLimitedBand(from, to, 'rad', true);
    expect(checked.ok).toBe(false);
    if (!checked.ok) expect(checked.field).toBe(field);
    const server = refusedField({ ...base, limitedBand: { minFrequency: Number(from === '' ? NaN : from), maxFrequency: Number(to === '' ? NaN : to) } });
    expect(server?.field).toBe(field);
  });

  it('accepts what the server accepts, and offers Hz only where it can be converted', () => {
    expect(checkLimitedBand('0', '8', 'rad', false)).toEqual({ ok: true, band: { minFrequency: 0, maxFrequency: 8, unit: 'rad' } });
    expect(checkLimitedBand('0', '8', 'hz', false)).toMatchObject({ ok: false, field: 'recipe.limitedBand.unit' });
    expect(checkLimitedBand('0', '8', 'hz', true)).toEqual({ ok: true, band: { minFrequency: 0, maxFrequency: 8, unit: 'hz' } });
  });

  it('gives the frequency-limited slider the balanced orders with no bound and no pole figures', () => {
    const balanced: OrderFigureTable = {
      available: true,
      orders: [1, 2, 4],
      figures: {
        1: { errorBound: 3, keptUnstable: 0, keptMarginal: 1, stiffnessRatio: null, maxStableStepEuler: 1, maxStableStepRk4: 2 },
        2: { errorBound: 2, keptUnstable: 0, keptMarginal: 1, stiffnessRatio: 4, maxStableStepEuler: 0.5, maxStableStepRk4: 1 },
        4: { errorBound: 1, keptUnstable: 0, keptMarginal: 1, stiffnessRatio: 9, maxStableStepEuler: 0.1, maxStableStepRk4: 0.2 },
      },
      limitNote: null,
    };
    const fl = frequencyLimitedTable(balanced);
    expect(fl.available && fl.orders).toEqual([1, 2, 4]);
    if (!fl.available) throw new Error('expected a table');
    for (const r of fl.orders) {
      expect(fl.figures[r]).toEqual({ errorBound: null, keptUnstable: 0, keptMarginal: 1, stiffnessRatio: null, maxStableStepEuler: null, maxStableStepRk4: null });
    }
    expect(frequencyLimitedTable({ available: false, reason: 'no stable part' })).toEqual({ available: false, reason: 'no stable part' });
  });
});
