// What the pin routes accept: a new pin (the reduced model by slug, and how to resolve it) and a changed one.
import { z } from 'zod';
import { SLUG_PATTERN } from '@/lib/slug';

export const PIN_MODES = ['exact', 'newest_approved'] as const;
export type PinMode = (typeof PIN_MODES)[number];

const positiveInt = (what: string) =>
  z.number({ error: `${what} must be a whole number.` }).int(`${what} must be a whole number.`).min(1, `${what} must be at least 1.`);

const pinFields = z.object({
  reducedModel: z
    .string({ error: 'Choose a reduced model.' })
    .regex(SLUG_PATTERN, 'The reduced model must be given by its slug.'),
  mode: z.enum(PIN_MODES, { error: 'Mode must be "exact" or "newest_approved".' }),
  version: positiveInt('Version').optional(),
  maxOrder: positiveInt('Maximum order').nullable().optional(),
  maxRelativeHInfinityError: z
    .number({ error: 'Maximum relative H-infinity error must be a number (a ratio, e.g. 0.01 for 1 %).' })
    .refine((v) => Number.isFinite(v) && v > 0, 'Maximum relative H-infinity error must be a positive ratio, e.g. 0.01 for 1 %.')
    .nullable()
    .optional(),
  requireAcceptancePassed: z.boolean({ error: 'Acceptance band passed must be true or false.' }).optional(),
});

export type PinShape = Omit<z.infer<typeof pinFields>, 'reducedModel'>;

function checkPinShape(pin: PinShape, ctx: z.RefinementCtx): void {
  if (pin.mode === 'exact') {
    if (pin.version === undefined) ctx.addIssue({ code: 'custom', path: ['version'], message: 'An exact pin needs the version number to pin.' });
    for (const field of ['maxOrder', 'maxRelativeHInfinityError', 'requireAcceptancePassed'] as const) {
      if (pin[field] !== undefined && pin[field] !== null && pin[field] !== false) {
        ctx.addIssue({ code: 'custom', path: [field], message: 'Limits apply to "newest approved" pins only; an exact pin names its version.' });
      }
    }
  } else if (pin.version !== undefined) {
    ctx.addIssue({ code: 'custom', path: ['version'], message: 'A "newest approved" pin names no version; give limits instead, or pin exactly.' });
  }
}

/** A new pin: the reduced model (slug) and how to resolve it. */
export const pinInputSchema = pinFields.superRefine(checkPinShape);
/** A changed pin: the same, without the model (a pin keeps its model; pin another one instead). */
export const pinUpdateSchema = pinFields.omit({ reducedModel: true }).superRefine(checkPinShape);

export type PinUpdate = z.infer<typeof pinUpdateSchema>;
export type PinInput = z.infer<typeof pinInputSchema>;
