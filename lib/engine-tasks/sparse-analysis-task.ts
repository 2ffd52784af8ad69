// Analysis of a source version on the large-model path, in a worker thread: the engine's sparse analysis
// (reduction/sparse/analysis.ts, the same call as `analyze` on the command line: low-rank ADI gramians,
// Penzl 2000 / Li & White 2002; the DC gain by one sparse LU; the slowest poles by shift-invert
// Krylov–Schur, Stewart 2001; dominant poles, Rommes & Martins 2006; the fastest pole; ‖G‖∞ from below) kept
// as an AnalysisRecord, each figure listed as exact or estimated (record.sparse), and the order slider's
// figures from the leading Hankel singular values.
//
// Progress: a stage per engine step with its counts ("ADI step 14 of at most 300, residual 3·10⁻⁷"); the
// job's stop flag goes into every engine loop, so a cancelled analysis stops between iterations.
import {
  balancedErrorBounds,
  defaultFrequencyBand,
  toRows,
  type StopSignal,
} from '../../reduction/index';
import { analyzeSparseModel, type SparseAnalysisProgress, type SparseModes } from '../../reduction/sparse/analysis';
import type { AdiFactor, AdiStep } from '../../reduction/sparse/adi';
import { loadSparseModel, type ModelFile } from './model-files';
import { scientific, type ProgressReporter } from './progress';
import type { AnalysisRecord, ModeRecord, OrderFigureTable, OrderFiguresRecord, SparseAnalysisRecord } from './records';

const finiteOrNull = (x: number): number | null => (Number.isFinite(x) ? x : null);

export interface SparseTaskOptions {
  readonly signal?: StopSignal;
  /** bytes a sparse factorization may take (the worker's memory budget); unlimited when absent */
  readonly memoryBudgetBytes?: number;
}

/** Most states the modal and IRKA sliders offer on the large-model path (common practice: a reduced model for control has tens of states). */
export const SPARSE_MAX_ORDER = 60;

/** Where each stage sits in the progress bar (the ADI of both gramians is most of the work). */
const STAGES: Record<SparseAnalysisProgress['stage'], { at: number; weight: number; words: string }> = {
  gramians: { at: 0.03, weight: 0.52, words: 'Low-rank ADI of the controllability and observability gramians' },
  'zero-frequency-gain': { at: 0.55, weight: 0.05, words: 'DC gain by a sparse LU of A' },
  'slowest-poles': { at: 0.6, weight: 0.12, words: 'Slowest poles by shift-invert Krylov–Schur' },
  'fastest-pole': { at: 0.72, weight: 0.08, words: 'Fastest pole by Krylov–Schur on E⁻¹A' },
  sweep: { at: 0.8, weight: 0.08, words: 'Frequency sweep for the H∞ norm' },
  'dominant-poles': { at: 0.88, weight: 0.1, words: 'Dominant poles by the dominant pole algorithm' },
};

/**
 * How far an ADI iteration is: the larger of its steps over the most it may make and of its residual's way
 * down to the tolerance on a log scale (it usually stops at the tolerance long before the step limit).
 */
export function adiFraction(s: AdiStep): number {
  const byResidual = s.residual > 0 && s.residual < 1 ? Math.log(s.residual) / Math.log(s.tolerance) : s.residual <= 0 ? 1 : 0;
  return Math.min(1, Math.max(s.step / s.maxSteps, byResidual));
}

/** The modes of the record: every computed pole (a pair once, Im > 0), with the dominance of those the dominant pole algorithm found. */
function modesOf(m: SparseModes): ModeRecord[] {
  const modes: ModeRecord[] = [];
  m.computed.forEach((p, i) => {
    if (p.im < 0) return;
    const dominant = m.dominant.poles.find((d) => Math.abs(d.re - p.re) <= 1e-8 * Math.hypot(p.re, p.im) && Math.abs(d.im - p.im) <= 1e-8 * Math.hypot(p.re, p.im));
    modes.push({
      re: p.re,
      im: p.im,
      pair: p.im > 0,
      stability: m.classification.stability[i],
      dominance: dominant ? finiteOrNull(dominant.dominance) : null,
      states: p.im > 0 ? 2 : 1,
    });
  });
  // Most dominant first, then the others nearest s = 0 first (the modes table's order).
  return modes.sort((a, b) => (b.dominance ?? -1) - (a.dominance ?? -1));
}

const NO_STEP_FIGURES = { stiffnessRatio: null, maxStableStepEuler: null, maxStableStepRk4: null } as const;

/** The balanced methods' slider: every order up to the resolved Hankel singular values, with the estimated bound 2Σσ(r+1..k). */
function balancedTable(hsv: readonly number[], bounds: readonly number[]): OrderFigureTable {
  const top = Math.min(hsv.length, 150);
  if (top === 0) return { available: false, reason: 'the low-rank gramians resolved no Hankel singular value' };
  const orders = Array.from({ length: top }, (_, k) => k + 1);
  const figures: Record<number, OrderFiguresRecord> = {};
  for (const r of orders) figures[r] = { errorBound: finiteOrNull(bounds[r]), keptUnstable: 0, keptMarginal: 0, ...NO_STEP_FIGURES };
  return {
    available: true,
    orders,
    figures,
    limitNote:
      `The low-rank gramians resolve ${hsv.length} Hankel singular values, so the slider stops at ${top} states; each bound 2Σσ(r+1..${hsv.length}) sums ` +
      'the resolved values only (an estimate). The reduced model’s stiffness and step limits are reported once it has been made.',
  };
}

/** Modal truncation at scale computes its modes when it runs: orders without figures. */
function modalTable(states: number, rule: 'dominance' | 'slowest'): OrderFigureTable {
  const top = Math.min(states, SPARSE_MAX_ORDER);
  const orders = Array.from({ length: top }, (_, k) => k + 1);
  const figures: Record<number, OrderFiguresRecord> = {};
  for (const r of orders) figures[r] = { errorBound: null, keptUnstable: 0, keptMarginal: 0, ...NO_STEP_FIGURES };
  return {
    available: true,
    orders,
    figures,
    limitNote:
      `On the large-model path the ${rule === 'dominance' ? 'dominant modes (by the dominant pole algorithm, with some of the slowest)' : 'slowest modes (nearest s = 0)'} ` +
      'are computed when the reduction runs, so no bound is known here (its bound needs every discarded mode); a complex pair is never split.',
  };
}

function factorOf(f: AdiFactor | undefined) {
  return f ? { residual: f.residual, iterations: f.iterations, factorColumns: f.Z.cols, converged: f.converged } : null;
}

export function runSparseAnalysis(files: readonly ModelFile[], engineVersion: string, report: ProgressReporter, options: SparseTaskOptions = {}): AnalysisRecord {
  const started = Date.now();
  report('Reading the model files (compressed columns, streamed)', 0);
  const { model, format } = loadSparseModel(files);
  const n = model.A.n;
  const a = analyzeSparseModel(model, {
    adi: { memoryBudgetBytes: options.memoryBudgetBytes },
    signal: options.signal,
    onProgress: (p) => {
      const stage = STAGES[p.stage];
      if (p.adi) {
        const s = p.adi;
        // Both equations run in lockstep: the fraction follows the steps of the one being reported.
        report(
          `${stage.words}: ${s.equation}`,
          stage.at + stage.weight * adiFraction(s),
          { done: s.step, total: s.maxSteps, atMost: true, unit: 'ADI step', note: `residual ${scientific(s.residual)}` },
        );
      } else report(stage.words, stage.at);
    },
  });
  report('Order slider from the leading Hankel singular values', 0.98);
  const m = a.modes;
  const hsv = Array.from(a.hankelSingularValues);
  const bounds = balancedErrorBounds(hsv);
  const count = (s: string) => m.classification.stability.filter((x) => x === s).length;
  const limit = (l: SparseModes['stepLimits']['rk4']) => ({ maxStep: finiteOrNull(l.maxStep), limitingPole: l.limitingPole });
  const g = a.gramians;
  const sparse: SparseAnalysisRecord = {
    estimated: [
      'poles',
      'stable',
      'stablePoles',
      'stiffnessRatio',
      'slowestDecayRate',
      'fastestDecayRate',
      'stepLimits',
      'modes',
      'hInfinityNorm',
      'stablePartHInfinityNorm',
      'h2Norm',
      'hankelSingularValues',
      'hankelBound',
    ],
    notes: {
      poles:
        `the poles computed: the ${m.slowestCount} nearest s = 0 (shift-invert Krylov–Schur), ${m.dominant.poles.length} dominant (dominant pole algorithm) and the fastest ` +
        '(Krylov–Schur on E⁻¹A); the model’s other poles are not computed',
      stable: 'every computed pole is stable and the low-rank ADI of both gramians converged (it does not for an unstable model); not a certificate',
      stiffnessRatio: 'fastest over slowest decay rate of the computed poles: the slowest among those nearest s = 0, the fastest from the fastest pole',
      stepLimits: 'from the computed poles; the fastest sets them unless a lightly damped pole not computed lies closer to the imaginary axis',
      modes: 'the computed poles, with the dominance of those the dominant pole algorithm found (not certified to be the most dominant)',
      hInfinityNorm: `largest σmax(G(jω)) over ω = 0, ${m.sweepPoints} frequencies and the dominant poles’ frequencies, refined at the highest peak (${m.evaluations} evaluations): a lower bound`,
      h2Norm: '‖C Zc‖_F from the low-rank controllability factor',
      hankelSingularValues: `the ${hsv.length} values the low-rank gramian factors resolve, accurate to about the gramian residual; the smaller ones are not computed`,
      zeroFrequencyGain: 'G(0) = D − C A⁻¹ B by one sparse LU of A: exact to rounding',
    },
    descriptor: model.E !== undefined,
    hsvResolved: hsv.length,
    gramianResidual: {
      tolerance: a.adiTolerance,
      controllability: factorOf(g.controllability),
      observability: factorOf(g.observability),
      shifts: g.shifts.length,
      factorizations: g.factorizations,
      seconds: g.seconds,
    },
    poleResiduals: m.computed.map((p) => finiteOrNull(p.residual)),
    fastestPole: { re: m.fastest.re, im: m.fastest.im, residual: finiteOrNull(m.fastest.residual), converged: m.fastest.converged },
    sweepEvaluations: m.evaluations,
  };
  const poles = { re: Array.from(m.poles.re), im: Array.from(m.poles.im), stability: [...m.classification.stability] };
  const peak = m.hInfinity;
  return {
    engineVersion,
    format,
    states: n,
    inputs: model.B.cols,
    outputs: model.C.rows,
    nonzerosA: model.A.colPtr[n],
    labels: { inputs: null, outputs: null },
    timeBase: null,
    poles,
    stable: m.stable,
    stablePoles: count('stable'),
    marginalPoles: count('marginal'),
    unstablePoles: count('unstable'),
    stabilityTolerance: m.stabilityTolerance,
    stiffnessRatio: m.stiffness.stiffnessRatio === null ? null : finiteOrNull(m.stiffness.stiffnessRatio),
    slowestDecayRate: m.stiffness.slowestDecayRate,
    fastestDecayRate: m.stiffness.fastestDecayRate,
    zeroFrequencyGain: a.zeroFrequencyGain ? { defined: true, value: toRows(a.zeroFrequencyGain) } : { defined: false, reason: a.zeroFrequencyGainNote ?? 'not defined' },
    h2Norm: a.h2Norm === null ? { finite: false, reason: 'D ≠ 0: the H2 norm is infinite' } : { finite: true, value: a.h2Norm },
    hInfinityNorm: { finite: true, value: peak.value, peakFrequency: finiteOrNull(peak.frequency) },
    stablePartHInfinityNorm: peak.value,
    hankelSingularValues: hsv,
    hankelBound: bounds,
    modes: modesOf(m),
    modalDominanceReliable: m.dominanceReliable,
    eigenvectorCondition: null,
    stepLimits: { forwardEuler: limit(m.stepLimits.forwardEuler), rk4: limit(m.stepLimits.rk4) },
    frequencyBand: defaultFrequencyBand(m.poles),
    orderFigures: {
      balanced: balancedTable(hsv, bounds),
      residualization: balancedTable(hsv, bounds),
      modalDominance: modalTable(n, 'dominance'),
      modalSlowest: modalTable(n, 'slowest'),
    },
    wallMs: Date.now() - started,
    path: 'sparse',
    sparse,
  };
}
