// A recipe in words, written once for every place that says what produced a reduced model: the comparison
// page's lead, the review sheet, the reduced-model lists, the lineage graph's edges, the recipe form's
// method choices, the worker's progress stages and the exports' text (C header, CSV bundle README).
// Pure and browser-safe: client components import it.
import { formatFrequency, formatNumber, frequencyUnit } from '@/lib/format';

export type RecipeMethod = 'balanced' | 'residualization' | 'modal' | 'frequency-limited' | 'irka';

/** The method's name in running text (trade names of published methods). */
export const METHOD_NAMES: Record<RecipeMethod, string> = {
  balanced: 'balanced truncation',
  residualization: 'balanced residualization',
  modal: 'modal truncation',
  'frequency-limited': 'frequency-limited balanced truncation',
  irka: 'IRKA (iterative rational Krylov)',
};

/** What sets each method apart, for the recipe form's choices. */
const METHOD_NOTES: Partial<Record<RecipeMethod, string>> = {
  residualization: 'keeps the DC gain',
  'frequency-limited': 'for a band',
  irka: 'H2-optimal, no a-priori bound',
};

/** The sentence that stands in for a bound where the method has none. */
export const NO_BOUND_NOTE = 'no a-priori error bound for this method';

const isMethod = (m: string): m is RecipeMethod => Object.prototype.hasOwnProperty.call(METHOD_NAMES, m);

/** The method's name, or the stored key itself for a method this build does not know. */
export function methodName(method: string): string {
  return isMethod(method) ? METHOD_NAMES[method] : method;
}

/** "Balanced residualization (keeps the DC gain)": the recipe form's label of a method. */
export function methodChoiceLabel(method: RecipeMethod): string {
  const name = METHOD_NAMES[method];
  const note = METHOD_NOTES[method];
  return `${name.charAt(0).toUpperCase()}${name.slice(1)}${note ? ` (${note})` : ''}`;
}

/** A short edge label of the lineage graph: "balanced truncation, r = 12". */
export function methodOrderLabel(method: string, order: number): string {
  return `${methodName(method)}, r = ${order}`;
}

type Band = { minFrequency?: unknown; maxFrequency?: unknown; unit?: unknown };

export interface RecipeInWords {
  method: string;
  order: number | null;
  tolerance: number | null;
  /** recipes.options: { selection, band } for modal truncation, { band, enteredBand } for frequency-limited */
  options: object;
}

const bandOf = (v: unknown): { lo: number; hi: number; unit: unknown } | null => {
  const b = v as Band | undefined;
  return b && typeof b === 'object' && typeof b.minFrequency === 'number' && typeof b.maxFrequency === 'number'
    ? { lo: b.minFrequency, hi: b.maxFrequency, unit: b.unit }
    : null;
};

/**
 * The recipe in one phrase: method, mode selection or band, and the order rule, e.g. "modal truncation,
 * modes kept first by slowest, order 6" or "balanced truncation, smallest order whose bound is at most
 * 0.01 × ‖G‖∞ (gave 8)". `resultOrder` adds the order the tolerance rule gave; `plain` (the exports' text
 * files) writes every digit and ASCII only.
 */
export function describeRecipe(recipe: RecipeInWords, options: { timeBase?: string; resultOrder?: number; plain?: boolean } = {}): string {
  const timeBase = options.timeBase || 's';
  const plain = options.plain ?? false;
  const num = plain ? (x: number) => String(x) : (x: number) => formatNumber(x);
  const frequencyText = plain ? (w: number) => `${w} ${frequencyUnit(timeBase)}` : (w: number) => formatFrequency(w, timeBase);
  const dash = plain ? ' to ' : '–';
  const opts = recipe.options as Record<string, unknown>;
  const parts = [methodName(recipe.method)];
  const band = bandOf(opts.band);
  if (recipe.method === 'modal') {
    const selection = typeof opts.selection === 'string' ? opts.selection : 'dominance';
    parts[0] += `, modes kept first by ${selection}${band ? ` in ${num(band.lo)}${dash}${frequencyText(band.hi)}` : ''}`;
  } else if (recipe.method === 'frequency-limited' && band) {
    const entered = bandOf(opts.enteredBand);
    const given = entered && entered.unit === 'hz' ? ` (given as ${num(entered.lo)}${dash}${num(entered.hi)} Hz)` : '';
    parts[0] += ` on the band ${num(band.lo)}${dash}${frequencyText(band.hi)}${given}`;
  }
  if (recipe.order !== null) parts.push(`order ${recipe.order}`);
  else if (recipe.tolerance !== null) {
    const gave = options.resultOrder !== undefined ? ` (gave ${options.resultOrder})` : '';
    parts.push(`smallest order whose bound is at most ${num(recipe.tolerance)} ${plain ? 'x ||G||inf' : '× ‖G‖∞'}${gave}`);
  }
  if (recipe.method === 'frequency-limited' || recipe.method === 'irka') parts.push(NO_BOUND_NOTE);
  return parts.join(', ');
}
