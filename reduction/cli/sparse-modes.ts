/**
 * The command line's modal figures on the sparse path (`reduction/sparse/eigs.ts`, `dominant.ts`, `modal.ts`,
 * `norms.ts`):
 *
 *   analyze                 the slowest poles (shift-invert Krylov–Schur near 0), the dominant poles (SAMDP,
 *                           started at a sweep's peaks), the fastest pole (Krylov–Schur on E⁻¹A), and from
 *                           them the dense path's figures — modal data, stability counts, stiffness ratio and
 *                           explicit step limits (`analysis.ts`, `step-limits.ts`, one rule for both paths) —
 *                           and ‖G‖∞ from below by a sweep with local refinement; each listed in `estimated`.
 *   reduce --method modal   modal truncation of the computed modes (`sparseModalReduction`).
 */
import { ModelError } from '../errors';
import { classifyPoles, DEFAULT_STABILITY_TOLERANCE } from '../spectral-split';
import { poleData, snapMarginalPoles, stiffnessOf } from '../analysis';
import { stepLimitsFromPoles } from '../step-limits';
import type { ReductionOptions } from '../reduce';
import { fastestPole, sparseEigs } from '../sparse/eigs';
import { dominantPoles } from '../sparse/dominant';
import { hInfinityLowerBound, sweepGridFromPoles } from '../sparse/norms';
import { shiftNearZero, sparseModalReduction } from '../sparse/modal';
import { sampledErrorPeak } from '../sparse/frequency';
import { memoryBudgetBytes } from '../sparse/budget';
import type { SparseStateSpaceModel } from '../sparse/model';
import { integerOption, numberOption, type OptionSpec, type ParsedArgs } from './args';
import { complexPairs, finiteOrNull, matrixRows } from './output';
import { ENGINE_PATH } from './registry';

export const SPARSE_ANALYSIS_OPTIONS: Readonly<Record<string, OptionSpec>> = {
  'pole-count': { value: true, description: 'sparse path: how many slowest and how many dominant poles to compute (default 6 each)' },
  'sweep-points': { value: true, description: 'sparse path: frequencies of the sweep that bounds ‖G‖∞ from below (default 16, plus ω = 0, the frequencies of the dominant poles and refinement)' },
};

/** Sparse-path analyze options that the dense path refuses. */
export const SPARSE_ANALYSIS_OPTION_NAMES = Object.keys(SPARSE_ANALYSIS_OPTIONS);

function positiveInteger(args: ParsedArgs, name: string, fallback: number, least: number): number {
  const v = integerOption(args, name) ?? fallback;
  if (v < least) throw new ModelError('invalid_option', name, `--${name} must be a whole number ≥ ${least}, got ${v}`);
  return v;
}

interface ComputedPole {
  re: number;
  im: number;
  residual: number;
}

/** Adds λ (and λ̄ for a complex λ) unless already listed (within 1e-8 relative). */
function addPole(list: ComputedPole[], p: ComputedPole): void {
  const scale = Math.hypot(p.re, p.im);
  for (const sign of p.im === 0 ? [1] : [1, -1]) {
    const q = { re: p.re, im: sign * Math.abs(p.im), residual: p.residual };
    if (!list.some((x) => Math.abs(x.re - q.re) <= 1e-8 * scale && Math.abs(x.im - q.im) <= 1e-8 * scale)) list.push(q);
  }
}

/**
 * The modal figures of `analyze` on the sparse path (see the file header). `stableByGramians` says whether
 * the low-rank ADI converged (it does only for a stable model).
 */
export function sparseModalFigures(
  model: SparseStateSpaceModel,
  args: ParsedArgs,
  options: { readonly memoryBudgetBytes?: number; readonly stableByGramians: boolean },
): { figures: Record<string, unknown>; estimated: string[] } {
  const count = positiveInteger(args, 'pole-count', 6, 1);
  const points = positiveInteger(args, 'sweep-points', 16, 2);
  const budget = options.memoryBudgetBytes;
  const tolerance = DEFAULT_STABILITY_TOLERANCE;
  const si = shiftNearZero(model, budget);
  let slow;
  try {
    slow = sparseEigs(model, { count, factorization: si });
  } finally {
    si.dispose();
  }
  const fast = fastestPole(model, { memoryBudgetBytes: budget });
  const slowMag = Math.min(...Array.from(slow.values.re, (r, i) => Math.hypot(r, slow.values.im[i])).filter((x) => x > 0));
  const fastMag = Math.hypot(fast.re, fast.im);
  const grid = [0, ...sweepGridFromPoles(slowMag, fastMag, points)];
  let peak = hInfinityLowerBound(model, { grid, refine: 1, refineSteps: 10, memoryBudgetBytes: budget });
  const dominant = dominantPoles(model, {
    count,
    initialShifts: peak.peaks.slice(0, 6).map((w) => ({ re: 0, im: w })),
    memoryBudgetBytes: budget,
  });
  // Lightly damped dominant poles peak near ω = Im λ: look there too.
  const candidates = dominant.poles.filter((p) => p.im > 0 && p.dampingRatio < 0.5).map((p) => p.im);
  let evaluations = peak.evaluations;
  if (candidates.length > 0) {
    const near = hInfinityLowerBound(model, { grid: candidates, refine: 1, refineSteps: 8, memoryBudgetBytes: budget });
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
  const count3 = (s: string) => classification.stability.filter((x) => x === s).length;
  const stiffness = stiffnessOf(classification);
  const limits = stepLimitsFromPoles(snapMarginalPoles(poles.re, poles.im, classification.stability, tolerance, classification.scale));
  const data = poleData(classification);
  const stepLimit = (l: { maxStep: number; limitingPole: [number, number] | null }) => ({ maxStep: finiteOrNull(l.maxStep), limitingPole: l.limitingPole });
  const figures: Record<string, unknown> = {
    poles: complexPairs(poles),
    polesComplete: false,
    polesNote:
      `the poles computed: the ${slow.values.re.length} nearest s = ${slow.shift.re} (shift-invert Krylov–Schur), ${dominant.poles.length} dominant ` +
      `(subspace-accelerated dominant pole algorithm) and the fastest (Krylov–Schur on E⁻¹A); the model's other poles are not computed`,
    poleResiduals: computed.map((p) => finiteOrNull(p.residual)),
    poleResidualsNote: '‖A x − λ E x‖₂/(‖A‖₁‖x‖₂) of each computed pole',
    stable: options.stableByGramians && classification.stability.every((s) => s === 'stable'),
    stableNote: 'every computed pole is stable and the low-rank ADI of the gramians converged (it does not for an unstable model); not a certificate',
    stablePoles: count3('stable'),
    marginalPoles: count3('marginal'),
    unstablePoles: count3('unstable'),
    stabilityTolerance: tolerance,
    slowestDecayRate: stiffness.slowestDecayRate,
    fastestDecayRate: stiffness.fastestDecayRate,
    stiffnessRatio: stiffness.stiffnessRatio === null ? null : finiteOrNull(stiffness.stiffnessRatio),
    decayRatesNote: 'over the computed poles: the slowest decay rate among the poles nearest s = 0 and the dominant ones, the fastest from the fastest pole',
    modalData: data.map((p) => ({ naturalFrequency: p.naturalFrequency, dampingRatio: p.dampingRatio, timeConstant: p.timeConstant, stability: p.stability })),
    stepLimits: { forwardEuler: stepLimit(limits.forwardEuler), rk4: stepLimit(limits.rk4) },
    stepLimitsNote: 'from the computed poles; the fastest pole sets them unless a lightly damped pole not computed lies closer to the imaginary axis',
    modalDominance: {
      reliable: dominant.poles.every((p) => p.residual <= 1e-8 && p.leftResidual <= 1e-8),
      eigenvectorCondition: null,
      modes: dominant.poles.map((p) => ({
        pole: [p.re, p.im],
        states: p.states,
        naturalFrequency: p.naturalFrequency,
        dampingRatio: p.dampingRatio,
        dominance: finiteOrNull(p.dominance),
        residueNorm: p.residueNorm,
        residual: p.residual,
      })),
    },
    modalDominanceNote: 'the dominant poles found by the subspace-accelerated dominant pole algorithm started at the sweep\'s peaks, most dominant first; not certified to be the model\'s most dominant',
    hInfinityNorm: peak.value,
    hInfinityPeakFrequency: finiteOrNull(peak.frequency),
    hInfinityNormNote: `largest σ_max(G(iω)) over ω = 0, ${points} frequencies and the dominant poles' frequencies, refined at the highest peak (${evaluations} evaluations): a lower bound on ‖G‖∞`,
    fastestPole: { pole: [fast.re, fast.im], residual: fast.residual, converged: fast.converged, solver: fast.solver },
  };
  return {
    figures,
    estimated: ['poles', 'stable', 'stablePoles', 'marginalPoles', 'unstablePoles', 'slowestDecayRate', 'fastestDecayRate', 'stiffnessRatio', 'modalData', 'stepLimits', 'modalDominance', 'hInfinityNorm'],
  };
}

/** `reduce --method modal` on the sparse path. */
export function runSparseModalReduce(model: SparseStateSpaceModel, args: ParsedArgs, selection: ReductionOptions['modalSelection']): Record<string, unknown> {
  for (const o of ['adi-tolerance', 'adi-max-iterations']) {
    if (args.options.has(o)) throw new ModelError('invalid_option', o, `--${o} applies to the balanced methods, not to --method modal`);
  }
  if (args.options.has('tolerance')) {
    throw new ModelError(
      'invalid_option',
      'tolerance',
      'on the sparse path --method modal takes --order R (or --keep band): a tolerance needs the modal bound over every discarded mode, and the sparse path computes only some modes',
    );
  }
  const order = integerOption(args, 'order');
  const points = integerOption(args, 'error-points') ?? 0;
  if (points < 0) throw new ModelError('invalid_option', 'error-points', `--error-points must be ≥ 0, got ${points}`);
  const budget = memoryBudgetBytes(numberOption(args, 'memory-budget'));
  const r = sparseModalReduction(model, { order, selection, stabilityTolerance: numberOption(args, 'stability-tolerance'), memoryBudgetBytes: budget });
  const red = r.reduction;
  const mags = Array.from(r.computedPoles.re, (re, i) => Math.hypot(re, r.computedPoles.im[i])).filter((x) => x > 0);
  const grid = points > 0 ? Float64Array.from([0, ...sweepGridFromPoles(Math.min(...mags), 10 * Math.max(...mags), points)]) : null;
  const measured = grid ? sampledErrorPeak(model, red.model, grid, budget) : null;
  return {
    [ENGINE_PATH]: 'sparse',
    method: 'modal',
    modalSelection: selection ?? { rule: 'dominance' },
    order: red.order,
    states: model.A.n,
    descriptor: model.E !== undefined,
    A: matrixRows(red.model.A),
    B: matrixRows(red.model.B),
    C: matrixRows(red.model.C),
    D: matrixRows(red.model.D),
    errorBound: null,
    errorBoundNote:
      `the modal bound Σ‖Rᵢ‖/|Re λᵢ| needs every discarded mode; the sparse path computes ${r.computedStates} states' worth of modes, ` +
      `and their discarded part sums to ${red.errorBound.toPrecision(4)} (discardedComputedBound), a lower estimate of the bound`,
    discardedComputedBound: finiteOrNull(r.discardedComputedBound),
    hInfinityError: measured ? measured.value : null,
    ...(measured
      ? {
          hInfinityErrorFrequency: finiteOrNull(measured.frequency),
          hInfinityErrorNote: `largest error over a sweep of the full model at ω = 0 and ${points} frequencies: a lower bound on the H∞ error`,
        }
      : { hInfinityErrorNote: 'not measured on the sparse path unless --error-points N is given' }),
    hankelSingularValues: null,
    hsvComplete: false,
    gramianResidual: null,
    stableOrder: red.stableOrder,
    unstableStatesKept: red.unstableStatesKept,
    poles: complexPairs(red.poles),
    polesComplete: false,
    computedStates: r.computedStates,
    computedPoles: complexPairs(r.computedPoles),
    maxEigenResidual: r.maxResidual,
    maxEigenResidualNote: 'largest ‖A x − λ E x‖₂/(‖A‖₁‖x‖₂) over the computed modes, right and left vectors',
    computedModes: (red.basis.modes ?? []).map((m) => ({
      pole: [m.re, m.im],
      states: m.states,
      naturalFrequency: m.naturalFrequency,
      dampingRatio: m.dampingRatio,
      dominance: finiteOrNull(m.dominance),
    })),
    orderRule: order === undefined ? 'band' : 'order',
    estimated: ['discardedComputedBound', ...(measured ? ['hInfinityError'] : [])],
    notes: r.notes,
  };
}
