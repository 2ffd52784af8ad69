// What a reduction request and an input-signal upload accept: the recipe (method, order rule, modal
// selection and band, the band of frequency-limited balanced truncation, the acceptance band) and where the
// result goes. Browser-safe (zod only): the recipe form validates with the same schema as the server
// (components/source-models/RecipeForm.tsx, through @hookform/resolvers).
import { z } from 'zod';

const positiveFrequency = (what: string) =>
  z.number({ error: `${what} must be a number (rad per time unit).` }).positive(`${what} must be above 0.`).finite(`${what} must be finite.`);

const bandSchema = z
  .object({ minFrequency: positiveFrequency('The lowest frequency'), maxFrequency: positiveFrequency('The highest frequency') })
  .refine((b) => b.maxFrequency > b.minFrequency, { message: 'The highest frequency must be above the lowest.', path: ['maxFrequency'] });

/**
 * The band of frequency-limited balanced truncation as the person entered it: 0 ≤ from < to, finite, in rad
 * per model time unit ('rad') or in Hz ('hz', cycles per second). Converted to rad per time unit by
 * limitedBandInRadians once the model's time unit is known.
 */
export const limitedBandSchema = z
  .object({
    minFrequency: z
      .number({ error: 'The band’s lower edge must be a finite number.' })
      .finite('The band’s lower edge must be finite.')
      .min(0, 'The band’s lower edge must be 0 or above.'),
    maxFrequency: z
      .number({ error: 'The band’s upper edge must be a finite number.' })
      .finite('The band’s upper edge must be finite.')
      .positive('The band’s upper edge must be above 0.'),
    unit: z.enum(['rad', 'hz'], { error: 'The band’s unit must be rad (per model time unit) or hz.' }).default('rad'),
  })
  .refine((b) => b.maxFrequency > b.minFrequency, { message: 'The band’s upper edge must be above its lower edge.', path: ['maxFrequency'] });
export type LimitedBandInput = z.infer<typeof limitedBandSchema>;

export const RECIPE_METHODS = ['balanced', 'residualization', 'modal', 'frequency-limited', 'irka'] as const;
export type RecipeMethod = (typeof RECIPE_METHODS)[number];

export const recipeSchema = z
  .object({
    method: z.enum(RECIPE_METHODS, { error: 'Method must be balanced, residualization, modal, frequency-limited or irka.' }),
    orderRule: z.enum(['order', 'tolerance'], { error: 'Choose the order by number or by tolerance.' }),
    order: z.number({ error: 'The order must be a number.' }).int('The order must be a whole number.').min(1, 'Keep at least 1 state.').optional(),
    tolerance: z
      .number({ error: 'The tolerance must be a number.' })
      .positive('The tolerance must be above 0.')
      .max(1, 'The tolerance is relative to ‖G‖∞; give a value at most 1.')
      .optional(),
    modalSelection: z.enum(['dominance', 'slowest', 'band'], { error: 'The selection rule must be dominance, slowest or band.' }).default('dominance'),
    band: bandSchema.optional(),
    /** frequency-limited balanced truncation: the band to balance on */
    limitedBand: limitedBandSchema.optional(),
    acceptance: z
      .object({
        minFrequency: positiveFrequency('The acceptance band’s lowest frequency'),
        maxFrequency: positiveFrequency('The acceptance band’s highest frequency'),
        maxError: z.number({ error: 'The largest error must be a number.' }).positive('The largest error must be above 0.').finite(),
      })
      .refine((b) => b.maxFrequency > b.minFrequency, { message: 'The highest frequency must be above the lowest.', path: ['maxFrequency'] })
      .optional(),
  })
  .superRefine((r, ctx) => {
    if (r.method === 'frequency-limited') {
      if (r.orderRule === 'tolerance') {
        ctx.addIssue({
          code: 'custom',
          path: ['orderRule'],
          message: 'Frequency-limited balanced truncation has no a-priori error bound to meet a tolerance; choose the order by number of states.',
        });
      }
      if (!r.limitedBand) ctx.addIssue({ code: 'custom', path: ['limitedBand'], message: 'Frequency-limited balanced truncation needs the band to balance on.' });
    } else if (r.limitedBand) {
      ctx.addIssue({ code: 'custom', path: ['limitedBand'], message: 'A band to balance on applies to frequency-limited balanced truncation only.' });
    }
    if (r.method === 'irka' && r.orderRule === 'tolerance') {
      ctx.addIssue({ code: 'custom', path: ['orderRule'], message: 'IRKA has no a-priori error bound to meet a tolerance; choose the order by number of states.' });
    }
    if (r.orderRule === 'order' && r.order === undefined) ctx.addIssue({ code: 'custom', path: ['order'], message: 'Give the number of states to keep.' });
    if (r.orderRule === 'tolerance' && r.tolerance === undefined) ctx.addIssue({ code: 'custom', path: ['tolerance'], message: 'Give the tolerance the bound must meet.' });
    if (r.method === 'modal' && r.modalSelection === 'band' && !r.band) ctx.addIssue({ code: 'custom', path: ['band'], message: 'The band rule needs a frequency band.' });
  });

const targetSchema = z.discriminatedUnion('kind', [
  z.object({
    kind: z.literal('new'),
    name: z.string({ error: 'Name the reduced model.' }).trim().min(1, 'Name the reduced model.').max(120, 'The name must be at most 120 characters.'),
    description: z.string().trim().max(4000, 'The description must be at most 4000 characters.').default(''),
  }),
  z.object({ kind: z.literal('existing'), reducedModelId: z.uuid({ error: 'Choose the reduced model to add a version to.' }) }),
]);

export const reductionRequestSchema = z.object({
  sourceVersionId: z.uuid({ error: 'The source version id must be a UUID.' }),
  recipe: recipeSchema,
  target: targetSchema,
});
export type ReductionRequest = z.infer<typeof reductionRequestSchema>;

export const signalFieldsSchema = z.object({ reducedVersionId: z.uuid({ error: 'The reduced version id must be a UUID.' }) });
