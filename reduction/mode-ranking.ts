/**
 * The order in which modal truncation keeps modes (reduction/modal.ts), as pure functions with no linear
 * algebra and no imports, so the engine, the worker's order slider (lib/engine-tasks/order-figures.ts) and
 * the recipe form (which poles a modal truncation keeps) rank modes by one rule.
 *
 * Rules: by dominance, the bound ‖cᵢ‖‖bᵢ‖/|Re λᵢ| on the mode's share of ‖G‖∞ (largest first; Antoulas,
 * "Approximation of Large-Scale Dynamical Systems", SIAM 2005, §9.2); slowest first (smallest |Re λ|, ties by
 * dominance); or the modes whose natural frequency |λ| lies in a band first, then by dominance.
 */
import type { PoleStability } from './poles';

export type ModalSelection =
  | { readonly rule: 'dominance' }
  | { readonly rule: 'slowest' }
  | { readonly rule: 'band'; readonly band: readonly [number, number] };

/** What a selection rule looks at in a mode. */
export interface RankedModeFacts {
  readonly re: number;
  readonly naturalFrequency: number;
  readonly dominance: number;
}

/**
 * The ranking as a comparator (modes to keep first). `facts` reads a mode of any record type (the order
 * slider ranks stored mode records by the same rule as the engine ranks its modes).
 */
export function modeComparator<M>(selection: ModalSelection, facts: (m: M) => RankedModeFacts): (a: M, b: M) => number {
  const byDominance = (a: M, b: M) => facts(b).dominance - facts(a).dominance;
  if (selection.rule === 'dominance') return byDominance;
  if (selection.rule === 'slowest') return (a, b) => Math.abs(facts(a).re) - Math.abs(facts(b).re) || byDominance(a, b);
  const [lo, hi] = selection.band;
  const inBand = (m: M) => {
    const wn = facts(m).naturalFrequency;
    return wn >= lo && wn <= hi;
  };
  return (a, b) => Number(inBand(b)) - Number(inBand(a)) || byDominance(a, b);
}

/** A mode as stored by an analysis: a pair is listed once (im ≥ 0) with `states` = 2. */
export interface StoredMode {
  readonly re: number;
  readonly im: number;
  readonly states: 1 | 2;
  readonly stability: PoleStability;
  /** null for marginal and unstable poles, which are kept exactly and not ranked */
  readonly dominance: number | null;
}

/** The stable, ranked modes of an analysis in the order modal truncation keeps them. */
export function rankStoredModes<M extends StoredMode>(modes: readonly M[], selection: ModalSelection): M[] {
  const stable = modes.filter((m) => m.stability === 'stable' && m.dominance !== null);
  const order = modeComparator<M>(selection, (m) => ({ re: m.re, naturalFrequency: Math.hypot(m.re, m.im), dominance: m.dominance ?? 0 }));
  return [...stable].sort(order);
}

/**
 * Number of states of the stable modes whose natural frequency |λ| lies in [lo, hi] rad per time unit:
 * the band rule's own order. A mode without `stability` is one of the engine's modes, all stable.
 */
export function statesInBand(
  modes: readonly { readonly re: number; readonly im: number; readonly states: 1 | 2; readonly stability?: PoleStability }[],
  band: readonly [number, number],
): number {
  return modes
    .filter((m) => (m.stability ?? 'stable') === 'stable')
    .filter((m) => {
      const wn = Math.hypot(m.re, m.im);
      return wn >= band[0] && wn <= band[1];
    })
    .reduce((s, m) => s + m.states, 0);
}
