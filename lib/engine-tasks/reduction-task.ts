// One reduction run, in a worker thread: the recipe through the engine's reduce entry (reduction/reduce.ts:
// balanced truncation, Laub et al. 1987; balanced residualization, Liu & Anderson 1989; modal truncation,
// reduction/modal.ts) or frequency-limited balanced truncation for a band (reduction/frequency-limited.ts,
// Gawronski & Juang 1990: no a-priori bound; the errors inside and outside the band are measured and the
// reduced model's stability is reported, since the method does not guarantee it), then everything the
// comparison page draws and the accuracy report states:
//
//   frequency: G and Gr per channel on a log grid over the poles' band (reduction/frequency.ts, Laub 1981
//     Hessenberg evaluation), with the H∞ error peak and the acceptance band sampled densely; σmax of each;
//     and σmax of the error system G − Gr itself (errorSystem), not the difference of two large numbers;
//   time: step and impulse responses per input (reduction/simulate, auto solver), and the simulation cost of
//     full versus reduced with the same solvers, input and output grid (simulationCostReport);
//   figures: measured H∞ (Bruinsma & Steinbuch 1990) and H2 errors and the DC-gain error from
//     assessReduction, the a-priori bound, stiffness ratios, and the acceptance verdict.
import {
  acceptanceVerdict,
  errorSystem,
  explicitStabilitySteps,
  STIFF_RATIO,
  frequencyEvaluator,
  h2Norm,
  hInfinityNorm,
  largestSingularValue,
  logFrequencyGrid,
  modelPoles,
  reduceModel,
  simulate,
  SharedExponentials,
  simulationCostReport,
  stepInput,
  impulseInput,
  toRows,
  ModelError,
  type HInfinityResult,
  type ModalSelection,
  type NormValue,
  type ReductionRecipe,
  type SimulationResult,
  type SolverStats,
  type StateSpaceModel,
} from '../../reduction/index';
import { bandErrors, frequencyLimitedTruncation, type Band } from '../../reduction/frequency-limited';
import { loadModel, type ModelFile } from './model-files';
import { spectralRadius } from '../../reduction/poles';
import { acceptancePassedColumn } from '../acceptance';
import { METHOD_NAMES, NO_BOUND_NOTE, type RecipeMethod } from '../recipe-words';
import { figuresFromPoles, keptPolesOf } from './order-figures';
import type { ProgressReporter } from './progress';
import type {
  AcceptanceRecord,
  AccuracyFiguresRecord,
  AnalysisRecord,
  ChannelCurves,
  CostRowRecord,
  FrequencyLimitedRecord,
  ReductionCurves,
  ReductionRecord,
  SolverCostRecord,
  TimeCurves,
} from './records';

export interface RecipeInput {
  method: RecipeMethod;
  order: number | null;
  tolerance: number | null;
  modal?: { selection: 'dominance' | 'slowest' | 'band'; band?: { minFrequency: number; maxFrequency: number } } | null;
  /** frequency-limited: the band to balance on, rad per model time unit (0 ≤ min < max) */
  limitedBand?: { minFrequency: number; maxFrequency: number } | null;
  acceptance?: { minFrequency: number; maxFrequency: number; maxError: number } | null;
}

/** What the reduction needs from the stored analysis, so it is not computed twice. */
export type AnalysisSummary = Pick<AnalysisRecord, 'frequencyBand' | 'stablePartHInfinityNorm' | 'stiffnessRatio' | 'modes' | 'fastestDecayRate' | 'poles' | 'stabilityTolerance'>;

const finiteOrNull = (x: number): number | null => (Number.isFinite(x) ? x : null);

/** Points of the frequency grid over the poles' band, and inside an acceptance band. */
const GRID_POINTS = 240;
const BAND_POINTS = 120;
const TIME_POINTS = 401;
/** Explicit (Dormand–Prince) runs are skipped above these estimates: the point is made long before. */
const EXPLICIT_MAX_STEPS = 200_000;
const EXPLICIT_MAX_FLOPS = 3e9;

export function reductionRecipe(recipe: RecipeInput): ReductionRecipe {
  if (recipe.method === 'frequency-limited') {
    throw new ModelError('invalid_option', 'method', 'frequency-limited balanced truncation is run by frequencyLimitedRun, not reduceModel');
  }
  let modalSelection: ModalSelection | undefined;
  if (recipe.method === 'modal' && recipe.modal) {
    const { selection, band } = recipe.modal;
    if (selection === 'band') {
      if (!band) throw new ModelError('invalid_option', 'band', 'the band rule needs a frequency band');
      modalSelection = { rule: 'band', band: [band.minFrequency, band.maxFrequency] };
    } else {
      modalSelection = { rule: selection };
    }
  }
  return {
    method: recipe.method,
    order: recipe.order ?? undefined,
    tolerance: recipe.tolerance ?? undefined,
    modalSelection,
  };
}

/** What both reduction paths hand the rest of the run: the reduced model and its measured accuracy. */
interface EngineReduction {
  model: StateSpaceModel;
  stablePart: StateSpaceModel;
  /** the full model's stable part, which the error G − Gr = Gs − Gsr is measured against */
  fullStablePart: StateSpaceModel;
  method: string;
  order: number;
  stableOrder: number;
  unstableStatesKept: number;
  hInfinityError: HInfinityResult;
  h2Error: NormValue;
  zeroFrequencyGainError: number;
  /** the a-priori bound, NaN when the method has none */
  errorBound: number;
  orderRule: 'order' | 'tolerance';
  toleranceTarget: number | null;
  notes: string[];
  frequencyLimited: FrequencyLimitedRecord | null;
}


/** Balanced truncation, residualization and modal truncation through the engine's reduce entry. */
function reduceRun(model: StateSpaceModel, recipe: RecipeInput): EngineReduction {
  const r = reduceModel(model, reductionRecipe(recipe));
  return {
    model: r.model,
    stablePart: r.stablePart,
    fullStablePart: r.basis.split.stable,
    method: r.method,
    order: r.order,
    stableOrder: r.stableOrder,
    unstableStatesKept: r.unstableStatesKept,
    hInfinityError: r.hInfinityError,
    h2Error: r.h2Error,
    zeroFrequencyGainError: r.zeroFrequencyGainError,
    errorBound: r.errorBound,
    orderRule: r.orderChoice.rule,
    toleranceTarget: r.orderChoice.target ?? null,
    notes: [...r.notes],
    frequencyLimited: null,
  };
}

/**
 * Frequency-limited balanced truncation (reduction/frequency-limited.ts) to the recipe's order on its band,
 * with the same measured figures as the other methods. The reduced stable part need not be stable here:
 * then the H∞ and H2 errors are not finite and say why, and the band errors (measured on grids, as the
 * engine does) are what the report stands on.
 */
export function frequencyLimitedRun(model: StateSpaceModel, recipe: RecipeInput, stabilityTolerance: number): EngineReduction {
  const band = recipe.limitedBand;
  if (!band) throw new ModelError('invalid_option', 'band', 'frequency-limited balanced truncation needs the band to balance on');
  if (recipe.order === null) throw new ModelError('invalid_option', 'order', 'frequency-limited balanced truncation needs an order (it has no bound for a tolerance to meet)');
  const limits: Band = [band.minFrequency, band.maxFrequency];
  // The errors are measured here, with the H2 error and the evaluator shared (not by frequencyLimitedReduction).
  const r = frequencyLimitedTruncation(model, { band: limits, order: recipe.order, stabilityTolerance });
  const errors = bandErrors(r.fullStablePart, r.stablePart, limits);
  const error = errorSystem(r.fullStablePart, r.stablePart);
  const evaluator = frequencyEvaluator(error);
  const unstable = 'the reduced model has poles in the closed right half-plane (frequency-limited balanced truncation does not guarantee stability)';
  const hInfinityError: HInfinityResult = r.reducedStable ? hInfinityNorm(error, { evaluator, stabilityTolerance }) : { finite: false, reason: unstable };
  const h2Error: NormValue = r.reducedStable ? h2Norm(error, { evaluator, stabilityTolerance }) : { finite: false, reason: unstable };
  let zeroFrequencyGainError = NaN;
  try {
    zeroFrequencyGainError = largestSingularValue(evaluator.at(0));
  } catch {
    zeroFrequencyGainError = NaN; // a pole of the reduced model at 0: no DC gain to compare
  }
  return {
    model: r.model,
    stablePart: r.stablePart,
    fullStablePart: r.fullStablePart,
    method: 'frequency-limited',
    order: r.order,
    stableOrder: r.stableOrder,
    unstableStatesKept: r.unstableStatesKept,
    hInfinityError,
    h2Error,
    zeroFrequencyGainError,
    errorBound: NaN,
    orderRule: 'order',
    toleranceTarget: null,
    notes: [...r.notes],
    frequencyLimited: {
      band: { minFrequency: band.minFrequency, maxFrequency: band.maxFrequency },
      inBandError: errors.inBand,
      inBandErrorFrequency: finiteOrNull(errors.inBandPeakFrequency),
      outOfBandError: errors.outOfBand,
      outOfBandErrorFrequency: finiteOrNull(errors.outOfBandPeakFrequency),
      singularValues: Array.from(r.singularValues),
      reducedStable: r.reducedStable,
    },
  };
}

function sortedUnique(values: number[]): number[] {
  const sorted = values.filter((w) => Number.isFinite(w) && w > 0).sort((a, b) => a - b);
  const out: number[] = [];
  for (const w of sorted) if (out.length === 0 || w > out[out.length - 1] * (1 + 1e-12)) out.push(w);
  return out;
}

function channelCurves(evaluator: ReturnType<typeof frequencyEvaluator>, w: readonly number[], p: number, m: number) {
  const curves: ChannelCurves = {
    re: Array.from({ length: p }, () => Array.from({ length: m }, () => new Array<number>(w.length))),
    im: Array.from({ length: p }, () => Array.from({ length: m }, () => new Array<number>(w.length))),
  };
  const sigma: number[] = new Array(w.length);
  // All frequencies in one call: the Hessenberg form solves them as one batch in the native backend.
  evaluator.many(w).forEach((g, k) => {
    for (let i = 0; i < p; i++) {
      for (let j = 0; j < m; j++) {
        curves.re[i][j][k] = g.re.data[i * m + j];
        curves.im[i][j][k] = g.im.data[i * m + j];
      }
    }
    sigma[k] = largestSingularValue(g);
  });
  return { curves, sigma };
}

/**
 * End time of the step and impulse responses: five time constants of the slowest of the modes that carry
 * 95 % of the dominance (so a negligible slow mode does not stretch the plot), common practice for a
 * settling window; but no more than 20 periods of the most dominant oscillating mode, so a lightly damped
 * structure's ringing is drawn with ~20 points per period on the 401-point grid instead of aliased.
 */
export function simulationEnd(summary: AnalysisSummary): number {
  const stable = summary.modes.filter((m) => m.stability === 'stable' && m.dominance !== null).sort((a, b) => (b.dominance ?? 0) - (a.dominance ?? 0));
  const total = stable.reduce((s, m) => s + (m.dominance ?? 0), 0);
  let sum = 0;
  let slowest = Infinity;
  for (const m of stable) {
    slowest = Math.min(slowest, -m.re);
    sum += m.dominance ?? 0;
    if (sum >= 0.95 * total) break;
  }
  if (!(Number.isFinite(slowest) && slowest > 0)) {
    const fastest = summary.fastestDecayRate;
    return fastest && fastest > 0 ? 50 / fastest : 10;
  }
  let tEnd = 5 / slowest;
  const ringing = stable.find((m) => m.im > 0);
  if (ringing) tEnd = Math.min(tEnd, (20 * 2 * Math.PI) / ringing.im);
  return tEnd;
}

function timeCurves(
  full: StateSpaceModel,
  reduced: StateSpaceModel,
  kind: 'step' | 'impulse',
  tEnd: number,
  // The step and impulse responses of every input share each model's exponentials (exact solver).
  shared: { full: SharedExponentials; reduced: SharedExponentials },
  // After each simulation: `done` of `total` (each input, full model then reduced).
  onSimulation?: (done: number, total: number) => void,
): TimeCurves {
  const m = full.B.cols;
  const p = full.C.rows;
  let done = 0;
  const perInput = (model: StateSpaceModel, sharedExponentials: SharedExponentials) => {
    const results: SimulationResult[] = [];
    for (let j = 0; j < m; j++) {
      const input = kind === 'step' ? stepInput(model, j + 1) : impulseInput(model, j + 1);
      results.push(simulate(model, input, { tEnd, points: TIME_POINTS, solver: 'auto', sharedExponentials }));
      onSimulation?.(++done, 2 * m);
    }
    return results;
  };
  const f = perInput(full, shared.full);
  const r = perInput(reduced, shared.reduced);
  const column = (res: SimulationResult, i: number) => Array.from({ length: res.y.rows }, (_, k) => res.y.data[k * p + i]);
  return {
    t: Array.from(f[0].t),
    full: f.map((res) => Array.from({ length: p }, (_, i) => column(res, i))),
    reduced: r.map((res) => Array.from({ length: p }, (_, i) => column(res, i))),
    solverFull: f[0].solver,
    solverReduced: r[0].solver,
  };
}

export function costOf(solver: string, s: SolverStats): SolverCostRecord {
  return {
    solver,
    steps: s.steps,
    rejectedSteps: s.rejectedSteps,
    rhsEvaluations: s.rhsEvaluations,
    factorizations: s.factorizations,
    pointsStored: s.pointsStored,
    wallMs: s.wallMs,
  };
}

/** Steps and flops of an explicit run, its steps held by stability (reduction/step-limits.ts, explicitStabilitySteps). */
function explicitEstimate(model: StateSpaceModel, radius: number, tEnd: number): { steps: number; flops: number } {
  const steps = explicitStabilitySteps(radius, tEnd);
  const n = model.A.rows;
  return { steps, flops: steps * 6 * 2 * n * (n + model.B.cols) };
}

function costRows(full: StateSpaceModel, reduced: StateSpaceModel, fullRadius: number, reducedRadius: number, tEnd: number) {
  const input = stepInput(full);
  const options = { tEnd, points: TIME_POINTS };
  const both = simulationCostReport(full, reduced, input, options, ['exact', 'stiff']);
  const rows: CostRowRecord[] = both.rows.map((row) => ({
    solver: row.solver,
    full: costOf(row.solver, row.full),
    reduced: costOf(row.solver, row.reduced),
    skippedFull: null,
    maxOutputDifference: row.maxOutputDifference,
  }));
  const estimate = explicitEstimate(full, fullRadius, tEnd);
  const reducedEstimate = explicitEstimate(reduced, reducedRadius, tEnd);
  const affordable = (e: { steps: number; flops: number }) => e.steps <= EXPLICIT_MAX_STEPS && e.flops <= EXPLICIT_MAX_FLOPS;
  if (affordable(estimate)) {
    const explicit = simulationCostReport(full, reduced, input, options, ['explicit']).rows[0];
    rows.push({
      solver: 'explicit',
      full: costOf('explicit', explicit.full),
      reduced: costOf('explicit', explicit.reduced),
      skippedFull: null,
      maxOutputDifference: explicit.maxOutputDifference,
    });
  } else if (affordable(reducedEstimate)) {
    const r = simulate(reduced, input, { ...options, solver: 'explicit' });
    rows.push({
      solver: 'explicit',
      full: null,
      reduced: costOf('explicit', r.stats),
      skippedFull:
        `not run: its fastest pole (|λ| = ${fullRadius.toPrecision(3)}) holds an explicit solver to about ` +
        `${Math.ceil(estimate.steps).toLocaleString('en-US')} steps over ${tEnd.toPrecision(3)} time units`,
      maxOutputDifference: null,
    });
  }
  return { rows, description: both.input };
}

/** The acceptance band's verdict on the error curve just computed (reduction/acceptance.ts), as stored. */
export function acceptanceRecord(band: NonNullable<RecipeInput['acceptance']>, w: readonly number[], error: readonly number[]): AcceptanceRecord {
  const v = acceptanceVerdict(w, error, band);
  return {
    minFrequency: band.minFrequency,
    maxFrequency: band.maxFrequency,
    maxError: band.maxError,
    status: v.status,
    passed: v.status === 'pass',
    worstError: v.worstError,
    worstFrequency: v.worstFrequency,
    pointsChecked: v.pointsChecked,
    computedRange: v.computedRange ? [v.computedRange[0], v.computedRange[1]] : null,
  };
}

export function runReduction(
  files: readonly ModelFile[],
  recipe: RecipeInput,
  summary: AnalysisSummary,
  engineVersion: string,
  report: ProgressReporter,
): ReductionRecord {
  const started = Date.now();
  report('Reading the model files', 0);
  const { model } = loadModel(files);
  report(`Reducing by ${METHOD_NAMES[recipe.method]} and measuring the H∞ and H2 errors`, 0.03);
  const r = recipe.method === 'frequency-limited' ? frequencyLimitedRun(model, recipe, summary.stabilityTolerance) : reduceRun(model, recipe);
  const reduced = r.model;
  const p = model.C.rows;
  const m = model.B.cols;

  report('Frequency responses of the full and the reduced model', 0.5);
  const [lo, hi] = summary.frequencyBand;
  const gridValues = Array.from(logFrequencyGrid(lo, hi, GRID_POINTS));
  if (r.hInfinityError.finite && Number.isFinite(r.hInfinityError.peakFrequency) && r.hInfinityError.peakFrequency > 0) {
    gridValues.push(r.hInfinityError.peakFrequency);
  }
  if (recipe.acceptance) {
    gridValues.push(...logFrequencyGrid(recipe.acceptance.minFrequency, recipe.acceptance.maxFrequency, BAND_POINTS));
  }
  if (r.frequencyLimited) {
    // The balancing band drawn densely, its edges and the two measured peaks on the grid.
    const { band } = r.frequencyLimited;
    gridValues.push(...logFrequencyGrid(band.minFrequency > 0 ? band.minFrequency : band.maxFrequency / 1e4, band.maxFrequency, BAND_POINTS));
    gridValues.push(band.minFrequency, band.maxFrequency);
    for (const peak of [r.frequencyLimited.inBandErrorFrequency, r.frequencyLimited.outOfBandErrorFrequency]) if (peak !== null) gridValues.push(peak);
  }
  const w = sortedUnique(gridValues);
  const full = channelCurves(frequencyEvaluator(model), w, p, m);
  const red = channelCurves(frequencyEvaluator(reduced), w, p, m);
  report('Error of the reduced model across frequency', 0.6);
  const errorEvaluator = frequencyEvaluator(errorSystem(r.fullStablePart, r.stablePart));
  const error = errorEvaluator.many(w).map((g) => largestSingularValue(g));

  const tEnd = simulationEnd(summary);
  report('Step responses of the full and the reduced model', 0.66);
  const shared = { full: new SharedExponentials(model.A, model.B), reduced: new SharedExponentials(reduced.A, reduced.B) };
  const step = timeCurves(model, reduced, 'step', tEnd, shared, (done, total) =>
    report('Step responses of the full and the reduced model', 0.66 + (0.1 * done) / total, { done, total, unit: 'simulation' }),
  );
  report('Impulse responses of the full and the reduced model', 0.76);
  const impulse = timeCurves(model, reduced, 'impulse', tEnd, shared, (done, total) =>
    report('Impulse responses of the full and the reduced model', 0.76 + (0.1 * done) / total, { done, total, unit: 'simulation' }),
  );
  let peakStepError = 0;
  step.full.forEach((outputs, j) =>
    outputs.forEach((ys, i) => ys.forEach((y, k) => (peakStepError = Math.max(peakStepError, Math.abs(y - step.reduced[j][i][k]))))),
  );

  report('Simulation cost: full and reduced model with the same solvers', 0.86);
  const stablePartPoles = r.stablePart.A.rows > 0 ? modelPoles(r.stablePart.A) : { re: new Float64Array(0), im: new Float64Array(0) };
  const reducedOrderFigures = figuresFromPoles(stablePartPoles.re, stablePartPoles.im, keptPolesOf(summary.poles, summary.stabilityTolerance), r.errorBound);
  const fullRadius = spectralRadius(summary.poles);
  const reducedPoles = modelPoles(reduced.A);
  const cost = costRows(model, reduced, fullRadius, spectralRadius(reducedPoles), tEnd);
  const needs = (ratio: number | null) => (ratio !== null && ratio >= STIFF_RATIO ? 'stiff' : 'explicit');
  const fullRow = cost.rows.find((row) => row.solver === needs(summary.stiffnessRatio) && row.full) ?? cost.rows.find((row) => row.solver === 'stiff');
  const reducedRow = cost.rows.find((row) => row.solver === needs(reducedOrderFigures.stiffnessRatio)) ?? cost.rows.find((row) => row.solver === 'stiff');

  const acceptance = recipe.acceptance ? acceptanceRecord(recipe.acceptance, w, error) : null;
  const hInfinityError = r.hInfinityError.finite ? r.hInfinityError.value : null;
  const reference = summary.stablePartHInfinityNorm;
  const figures: AccuracyFiguresRecord = {
    fullOrder: model.A.rows,
    reducedOrder: r.order,
    stableOrder: r.stableOrder,
    unstableStatesKept: r.unstableStatesKept,
    method: r.method,
    hInfinityError,
    hInfinityErrorFrequency: r.hInfinityError.finite ? finiteOrNull(r.hInfinityError.peakFrequency) : null,
    hInfinityErrorRelative: hInfinityError !== null && reference !== null && reference > 0 ? hInfinityError / reference : null,
    referenceHInfinityNorm: reference,
    errorBound: finiteOrNull(r.errorBound),
    h2Error: r.h2Error.finite ? r.h2Error.value : null,
    h2ErrorNote: r.h2Error.finite ? null : r.h2Error.reason,
    zeroFrequencyGainError: finiteOrNull(r.zeroFrequencyGainError),
    peakStepError,
    stiffnessRatioFull: summary.stiffnessRatio,
    stiffnessRatioReduced: reducedOrderFigures.stiffnessRatio,
    reducedOrderFigures,
    simulation: fullRow?.full && reducedRow ? { full: fullRow.full, reduced: reducedRow.reduced } : null,
    simulationInput: cost.description,
    simulationEnd: tEnd,
    costRows: cost.rows,
    acceptance,
    orderRule: r.orderRule,
    toleranceTarget: r.toleranceTarget,
    notes: [...r.notes],
    errorBoundNote: r.frequencyLimited || recipe.method === 'irka' ? NO_BOUND_NOTE : null,
    reducedStable: r.frequencyLimited ? r.frequencyLimited.reducedStable : Array.from(stablePartPoles.re).every((re) => re < 0),
    frequencyLimited: r.frequencyLimited,
    engineWallMs: Date.now() - started,
    path: 'dense',
  };
  report('Writing the reduced model', 0.98);
  return reductionRecord({
    reduced,
    labelsFrom: model,
    order: r.order,
    unstableStatesKept: r.unstableStatesKept,
    figures,
    frequency: { frequencies: w, full: full.curves, reduced: red.curves, sigmaFull: full.sigma, sigmaReduced: red.sigma, error },
    step,
    impulse,
    acceptance,
    engineVersion,
  });
}

/**
 * The record a reduction run hands back, on either path: the reduced matrices (with the source model's input
 * and output labels and time base where it has them), the figures, the curves the comparison page draws, and
 * the acceptance column.
 */
export function reductionRecord(parts: {
  reduced: StateSpaceModel;
  labelsFrom?: StateSpaceModel;
  order: number;
  unstableStatesKept: number;
  figures: AccuracyFiguresRecord;
  frequency: ReductionCurves['frequency'];
  step: TimeCurves;
  impulse: TimeCurves;
  acceptance: AcceptanceRecord | null;
  engineVersion: string;
}): ReductionRecord {
  const { reduced, labelsFrom: model } = parts;
  return {
    matrices: {
      A: toRows(reduced.A),
      B: toRows(reduced.B),
      C: toRows(reduced.C),
      D: toRows(reduced.D),
      ...(model?.labels && (model.labels.inputs || model.labels.outputs)
        ? {
            labels: {
              ...(model.labels.inputs ? { inputs: [...model.labels.inputs] } : {}),
              ...(model.labels.outputs ? { outputs: [...model.labels.outputs] } : {}),
            },
          }
        : {}),
      ...(model?.timeBase ? { timeBase: model.timeBase } : {}),
    },
    order: parts.order,
    unstableStatesKept: parts.unstableStatesKept,
    figures: parts.figures,
    curves: { frequency: parts.frequency, step: parts.step, impulse: parts.impulse },
    acceptancePassed: acceptancePassedColumn(parts.acceptance?.status ?? null),
    engineVersion: parts.engineVersion,
  };
}
