// One reduction run on the large-model path, in a worker thread, by the engine's at-scale methods (the same
// calls as `reduce` on the command line's sparse path):
//
//   balanced, residualization   square-root balancing on low-rank ADI gramian factors (reduction/sparse/
//                               balanced.ts; Penzl 2000, Li & White 2002; Laub et al. 1987, Liu & Anderson
//                               1989): the bound 2Σσ(r+1..k) over the resolved values is an estimate
//   irka                        H2-optimal tangential interpolation (reduction/sparse/irka.ts; Gugercin,
//                               Antoulas & Beattie 2008): no a-priori bound
//   modal                       modal truncation of computed modes (reduction/sparse/modal.ts): the bound
//                               needs every discarded mode, so none is given
//   frequency-limited           Gawronski & Juang's method on the band, in two steps (reduction/sparse/
//                               frequency-limited.ts): no a-priori bound; the band errors are measured
//
// and then what the comparison page draws: the full model's frequency response by one sparse LU per
// frequency (reduction/sparse/frequency.ts, with progress and the stop flag), the reduced model's on the same
// grid, and σmax of their difference; the H∞ error as the largest of those samples (a lower bound, said so);
// the DC-gain error from G(0) of both; the step and impulse responses of both models, the full one by the
// engine's sparse time integration (reduction/sparse/simulate.ts: the NDF/BDF family of Shampine & Reichelt
// 1997 on E − c·A, or Dormand–Prince, chosen once by the engine's stiffness rule), and the simulation cost of
// both with that solver. Should the full model's integration not fit the memory budget, the reduced model's
// responses are drawn alone and the page says why.
import {
  frequencyEvaluator,
  largestSingularValue,
  logFrequencyGrid,
  modelPoles,
  simulate,
  SharedExponentials,
  stepInput,
  impulseInput,
  ModelError,
  type ComplexMatrix,
  type InputSignal,
  type SimulationResult,
  type StateSpaceModel,
} from '../../reduction/index';
import { chooseSparseSolver, simulateSparse, sparseSimulationCostReport } from '../../reduction/sparse/simulate';
import { sparseBalancedReduction } from '../../reduction/sparse/balanced';
import { sparseIrka } from '../../reduction/sparse/irka';
import { sparseModalReduction } from '../../reduction/sparse/modal';
import { sparseFrequencyResponse } from '../../reduction/sparse/frequency';
import { sparseFrequencyLimitedReduction } from '../../reduction/sparse/frequency-limited';
import { NO_BAND_BOUND } from '../../reduction/frequency-limited';
import type { AdiOptions } from '../../reduction/sparse/adi';
import type { SparseStateSpaceModel } from '../../reduction/sparse/model';
import { METHOD_NAMES } from '../recipe-words';
import { loadSparseModel, type ModelFile } from './model-files';
import { figuresFromPoles, keptPolesOf } from './order-figures';
import { scientific, type ProgressReporter } from './progress';
import { acceptanceRecord, costOf, reductionRecord, simulationEnd, type AnalysisSummary, type RecipeInput } from './reduction-task';
import { adiFraction, type SparseTaskOptions } from './sparse-analysis-task';
import type { AccuracyFiguresRecord, ChannelCurves, CostRowRecord, FrequencyLimitedRecord, ReductionRecord, SolverCostRecord, TimeCurves } from './records';

const finiteOrNull = (x: number): number | null => (Number.isFinite(x) ? x : null);

/** Frequencies of the full model's sweep over the poles' band, and inside an acceptance band (each one sparse LU). */
export const SPARSE_GRID_POINTS = 60;
const SPARSE_BAND_POINTS = 20;
const TIME_POINTS = 401;

/** Why the full model's time responses are missing, when its integration could not be made (shown on the comparison page). */
function fullTimeResponseNote(reason: string): string {
  return `The full model’s step and impulse responses could not be computed (${reason}); the reduced model’s are drawn alone.`;
}

interface AtScale {
  model: StateSpaceModel;
  order: number;
  errorBound: number;
  errorBoundNote: string;
  notes: string[];
  frequencyLimited?: FrequencyLimitedRecord;
}

function reduceAtScale(model: SparseStateSpaceModel, recipe: RecipeInput, report: ProgressReporter, options: SparseTaskOptions): AtScale {
  const budget = options.memoryBudgetBytes;
  const signal = options.signal;
  if (recipe.order === null) {
    throw new ModelError('invalid_option', 'order', 'on the large-model path the order is chosen by number (the slider shows each order’s estimated bound)');
  }
  const order = recipe.order;
  const words = `Reducing by ${METHOD_NAMES[recipe.method]}`;
  const adi: AdiOptions = {
    memoryBudgetBytes: budget,
    signal,
    onStep: (s) =>
      report(`${words}: low-rank ADI of the ${s.equation} gramian`, 0.03 + 0.4 * adiFraction(s), {
        done: s.step,
        total: s.maxSteps,
        atMost: true,
        unit: 'ADI step',
        note: `residual ${scientific(s.residual)}`,
      }),
  };
  if (recipe.method === 'frequency-limited') {
    const band = recipe.limitedBand;
    if (!band) throw new ModelError('invalid_option', 'band', 'frequency-limited balanced truncation needs the band to balance on');
    const r = sparseFrequencyLimitedReduction(model, { band: [band.minFrequency, band.maxFrequency], order, adi });
    return {
      model: r.model,
      order: r.order,
      errorBound: NaN,
      errorBoundNote: `${NO_BAND_BOUND}; the errors inside and outside the band are measured`,
      notes: [...r.notes, ...(r.reducedStable ? [] : ['the reduced model is not stable (frequency-limited balanced truncation does not guarantee stability)'])],
      frequencyLimited: {
        band: { minFrequency: band.minFrequency, maxFrequency: band.maxFrequency },
        inBandError: r.inBandError,
        inBandErrorFrequency: finiteOrNull(r.inBandErrorFrequency),
        outOfBandError: r.outOfBandError,
        outOfBandErrorFrequency: finiteOrNull(r.outOfBandErrorFrequency),
        singularValues: Array.from(r.singularValues),
        reducedStable: r.reducedStable,
      },
    };
  }
  if (recipe.method === 'balanced' || recipe.method === 'residualization') {
    const r = sparseBalancedReduction(model, { method: recipe.method, order, adi });
    return {
      model: r.model,
      order: r.order,
      errorBound: r.errorBound,
      errorBoundNote: `estimated: 2Σσ(r+1..k) over the ${r.factorRank} Hankel singular values the low-rank gramians resolve`,
      notes: [...r.notes],
    };
  }
  if (recipe.method === 'irka') {
    const r = sparseIrka(model, {
      order,
      memoryBudgetBytes: budget,
      signal,
      onStep: (s) =>
        report(`${words}: shift updates`, 0.03 + 0.4 * Math.min(1, s.iteration / s.maxIterations), {
          done: s.iteration,
          total: s.maxIterations,
          atMost: true,
          unit: 'IRKA iteration',
          note: `shift change ${scientific(s.shiftChange)}`,
        }),
    });
    const stable = r.report.reducedStable;
    return {
      model: r.model,
      order: r.model.A.rows,
      errorBound: NaN,
      errorBoundNote: 'IRKA has no a-priori error bound; the error is measured against the full model',
      notes: [
        `IRKA ${r.report.converged ? 'converged' : 'did not converge'} after ${r.report.iterations} iterations (last relative shift change ${scientific(r.report.shiftChange)})`,
        ...(stable ? [] : ['the reduced model is not stable (IRKA does not guarantee stability)']),
        ...r.notes,
      ],
    };
  }
  if (recipe.method === 'modal') {
    report(`${words}: computing the modes`, 0.05);
    const selection = recipe.modal?.selection === 'slowest' ? { rule: 'slowest' as const } : { rule: 'dominance' as const };
    if (recipe.modal?.selection === 'band') {
      throw new ModelError('invalid_option', 'recipe.modalSelection', 'on the large-model path modal truncation keeps the most dominant or the slowest modes; the band rule is not offered');
    }
    const r = sparseModalReduction(model, { order, selection, memoryBudgetBytes: budget, signal });
    return {
      model: r.reduction.model,
      order: r.reduction.order,
      errorBound: NaN,
      errorBoundNote:
        `the modal bound needs every discarded mode; of the ${r.computedStates} states’ worth of modes computed, those left out sum to ` +
        `${r.discardedComputedBound.toPrecision(3)} (a lower estimate of the bound)`,
      notes: [...r.notes],
    };
  }
  throw new ModelError('invalid_option', 'method', `${METHOD_NAMES[recipe.method]} is not offered on the large-model path (balanced truncation, residualization, modal truncation, frequency-limited balanced truncation or IRKA)`);
}

function difference(a: ComplexMatrix, b: ComplexMatrix): ComplexMatrix {
  return {
    re: { rows: a.re.rows, cols: a.re.cols, data: a.re.data.map((x, i) => x - b.re.data[i]) },
    im: { rows: a.im.rows, cols: a.im.cols, data: a.im.data.map((x, i) => x - b.im.data[i]) },
  };
}

function curvesOf(g: readonly ComplexMatrix[], p: number, m: number): { curves: ChannelCurves; sigma: number[] } {
  const curves: ChannelCurves = {
    re: Array.from({ length: p }, (_, i) => Array.from({ length: m }, (_, j) => g.map((gk) => gk.re.data[i * m + j]))),
    im: Array.from({ length: p }, (_, i) => Array.from({ length: m }, (_, j) => g.map((gk) => gk.im.data[i * m + j]))),
  };
  return { curves, sigma: g.map((gk) => largestSingularValue(gk)) };
}

const columns = (res: SimulationResult, p: number) =>
  Array.from({ length: p }, (_, i) => Array.from({ length: res.y.rows }, (_, k) => res.y.data[k * p + i]));

/** Step or impulse responses ([input][output][k]) of both models; the full model's are empty when `full` is null. */
function timeCurves(
  full: SparseStateSpaceModel,
  reduced: StateSpaceModel,
  kind: 'step' | 'impulse',
  tEnd: number,
  shared: SharedExponentials,
  runFull: ((input: InputSignal, k: number) => SimulationResult) | null,
  first: number,
): TimeCurves {
  const m = reduced.B.cols;
  const p = reduced.C.rows;
  const inputOf = (model: { B: StateSpaceModel['B'] }, j: number) => (kind === 'step' ? stepInput(model, j + 1) : impulseInput(model, j + 1));
  const reducedRuns = Array.from({ length: m }, (_, j) => simulate(reduced, inputOf(reduced, j), { tEnd, points: TIME_POINTS, solver: 'auto', sharedExponentials: shared }));
  const fullRuns = runFull ? Array.from({ length: m }, (_, j) => runFull(inputOf(full, j), first + j)) : null;
  return {
    t: Array.from((fullRuns ?? reducedRuns)[0].t),
    full: fullRuns ? fullRuns.map((res) => columns(res, p)) : [],
    reduced: reducedRuns.map((res) => columns(res, p)),
    solverFull: fullRuns ? fullRuns[0].solver : 'not computed',
    solverReduced: reducedRuns[0].solver,
  };
}

export function runSparseReduction(
  files: readonly ModelFile[],
  recipe: RecipeInput,
  summary: AnalysisSummary,
  engineVersion: string,
  report: ProgressReporter,
  options: SparseTaskOptions = {},
): ReductionRecord {
  const started = Date.now();
  report('Reading the model files (compressed columns, streamed)', 0);
  const { model } = loadSparseModel(files);
  const r = reduceAtScale(model, recipe, report, options);
  const reduced = r.model;
  const p = model.C.rows;
  const m = model.B.cols;

  // The sweep: ω = 0 (the DC gain) first, then the grid over the poles' band and any acceptance band.
  const [lo, hi] = summary.frequencyBand;
  const values = Array.from(logFrequencyGrid(lo, hi, SPARSE_GRID_POINTS));
  if (recipe.acceptance) values.push(...logFrequencyGrid(recipe.acceptance.minFrequency, recipe.acceptance.maxFrequency, SPARSE_BAND_POINTS));
  const sorted = values.filter((w) => Number.isFinite(w) && w > 0).sort((a, b) => a - b);
  const w: number[] = [];
  for (const x of sorted) if (w.length === 0 || x > w[w.length - 1] * (1 + 1e-12)) w.push(x);
  const sweepWords = 'Frequency response of the full model by sparse solves';
  report(sweepWords, 0.45, { done: 0, total: w.length + 1, unit: 'frequency' });
  const full = sparseFrequencyResponse(model, [0, ...w], options.memoryBudgetBytes, {
    signal: options.signal,
    onStep: ({ done, total }) => report(sweepWords, 0.45 + (0.25 * done) / total, { done, total, unit: 'frequency' }),
  });
  report('Frequency response of the reduced model and the error', 0.72);
  const ev = frequencyEvaluator(reduced);
  let zeroFrequencyGainError: number | null = null;
  try {
    zeroFrequencyGainError = largestSingularValue(difference(full.response[0], ev.at(0)));
  } catch {
    zeroFrequencyGainError = null; // a reduced pole at 0: no DC gain to compare
  }
  const fullAt = full.response.slice(1);
  const reducedAt = ev.many(w);
  const error = fullAt.map((g, k) => largestSingularValue(difference(g, reducedAt[k])));
  let hInfinityError = zeroFrequencyGainError ?? 0;
  let hInfinityErrorFrequency: number | null = zeroFrequencyGainError !== null ? 0 : null;
  error.forEach((e, k) => {
    if (e > hInfinityError) [hInfinityError, hInfinityErrorFrequency] = [e, w[k]];
  });
  const f = curvesOf(fullAt, p, m);
  const g = curvesOf(reducedAt, p, m);

  // Time responses: the solver chosen once for the full model by the engine's stiffness rule, then each
  // input's step and impulse response of both models on the same output grid.
  const tEnd = simulationEnd(summary);
  const budget = options.memoryBudgetBytes ?? Infinity;
  const timeWords = 'Step and impulse responses of the full model by sparse time integration';
  report(timeWords, 0.74);
  const shared = new SharedExponentials(reduced.A, reduced.B);
  let note: string | null = null;
  let step: TimeCurves;
  let impulse: TimeCurves;
  let cost: { rows: CostRowRecord[]; simulation: { full: SolverCostRecord; reduced: SolverCostRecord } | null; input: string };
  try {
    const choice = chooseSparseSolver(model, tEnd, budget);
    const runs = 2 * m;
    const runFull = (input: InputSignal, k: number) =>
      simulateSparse(model, input, { tEnd, points: TIME_POINTS, solver: choice.solver, memoryBudgetBytes: budget }, {
        signal: options.signal,
        onStep: (s) =>
          report(timeWords, 0.74 + (0.18 * (k + Math.min(1, s.t / s.tEnd))) / runs, {
            done: k,
            total: runs,
            unit: 'simulation',
            note: `t = ${scientific(s.t)} of ${scientific(s.tEnd)}, ${s.steps} steps`,
          }),
      });
    step = timeCurves(model, reduced, 'step', tEnd, shared, runFull, 0);
    impulse = timeCurves(model, reduced, 'impulse', tEnd, shared, runFull, m);
    report('Simulation cost: full and reduced model with the same solver', 0.93);
    const costReport = sparseSimulationCostReport(model, reduced, stepInput(model), { tEnd, points: TIME_POINTS, memoryBudgetBytes: budget }, [choice.solver]);
    const rows = costReport.rows.map((row) => ({
      solver: row.solver,
      full: costOf(row.solver, row.full),
      reduced: costOf(row.solver, row.reduced),
      skippedFull: null,
      maxOutputDifference: row.maxOutputDifference,
    }));
    cost = { rows, simulation: rows[0] ? { full: rows[0].full!, reduced: rows[0].reduced } : null, input: costReport.input };
  } catch (e) {
    // Over the memory budget (or a singular E − c·A): the reduced model's responses alone, and why.
    if (!(e instanceof ModelError)) throw e;
    note = fullTimeResponseNote(e.message);
    step = timeCurves(model, reduced, 'step', tEnd, shared, null, 0);
    impulse = timeCurves(model, reduced, 'impulse', tEnd, shared, null, m);
    cost = { rows: [], simulation: null, input: `not run: ${e.message}` };
  }
  let peakStepError: number | null = null;
  if (step.full.length > 0) {
    peakStepError = 0;
    step.full.forEach((outputs, j) => outputs.forEach((ys, i) => ys.forEach((y, k) => (peakStepError = Math.max(peakStepError!, Math.abs(y - step.reduced[j][i][k]))))));
  }

  const poles = modelPoles(reduced.A);
  const reducedStable = Array.from(poles.re).every((re) => re < 0);
  const reducedOrderFigures = figuresFromPoles(poles.re, poles.im, keptPolesOf(summary.poles, summary.stabilityTolerance), finiteOrNull(r.errorBound));
  const acceptance = recipe.acceptance ? acceptanceRecord(recipe.acceptance, w, error) : null;
  const reference = summary.stablePartHInfinityNorm;
  const figures: AccuracyFiguresRecord = {
    fullOrder: model.A.n,
    reducedOrder: r.order,
    stableOrder: r.order,
    unstableStatesKept: 0,
    method: recipe.method,
    hInfinityError,
    hInfinityErrorFrequency,
    hInfinityErrorRelative: reference !== null && reference > 0 ? hInfinityError / reference : null,
    referenceHInfinityNorm: reference,
    errorBound: finiteOrNull(r.errorBound),
    h2Error: null,
    h2ErrorNote: 'not computed on the large-model path',
    zeroFrequencyGainError,
    peakStepError,
    stiffnessRatioFull: summary.stiffnessRatio,
    stiffnessRatioReduced: reducedOrderFigures.stiffnessRatio,
    reducedOrderFigures,
    simulation: cost.simulation,
    simulationInput: cost.input,
    simulationEnd: tEnd,
    costRows: cost.rows,
    acceptance,
    orderRule: 'order',
    toleranceTarget: null,
    notes: [
      `H∞ error: the largest σmax(G − Gr) over ω = 0 and ${w.length} frequencies of a full-model sweep by sparse solves, a lower bound on ‖G − Gr‖∞`,
      ...(Number.isFinite(r.errorBound) ? [`A-priori bound ${r.errorBoundNote}`] : []),
      ...r.notes,
    ],
    // A note stands in for a bound only where there is none (the page then shows "none"); the balanced bound's
    // being an estimate is said in `estimated` and the notes.
    errorBoundNote: Number.isFinite(r.errorBound) ? null : r.errorBoundNote,
    reducedStable,
    frequencyLimited: r.frequencyLimited ?? null,
    engineWallMs: Date.now() - started,
    path: 'sparse',
    estimated: ['hInfinityError', 'hInfinityErrorRelative', ...(Number.isFinite(r.errorBound) ? ['errorBound'] : []), ...(r.frequencyLimited ? ['frequencyLimited'] : [])],
    fullTimeResponseNote: note,
  };
  report('Writing the reduced model', 0.98);
  return reductionRecord({
    reduced,
    order: r.order,
    unstableStatesKept: 0,
    figures,
    frequency: { frequencies: w, full: f.curves, reduced: g.curves, sigmaFull: f.sigma, sigmaReduced: g.sigma, error },
    step,
    impulse,
    acceptance,
    engineVersion,
  });
}
