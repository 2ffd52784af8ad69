// The recipe schema (lib/reduced-models.ts) for frequency-limited balanced truncation (issue 15): a band
// 0 ≤ w1 < w2, finite, in rad per time unit or Hz; refused bands name their field, as the route answers
// (lib/http.ts validationError); the order is by number only (the method has no a-priori bound), and the
// Hz conversion is ω = 2π f × (seconds per time unit), the definition of the hertz.
import { describe, expect, it } from 'vitest';
import { limitedBandInRadians, recipeSchema, reductionRequestSchema } from '@/lib/reduced-models';
import { validationError } from '@/lib/http';

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
