/**
 * The one entry point for reduction: method + order rule → reduced model with its accuracy figures.
 *
 * Every method works on the stable part only: the model is split G = Gs + Gu (`spectral-split.ts`), Gs
 * is brought once into an ordered realization (balanced for balanced truncation and residualization,
 * Laub et al. 1987 / Liu & Anderson 1989 in `balanced.ts`; sorted modal for modal truncation, `modal.ts`),
 * and the reduced model is Gsr + Gu with Gu kept exactly. Because Gu cancels, G − Gr = Gs − Gsr is
 * stable, and its H∞ norm (Hamiltonian method, Bruinsma & Steinbuch 1990, `norms.ts`), H2 norm and DC
 * value are the measured errors reported beside the a-priori bound.
 *
 * IRKA (Gugercin, Antoulas & Beattie 2008, `irka.ts`) has no ordered realization to slice: each order is
 * its own run on the stable part (kept per order in the basis), and it has no a-priori bound (`errorBound`
 * is NaN; the measured errors are what its accuracy stands on).
 *
 * `prepareReduction` keeps the ordered realization in a `ReductionBasis`, so any other order is a slice
 * (or, for residualization, one Schur complement) of it, not a new decomposition: the order slider of
 * the web page calls `summaryAt` for each order.
 */
import { type ComplexVector, zeros } from './linalg/index';
import { ModelError } from './errors';
import type { StateSpaceModel } from './model';
import {
  splitStableUnstable,
  modelPoles,
  classifyPoles,
  DEFAULT_STABILITY_TOLERANCE,
  relativeToleranceOption,
  type SpectralSplit,
} from './spectral-split';
import {
  balancedRealization,
  balancedTruncation,
  balancedResidualization,
  balancedErrorBound,
  balancedCutPoints,
  balancedCertificate,
  DEFAULT_RANK_TOLERANCE,
  type BalancedRealization,
} from './balanced';
import {
  rankedModalForm,
  requireDiagonalizable,
  modalCutPoints,
  modalErrorBound,
  type ModalForm,
  type Mode,
} from './modal';
import { statesInBand, type ModalSelection } from './mode-ranking';
import { irka, type IrkaOptions, type IrkaReport, type IrkaResult } from './irka';
import { chooseOrder, type OrderChoice, type OrderRule, type OrderSpace } from './order';
import { hInfinityNorm, h2Norm, type HInfinityResult, type NormValue } from './norms';
import { frequencyEvaluator, largestSingularValue } from './frequency';
import { stiffnessOf } from './analysis';
import { errorSystem, leadingStates, blockDiagonal, stackRows, stackColumns } from './realization';
import { PreparationCache } from './preparation';

export { PreparationCache } from './preparation';

export const REDUCTION_METHODS = ['balanced', 'residualization', 'modal', 'irka'] as const;
export type ReductionMethod = (typeof REDUCTION_METHODS)[number];

export interface ReductionOptions {
  readonly method: ReductionMethod;
  /** Modal truncation: which modes to keep first (default: by dominance). */
  readonly modalSelection?: ModalSelection;
  /** Relative tolerance for marginal poles (see spectral-split.ts). */
  readonly stabilityTolerance?: number;
  /** Balanced methods: relative rank tolerance on the Hankel singular values (see balanced.ts). */
  readonly rankTolerance?: number;
  /** IRKA: tolerance, most iterations, initial shifts, stop flag and progress (see irka.ts). */
  readonly irka?: IrkaOptions;
}

export interface ReductionRecipe extends ReductionOptions, OrderRule {}

export interface ReducedModel {
  readonly method: ReductionMethod;
  /** The reduced model Gr = Gsr + Gu. */
  readonly model: StateSpaceModel;
  /** Its stable part Gsr (carries D). */
  readonly stablePart: StateSpaceModel;
  /** States of the reduced model. */
  readonly order: number;
  readonly stableOrder: number;
  /** States kept exactly for marginal and unstable poles. */
  readonly unstableStatesKept: number;
  /** A-priori bound on ‖G − Gr‖∞ (Glover 1984 for the balanced methods; the modal bound for diagonalizable A); NaN for IRKA, which has none. */
  readonly errorBound: number;
  /** Plain-language remarks: an order raised to keep a pair, a non-minimal model's effective order, … */
  readonly notes: readonly string[];
  /** IRKA: iterations, convergence, shift changes, the interpolation points and the reduced model's stability. */
  readonly irka?: IrkaReport;
}

/** The note every IRKA result carries in place of a bound. */
export const IRKA_NO_BOUND_NOTE = 'IRKA has no a-priori error bound; the H2 and H∞ errors are measured against the full model';

export interface OrderSummary {
  readonly order: number;
  readonly stableOrder: number;
  readonly errorBound: number;
  readonly unstableStatesKept: number;
  readonly stiffnessRatio: number | null;
}

export interface ReductionBasis extends OrderSpace {
  readonly method: ReductionMethod;
  readonly states: number;
  readonly split: SpectralSplit;
  /** Balanced methods: Hankel singular values of the stable part, descending. */
  readonly hankelSingularValues: Float64Array | null;
  /** Balanced methods: the numerical minimal order of the stable part. */
  readonly minimalOrder: number;
  /** Modal truncation: the stable modes in the order they are kept. */
  readonly modes: readonly Mode[] | null;
  /** Balanced methods: the balanced realization of the stable part. */
  readonly balanced: BalancedRealization | null;
  /** Allowed orders of the reduced model (total states), ascending. */
  allowedOrders(): number[];
  /** The reduced model with `order` states in total (raised to the next cut point if needed). */
  truncateAt(order: number): ReducedModel;
  /** Bound, states kept for unstable poles and the reduced stiffness ratio at `order`. */
  summaryAt(order: number): OrderSummary;
}

function assembleReduced(stablePart: StateSpaceModel, unstable: StateSpaceModel): StateSpaceModel {
  if (unstable.A.rows === 0) return stablePart;
  return {
    A: blockDiagonal(stablePart.A, unstable.A),
    B: stackRows(stablePart.B, unstable.B),
    C: stackColumns(stablePart.C, unstable.C),
    D: stablePart.D,
  };
}

function modalSelectionOf(options: ReductionOptions): ModalSelection {
  const sel = options.modalSelection ?? { rule: 'dominance' };
  if (sel.rule === 'band') {
    const [lo, hi] = sel.band;
    if (!(Number.isFinite(lo) && Number.isFinite(hi) && lo >= 0 && hi > lo)) {
      throw new ModelError('invalid_option', 'band', `band must be [low, high] with 0 ≤ low < high, got [${lo}, ${hi}]`);
    }
  }
  return sel;
}

/** Split, then bring the stable part once into the method's ordered realization. */
export function prepareReduction(model: StateSpaceModel, options: ReductionOptions, cache: PreparationCache = new PreparationCache()): ReductionBasis {
  if (!REDUCTION_METHODS.includes(options.method)) {
    throw new ModelError(
      'invalid_option',
      'method',
      `method must be one of ${REDUCTION_METHODS.join(', ')}, got "${String(options.method)}"`,
    );
  }
  const stabilityTolerance = relativeToleranceOption(
    options.stabilityTolerance,
    DEFAULT_STABILITY_TOLERANCE,
    'stabilityTolerance',
  );
  const rankTolerance = relativeToleranceOption(options.rankTolerance, DEFAULT_RANK_TOLERANCE, 'rankTolerance');
  const split = cache.split(model, stabilityTolerance);
  const method = options.method;
  const nu = split.unstableStates;
  const ns = split.stableStates;

  let cutPoints: number[];
  let boundAt: (r: number) => number;
  let stableReduced: (r: number) => { model: StateSpaceModel; notes: string[]; irka?: IrkaReport };
  let hankel: Float64Array | null = null;
  let minimalOrder = ns;
  let modes: readonly Mode[] | null = null;
  let balancedForm: BalancedRealization | null = null;

  if (method === 'irka') {
    // Every order is allowed (the shifts are closed under conjugation, so any r gives a real model).
    cutPoints = Array.from({ length: ns + 1 }, (_, k) => k);
    boundAt = () => NaN;
    const cls = split.classification;
    const stablePoles = {
      re: Float64Array.from(cls.poles.re.filter((_, i) => cls.stability[i] === 'stable')),
      im: Float64Array.from(cls.poles.im.filter((_, i) => cls.stability[i] === 'stable')),
    };
    const runs = new Map<number, IrkaResult>();
    stableReduced = (r) => {
      const s = split.stable;
      if (r === 0) return { model: { A: zeros(0, 0), B: zeros(0, s.B.cols), C: zeros(s.C.rows, 0), D: s.D }, notes: [] };
      if (r === ns) return { model: s, notes: ['the order keeps every state of the stable part: nothing is reduced'] };
      let run = runs.get(r);
      if (!run) {
        run = irka(s, r, options.irka ?? {}, stablePoles.re.length === ns ? stablePoles : undefined);
        runs.set(r, run);
      }
      return { model: run.model, notes: [...run.notes], irka: run.report };
    };
  } else if (method === 'modal') {
    const form: ModalForm = rankedModalForm(split.stable, modalSelectionOf(options));
    requireDiagonalizable(form);
    modes = form.modes;
    cutPoints = modalCutPoints(form);
    boundAt = (r) => modalErrorBound(form, r);
    stableReduced = (r) => ({ model: leadingStates(form.realization, r), notes: [] });
  } else {
    const real: BalancedRealization = cache.balanced(split.stable, stabilityTolerance, rankTolerance);
    balancedForm = real;
    hankel = real.hankelSingularValues;
    minimalOrder = real.minimalOrder;
    cutPoints = balancedCutPoints(real);
    boundAt = (r) => balancedErrorBound(real.hankelSingularValues, r);
    stableReduced = (r) => {
      const notes: string[] = [];
      if (r > real.minimalOrder) {
        notes.push(
          `the stable part is numerically of order ${real.minimalOrder} (the other Hankel singular values are ` +
            `below the rank tolerance), so ${r - real.minimalOrder} of the requested states carry no ` +
            `input-output behaviour and are not formed`,
        );
      }
      const reduced = method === 'balanced' ? balancedTruncation(real, r) : balancedResidualization(real, r);
      return { model: reduced, notes };
    };
  }

  const space: OrderSpace = { unstableStates: nu, stableStates: ns, cutPoints, errorBoundAt: boundAt };
  const choose = (order: number): OrderChoice => chooseOrder(space, { order }, () => 0);

  const reducedFor = (choice: OrderChoice): ReducedModel => {
    const { model: stablePart, notes, irka: irkaReport } = stableReduced(choice.stableOrder);
    const allNotes = method === 'irka' ? [IRKA_NO_BOUND_NOTE, ...notes] : [...notes];
    if (choice.requestedOrder !== undefined) {
      allNotes.push(
        method === 'modal'
          ? `order ${choice.requestedOrder} would split a complex pair; raised to ${choice.order} to keep the pair together`
          : `order ${choice.requestedOrder} would separate equal Hankel singular values; raised to ${choice.order} to keep them together`,
      );
    }
    if (nu > 0) {
      allNotes.push(`${nu} state(s) kept exactly for marginal and unstable poles`);
    }
    const full = assembleReduced(stablePart, split.unstable);
    return {
      method,
      model: full,
      stablePart,
      order: full.A.rows,
      stableOrder: stablePart.A.rows,
      unstableStatesKept: nu,
      // The bound of the model actually formed (fewer states than asked for past the numerical rank).
      errorBound: boundAt(stablePart.A.rows),
      notes: allNotes,
      ...(irkaReport ? { irka: irkaReport } : {}),
    };
  };

  return {
    method,
    states: model.A.rows,
    split,
    hankelSingularValues: hankel,
    minimalOrder,
    modes,
    balanced: balancedForm,
    unstableStates: nu,
    stableStates: ns,
    cutPoints,
    errorBoundAt: boundAt,
    allowedOrders: () => cutPoints.map((c) => c + nu),
    truncateAt: (order) => reducedFor(choose(order)),
    summaryAt(order: number): OrderSummary {
      const reduced = reducedFor(choose(order));
      const poles = modelPoles(reduced.model.A);
      return {
        order: reduced.order,
        stableOrder: reduced.stableOrder,
        errorBound: reduced.errorBound,
        unstableStatesKept: nu,
        stiffnessRatio: stiffnessOf(classifyPoles(poles, stabilityTolerance)).stiffnessRatio,
      };
    },
  };
}

export interface AccuracyFigures {
  /** Measured ‖G − Gr‖∞ with the frequency where the error peaks. */
  readonly hInfinityError: HInfinityResult;
  /** ‖G − Gr‖₂ (not finite when the error has a feedthrough, as residualization's usually has). */
  readonly h2Error: NormValue;
  /** σ_max(G(0) − Gr(0)); the error system is stable, so this is defined even when G(0) is not. */
  readonly zeroFrequencyGainError: number;
  readonly poles: ComplexVector;
  readonly stiffnessRatio: number | null;
}

/** Slack of the H∞ error's certification, relative to σ_{r+1} (common practice: far below the digits shown). */
export const ERROR_CERTIFICATION_SLACK = 1e-6;

/** Measured accuracy of a reduced model against the full model the basis was made from. */
export function assessReduction(basis: ReductionBasis, reduced: ReducedModel, stabilityTolerance?: number): AccuracyFigures {
  const tolerance = stabilityTolerance ?? basis.split.classification.tolerance;
  const error = errorSystem(basis.split.stable, reduced.stablePart);
  const fullStable = basis.split.classification;
  const reducedStablePoles = modelPoles(reduced.stablePart.A);
  const stableRe: number[] = [];
  const stableIm: number[] = [];
  fullStable.stability.forEach((s, i) => {
    if (s === 'stable') {
      stableRe.push(fullStable.poles.re[i]);
      stableIm.push(fullStable.poles.im[i]);
    }
  });
  const errorPoles: ComplexVector = {
    re: Float64Array.from([...stableRe, ...reducedStablePoles.re]),
    im: Float64Array.from([...stableIm, ...reducedStablePoles.im]),
  };
  // The error system is block diagonal, so its poles are those of the two parts, already known.
  const usePoles = errorPoles.re.length === error.A.rows ? errorPoles : undefined;
  const evaluator = frequencyEvaluator(error);
  const options = { poles: usePoles, stabilityTolerance: tolerance, evaluator };
  const poles = modelPoles(reduced.model.A);
  // With a balanced realization at hand, the H∞ error is certified on G_q − Gr, G_q the smallest
  // balanced truncation within 1e-6·σ_{r+1} of G (σ_{r+1} ≤ ‖G − Gr‖∞, Glover 1984): Hamiltonians of
  // order 2(q + r) instead of 2(n + r), the bracket widened by that slack.
  let certifyOn: { model: StateSpaceModel; slack: number } | undefined;
  const real = basis.balanced;
  if (real && reduced.stableOrder < real.hankelSingularValues.length) {
    const next = real.hankelSingularValues[reduced.stableOrder];
    const small = next > 0 ? balancedCertificate(real, ERROR_CERTIFICATION_SLACK * next, reduced.stableOrder) : null;
    if (small) certifyOn = { model: errorSystem(small.model, reduced.stablePart), slack: small.slack };
  }
  return {
    hInfinityError: hInfinityNorm(error, { ...options, certifyOn }),
    h2Error: h2Norm(error, options),
    zeroFrequencyGainError: largestSingularValue(evaluator.at(0)),
    poles,
    stiffnessRatio: stiffnessOf(classifyPoles(poles, tolerance)).stiffnessRatio,
  };
}

export interface ReductionResult extends ReducedModel, AccuracyFigures {
  readonly hankelSingularValues: Float64Array | null;
  readonly orderChoice: OrderChoice;
  /** ‖G‖∞ used by the tolerance rule (of the stable part when G has marginal or unstable poles); null for the order rule. */
  readonly referenceNorm: number | null;
  readonly basis: ReductionBasis;
}

/** Reduce a model by a recipe: method, and exactly one of `order` or `tolerance`. */
export function reduceModel(model: StateSpaceModel, recipe: ReductionRecipe): ReductionResult {
  if (recipe.method === 'irka' && recipe.tolerance !== undefined) {
    throw new ModelError('invalid_option', 'tolerance', 'IRKA has no a-priori error bound for a tolerance to meet; give an order');
  }
  const basis = prepareReduction(model, recipe);
  let referenceNorm: number | null = null;
  const reference = (): number => {
    // G − Gr = Gs − Gsr, so the natural scale for a relative tolerance is ‖Gs‖∞ (= ‖G‖∞ for stable G).
    const { split } = basis;
    const poles = split.unstableStates === 0 ? split.classification.poles : undefined;
    const norm = hInfinityNorm(split.stable, { stabilityTolerance: split.classification.tolerance, poles });
    referenceNorm = norm.finite ? norm.value : 0;
    return referenceNorm;
  };
  let rule: OrderRule = { order: recipe.order, tolerance: recipe.tolerance };
  const sel = recipe.modalSelection;
  if (recipe.method === 'modal' && sel?.rule === 'band' && rule.order === undefined && rule.tolerance === undefined) {
    // The band rule's own order: every mode inside the band, plus the states kept for unstable poles.
    rule = { order: basis.unstableStates + statesInBand(basis.modes ?? [], sel.band) };
  }
  const orderChoice = chooseOrder(basis, rule, reference);
  // The requested order, so that the note about a raised order is kept.
  const reduced = basis.truncateAt(orderChoice.requestedOrder ?? orderChoice.order);
  const accuracy = assessReduction(basis, reduced);
  return {
    ...reduced,
    ...accuracy,
    hankelSingularValues: basis.hankelSingularValues,
    orderChoice,
    referenceNorm,
    basis,
  };
}
