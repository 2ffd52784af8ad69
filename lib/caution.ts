/**
 * The caution every reduced-model page (components/workspace/Caution.tsx) and every export (JSON, CSV
 * bundle, C header; lib/exports/, lib/pull-api.ts) carries: reduced models go into controllers of machines
 * that can hurt people. It lives in lib/ so that the exports use it without React and the pages and the
 * exports show the same words. Plain ASCII: a C comment or a CSV cell can carry it as is.
 */

export const CAUTION_TITLE = 'Caution';

/** One sentence per point of the caution, in order; CAUTION_TEXT is these joined. */
export const CAUTION_POINTS: readonly string[] = [
  'A controller built on this reduced model may run a machine that can injure people.',
  'The reduced model only approximates its source model; rely on it only inside the error bounds and the frequency band reported with it.',
  'Before use, check the closed-loop behaviour against the full model, and again on the real hardware.',
  "Follow your organisation's functional-safety process and the codes and standards that apply where the machine runs.",
  'An approval in Modeshelf records that the model was reviewed; it is not a certification.',
];

export const CAUTION_TEXT: string = CAUTION_POINTS.join(' ');
