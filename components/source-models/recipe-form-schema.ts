/**
 * The recipe form's values (as typed, strings) and their validation: first the form's own checks, each
 * message under the request field it is about ('recipe.tolerance', 'target.name', …), then the values as a
 * request body through the server's own schema (lib/reduced-models/schemas.ts reductionRequestSchema), so a
 * body the form sends is one the route accepts. Used by RecipeForm through @hookform/resolvers; pure,
 * tested in node.
 */
import { z } from 'zod';
import { reductionRequestSchema } from '@/lib/reduced-models/schemas';
import { checkLimitedBand, type Method, type ModalSelection } from './recipe-choices';

const formValuesSchema = z.object({
  orderRule: z.enum(['order', 'tolerance']),
  tolerance: z.string(),
  /** modal truncation's band rule */
  band: z.object({ from: z.string(), to: z.string() }),
  /** frequency-limited balanced truncation's band */
  limitedBand: z.object({ from: z.string(), to: z.string(), unit: z.enum(['rad', 'hz']) }),
  withAcceptance: z.boolean(),
  acceptance: z.object({ from: z.string(), to: z.string(), maxError: z.string() }),
  /** 'new', or the id of the reduced model the result becomes the next version of */
  target: z.string(),
  name: z.string(),
  description: z.string(),
});
export type RecipeFormValues = z.infer<typeof formValuesSchema>;

/** What the values are checked with besides themselves: the workspace's choices and the model's time unit. */
export interface RecipeFormContext {
  sourceVersionId: string;
  method: Method;
  selection: ModalSelection;
  /** the order on the slider */
  order: number;
  /** the model's time unit has a known length, so a band in Hz can be converted */
  hzAllowed: boolean;
  /** the order is chosen by number only (recipe-choices.ts orderByNumberOnly): no tolerance rule */
  numberOnly?: boolean;
}

/** A number as typed: undefined when nothing is typed, NaN when it is not a finite number. */
export function typedNumber(text: string): number | undefined {
  const t = text.trim();
  if (t === '') return undefined;
  const v = Number(t);
  return Number.isFinite(v) ? v : NaN;
}

/** The modal band rule's band when both edges are typed, positive and in order; else null. */
export function modalBand(band: RecipeFormValues['band']): [number, number] | null {
  const lo = typedNumber(band.from);
  const hi = typedNumber(band.to);
  return lo !== undefined && hi !== undefined && lo > 0 && hi > lo ? [lo, hi] : null;
}

const acceptanceBand = (a: RecipeFormValues['acceptance']) => ({ lo: typedNumber(a.from), hi: typedNumber(a.to), max: typedNumber(a.maxError) });

type RequestInput = z.input<typeof reductionRequestSchema>;

/** The form's values and context as a reduction request body, for the server's schema to check (hence the cast). */
function requestBody(v: RecipeFormValues, ctx: RecipeFormContext): RequestInput {
  const limited = ctx.method === 'frequency-limited';
  const orderRule = limited || ctx.numberOnly ? 'order' : v.orderRule;
  const recipe: Record<string, unknown> = { method: ctx.method, orderRule, modalSelection: ctx.selection };
  if (limited) {
    const checked = checkLimitedBand(v.limitedBand.from, v.limitedBand.to, v.limitedBand.unit, ctx.hzAllowed);
    if (checked.ok) recipe.limitedBand = checked.band;
  }
  if (orderRule === 'order') recipe.order = ctx.order;
  else recipe.tolerance = typedNumber(v.tolerance);
  const band = ctx.method === 'modal' && ctx.selection === 'band' ? modalBand(v.band) : null;
  if (band) recipe.band = { minFrequency: band[0], maxFrequency: band[1] };
  if (v.withAcceptance) {
    const { lo, hi, max } = acceptanceBand(v.acceptance);
    recipe.acceptance = { minFrequency: lo, maxFrequency: hi, maxError: max };
  }
  return {
    sourceVersionId: ctx.sourceVersionId,
    recipe,
    target: v.target === 'new' ? { kind: 'new', name: v.name.trim(), description: v.description.trim() } : { kind: 'existing', reducedModelId: v.target },
  } as RequestInput;
}

export function recipeFormSchema(ctx: RecipeFormContext) {
  return formValuesSchema
    .superRefine((v, issues) => {
      const fail = (field: string, message: string) => issues.addIssue({ code: 'custom', path: field.split('.'), message });
      const limited = ctx.method === 'frequency-limited';
      if (limited) {
        const checked = checkLimitedBand(v.limitedBand.from, v.limitedBand.to, v.limitedBand.unit, ctx.hzAllowed);
        if (!checked.ok) fail(checked.field, checked.message);
      }
      if (!limited && !ctx.numberOnly && v.orderRule === 'tolerance' && !((typedNumber(v.tolerance) ?? NaN) > 0)) {
        fail('recipe.tolerance', 'Give a positive tolerance, e.g. 1e-3.');
      }
      if (ctx.method === 'modal' && ctx.selection === 'band' && !modalBand(v.band)) {
        fail('recipe.band', 'Give the band as two frequencies, the lower first.');
      }
      if (v.withAcceptance) {
        const { lo, hi, max } = acceptanceBand(v.acceptance);
        if (!((lo ?? NaN) > 0 && (hi ?? NaN) > (lo ?? NaN))) fail('recipe.acceptance.maxFrequency', 'Give the band as two positive frequencies, the lower first.');
        else if (!((max ?? NaN) > 0)) fail('recipe.acceptance.maxError', 'Give the largest error allowed in the band (a positive gain).');
      }
      if (v.target === 'new' && v.name.trim() === '') fail('target.name', 'Name the reduced model.');
    })
    .transform((v) => requestBody(v, ctx))
    .pipe(reductionRequestSchema);
}
