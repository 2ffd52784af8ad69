// The shapes the engine tasks hand back and the database keeps (analyses.result, accuracy_reports.figures
// and .curves, jobs.result). Plain JSON: no typed arrays, and every non-finite number already turned into
// null with its meaning stated beside the field, because PostgreSQL's jsonb holds neither NaN nor Infinity.
//
// Type-only module: pages and client components may import it.
import type { SourceFormat } from './model-files';
import type { PoleStability } from '../../reduction/poles';
import type { AcceptanceStatus } from '../../reduction/acceptance';
import type { SolverStats } from '../../reduction/simulate/types';

export type { PoleStability };

/** A norm that is finite, or why it is not. */
export type NormRecord = { finite: true; value: number } | { finite: false; reason: string };

export interface StepLimitRecord {
  /** Largest stable fixed step in the model's time unit; null when no pole limits it (integrators only). */
  maxStep: number | null;
  limitingPole: [number, number] | null;
}

/** The figures the order slider shows for one order (components/workspace/order-steps.ts, OrderFigures). */
export interface OrderFiguresRecord {
  errorBound: number | null;
  keptUnstable: number;
  keptMarginal: number;
  stiffnessRatio: number | null;
  maxStableStepEuler: number | null;
  maxStableStepRk4: number | null;
}

export type OrderFigureTable =
  | {
      available: true;
      /** Allowed total orders, ascending (every state kept for marginal/unstable poles included). */
      orders: number[];
      figures: Record<number, OrderFiguresRecord>;
      /** Why the list stops where it does, when it stops before the full order. */
      limitNote: string | null;
    }
  | { available: false; reason: string };

export interface ModeRecord {
  re: number;
  im: number;
  /** a complex pair, listed once with im > 0 */
  pair: boolean;
  stability: PoleStability;
  /** ‖mode's contribution‖∞ bound (reduction/modal.ts); null for marginal and unstable poles */
  dominance: number | null;
  states: 1 | 2;
}

export interface AnalysisRecord {
  engineVersion: string;
  format: SourceFormat;
  states: number;
  inputs: number;
  outputs: number;
  nonzerosA: number;
  /** names of the inputs and outputs, when the model file gave them */
  labels: { inputs: string[] | null; outputs: string[] | null };
  timeBase: string | null;
  poles: { re: number[]; im: number[]; stability: PoleStability[] };
  stable: boolean;
  stablePoles: number;
  marginalPoles: number;
  unstablePoles: number;
  stabilityTolerance: number;
  stiffnessRatio: number | null;
  slowestDecayRate: number | null;
  fastestDecayRate: number | null;
  zeroFrequencyGain: { defined: true; value: number[][] } | { defined: false; reason: string };
  h2Norm: NormRecord;
  /** ‖G‖∞ with its peak frequency (null: the peak is σmax(D) as ω → ∞) */
  hInfinityNorm: ({ finite: true; value: number; peakFrequency: number | null }) | { finite: false; reason: string };
  /** ‖Gs‖∞ of the stable part: the scale of relative errors (= ‖G‖∞ when G is stable) */
  stablePartHInfinityNorm: number | null;
  hankelSingularValues: number[];
  /** 2Σσ(r+1..n) for r = 0..n, the balanced methods' bound on the stable part */
  hankelBound: number[];
  modes: ModeRecord[];
  modalDominanceReliable: boolean;
  eigenvectorCondition: number | null;
  stepLimits: { forwardEuler: StepLimitRecord; rk4: StepLimitRecord };
  /** band that shows every pole's corner, rad per time unit (reduction/frequency.ts) */
  frequencyBand: [number, number];
  orderFigures: {
    balanced: OrderFigureTable;
    residualization: OrderFigureTable;
    modalDominance: OrderFigureTable;
    modalSlowest: OrderFigureTable;
  };
  wallMs: number;
  /** the engine path that analysed it; absent in records written before the large-model path (dense) */
  path?: 'dense' | 'sparse';
  /** large-model path only: what was computed how, and which figures are estimates */
  sparse?: SparseAnalysisRecord;
}

/**
 * What the large-model path adds to an analysis (lib/engine-tasks/sparse-analysis-task.ts): which of the
 * record's figures are estimates and how each was obtained, and the low-rank gramians' own accuracy.
 */
export interface SparseAnalysisRecord {
  /** keys of AnalysisRecord whose values are estimates (the rest are exact to rounding) */
  estimated: string[];
  /** how each figure was obtained, by AnalysisRecord key */
  notes: Record<string, string>;
  /** E ẋ = A x + B u: whether a descriptor matrix E was given (or made from a second-order M) */
  descriptor: boolean;
  /** the Hankel singular values the low-rank gramian factors resolve (the slider stops there) */
  hsvResolved: number;
  /** the low-rank ADI of both gramians: normalised residual ‖W‖²/‖B‖² reached, steps, factor columns */
  gramianResidual: {
    tolerance: number;
    controllability: { residual: number; iterations: number; factorColumns: number; converged: boolean } | null;
    observability: { residual: number; iterations: number; factorColumns: number; converged: boolean } | null;
    shifts: number;
    factorizations: number;
    seconds: number;
  };
  /** ‖A x − λ E x‖/(‖A‖₁‖x‖) of each computed pole, in the order of `poles` */
  poleResiduals: (number | null)[];
  /** the fastest pole (Krylov–Schur on E⁻¹A): its residual and whether it converged */
  fastestPole: { re: number; im: number; residual: number | null; converged: boolean };
  /** frequencies evaluated by the ‖G‖∞ sweep */
  sweepEvaluations: number;
}

export interface ChannelCurves {
  /** [output][input][k] */
  re: number[][][];
  im: number[][][];
}

export interface TimeCurves {
  t: number[];
  /** [input][output][k]: response of each output to a unit step (or impulse) on one input */
  full: number[][][];
  reduced: number[][][];
  solverFull: string;
  solverReduced: string;
}

export interface ReductionCurves {
  frequency: {
    /** rad per time unit of the source model */
    frequencies: number[];
    full: ChannelCurves;
    reduced: ChannelCurves;
    sigmaFull: number[];
    sigmaReduced: number[];
    /** σmax(G(jω) − Gr(jω)), from the error system itself */
    error: number[];
  };
  step: TimeCurves;
  impulse: TimeCurves;
}

/** One solver's cost figures as stored: the engine's SolverStats (reduction/simulate/types.ts) with the solver's name. */
export type SolverCostRecord = SolverStats & { solver: string };

export interface CostRowRecord {
  solver: string;
  full: SolverCostRecord | null;
  reduced: SolverCostRecord;
  /** why the full model was not run with this solver (too many steps to be worth it) */
  skippedFull: string | null;
  maxOutputDifference: number | null;
}

/**
 * The acceptance band's verdict as the worker decided it (reduction/acceptance.ts) on the error curve it
 * stored; every page, export and API shows this record (read through lib/acceptance.ts), never a verdict of
 * its own.
 */
export interface AcceptanceRecord {
  minFrequency: number;
  maxFrequency: number;
  maxError: number;
  /** absent in reports written before the three-state verdict (lib/acceptance.ts reads those) */
  status?: AcceptanceStatus;
  /** status === 'pass' */
  passed: boolean;
  /** null when no point lies in the band */
  worstError: number | null;
  worstFrequency: number | null;
  /** grid samples in the band plus interpolated band edges */
  pointsChecked?: number;
  /** the name of pointsChecked in older reports */
  samplesChecked?: number;
  /** first and last frequency of the error curve */
  computedRange?: [number, number] | null;
}

/**
 * Frequency-limited balanced truncation's own figures (reduction/frequency-limited.ts): the band it balanced
 * on and σmax(G − Gr) measured inside and outside it. The method has no a-priori bound.
 */
export interface FrequencyLimitedRecord {
  /** rad per model time unit */
  band: { minFrequency: number; maxFrequency: number };
  /** max σmax(G(jω) − Gr(jω)) on a grid inside the band (edges included) */
  inBandError: number;
  inBandErrorFrequency: number | null;
  /** the same outside the band, from well below the slowest pole to well above the fastest */
  outOfBandError: number;
  outOfBandErrorFrequency: number | null;
  /** frequency-limited Hankel singular values of the stable part, descending */
  singularValues: number[];
  /** every pole of the reduced stable part in the open left half-plane */
  reducedStable: boolean;
}

/** accuracy_reports.figures: the FiguresTable's fields (components/workspace/figures-rows.ts) and more. */
export interface AccuracyFiguresRecord {
  fullOrder: number;
  reducedOrder: number;
  stableOrder: number;
  unstableStatesKept: number;
  method: string;
  hInfinityError: number | null;
  hInfinityErrorFrequency: number | null;
  hInfinityErrorRelative: number | null;
  referenceHInfinityNorm: number | null;
  errorBound: number | null;
  h2Error: number | null;
  h2ErrorNote: string | null;
  zeroFrequencyGainError: number | null;
  peakStepError: number | null;
  stiffnessRatioFull: number | null;
  stiffnessRatioReduced: number | null;
  /** the reduced model's own slider figures: kept states, stiffness, largest stable explicit steps */
  reducedOrderFigures: OrderFiguresRecord;
  /** the adaptive solver each model needs (stiff or explicit), side by side */
  simulation: { full: SolverCostRecord; reduced: SolverCostRecord } | null;
  simulationInput: string;
  simulationEnd: number;
  costRows: CostRowRecord[];
  acceptance: AcceptanceRecord | null;
  orderRule: 'order' | 'tolerance';
  toleranceTarget: number | null;
  notes: string[];
  /** why errorBound is null when the method has no a-priori bound (absent in reports written before it) */
  errorBoundNote?: string | null;
  /** whether the reduced model's stable part is stable (absent in older reports, where it always was) */
  reducedStable?: boolean;
  /** frequency-limited balanced truncation only */
  frequencyLimited?: FrequencyLimitedRecord | null;
  engineWallMs: number;
  /** the engine path that made it; absent in reports written before the large-model path (dense) */
  path?: 'dense' | 'sparse';
  /** large-model path: the keys of these figures that are estimates (the H∞ error sampled by a sweep, the bound over the resolved Hankel values) */
  estimated?: string[];
  /** large-model path: why the full model's time responses are absent (TimeCurves.full is then empty) */
  fullTimeResponseNote?: string | null;
}

export interface ReducedMatricesRecord {
  A: number[][];
  B: number[][];
  C: number[][];
  D: number[][];
  labels?: { inputs?: string[]; outputs?: string[] };
  timeBase?: string;
}

export interface ReductionRecord {
  matrices: ReducedMatricesRecord;
  order: number;
  unstableStatesKept: number;
  figures: AccuracyFiguresRecord;
  curves: ReductionCurves;
  acceptancePassed: boolean | null;
  engineVersion: string;
}

/** jobs.result of a response job: one channel set of an uploaded input signal. */
export interface InputResponseRecord {
  description: string;
  t: number[];
  /** [output][k] */
  full: number[][];
  reduced: number[][];
  solverFull: string;
  solverReduced: string;
  wallMsFull: number;
  wallMsReduced: number;
}
