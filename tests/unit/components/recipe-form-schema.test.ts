// The recipe form's validation (components/source-models/recipe-form-schema.ts), as RecipeForm runs it
// through @hookform/resolvers: the form's own messages under the request fields they are about, the values
// turned into the request body the server's schema accepts, and the server schema's own message for what
// the form does not check itself.
import { describe, expect, it } from 'vitest';
import { get } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { recipeFormSchema, type RecipeFormContext, type RecipeFormValues } from '@/components/source-models/recipe-form-schema';
import { reductionRequestSchema } from '@/lib/reduced-models/schemas';

const SOURCE = '00000000-0000-4000-8000-000000000000';
const MODEL = '11111111-1111-4111-8111-111111111111';

const values = (change: Partial<RecipeFormValues> = {}): RecipeFormValues => ({
  orderRule: 'order',
  tolerance: '1e-3',
  band: { from: '', to: '' },
  limitedBand: { from: '', to: '', unit: 'rad' },
  withAcceptance: false,
  acceptance: { from: '', to: '', maxError: '' },
  target: 'new',
  name: 'Wall, reduced',
  description: '',
  ...change,
});
const context = (change: Partial<RecipeFormContext> = {}): RecipeFormContext => ({
  sourceVersionId: SOURCE,
  method: 'balanced',
  selection: 'dominance',
  order: 6,
  hzAllowed: true,
  ...change,
});

/** The messages by request field, as the form reads them (react-hook-form's errors through the resolver). */
async function messages(v: RecipeFormValues, ctx: RecipeFormContext, fields: string[]): Promise<Record<string, string | undefined>> {
  const result = await zodResolver(recipeFormSchema(ctx))(v, ctx, { fields: {}, shouldUseNativeValidation: false });
  return Object.fromEntries(fields.map((f) => [f, (get(result.errors, f) as { message?: string } | undefined)?.message]));
}

describe('the recipe form’s validation', () => {
  it('turns a valid form into the body the server accepts', async () => {
    const result = await zodResolver(recipeFormSchema(context()))(values({ description: '  for the MPC  ' }), context(), { fields: {}, shouldUseNativeValidation: false });
    expect(result.errors).toEqual({});
    expect(result.values).toEqual({
      sourceVersionId: SOURCE,
      recipe: { method: 'balanced', orderRule: 'order', order: 6, modalSelection: 'dominance' },
      target: { kind: 'new', name: 'Wall, reduced', description: 'for the MPC' },
    });
    expect(reductionRequestSchema.safeParse(result.values).success).toBe(true);
  });

  it('asks for a positive tolerance, both band edges in order, and a name, each beside its field', async () => {
    const found = await messages(
      values({ orderRule: 'tolerance', tolerance: 'abc', band: { from: '50', to: '5' }, withAcceptance: true, acceptance: { from: '1', to: '10', maxError: '0' }, name: '  ' }),
      context({ method: 'modal', selection: 'band' }),
      ['recipe.tolerance', 'recipe.band', 'recipe.acceptance.maxFrequency', 'recipe.acceptance.maxError', 'target.name'],
    );
    expect(found).toEqual({
      'recipe.tolerance': 'Give a positive tolerance, e.g. 1e-3.',
      'recipe.band': 'Give the band as two frequencies, the lower first.',
      'recipe.acceptance.maxFrequency': undefined,
      'recipe.acceptance.maxError': 'Give the largest error allowed in the band (a positive gain).',
      'target.name': 'Name the reduced model.',
    });
    const band = await messages(values({ withAcceptance: true, acceptance: { from: '10', to: '1', maxError: '0.1' } }), context(), ['recipe.acceptance.maxFrequency']);
    expect(band['recipe.acceptance.maxFrequency']).toBe('Give the band as two positive frequencies, the lower first.');
  });

  it('checks the band of frequency-limited balanced truncation as the server does, and orders it by number only', async () => {
    const limited = context({ method: 'frequency-limited' });
    expect(await messages(values({ limitedBand: { from: '', to: '50', unit: 'rad' } }), limited, ['recipe.limitedBand.minFrequency'])).toEqual({
      'recipe.limitedBand.minFrequency': 'Give the band’s lower edge (0 for a band from DC).',
    });
    expect(await messages(values({ limitedBand: { from: '5', to: '5', unit: 'rad' } }), limited, ['recipe.limitedBand.maxFrequency'])).toEqual({
      'recipe.limitedBand.maxFrequency': 'The band’s upper edge must be above its lower edge.',
    });
    expect(await messages(values({ limitedBand: { from: '0', to: '8', unit: 'hz' } }), { ...limited, hzAllowed: false }, ['recipe.limitedBand.unit'])).toEqual({
      'recipe.limitedBand.unit': 'Hz needs a model time unit of known length; give the band in rad per time unit.',
    });
    // A tolerance rule left over from another method does not apply: the order is by number.
    const result = await zodResolver(recipeFormSchema(limited))(values({ orderRule: 'tolerance', limitedBand: { from: '0', to: '8', unit: 'hz' } }), limited, {
      fields: {},
      shouldUseNativeValidation: false,
    });
    expect(result.values).toMatchObject({ recipe: { method: 'frequency-limited', orderRule: 'order', order: 6, limitedBand: { minFrequency: 0, maxFrequency: 8, unit: 'hz' } } });
  });

  it('leaves what the form does not check to the server schema, with its message', async () => {
    const found = await messages(values({ target: 'not-a-model-id' }), context(), ['target.reducedModelId']);
    expect(found['target.reducedModelId']).toBe('Choose the reduced model to add a version to.');
    const existing = await zodResolver(recipeFormSchema(context()))(values({ target: MODEL }), context(), { fields: {}, shouldUseNativeValidation: false });
    expect(existing.values).toMatchObject({ target: { kind: 'existing', reducedModelId: MODEL } });
  });
});
