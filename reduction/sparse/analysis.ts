/**
 * Analysis of a large sparse model, written once for the command line (`analyze` on the sparse path,
 * `reduction/cli/sparse.ts` and `sparse-modes.ts` format it as JSON) and the web's analysis task
 * (`lib/engine-tasks/sparse-analysis-task.ts` stores it): the same engine calls, the same rules.
 *
 *   gramians     low-rank ADI factors of both gramians (`adi.ts`; Penzl 2000, Li & White 2002) and the
 *                Hankel singular values they resolve (`lowRankBalancedRealization`): estimated, with the
 *                normalised residual each iteration reached
 *   DC gain      G(0) = D − C A⁻¹ B by one sparse LU of A: exact (to rounding)
 *   H2 norm      ‖C Zc‖_F from the controllability factor: estimated
 *   poles        the `poleCount` nearest s = 0 (shift-invert Krylov–Schur, Stewart 2001), the dominant ones
 *                (SAMDP, Rommes & Martins 2006, started at the peaks of a sweep) and the fastest (Krylov–Schur
 *                on E⁻¹A); from them, by the dense path's own rules (`analysis.ts`, `poles.ts`,
 *                `step-limits.ts`), modal data, stability counts, decay rates, stiffness ratio, step limits:
 *                estimated
 *   ‖G‖∞         from below by a sweep from a decade below the slowest pole to the fastest, the dominant
 *                poles' frequencies, refined at the highest peak (`norms.ts`): estimated (a lower bound)
 *
 * Every loop takes the caller's stop flag (`signal`, ../stop.ts); `onProgress` hears each stage as it
 * starts and each ADI step with its residual.
 */
import { classifyPoles, DEFAULT_STABILITY_TOLERANCE, type PoleClassification } from '../spectral-split';
import { poleData, snapMarginalPoles, stiffnessOf, type PoleData } from '../analysis';
import { stepLimitsFromPoles, type StepLimits } from '../step-limits';
import type { Stiffness } from '../poles';
import { throwIfStopped, type StopSignal } from '../stop';
import { matmul, zeros, type Matrix } from '../linalg/index';
import { SparseLu } from '../linalg/sparse';
import { lowRankGramians, type AdiOptions, type AdiResult, type AdiStep } from './adi';
import { lowRankBalancedRealization } from './balanced';
import { checkFactorBudget } from './budget';
import { fastestPole, sparseEigs, type FastestPoleResult } from './eigs';
import { dominantPoles, type DominantPoleResult } from './dominant';
import { hInfinityLowerBound, sweepGridFromPoles, type HInfinityLowerBound } from './norms';
import { shiftNearZero } from './modal';
import type { SparseStateSpaceModel } from './model';

/** Default number of slowest and of dominant poles, and of sweep frequencies for ‖G‖∞ (the command line's defaults). */
export const DEFAULT_POLE_COUNT = 6;
export const DEFAULT_SWEEP_POINTS = 16;
/** The ADI tolerance when none is given (adi.ts's default). */
export const DEFAULT_ADI_TOLERANCE = 1e-10;
/** Dominant poles whose right and left residuals are at most this count as reliable for the ranking. */
const RELIABLE_RESIDUAL = 1e-8;

export type SparseAnalysisStage = 'gramians' | 'zero-frequency-gain' | 'slowest-poles' | 'fastest-pole' | 'sweep' | 'dominant-poles';

export interface SparseAnalysisProgress {
  readonly stage: SparseAnalysisStage;
  /** during 'gramians': the ADI step just made */
  readonly adi?: AdiStep;
}

export interface SparseModalOptions {
  /** how many slowest and how many dominant poles (default 6) */
  readonly poleCount?: number;
  /** frequencies of the ‖G‖∞ sweep (default 16, plus ω = 0, the dominant poles' frequencies and refinement) */
  readonly sweepPoints?: number;
  readonly memoryBudgetBytes?: number;
  /** whether the low-rank ADI of both gramians converged (it does only for a stable model) */
  readonly stableByGramians: boolean;
  readonly signal?: StopSignal;
  readonly onProgress?: (p: SparseAnalysisProgress) => void;
}

export interface ComputedPole {
  readonly re: number;
  readonly im: number;
  /** ‖A x − λ E x‖₂/(‖A‖₁‖x‖₂) */
  readonly residual: number;
}

/** The poles computed on the sparse path and every figure made from them. */
export interface SparseModes {
  /** the computed poles (a pair as both members), nearest s = 0 first */
  readonly computed: readonly ComputedPole[];
  readonly poles: { readonly re: Float64Array; readonly im: Float64Array };
  /** how many of them came from the shift-invert run near s = 0, and that run's shift */
  readonly slowestCount: number;
  readonly slowestShift: { readonly re: number; readonly im: number };
  readonly dominant: DominantPoleResult;
  readonly fastest: FastestPoleResult;
  readonly classification: PoleClassification;
  readonly stabilityTolerance: number;
  readonly stiffness: Stiffness;
  readonly stepLimits: StepLimits;
  readonly modalData: readonly PoleData[];
  /** every computed pole stable and both ADI iterations converged: not a certificate */
  readonly stable: boolean;
  /** every dominant pole's right and left residual at most 1e-8 */
  readonly dominanceReliable: boolean;
  /** ‖G‖∞ from below, with the sweep's size and the frequencies evaluated in all */
  readonly hInfinity: HInfinityLowerBound;
  readonly sweepPoints: number;
  readonly evaluations: number;
}

/** Adds λ (and λ̄ for a complex λ) unless already listed (within 1e-8 relative). */
function addPole(list: ComputedPole[], p: ComputedPole): void {
  const scale = Math.hypot(p.re, p.im);
  for (const sign of p.im === 0 ? [1] : [1, -1]) {
    const q = { re: p.re, im: sign * Math.abs(p.im), residual: p.residual };
    if (!list.some((x) => Math.abs(x.re - q.re) <= 1e-8 * scale && Math.abs(x.im - q.im) <= 1e-8 * scale)) list.push(q);
  }
}

/** The poles and the modal figures of the file header, with ‖G‖∞ from below. */
export function sparseModes(model: SparseStateSpaceModel, options: SparseModalOptions): SparseModes {
  const count = options.poleCount ?? DEFAULT_POLE_COUNT;
  const points = options.sweepPoints ?? DEFAULT_SWEEP_POINTS;
  const budget = options.memoryBudgetBytes;
  const signal = options.signal;
  const tolerance = DEFAULT_STABILITY_TOLERANCE;
  options.onProgress?.({ stage: 'slowest-poles' });
  const si = shiftNearZero(model, budget);
  let slow;
  try {
    slow = sparseEigs(model, { count, factorization: si, signal });
  } finally {
    si.dispose();
  }
  options.onProgress?.({ stage: 'fastest-pole' });
  const fast = fastestPole(model, { memoryBudgetBytes: budget, signal });
  const slowMag = Math.min(...Array.from(slow.values.re, (r, i) => Math.hypot(r, slow.values.im[i])).filter((x) => x > 0));
  const fastMag = Math.hypot(fast.re, fast.im);
  const grid = [0, ...sweepGridFromPoles(slowMag, fastMag, points)];
  options.onProgress?.({ stage: 'sweep' });
  let peak = hInfinityLowerBound(model, { grid, refine: 1, refineSteps: 10, memoryBudgetBytes: budget, signal });
  options.onProgress?.({ stage: 'dominant-poles' });
  const dominant = dominantPoles(model, {
    count,
    initialShifts: peak.peaks.slice(0, 6).map((w) => ({ re: 0, im: w })),
    memoryBudgetBytes: budget,
    signal,
  });
  // Lightly damped dominant poles peak near ω = Im λ: look there too.
  const candidates = dominant.poles.filter((p) => p.im > 0 && p.dampingRatio < 0.5).map((p) => p.im);
  let evaluations = peak.evaluations;
  if (candidates.length > 0) {
    const near = hInfinityLowerBound(model, { grid: candidates, refine: 1, refineSteps: 8, memoryBudgetBytes: budget, signal });
    evaluations += near.evaluations;
    if (near.value > peak.value) peak = near;
  }
  const computed: ComputedPole[] = [];
  // The slowest as computed (a multiple eigenvalue keeps its multiplicity), the others unless already listed.
  for (let i = 0; i < slow.values.re.length; i++) computed.push({ re: slow.values.re[i], im: slow.values.im[i], residual: slow.residuals[i] });
  for (const p of dominant.poles) addPole(computed, { re: p.re, im: p.im, residual: p.residual });
  addPole(computed, { re: fast.re, im: fast.im, residual: fast.residual });
  computed.sort((a, b) => Math.hypot(a.re, a.im) - Math.hypot(b.re, b.im) || b.im - a.im);
  const poles = { re: Float64Array.from(computed, (p) => p.re), im: Float64Array.from(computed, (p) => p.im) };
  const classification = classifyPoles(poles, tolerance);
  return {
    computed,
    poles,
    slowestCount: slow.values.re.length,
    slowestShift: slow.shift,
    dominant,
    fastest: fast,
    classification,
    stabilityTolerance: tolerance,
    stiffness: stiffnessOf(classification),
    stepLimits: stepLimitsFromPoles(snapMarginalPoles(poles.re, poles.im, classification.stability, tolerance, classification.scale)),
    modalData: poleData(classification),
    stable: options.stableByGramians && classification.stability.every((s) => s === 'stable'),
    dominanceReliable: dominant.poles.every((p) => p.residual <= RELIABLE_RESIDUAL && p.leftResidual <= RELIABLE_RESIDUAL),
    hInfinity: peak,
    sweepPoints: points,
    evaluations,
  };
}

/** G(0) = D − C A⁻¹ B by one sparse LU of A, or why it is not defined (A singular to working precision). */
export function sparseZeroFrequencyGain(
  model: SparseStateSpaceModel,
  memoryBudgetBytes = Infinity,
): { readonly value: Matrix; readonly note?: undefined } | { readonly value: null; readonly note: string } {
  const lu = SparseLu.analyze(model.A, 'A');
  checkFactorBudget(lu, memoryBudgetBytes, 'A');
  try {
    lu.factor();
    const m = model.B.cols, p = model.C.rows, n = model.A.n;
    const g0 = zeros(p, m);
    for (let c = 0; c < m; c++) {
      const b = new Float64Array(n);
      for (let i = 0; i < n; i++) b[i] = model.B.data[i * m + c];
      const x = lu.solve(b);
      for (let r = 0; r < p; r++) {
        let s = 0;
        for (let i = 0; i < n; i++) s += model.C.data[r * n + i] * x[i];
        g0.data[r * m + c] = model.D.data[r * m + c] - s;
      }
    }
    return { value: g0 };
  } catch (e) {
    return { value: null, note: `A is singular to working precision (${(e as Error).message}): no DC gain` };
  } finally {
    lu.dispose();
  }
}

export interface SparseAnalysisOptions {
  /** ADI settings (tolerance, most steps, memory budget); its signal and onStep are this function's */
  readonly adi?: Omit<AdiOptions, 'signal' | 'onStep'>;
  readonly poleCount?: number;
  readonly sweepPoints?: number;
  readonly signal?: StopSignal;
  readonly onProgress?: (p: SparseAnalysisProgress) => void;
}

export interface SparseAnalysis {
  readonly gramians: AdiResult;
  /** the ADI tolerance the iterations were asked to reach */
  readonly adiTolerance: number;
  /** the Hankel singular values the low-rank factors resolve, descending (estimated) */
  readonly hankelSingularValues: Float64Array;
  /** ‖C Zc‖_F, null when D ≠ 0 (the H2 norm is infinite) */
  readonly h2Norm: number | null;
  readonly zeroFrequencyGain: Matrix | null;
  readonly zeroFrequencyGainNote?: string;
  readonly modes: SparseModes;
}

/** The whole analysis of the file header. */
export function analyzeSparseModel(model: SparseStateSpaceModel, options: SparseAnalysisOptions = {}): SparseAnalysis {
  const adi = options.adi ?? {};
  const signal = options.signal;
  options.onProgress?.({ stage: 'gramians' });
  const g = lowRankGramians(model, { ...adi, signal, onStep: (step) => options.onProgress?.({ stage: 'gramians', adi: step }) });
  throwIfStopped(signal, 'the balanced realization');
  const { realization } = lowRankBalancedRealization(model, g);
  const cz = matmul(model.C, g.controllability!.Z);
  const h2Norm = model.D.data.some((x) => x !== 0) ? null : Math.sqrt(cz.data.reduce((s, x) => s + x * x, 0));
  throwIfStopped(signal, 'the DC gain');
  options.onProgress?.({ stage: 'zero-frequency-gain' });
  const g0 = sparseZeroFrequencyGain(model, adi.memoryBudgetBytes ?? Infinity);
  const modes = sparseModes(model, {
    poleCount: options.poleCount,
    sweepPoints: options.sweepPoints,
    memoryBudgetBytes: adi.memoryBudgetBytes,
    stableByGramians: Boolean(g.controllability?.converged && g.observability?.converged),
    signal,
    onProgress: options.onProgress,
  });
  return {
    gramians: g,
    adiTolerance: adi.tolerance ?? DEFAULT_ADI_TOLERANCE,
    hankelSingularValues: realization.hankelSingularValues,
    h2Norm,
    zeroFrequencyGain: g0.value,
    ...(g0.note ? { zeroFrequencyGainNote: g0.note } : {}),
    modes,
  };
}
