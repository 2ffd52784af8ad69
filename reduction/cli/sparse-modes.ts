/**
 * The command line's modal figures on the sparse path (computed by `reduction/sparse/analysis.ts` from
 * `eigs.ts`, `dominant.ts`, `norms.ts`; modal truncation in `modal.ts`):
 *
 *   analyze                 the slowest poles (shift-invert Krylov–Schur near 0), the dominant poles (SAMDP,
 *                           started at a sweep's peaks), the fastest pole (Krylov–Schur on E⁻¹A), and from
 *                           them the dense path's figures — modal data, stability counts, stiffness ratio and
 *                           explicit step limits (`analysis.ts`, `step-limits.ts`, one rule for both paths) —
 *                           and ‖G‖∞ from below by a sweep with local refinement; each listed in `estimated`.
 *   reduce --method modal   modal truncation of the computed modes (`sparseModalReduction`).
 */
import { ModelError } from '../errors';
import type { ReductionOptions } from '../reduce';
import { DEFAULT_POLE_COUNT, DEFAULT_SWEEP_POINTS, type SparseModes } from '../sparse/analysis';
import { sweepGridFromPoles } from '../sparse/norms';
import { sparseModalReduction } from '../sparse/modal';
import { sampledErrorPeak } from '../sparse/frequency';
import { memoryBudgetBytes } from '../sparse/budget';
import type { SparseStateSpaceModel } from '../sparse/model';
import { integerOption, numberOption, type OptionSpec, type ParsedArgs } from './args';
import { complexPairs, finiteOrNull, modelMatrices } from './output';
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

/**
 * The modal figures of `analyze` on the sparse path as the command line writes them (the computation is
 * `sparseModes`, reduction/sparse/analysis.ts, which the web's analysis task calls too).
 */
export function sparseModesDocument(m: SparseModes): { figures: Record<string, unknown>; estimated: string[] } {
  const { computed, poles, classification, stiffness, stepLimits: limits, dominant, fastest: fast, hInfinity: peak } = m;
  const count3 = (s: string) => classification.stability.filter((x) => x === s).length;
  const stepLimit = (l: { maxStep: number; limitingPole: [number, number] | null }) => ({ maxStep: finiteOrNull(l.maxStep), limitingPole: l.limitingPole });
  const figures: Record<string, unknown> = {
    poles: complexPairs(poles),
    polesComplete: false,
    polesNote:
      `the poles computed: the ${m.slowestCount} nearest s = ${m.slowestShift.re} (shift-invert Krylov–Schur), ${dominant.poles.length} dominant ` +
      `(subspace-accelerated dominant pole algorithm) and the fastest (Krylov–Schur on E⁻¹A); the model's other poles are not computed`,
    poleResiduals: computed.map((p) => finiteOrNull(p.residual)),
    poleResidualsNote: '‖A x − λ E x‖₂/(‖A‖₁‖x‖₂) of each computed pole',
    stable: m.stable,
    stableNote: 'every computed pole is stable and the low-rank ADI of the gramians converged (it does not for an unstable model); not a certificate',
    stablePoles: count3('stable'),
    marginalPoles: count3('marginal'),
    unstablePoles: count3('unstable'),
    stabilityTolerance: m.stabilityTolerance,
    slowestDecayRate: stiffness.slowestDecayRate,
    fastestDecayRate: stiffness.fastestDecayRate,
    stiffnessRatio: stiffness.stiffnessRatio === null ? null : finiteOrNull(stiffness.stiffnessRatio),
    decayRatesNote: 'over the computed poles: the slowest decay rate among the poles nearest s = 0 and the dominant ones, the fastest from the fastest pole',
    modalData: m.modalData.map((p) => ({ naturalFrequency: p.naturalFrequency, dampingRatio: p.dampingRatio, timeConstant: p.timeConstant, stability: p.stability })),
    stepLimits: { forwardEuler: stepLimit(limits.forwardEuler), rk4: stepLimit(limits.rk4) },
    stepLimitsNote: 'from the computed poles; the fastest pole sets them unless a lightly damped pole not computed lies closer to the imaginary axis',
    modalDominance: {
      reliable: m.dominanceReliable,
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
    hInfinityNormNote: `largest σ_max(G(iω)) over ω = 0, ${m.sweepPoints} frequencies and the dominant poles' frequencies, refined at the highest peak (${m.evaluations} evaluations): a lower bound on ‖G‖∞`,
    fastestPole: { pole: [fast.re, fast.im], residual: fast.residual, converged: fast.converged, solver: fast.solver },
  };
  return {
    figures,
    estimated: ['poles', 'stable', 'stablePoles', 'marginalPoles', 'unstablePoles', 'slowestDecayRate', 'fastestDecayRate', 'stiffnessRatio', 'modalData', 'stepLimits', 'modalDominance', 'hInfinityNorm'],
  };
}

/** `--pole-count` and `--sweep-points` of `analyze` on the sparse path. */
export function sparseAnalysisCounts(args: ParsedArgs): { poleCount: number; sweepPoints: number } {
  return { poleCount: positiveInteger(args, 'pole-count', DEFAULT_POLE_COUNT, 1), sweepPoints: positiveInteger(args, 'sweep-points', DEFAULT_SWEEP_POINTS, 2) };
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
    ...modelMatrices(red.model),
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
