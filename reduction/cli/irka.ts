/**
 * `reduce MODEL --method irka --order R [--irka-tolerance T] [--irka-max-iterations N]`: IRKA (Gugercin,
 * Antoulas & Beattie 2008, Algorithm 4.1, tangential for several inputs and outputs) on the dense path
 * (`reduction/irka.ts` through `reduceModel`: marginal and unstable poles kept exactly, the H∞ and H2 errors
 * measured) or on the sparse path (`reduction/sparse/irka.ts`: stable models only; the H∞ error sampled by
 * a sweep of the full model with `--error-points N`). Same keys as the other methods, `errorBound` null
 * (IRKA has no a-priori bound), and an `irka` block: iterations, converged, shiftChange and its history,
 * the initial and final shifts, reflected shifts, whether the reduced model is stable.
 */
import { ModelError } from '../errors';
import { reduceModel } from '../reduce';
import type { IrkaOptions, IrkaReport, Shift } from '../irka';
import { sparseIrka } from '../sparse/irka';
import { sampledErrorPeak } from '../sparse/frequency';
import { memoryBudgetBytes } from '../sparse/budget';
import type { SparseStateSpaceModel } from '../sparse/model';
import { logFrequencyGrid } from '../frequency';
import { modelPoles } from '../spectral-split';
import { integerOption, loadModelArgument, numberOption, type OptionSpec, type ParsedArgs } from './args';
import { complexPairs, finiteOrNull, hInfinityCertificate, numberList, modelMatrices } from './output';
import { ENGINE_PATH } from './registry';
import { sparseModelArgument } from './sparse';

export const IRKA_OPTIONS: Readonly<Record<string, OptionSpec>> = {
  'irka-tolerance': { value: true, description: 'irka: relative change of the shifts at which the iteration stops (default 1e-6)' },
  'irka-max-iterations': { value: true, description: 'irka: most iterations (default 100); a run stopped there says converged: false' },
};

const NO_BOUND_NOTE = 'IRKA has no a-priori error bound; the errors reported are measured against the full model';

function irkaOptionsOf(args: ParsedArgs): IrkaOptions {
  const tolerance = numberOption(args, 'irka-tolerance');
  const maxIterations = integerOption(args, 'irka-max-iterations');
  if (tolerance !== undefined && !(tolerance > 0 && tolerance < 1)) {
    throw new ModelError('invalid_option', 'irka-tolerance', `--irka-tolerance must be in (0, 1), got ${tolerance}`);
  }
  if (maxIterations !== undefined && maxIterations < 1) {
    throw new ModelError('invalid_option', 'irka-max-iterations', `--irka-max-iterations must be ≥ 1, got ${maxIterations}`);
  }
  return { tolerance, maxIterations };
}

/** Every shift of a list (a pair as both members), as [re, im]. */
function shiftList(shifts: readonly Shift[]): [number, number][] {
  const out: [number, number][] = [];
  for (const s of shifts) {
    out.push([s.re, s.im]);
    if (s.im > 0) out.push([s.re, -s.im]);
  }
  return out;
}

/** The `irka` block of a document. */
export function irkaBlock(report: IrkaReport, extra: Record<string, unknown> = {}): Record<string, unknown> {
  return {
    iterations: report.iterations,
    converged: report.converged,
    shiftChange: finiteOrNull(report.shiftChange),
    shiftChangeHistory: numberList(report.shiftChangeHistory),
    shiftChangeMeasure: 'max over the shifts of |σ(new) − σ(old)| / |σ(new)|, each new shift paired with the nearest old one',
    tolerance: report.tolerance,
    maxIterations: report.maxIterations,
    initialShiftRule: report.initialShiftRule,
    initialShifts: shiftList(report.initialShifts),
    interpolationPoints: shiftList(report.interpolationPoints),
    reflectedShifts: report.reflectedShifts,
    reducedStable: report.reducedStable,
    ...extra,
  };
}

/** `reduce --method irka` on either path. */
export function runIrkaReduce(args: ParsedArgs): Record<string, unknown> {
  for (const o of ['keep', 'band']) {
    if (args.options.has(o)) throw new ModelError('invalid_option', o, `--${o} does not apply to --method irka`);
  }
  if (args.options.has('tolerance')) {
    throw new ModelError('invalid_option', 'tolerance', '--method irka has no a-priori error bound for a tolerance to meet; give --order R');
  }
  const order = integerOption(args, 'order');
  if (order === undefined) throw new ModelError('invalid_option', 'order', '--method irka needs --order R');
  const irka = irkaOptionsOf(args);
  const sparse = sparseModelArgument(args);
  if (sparse) return runSparseIrka(sparse, args, order, irka);
  for (const o of ['adi-tolerance', 'adi-max-iterations', 'memory-budget', 'error-points']) {
    if (args.options.has(o)) throw new ModelError('invalid_option', o, `--${o} applies to the sparse path only`);
  }
  const model = loadModelArgument(args.positionals);
  const r = reduceModel(model, { method: 'irka', order, stabilityTolerance: numberOption(args, 'stability-tolerance'), irka });
  const hInf = r.hInfinityError;
  return {
    method: r.method,
    order: r.order,
    ...modelMatrices(r.model),
    errorBound: null,
    errorBoundNote: NO_BOUND_NOTE,
    hInfinityError: hInf.finite ? hInf.value : null,
    ...(hInf.finite
      ? { hInfinityErrorFrequency: finiteOrNull(hInf.peakFrequency), hInfinityErrorCertificate: hInfinityCertificate(hInf) }
      : { hInfinityErrorNote: hInf.reason }),
    h2Error: r.h2Error.finite ? r.h2Error.value : null,
    ...(r.h2Error.finite ? {} : { h2ErrorNote: r.h2Error.reason }),
    zeroFrequencyGainError: finiteOrNull(r.zeroFrequencyGainError),
    hankelSingularValues: null,
    stableOrder: r.stableOrder,
    unstableStatesKept: r.unstableStatesKept,
    poles: complexPairs(r.poles),
    stiffnessRatio: r.stiffnessRatio === null ? null : finiteOrNull(r.stiffnessRatio),
    orderRule: 'order',
    ...(r.irka ? { irka: irkaBlock(r.irka) } : {}),
    notes: r.notes,
  };
}

/** The sparse path: stable models only, the error sampled by a full-model sweep when `--error-points N` is given. */
function runSparseIrka(model: SparseStateSpaceModel, args: ParsedArgs, order: number, irka: IrkaOptions): Record<string, unknown> {
  for (const o of ['adi-tolerance', 'adi-max-iterations']) {
    if (args.options.has(o)) throw new ModelError('invalid_option', o, `--${o} applies to the balanced methods only (IRKA solves no Lyapunov equation)`);
  }
  if (args.options.has('stability-tolerance')) {
    throw new ModelError('invalid_option', 'stability-tolerance', '--stability-tolerance applies to the dense path only (the sparse path assumes a stable model)');
  }
  const points = integerOption(args, 'error-points') ?? 0;
  if (points < 0) throw new ModelError('invalid_option', 'error-points', `--error-points must be ≥ 0, got ${points}`);
  const budget = memoryBudgetBytes(numberOption(args, 'memory-budget'));
  const r = sparseIrka(model, { order, ...irka, memoryBudgetBytes: budget });
  const report = r.report;
  let measured: { value: number; frequency: number } | null = null;
  let grid: Float64Array | null = null;
  if (points > 0 && report.reducedStable) {
    let lo = Infinity, hi = 0;
    for (const s of report.interpolationPoints) {
      const mag = Math.hypot(s.re, s.im);
      lo = Math.min(lo, mag);
      hi = Math.max(hi, mag);
    }
    grid = Float64Array.from([0, ...logFrequencyGrid(lo / 10, hi * 10, points)]);
    measured = sampledErrorPeak(model, r.model, grid, budget);
  }
  const hInfinityErrorNote = measured
    ? `largest error over a sweep of the full model at ω = 0 and ${points} frequencies spanning a decade beyond the shifts: a lower bound on the H∞ error`
    : points > 0
      ? 'not measured: the reduced model is unstable, so the H∞ error is infinite'
      : 'not measured on the sparse path unless --error-points N is given';
  return {
    [ENGINE_PATH]: 'sparse',
    method: 'irka',
    order: r.model.A.rows,
    states: model.A.n,
    descriptor: model.E !== undefined,
    ...modelMatrices(r.model),
    errorBound: null,
    errorBoundNote: NO_BOUND_NOTE,
    hInfinityError: measured ? measured.value : null,
    ...(measured ? { hInfinityErrorFrequency: finiteOrNull(measured.frequency) } : {}),
    hInfinityErrorNote,
    h2Error: null,
    h2ErrorNote: 'not computed on the sparse path',
    hankelSingularValues: null,
    poles: complexPairs(report.reducedPoles),
    orderRule: 'order',
    spectralRange: [r.spectralRange.lo, r.spectralRange.hi],
    spectralRangeNote: "estimated smallest and largest pole magnitudes of the full model (Arnoldi Ritz values through sparse solves); the default initial shifts are the mirror images of the slowest Ritz estimates",
    estimated: ['spectralRange', ...(measured ? ['hInfinityError'] : [])],
    irka: irkaBlock(report, { factorizations: r.factorizations, symbolicAnalyses: r.analyses, seconds: r.seconds }),
    notes: [NO_BOUND_NOTE, ...r.notes],
  };
}
