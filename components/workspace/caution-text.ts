/**
 * The caution of DESIGN.md §8, in Modeshelf's words. It goes on every reduced-model page and into every
 * export (JSON, CSV bundle, C header), so it is plain ASCII: a C comment or a CSV cell can carry it as is.
 */

export const CAUTION_TITLE = 'Caution';

/** One sentence per point of §8, in order; CAUTION_TEXT is these joined. */
export const CAUTION_POINTS: readonly string[] = [
  'A controller built on this reduced model may run a machine that can injure people.',
  'The reduced model only approximates its source model; rely on it only inside the error bounds and the frequency band reported with it.',
  'Before use, check the closed-loop behaviour against the full model, and again on the real hardware.',
  "Follow your organisation's functional-safety process and the codes and standards that apply where the machine runs.",
  'An approval in Modeshelf records that the model was reviewed; it is not a certification.',
];

export const CAUTION_TEXT: string = CAUTION_POINTS.join(' ');
