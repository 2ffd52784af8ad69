/**
 * The recipe form's arithmetic, on the figures the analysis stored (no decomposition in the browser): which
 * order table a method and selection rule use, the order the tolerance rule would choose, and which poles a
 * modal truncation keeps. Pure functions, tested in node.
 */
import type { AnalysisRecord, OrderFigureTable, OrderFiguresRecord } from '@/lib/engine-tasks/records';
// The engine's own ranking rule (a pure module: no linear algebra reaches the browser).
import { rankStoredModes } from '@/reduction/mode-ranking';
import { firstOrderWithin } from '@/reduction/order';

export type Method = 'balanced' | 'residualization' | 'modal' | 'frequency-limited' | 'irka';
export type ModalSelection = 'dominance' | 'slowest' | 'band';

/**
 * Whether the order is chosen by number only: methods without an a-priori bound (frequency-limited balanced
 * truncation, IRKA), and every method on the large-model path (its bounds are estimates over the leading
 * Hankel values, shown on the slider for each order).
 */
export function orderByNumberOnly(analysis: AnalysisRecord, method: Method): boolean {
  return method === 'frequency-limited' || method === 'irka' || analysis.path === 'sparse';
}

export function storedTable(analysis: AnalysisRecord, method: Method, selection: ModalSelection): OrderFigureTable | null {
  if (method === 'balanced') return analysis.orderFigures.balanced;
  // IRKA has no bound: the balanced orders without it on the dense path; the large-model path's plain orders.
  if (method === 'irka') return analysis.path === 'sparse' ? analysis.orderFigures.modalDominance : frequencyLimitedTable(analysis.orderFigures.balanced);
  if (method === 'frequency-limited') {
    // On the large-model path the method starts from the balanced model of every resolved value (reduction/
    // sparse/frequency-limited.ts), so its order stays below their count.
    const table = frequencyLimitedTable(analysis.orderFigures.balanced);
    return analysis.path === 'sparse' && table.available ? { ...table, orders: table.orders.slice(0, -1) } : table;
  }
  if (method === 'residualization') return analysis.orderFigures.residualization;
  if (selection === 'dominance') return analysis.orderFigures.modalDominance;
  if (selection === 'slowest') return analysis.orderFigures.modalSlowest;
  return null; // the band rule's table depends on the band: fetched for it
}

/**
 * The order slider of frequency-limited balanced truncation: the balanced orders (the band's gramians are
 * never of higher numerical rank than the whole axis', so the same ceiling applies; reduction/frequency-
 * limited.ts forms fewer states and says so when the band needs fewer), with no bound column (the method has
 * no a-priori bound) and no stiffness or step figures (the reduced poles depend on the band and are known
 * only after the run). The states kept exactly for marginal and unstable poles are the same as for every method.
 */
export function frequencyLimitedTable(balanced: OrderFigureTable): OrderFigureTable {
  if (!balanced.available) return balanced;
  const figures: Record<number, OrderFiguresRecord> = {};
  for (const order of balanced.orders) {
    const f = balanced.figures[order];
    figures[order] = {
      errorBound: null,
      keptUnstable: f?.keptUnstable ?? 0,
      keptMarginal: f?.keptMarginal ?? 0,
      stiffnessRatio: null,
      maxStableStepEuler: null,
      maxStableStepRk4: null,
    };
  }
  return { available: true, orders: [...balanced.orders], figures, limitNote: balanced.limitNote };
}

/** Frequency-limited band as entered, checked as the server checks it (lib/reduced-models/schemas.ts limitedBandSchema). */
export type BandUnit = 'rad' | 'hz';
export type BandCheck =
  | { ok: true; band: { minFrequency: number; maxFrequency: number; unit: BandUnit } }
  | { ok: false; field: 'recipe.limitedBand.minFrequency' | 'recipe.limitedBand.maxFrequency' | 'recipe.limitedBand.unit'; message: string };

export function checkLimitedBand(fromText: string, toText: string, unit: BandUnit, hzAllowed: boolean): BandCheck {
  const read = (t: string) => (t.trim() === '' ? NaN : Number(t.trim()));
  const lo = read(fromText);
  const hi = read(toText);
  if (fromText.trim() === '') return { ok: false, field: 'recipe.limitedBand.minFrequency', message: 'Give the band’s lower edge (0 for a band from DC).' };
  if (!Number.isFinite(lo)) return { ok: false, field: 'recipe.limitedBand.minFrequency', message: 'The band’s lower edge must be a finite number.' };
  if (lo < 0) return { ok: false, field: 'recipe.limitedBand.minFrequency', message: 'The band’s lower edge must be 0 or above.' };
  if (toText.trim() === '') return { ok: false, field: 'recipe.limitedBand.maxFrequency', message: 'Give the band’s upper edge.' };
  if (!Number.isFinite(hi)) return { ok: false, field: 'recipe.limitedBand.maxFrequency', message: 'The band’s upper edge must be a finite number.' };
  if (!(hi > lo)) return { ok: false, field: 'recipe.limitedBand.maxFrequency', message: 'The band’s upper edge must be above its lower edge.' };
  if (unit === 'hz' && !hzAllowed) return { ok: false, field: 'recipe.limitedBand.unit', message: 'Hz needs a model time unit of known length; give the band in rad per time unit.' };
  return { ok: true, band: { minFrequency: lo, maxFrequency: hi, unit } };
}

/**
 * The order the tolerance rule picks: the smallest offered order whose bound is at most tolerance·‖Gs‖∞
 * (reduction/order.ts firstOrderWithin; Antoulas 2005, §7.2). Null when no offered order meets it (the engine then goes on
 * to larger orders than the slider offers, up to the full stable part).
 */
export function orderForTolerance(table: OrderFigureTable, tolerance: number, referenceNorm: number | null): { order: number; bound: number } | null {
  if (!table.available || !(tolerance > 0) || referenceNorm === null) return null;
  const bound = (order: number) => table.figures[order]?.errorBound;
  const order = firstOrderWithin(table.orders, bound, tolerance * referenceNorm);
  return order === undefined ? null : { order, bound: bound(order) as number };
}

/**
 * For the pole map: which poles a modal truncation to `order` states keeps (every marginal and unstable
 * pole, then the ranked modes until the order is reached). Null for the balanced methods, whose reduced
 * poles are not a subset of the full model's.
 */
export function keptPoles(analysis: AnalysisRecord, method: Method, selection: ModalSelection, order: number): boolean[] | null {
  if (method !== 'modal' || selection === 'band') return null;
  const { re, im, stability } = analysis.poles;
  const kept = re.map((_, i) => stability[i] !== 'stable');
  let states = analysis.marginalPoles + analysis.unstablePoles;
  // The mode list and the pole list come from two eigenvalue computations; a mode is matched to the
  // nearest pole not yet taken (and a pair to its conjugate as well).
  const take = (r: number, i: number) => {
    let best = -1;
    let distance = Infinity;
    for (let k = 0; k < re.length; k++) {
      if (kept[k]) continue;
      const d = Math.hypot(re[k] - r, im[k] - i);
      if (d < distance) {
        distance = d;
        best = k;
      }
    }
    if (best >= 0) kept[best] = true;
  };
  for (const mode of rankStoredModes(analysis.modes, { rule: selection })) {
    if (states >= order) break;
    take(mode.re, Math.abs(mode.im));
    if (mode.states === 2) take(mode.re, -Math.abs(mode.im));
    states += mode.states;
  }
  return kept;
}

/** A sensible first order: the smallest offered order whose bound is below 1 % of ‖Gs‖∞, else a tenth of the list. */
export function suggestedOrder(table: OrderFigureTable, referenceNorm: number | null): number {
  if (!table.available || table.orders.length === 0) return 1;
  const byTolerance = orderForTolerance(table, 0.01, referenceNorm);
  return byTolerance?.order ?? table.orders[Math.min(table.orders.length - 1, Math.floor(table.orders.length / 10))];
}
