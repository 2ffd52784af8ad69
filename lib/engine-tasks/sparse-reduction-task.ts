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
//
// and then what the comparison page draws: the full model's frequency response by one sparse LU per
// frequency (reduction/sparse/frequency.ts, with progress and the stop flag), the reduced model's on the same
// grid, and σmax of their difference; the H∞ error as the largest of those samples (a lower bound, said so);
// the DC-gain error from G(0) of both. Time responses of the full model are not computed at this scale (the
// exact solver needs dense exponentials; the reduced model's step and impulse responses are drawn alone).
import {
  frequencyEvaluator,
  largestSingularValue,
  logFrequencyGrid,
  modelPoles,
  simulate,
  SharedExponentials,
  stepInput,
  impulseInput,
  toRows,
  ModelError,
  type ComplexMatrix,
  type SimulationResult,
  type StateSpaceModel,
} from '../../reduction/index';
import { sparseBalancedReduction } from '../../reduction/sparse/balanced';
import { sparseIrka } from '../../reduction/sparse/irka';
import { sparseModalReduction } from '../../reduction/sparse/modal';
import { sparseFrequencyResponse } from '../../reduction/sparse/frequency';
import type { SparseStateSpaceModel } from '../../reduction/sparse/model';
import { acceptancePassedColumn } from '../acceptance';
import { METHOD_NAMES } from '../recipe-words';
import { loadSparseModel, type ModelFile } from './model-files';
import { figuresFromPoles, keptPolesOf } from './order-figures';
import { scientific, type ProgressReporter } from './progress';
import { acceptanceRecord, simulationEnd, type AnalysisSummary, type RecipeInput } from './reduction-task';
import { adiFraction, type SparseTaskOptions } from './sparse-analysis-task';
import type { AccuracyFiguresRecord, ChannelCurves, ReductionCurves, ReductionRecord, TimeCurves } from './records';

const finiteOrNull = (x: number): number | null => (Number.isFinite(x) ? x : null);

/** Frequencies of the full model's sweep over the poles' band, and inside an acceptance band (each one sparse LU). */
export const SPARSE_GRID_POINTS = 60;
const SPARSE_BAND_POINTS = 20;
const TIME_POINTS = 401;

/** Why the full model has no time response on this path (shown on the comparison page). */
export const FULL_TIME_RESPONSE_NOTE =
  'The full model’s step and impulse responses are not computed on the large-model path (the exact solver needs dense matrix exponentials of the full model); the reduced model’s are drawn alone.';

interface AtScale {
  model: StateSpaceModel;
  order: number;
  errorBound: number;
  errorBoundNote: string;
  notes: string[];
}

function reduceAtScale(model: SparseStateSpaceModel, recipe: RecipeInput, report: ProgressReporter, options: SparseTaskOptions): AtScale {
  const budget = options.memoryBudgetBytes;
  const signal = options.signal;
  if (recipe.order === null) {
    throw new ModelError('invalid_option', 'order', 'on the large-model path the order is chosen by number (the slider shows each order’s estimated bound)');
  }
  const order = recipe.order;
  const words = `Reducing by ${METHOD_NAMES[recipe.method]}`;
  if (recipe.method === 'balanced' || recipe.method === 'residualization') {
    const r = sparseBalancedReduction(model, {
      method: recipe.method,
      order,
      adi: {
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
      },
    });
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
  throw new ModelError('invalid_option', 'method', `${METHOD_NAMES[recipe.method]} is not offered on the large-model path (balanced truncation, residualization, modal truncation or IRKA)`);
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

/** Step or impulse responses of the reduced model alone ([input][output][k]; the full model's are left empty). */
function reducedTimeCurves(reduced: StateSpaceModel, kind: 'step' | 'impulse', tEnd: number, shared: SharedExponentials): TimeCurves {
  const m = reduced.B.cols;
  const p = reduced.C.rows;
  const results: SimulationResult[] = [];
  for (let j = 0; j < m; j++) {
    const input = kind === 'step' ? stepInput(reduced, j + 1) : impulseInput(reduced, j + 1);
    results.push(simulate(reduced, input, { tEnd, points: TIME_POINTS, solver: 'auto', sharedExponentials: shared }));
  }
  const column = (res: SimulationResult, i: number) => Array.from({ length: res.y.rows }, (_, k) => res.y.data[k * p + i]);
  return {
    t: Array.from(results[0].t),
    full: [],
    reduced: results.map((res) => Array.from({ length: p }, (_, i) => column(res, i))),
    solverFull: 'not computed',
    solverReduced: results[0].solver,
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
    onStep: ({ done, total }) => report(sweepWords, 0.45 + (0.4 * done) / total, { done, total, unit: 'frequency' }),
  });
  report('Frequency response of the reduced model and the error', 0.86);
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

  report('Step and impulse responses of the reduced model', 0.9);
  const tEnd = simulationEnd(summary);
  const shared = new SharedExponentials(reduced.A, reduced.B);
  const step = reducedTimeCurves(reduced, 'step', tEnd, shared);
  const impulse = reducedTimeCurves(reduced, 'impulse', tEnd, shared);

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
    peakStepError: null,
    stiffnessRatioFull: summary.stiffnessRatio,
    stiffnessRatioReduced: reducedOrderFigures.stiffnessRatio,
    reducedOrderFigures,
    simulation: null,
    simulationInput: 'not run: the full model is simulated only on the dense path',
    simulationEnd: tEnd,
    costRows: [],
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
    frequencyLimited: null,
    engineWallMs: Date.now() - started,
    path: 'sparse',
    estimated: ['hInfinityError', 'hInfinityErrorRelative', ...(Number.isFinite(r.errorBound) ? ['errorBound'] : [])],
    fullTimeResponseNote: FULL_TIME_RESPONSE_NOTE,
  };
  const curves: ReductionCurves = {
    frequency: { frequencies: w, full: f.curves, reduced: g.curves, sigmaFull: f.sigma, sigmaReduced: g.sigma, error },
    step,
    impulse,
  };
  report('Writing the reduced model', 0.98);
  return {
    matrices: { A: toRows(reduced.A), B: toRows(reduced.B), C: toRows(reduced.C), D: toRows(reduced.D) },
    order: r.order,
    unstableStatesKept: 0,
    figures,
    curves,
    acceptancePassed: acceptancePassedColumn(acceptance?.status ?? null),
    engineVersion,
  };
}
