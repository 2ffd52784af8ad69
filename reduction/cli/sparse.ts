/**
 * The command line's sparse path: which models take it, and loading them without a dense n×n matrix.
 *
 * A model takes the sparse path when its A file is a Matrix Market coordinate file and either
 * `--path sparse` is given, or `--path auto` (the default) and A has more states than the crossover
 * (`SPARSE_CROSSOVER_STATES` in `reduction/sparse/path.ts`, which the web upload uses too, or the
 * `MODESHELF_SPARSE_CROSSOVER` environment variable), or a descriptor
 * matrix is given (`--E E.mtx`, which only the sparse path reads). Everything else takes the dense path,
 * unchanged. On the sparse path A and E are read into compressed columns (`reduction/sparse/`), B, C and D
 * by the dense readers (they are thin).
 *
 * A second-order model M q̈ + D q̇ + K q = F u always takes the sparse path: `--mass M.mtx --stiffness
 * K.mtx [--damping D.mtx]` (Matrix Market coordinate files) and the positional files F (q×m), C (p×q
 * for displacement outputs, or p×2q for displacements then velocities) and optionally the feedthrough
 * (p×m); it goes into descriptor form without M⁻¹ (`reduction/sparse/second-order.ts`), 2q states.
 */
import { readFileSync } from 'node:fs';
import { ModelError } from '../errors';
import { parseMatrixFile } from '../io/model-files';
import { coordinateRowCount, parseSparseMatrixMarket } from '../sparse/matrix-market';
import { createSparseModel, type SparseStateSpaceModel } from '../sparse/model';
import { secondOrderToDescriptor } from '../sparse/second-order';
import { splitSecondOrderOutput } from '../second-order';
import { autoPathIsSparse, SPARSE_CROSSOVER_STATES } from '../sparse/path';
import { integerOption, numberListOption, numberOption, stringOption, type OptionSpec, type ParsedArgs } from './args';
import { sparseFrequencyLimitedReduction } from '../sparse/frequency-limited';
import { NO_BAND_BOUND } from '../frequency-limited';
import { largestSingularValue, logFrequencyGrid } from '../frequency';
import { lowRankGramians, type AdiFactor, type AdiOptions, type AdiResult } from '../sparse/adi';
import { lowRankBalancedRealization, sparseBalancedReduction } from '../sparse/balanced';
import { sampledErrorPeak, sparseFrequencyResponse } from '../sparse/frequency';
import { balancedErrorBound } from '../balanced';
import { memoryBudgetBytes, MEMORY_BUDGET_ENV } from '../sparse/budget';
import { analyzeSparseModel } from '../sparse/analysis';
import { finiteOrNull, matrixRows, numberList, modelMatrices } from './output';
import { ENGINE_PATH } from './registry';
import { sparseAnalysisCounts, sparseModesDocument } from './sparse-modes';

export const SPARSE_PATH_OPTIONS: Readonly<Record<string, OptionSpec>> = {
  path: { value: true, description: `dense | sparse | auto (default: sparse for a Matrix Market coordinate A above ${SPARSE_CROSSOVER_STATES} states, or with --E)` },
  E: { value: true, description: 'descriptor matrix E (E ẋ = A x + B u) as a Matrix Market coordinate file; sparse path only' },
  mass: { value: true, description: 'second-order model: mass matrix M (Matrix Market coordinate); the files are then F (force input), C and optionally D; sparse path' },
  stiffness: { value: true, description: 'second-order model: stiffness matrix K (Matrix Market coordinate), with --mass' },
  damping: { value: true, description: 'second-order model: damping matrix (Matrix Market coordinate), with --mass; zero when not given' },
  'adi-tolerance': { value: true, description: 'sparse path: normalised gramian residual the low-rank ADI stops at (default 1e-10)' },
  'adi-max-iterations': { value: true, description: 'sparse path: most ADI steps per gramian (default 300)' },
  'memory-budget': { value: true, description: `sparse path: MiB a sparse factorization may take, checked before it is made (default: ${MEMORY_BUDGET_ENV}, else unlimited)` },
};

function readText(path: string, field: string): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (e) {
    throw new ModelError('unreadable_file', field, `cannot read ${path}: ${(e as Error).message}`);
  }
}

/** The sparse model when the arguments route to the sparse path, null for the dense path. */
export function sparseModelArgument(args: ParsedArgs): SparseStateSpaceModel | null {
  const path = stringOption(args, 'path') ?? 'auto';
  if (path !== 'dense' && path !== 'sparse' && path !== 'auto') {
    throw new ModelError('invalid_option', 'path', `--path must be dense, sparse or auto, got "${path}"`);
  }
  const ePath = stringOption(args, 'E');
  const secondOrder = secondOrderArgument(args, path, ePath);
  if (secondOrder) return secondOrder;
  if (path === 'dense') {
    if (ePath !== undefined) throw new ModelError('invalid_option', 'E', '--E is read by the sparse path only; drop --path dense');
    return null;
  }
  const files = args.positionals;
  if (files.length < 3 || files.length > 4) {
    if (path === 'sparse' || ePath !== undefined) {
      throw new ModelError('invalid_option', 'model', 'the sparse path needs the A, B, C (and D) files, A as a Matrix Market coordinate file');
    }
    return null;
  }
  const aText = readText(files[0], 'A');
  const rows = coordinateRowCount(aText);
  if (rows === null) {
    if (path === 'sparse' || ePath !== undefined) {
      throw new ModelError('unsupported_format', 'A', `${files[0]}: the sparse path needs A as a Matrix Market coordinate file`);
    }
    return null;
  }
  if (path === 'auto' && !autoPathIsSparse(rows, ePath !== undefined)) return null;
  const A = parseSparseMatrixMarket(aText, 'A', files[0]);
  const E = ePath === undefined ? undefined : parseSparseMatrixMarket(readText(ePath, 'E'), 'E', ePath);
  const [B, C, D] = (['B', 'C', 'D'] as const).slice(0, files.length - 1).map((field, k) => parseMatrixFile(readText(files[k + 1], field), field, files[k + 1]));
  return createSparseModel({ A, E, B, C, D });
}

/** The second-order model of `--mass`, `--stiffness`, `--damping` and the files F, C [, D]; null without them. */
function secondOrderArgument(args: ParsedArgs, path: string, ePath: string | undefined): SparseStateSpaceModel | null {
  const given = (['mass', 'stiffness', 'damping'] as const).filter((o) => args.options.has(o));
  if (given.length === 0) return null;
  for (const needed of ['mass', 'stiffness'] as const) {
    if (!given.includes(needed)) throw new ModelError('invalid_option', needed, `a second-order model needs --mass and --stiffness (--damping is optional); --${needed} is missing`);
  }
  if (ePath !== undefined) throw new ModelError('invalid_option', 'E', '--E does not go with --mass: a second-order model’s E is made from M');
  if (path === 'dense') throw new ModelError('invalid_option', 'path', 'a second-order model given by --mass and --stiffness takes the sparse path; drop --path dense');
  const files = args.positionals;
  if (files.length < 2 || files.length > 3) {
    throw new ModelError('invalid_option', 'model', 'with --mass and --stiffness give the files F (force input, q×m), C (p×q or p×2q) and optionally D (p×m)');
  }
  const sparse = (option: 'mass' | 'stiffness' | 'damping') => {
    const file = stringOption(args, option);
    return file === undefined ? undefined : parseSparseMatrixMarket(readText(file, option), option, file);
  };
  const mass = sparse('mass')!;
  const [force, C, D] = (['B', 'C', 'D'] as const).slice(0, files.length).map((field, k) => parseMatrixFile(readText(files[k], field), field, files[k]));
  return secondOrderToDescriptor({
    mass,
    stiffness: sparse('stiffness')!,
    damping: sparse('damping'),
    force,
    ...splitSecondOrderOutput(C, mass.n, files[1]),
    feedthrough: D,
  });
}

/** ADI options from the command line. */
export function adiOptionsOf(args: ParsedArgs): AdiOptions {
  if (args.options.has('stability-tolerance')) {
    throw new ModelError('invalid_option', 'stability-tolerance', '--stability-tolerance applies to the dense path only (the sparse path assumes a stable model)');
  }
  const tolerance = numberOption(args, 'adi-tolerance');
  const maxIterations = integerOption(args, 'adi-max-iterations');
  if (tolerance !== undefined && !(tolerance > 0 && tolerance < 1)) {
    throw new ModelError('invalid_option', 'adi-tolerance', `--adi-tolerance must be in (0, 1), got ${tolerance}`);
  }
  if (maxIterations !== undefined && maxIterations < 1) {
    throw new ModelError('invalid_option', 'adi-max-iterations', `--adi-max-iterations must be ≥ 1, got ${maxIterations}`);
  }
  return { tolerance, maxIterations, memoryBudgetBytes: memoryBudgetBytes(numberOption(args, 'memory-budget')) };
}

/** `gramianResidual` of a sparse-path document: what the low-rank ADI reached. */
export function gramianReport(g: AdiResult, tolerance: number): Record<string, unknown> {
  const side = (f: AdiFactor | undefined) =>
    f && { residual: f.residual, iterations: f.iterations, factorColumns: f.Z.cols, converged: f.converged, residualHistory: numberList(f.residualHistory) };
  return {
    measure: 'normalised residual ‖W‖₂²/‖B‖₂² (controllability) and ‖W‖₂²/‖Cᵀ‖₂² (observability) of the low-rank ADI',
    tolerance,
    controllability: side(g.controllability),
    observability: side(g.observability),
    shifts: g.shifts.map((p) => [p.re, p.im]),
    factorizations: g.factorizations,
    seconds: g.seconds,
  };
}

/** A sweep grid from the shifts' magnitudes: a decade either side. */
function sweepGrid(g: AdiResult, points: number): Float64Array {
  let lo = Infinity, hi = 0;
  for (const p of g.shifts) {
    const r = Math.hypot(p.re, p.im);
    lo = Math.min(lo, r);
    hi = Math.max(hi, r);
  }
  return logFrequencyGrid(lo / 10, hi * 10, points);
}

export const SPARSE_REDUCE_OPTIONS: Readonly<Record<string, OptionSpec>> = {
  ...SPARSE_PATH_OPTIONS,
  'error-points': { value: true, description: 'sparse path: frequencies of a full-model sweep that measures the reduced model\'s error (default 0: not measured; 40 with --tolerance)' },
};

/**
 * `reduce --method frequency-limited --band W1,W2 --order R` on the sparse path
 * (`reduction/sparse/frequency-limited.ts`): its errors inside and outside the band measured against the full
 * model by sparse sweeps (`--error-points`, default 40 per grid); no bound.
 */
export function runSparseFrequencyLimited(model: SparseStateSpaceModel, args: ParsedArgs): Record<string, unknown> {
  const band = numberListOption(args, 'band');
  if (band === undefined || band.length !== 2) {
    throw new ModelError('invalid_option', 'band', '--method frequency-limited needs --band W1,W2 (rad per time unit, 0 ≤ W1 < W2)');
  }
  if (args.options.has('tolerance')) throw new ModelError('invalid_option', 'tolerance', '--method frequency-limited has no error bound to meet a tolerance; give --order');
  if (args.options.has('keep')) throw new ModelError('invalid_option', 'keep', '--keep applies to --method modal only');
  const order = integerOption(args, 'order');
  if (order === undefined) throw new ModelError('invalid_option', 'order', '--method frequency-limited needs --order R');
  const points = integerOption(args, 'error-points') ?? 40;
  if (points < 2) throw new ModelError('invalid_option', 'error-points', `--error-points must be ≥ 2, got ${points}`);
  const adi = adiOptionsOf(args);
  const r = sparseFrequencyLimitedReduction(model, { band: [band[0], band[1]], order, adi, points });
  return {
    [ENGINE_PATH]: 'sparse',
    method: r.method,
    band: [...r.band],
    order: r.order,
    states: model.A.n,
    descriptor: model.E !== undefined,
    ...modelMatrices(r.model),
    errorBound: null,
    errorBoundNote: NO_BAND_BOUND,
    inBandError: r.inBandError,
    inBandErrorFrequency: finiteOrNull(r.inBandErrorFrequency),
    outOfBandError: r.outOfBandError,
    outOfBandErrorFrequency: finiteOrNull(r.outOfBandErrorFrequency),
    errorNote: `largest σ_max(G − Gr) against the full model over ${points} log-spaced frequencies inside the band and ${points} on each side outside it (to a hundredth of the lower edge and a hundred times the upper): lower bounds`,
    frequencyLimitedSingularValues: numberList(r.singularValues),
    intermediateOrder: r.intermediateOrder,
    intermediateBound: r.intermediateBound,
    reducedStable: r.reducedStable,
    gramianResidual: gramianReport(r.gramians, adi.tolerance ?? 1e-10),
    estimated: ['inBandError', 'outOfBandError', 'frequencyLimitedSingularValues', 'intermediateBound'],
    notes: r.notes,
  };
}

/**
 * `reduce` on the sparse path: balanced truncation or residualization to `--order R`, or to the smallest
 * order whose estimated bound 2Σσ(r+1..k) is at most `--tolerance T` times ‖G‖∞. ‖G‖∞ is then estimated
 * from below by a sweep of the full model (`--error-points`, default 40, plus ω = 0), so T·‖G‖∞ is if
 * anything too small and the order chosen errs on the large side.
 */
export function runSparseReduce(model: SparseStateSpaceModel, args: ParsedArgs, method: string): Record<string, unknown> {
  if (method !== 'balanced' && method !== 'residualization') {
    throw new ModelError('invalid_option', 'method', `the sparse path offers --method balanced, residualization, modal, irka or frequency-limited, not "${method}"`);
  }
  for (const o of ['keep', 'band']) if (args.options.has(o)) throw new ModelError('invalid_option', o, `--${o} applies to --method modal only`);
  const requested = integerOption(args, 'order');
  const tolerance = numberOption(args, 'tolerance');
  if ((requested === undefined) === (tolerance === undefined)) {
    throw new ModelError('invalid_option', requested === undefined ? 'order' : 'tolerance', 'give exactly one of --order R and --tolerance T');
  }
  if (tolerance !== undefined && !(tolerance > 0 && tolerance < 1)) {
    throw new ModelError('invalid_option', 'tolerance', `--tolerance must be in (0, 1), got ${tolerance}`);
  }
  const points = integerOption(args, 'error-points') ?? (tolerance !== undefined ? 40 : 0);
  if (points < 0 || (tolerance !== undefined && points < 2)) {
    throw new ModelError('invalid_option', 'error-points', `--error-points must be ${tolerance !== undefined ? '≥ 2 with --tolerance' : '≥ 0'}, got ${points}`);
  }
  const adi = adiOptionsOf(args);
  const gramians = lowRankGramians(model, adi);
  const grid = points > 0 ? Float64Array.from([0, ...sweepGrid(gramians, points)]) : null;
  const full = grid ? sparseFrequencyResponse(model, grid, adi.memoryBudgetBytes) : null;
  let referenceNorm: number | null = null;
  let order: number;
  if (tolerance !== undefined) {
    referenceNorm = Math.max(...full!.response.map((h) => largestSingularValue(h)));
    const { realization } = lowRankBalancedRealization(model, gramians);
    const hsv = realization.hankelSingularValues;
    let r = 1;
    while (r < hsv.length && balancedErrorBound(hsv, r) > tolerance * referenceNorm) r++;
    if (balancedErrorBound(hsv, r) > tolerance * referenceNorm || r >= model.A.n) {
      throw new ModelError(
        'order_too_large',
        'tolerance',
        `no order up to the ${hsv.length} resolved Hankel singular values meets --tolerance ${tolerance}; loosen it or tighten --adi-tolerance`,
      );
    }
    order = r;
  } else order = requested!;
  const r = sparseBalancedReduction(model, { method, order, adi, gramians });
  const measured = full ? sampledErrorPeak(full, r.model, grid!) : null;
  return {
    [ENGINE_PATH]: 'sparse',
    method: r.method,
    order: r.order,
    states: model.A.n,
    descriptor: model.E !== undefined,
    ...modelMatrices(r.model),
    errorBound: finiteOrNull(r.errorBound),
    errorBoundNote: `2Σσ(r+1..k) over the ${r.factorRank} Hankel singular values the low-rank gramians resolve; the values past the ${r.factorRank}th are not computed, so this is an estimate of the a-priori bound`,
    hankelSingularValues: numberList(r.hankelSingularValues),
    hankelSingularValuesNote: `the ${r.factorRank} values the low-rank gramian factors resolve (accurate to about the gramian residual); the model's values past the ${r.factorRank}th are not computed`,
    hsvComplete: false,
    factorRank: r.factorRank,
    gramianResidual: gramianReport(r.gramians, adi.tolerance ?? 1e-10),
    hInfinityError: measured ? measured.value : null,
    ...(measured
      ? {
          hInfinityErrorFrequency: finiteOrNull(measured.frequency),
          hInfinityErrorNote: `largest error over a sweep of the full model at ω = 0 and ${points} frequencies: a lower bound on the H∞ error`,
        }
      : { hInfinityErrorNote: 'not measured on the sparse path unless --error-points N (or --tolerance) is given' }),
    orderRule: tolerance !== undefined ? 'tolerance' : 'order',
    ...(referenceNorm !== null
      ? { referenceNorm, referenceNormNote: 'largest σ_max(G(iω)) over the same sweep: a lower bound on ‖G‖∞' }
      : {}),
    estimated: ['hankelSingularValues', 'errorBound', ...(measured ? ['hInfinityError'] : []), ...(referenceNorm !== null ? ['referenceNorm'] : [])],
    notes: r.notes,
  };
}

/** `analyze` on the sparse path: the dense path's keys at scale, each figure exact or listed in `estimated`. */
export function runSparseAnalyze(model: SparseStateSpaceModel, args: ParsedArgs): Record<string, unknown> {
  const adi = adiOptionsOf(args);
  const a = analyzeSparseModel(model, { adi, ...sparseAnalysisCounts(args) });
  // Poles and the figures made from them, and ‖G‖∞ from below (sparse-modes.ts).
  const modes = sparseModesDocument(a.modes);
  return {
    [ENGINE_PATH]: 'sparse',
    states: model.A.n,
    inputs: model.B.cols,
    outputs: model.C.rows,
    descriptor: model.E !== undefined,
    ...modes.figures,
    hankelSingularValues: numberList(a.hankelSingularValues),
    hsvComplete: false,
    h2Norm: a.h2Norm,
    h2NormNote: a.h2Norm === null ? 'D ≠ 0: the H2 norm is infinite' : '‖C Zc‖_F from the low-rank controllability factor',
    zeroFrequencyGain: a.zeroFrequencyGain ? matrixRows(a.zeroFrequencyGain) : null,
    ...(a.zeroFrequencyGainNote ? { zeroFrequencyGainNote: a.zeroFrequencyGainNote } : {}),
    gramianResidual: gramianReport(a.gramians, a.adiTolerance),
    estimated: [...modes.estimated, 'hankelSingularValues', 'h2Norm'],
  };
}
