// The figures the order slider shows for every order it offers, worked out once when a source version is
// analysed, so moving the slider never starts a decomposition (issue 5, "Choose how many states to keep").
//
// Per order r: the a-priori bound, the states kept exactly for marginal and unstable poles, the reduced
// model's stiffness ratio (fastest over slowest decay rate of its stable poles; reduction/analysis.ts) and
// the largest stable fixed step of forward Euler and classical RK4 for its spectrum (reduction/step-limits.ts,
// after Hairer & Wanner 1996, §IV.2). The reduced model's poles are those of its reduced stable part plus
// the full model's marginal and unstable poles, which every method keeps exactly (reduction/reduce.ts).
//
//   balanced methods: one ReductionBasis (split and balanced realization, Laub et al. 1987 square-root form);
//     each order is a slice of it (truncation) or one Schur complement (residualization, Liu & Anderson
//     1989), and the eigenvalues of that r×r matrix. Offered up to the numerical minimal order (the further
//     states carry no input–output behaviour) and at most MAX_BALANCED_STABLE_ORDER stable states.
//   modal truncation: the kept poles are a prefix of the ranked modes, so everything follows from the
//     analysis' mode list by running sums and minima, without any matrix work.
import {
  modelPoles,
  rankStoredModes,
  stiffnessFromRates,
  prepareReduction,
  snapMarginalPoles,
  stepLimitsFromPoles,
  type PreparationCache,
  type ComplexVector,
  type ModalSelection,
  type ReductionMethod,
  type StateSpaceModel,
} from '../../reduction/index';
import type { ModeRecord, OrderFigureTable, OrderFiguresRecord, PoleStability } from './records';

/** Balanced orders beyond this many stable states are not offered on the slider (common practice: a reduced model
 *  meant for control design or real-time use has tens of states; the "by tolerance" rule still reaches any order). */
export const MAX_BALANCED_STABLE_ORDER = 150;

export interface KeptPoles {
  /** the full model's marginal and unstable poles, kept exactly by every method */
  readonly re: readonly number[];
  readonly im: readonly number[];
  readonly stability: readonly PoleStability[];
  readonly unstable: number;
  readonly marginal: number;
  /** relative stability tolerance and spectral radius of the full model (reduction/spectral-split.ts) */
  readonly tolerance: number;
  readonly scale: number;
}

export function keptPolesOf(
  poles: { re: readonly number[]; im: readonly number[]; stability: readonly PoleStability[] },
  tolerance: number,
): KeptPoles {
  const re: number[] = [];
  const im: number[] = [];
  const stability: PoleStability[] = [];
  let scale = 0;
  poles.re.forEach((r, i) => {
    scale = Math.max(scale, Math.hypot(r, poles.im[i]));
    if (poles.stability[i] === 'stable') return;
    re.push(r);
    im.push(poles.im[i]);
    stability.push(poles.stability[i]);
  });
  return {
    re,
    im,
    stability,
    unstable: stability.filter((s) => s === 'unstable').length,
    marginal: stability.filter((s) => s === 'marginal').length,
    tolerance,
    scale: scale > 0 ? scale : 1,
  };
}


const finiteOrNull = (x: number): number | null => (Number.isFinite(x) ? x : null);

/** Figures of a reduced model from the poles of its reduced stable part and the exactly kept poles. */
export function figuresFromPoles(
  stableRe: ArrayLike<number>,
  stableIm: ArrayLike<number>,
  kept: KeptPoles,
  errorBound: number | null,
): OrderFiguresRecord {
  // The kept poles as the step limits see them, marginal ones on the axis (the analysis' own rule).
  const keptStep = snapMarginalPoles(kept.re, kept.im, kept.stability, kept.tolerance, kept.scale);
  const re = Float64Array.from([...Array.from(stableRe), ...Array.from(keptStep.re)]);
  const im = Float64Array.from([...Array.from(stableIm), ...Array.from(keptStep.im)]);
  const limits = stepLimitsFromPoles({ re, im });
  // Stiffness over the stable poles only; the reduced stable part's poles are stable by construction for the
  // balanced methods (Pernebo & Silverman 1982), and classifying them again would count a rounding-level one
  // as marginal. Frequency-limited balanced truncation gives no such guarantee: a pole in the right
  // half-plane is left out of the stiffness ratio, holds both step limits at 0 (step-limits.ts), and the
  // reduction task reports the model as not stable (AccuracyFiguresRecord.reducedStable).
  const { stiffnessRatio } = stiffnessFromRates(Array.from(stableRe, (re) => -re));
  return {
    errorBound: errorBound === null ? null : finiteOrNull(errorBound),
    keptUnstable: kept.unstable,
    keptMarginal: kept.marginal,
    stiffnessRatio,
    maxStableStepEuler: finiteOrNull(limits.forwardEuler.maxStep),
    maxStableStepRk4: finiteOrNull(limits.rk4.maxStep),
  };
}

/**
 * Figures for balanced truncation or residualization at each offered order. `onOrder(done, total)` reports
 * progress. Throws what prepareReduction throws (ModelError).
 */
export function balancedOrderFigures(
  model: StateSpaceModel,
  method: Extract<ReductionMethod, 'balanced' | 'residualization'>,
  kept: KeptPoles,
  onOrder?: (done: number, total: number) => void,
  cache?: PreparationCache,
): OrderFigureTable {
  const basis = prepareReduction(model, { method, stabilityTolerance: kept.tolerance }, cache);
  if (basis.stableStates === 0) {
    return { available: false, reason: 'the model has no stable part to reduce: every pole is marginal or unstable' };
  }
  const nu = basis.unstableStates;
  const stableLimit = Math.min(basis.minimalOrder, MAX_BALANCED_STABLE_ORDER);
  const orders = basis.allowedOrders().filter((r) => r >= 1 && r - nu <= stableLimit);
  if (orders.length === 0) {
    return { available: false, reason: 'the stable part has no input–output behaviour (all Hankel singular values are negligible)' };
  }
  const figures: Record<number, OrderFiguresRecord> = {};
  orders.forEach((order, k) => {
    const reduced = basis.truncateAt(order);
    const poles: ComplexVector = reduced.stablePart.A.rows > 0 ? modelPoles(reduced.stablePart.A) : { re: new Float64Array(0), im: new Float64Array(0) };
    figures[order] = figuresFromPoles(poles.re, poles.im, kept, reduced.errorBound);
    onOrder?.(k + 1, orders.length);
  });
  let limitNote: string | null = null;
  if (basis.minimalOrder < basis.stableStates && basis.minimalOrder <= MAX_BALANCED_STABLE_ORDER) {
    limitNote =
      `The stable part is numerically of order ${basis.minimalOrder}: its other ${basis.stableStates - basis.minimalOrder} ` +
      'Hankel singular values are below the rank tolerance, so more states would add nothing.';
  } else if (basis.minimalOrder > MAX_BALANCED_STABLE_ORDER) {
    limitNote = `The slider offers up to ${MAX_BALANCED_STABLE_ORDER} stable states; choose "by tolerance" for a larger order.`;
  }
  return { available: true, orders, figures, limitNote };
}

/**
 * Modal truncation figures at every cut point of the ranking: the modal bound Σ dominance over the
 * discarded modes (reduction/modal.ts; Antoulas 2005, §9.2), and stiffness and step limits from the kept
 * modes by running minima (each step limit is the minimum of per-pole limits, reduction/step-limits.ts).
 */
export function modalOrderFigures(modes: readonly ModeRecord[], kept: KeptPoles, ranking: ModalSelection, reliable: boolean): OrderFigureTable {
  if (!reliable) {
    return {
      available: false,
      reason: 'modal truncation needs a diagonalizable A, and this model has (nearly) repeated poles in a Jordan chain; use balanced truncation',
    };
  }
  const ranked = rankStoredModes(modes, ranking);
  if (ranked.length === 0) return { available: false, reason: 'the model has no stable modes to choose from' };
  const nu = kept.unstable + kept.marginal;
  const keptLimits = stepLimitsFromPoles(snapMarginalPoles(kept.re, kept.im, kept.stability, kept.tolerance, kept.scale));
  let euler = keptLimits.forwardEuler.maxStep;
  let rk4 = keptLimits.rk4.maxStep;
  const rates: number[] = [];
  let tail = ranked.reduce((s, m) => s + (m.dominance ?? 0), 0);
  let states = 0;
  const orders: number[] = [];
  const figures: Record<number, OrderFiguresRecord> = {};
  for (const mode of ranked) {
    tail -= mode.dominance ?? 0;
    states += mode.states;
    const one = stepLimitsFromPoles({ re: Float64Array.of(mode.re, mode.re), im: Float64Array.of(mode.im, -mode.im) });
    euler = Math.min(euler, one.forwardEuler.maxStep);
    rk4 = Math.min(rk4, one.rk4.maxStep);
    rates.push(-mode.re);
    const order = states + nu;
    orders.push(order);
    figures[order] = {
      errorBound: Math.max(0, tail),
      keptUnstable: kept.unstable,
      keptMarginal: kept.marginal,
      stiffnessRatio: stiffnessFromRates(rates).stiffnessRatio,
      maxStableStepEuler: finiteOrNull(euler),
      maxStableStepRk4: finiteOrNull(rk4),
    };
  }
  return { available: true, orders, figures, limitNote: null };
}
