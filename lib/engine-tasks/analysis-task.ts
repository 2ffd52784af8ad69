// Analysis of one source version, run in a worker thread: the engine's analysis (poles with modal data,
// stability split, stiffness ratio, DC gain, H2 and H∞ norms, Hankel singular values, modal dominance and
// fixed-step limits; reduction/analysis.ts cites each method) and the order slider's figures for every
// method (order-figures.ts). The result is plain JSON for analyses.result.
//
// A model on the large-model path (model-files.ts, enginePathOf) is analysed by sparse-analysis-task.ts
// instead, with the job's stop flag and the worker's memory budget.
import {
  PreparationCache,
  analyzeModel,
  balancedErrorBounds,
  defaultFrequencyBand,
  hInfinityNorm,
  splitStableUnstable,
  toRows,
  type ModelAnalysis,
} from '../../reduction/index';
import { enginePathOf, loadModel, nonzeros, type ModelFile } from './model-files';
import { runSparseAnalysis, type SparseTaskOptions } from './sparse-analysis-task';
import { balancedOrderFigures, keptPolesOf, modalOrderFigures } from './order-figures';
import type { AnalysisRecord, ModeRecord, OrderFigureTable } from './records';
import type { ProgressReporter } from './progress';
import { ModelError } from '../../reduction/index';

const finiteOrNull = (x: number): number | null => (Number.isFinite(x) ? x : null);

function modesOf(a: ModelAnalysis): ModeRecord[] {
  const modes: ModeRecord[] = a.modalDominance.modes.map((m) => ({
    re: m.re,
    im: Math.abs(m.im),
    pair: m.states === 2,
    stability: 'stable',
    dominance: finiteOrNull(m.dominance),
    states: m.states,
  }));
  // Marginal and unstable poles are kept exactly and carry no dominance; a pair is listed once (Im > 0).
  a.poles.forEach((p) => {
    if (p.stability === 'stable' || p.im < 0) return;
    modes.push({ re: p.re, im: p.im, pair: p.im > 0, stability: p.stability, dominance: null, states: p.im > 0 ? 2 : 1 });
  });
  return modes;
}

function unavailable(e: unknown): OrderFigureTable {
  if (e instanceof ModelError) return { available: false, reason: e.message };
  throw e;
}

/** Weights of the stages in the progress bar: the analysis itself is about half of the work. */
const STAGES = { read: 0.02, analysis: 0.6, balanced: 0.22, residualization: 0.1, modal: 0.06 } as const;

export function runAnalysis(files: readonly ModelFile[], engineVersion: string, report: ProgressReporter, options: SparseTaskOptions = {}): AnalysisRecord {
  if (enginePathOf(files) === 'sparse') return runSparseAnalysis(files, engineVersion, report, options);
  const started = Date.now();
  report('Reading the model files', 0);
  const { model, format } = loadModel(files);
  report(`Computing poles, norms and Hankel singular values of ${model.A.rows} states`, STAGES.read);
  // One split and balanced realization for the analysis and both balanced methods' figures.
  const preparation = new PreparationCache();
  const a = analyzeModel(model, { cache: preparation });
  const kept = keptPolesOf(
    { re: a.poles.map((p) => p.re), im: a.poles.map((p) => p.im), stability: a.poles.map((p) => p.stability) },
    a.stabilityTolerance,
  );
  let stablePartHInfinityNorm: number | null = a.hInfinityNorm.finite ? a.hInfinityNorm.value : null;
  if (!a.stable && a.stablePoles > 0) {
    report('Computing the H∞ norm of the stable part', STAGES.read + STAGES.analysis * 0.95);
    const split = splitStableUnstable(model, { tolerance: a.stabilityTolerance });
    const norm = hInfinityNorm(split.stable, { stabilityTolerance: a.stabilityTolerance });
    stablePartHInfinityNorm = norm.finite ? norm.value : null;
  }

  let at = STAGES.read + STAGES.analysis;
  const figuresFor = (method: 'balanced' | 'residualization', weight: number, words: string): OrderFigureTable => {
    report(words, at);
    const start = at;
    try {
      return balancedOrderFigures(model, method, kept, (done, total) => {
        report(words, start + weight * (0.3 + (0.7 * done) / total), { done, total, unit: 'order' });
      }, preparation);
    } catch (e) {
      return unavailable(e);
    } finally {
      at = start + weight;
    }
  };
  const balanced = figuresFor('balanced', STAGES.balanced, 'Balanced realization and the order slider for balanced truncation');
  const residualization = figuresFor('residualization', STAGES.residualization, 'Order slider for balanced residualization');
  report('Order slider for modal truncation', at);
  const modes = modesOf(a);
  const modalDominance = modalOrderFigures(modes, kept, { rule: 'dominance' }, a.modalDominance.reliable);
  const modalSlowest = modalOrderFigures(modes, kept, { rule: 'slowest' }, a.modalDominance.reliable);

  const hsv = Array.from(a.hankelSingularValues);
  const limit = (l: ModelAnalysis['stepLimits']['rk4']) => ({ maxStep: finiteOrNull(l.maxStep), limitingPole: l.limitingPole });
  const band = defaultFrequencyBand({ re: a.poles.map((p) => p.re), im: a.poles.map((p) => p.im) });
  return {
    engineVersion,
    format,
    states: a.states,
    inputs: a.inputs,
    outputs: a.outputs,
    nonzerosA: nonzeros(model.A),
    labels: {
      inputs: model.labels?.inputs ? [...model.labels.inputs] : null,
      outputs: model.labels?.outputs ? [...model.labels.outputs] : null,
    },
    timeBase: model.timeBase ?? null,
    poles: { re: a.poles.map((p) => p.re), im: a.poles.map((p) => p.im), stability: a.poles.map((p) => p.stability) },
    stable: a.stable,
    stablePoles: a.stablePoles,
    marginalPoles: a.marginalPoles,
    unstablePoles: a.unstablePoles,
    stabilityTolerance: a.stabilityTolerance,
    stiffnessRatio: a.stiffnessRatio === null ? null : finiteOrNull(a.stiffnessRatio),
    slowestDecayRate: a.slowestDecayRate,
    fastestDecayRate: a.fastestDecayRate,
    zeroFrequencyGain: a.zeroFrequencyGain.defined ? { defined: true, value: toRows(a.zeroFrequencyGain.value) } : { defined: false, reason: a.zeroFrequencyGain.reason },
    h2Norm: a.h2Norm.finite ? { finite: true, value: a.h2Norm.value } : { finite: false, reason: a.h2Norm.reason },
    hInfinityNorm: a.hInfinityNorm.finite
      ? { finite: true, value: a.hInfinityNorm.value, peakFrequency: finiteOrNull(a.hInfinityNorm.peakFrequency) }
      : { finite: false, reason: a.hInfinityNorm.reason },
    stablePartHInfinityNorm,
    hankelSingularValues: hsv,
    hankelBound: balancedErrorBounds(hsv),
    modes,
    modalDominanceReliable: a.modalDominance.reliable,
    eigenvectorCondition: finiteOrNull(a.modalDominance.eigenvectorCondition),
    stepLimits: { forwardEuler: limit(a.stepLimits.forwardEuler), rk4: limit(a.stepLimits.rk4) },
    frequencyBand: band,
    orderFigures: { balanced, residualization, modalDominance, modalSlowest },
    wallMs: Date.now() - started,
    path: 'dense',
  };
}
