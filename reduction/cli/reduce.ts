/**
 * `reduce MODEL --method balanced|residualization|modal (--order R | --tolerance T)`: a reduced model
 * with its a-priori bound and measured errors (methods and papers: `reduction/reduce.ts`).
 * `reduce MODEL --method frequency-limited --band W1,W2 --order R`: frequency-limited balanced truncation
 * (`reduction/frequency-limited.ts`), with its measured errors inside and outside the band (no bound).
 * `reduce MODEL --method irka --order R`: IRKA on either path (`./irka.ts`; no bound, measured errors).
 */
import { ModelError } from '../errors';
import type { ModalSelection } from '../mode-ranking';
import { reduceModel, REDUCTION_METHODS, type ReductionMethod } from '../reduce';
import { frequencyLimitedReduction, NO_BAND_BOUND } from '../frequency-limited';
import { integerOption, loadModelArgument, numberListOption, numberOption, stringOption, type ParsedArgs } from './args';
import { complexPairs, finiteOrNull, numberList, hInfinityCertificate, modelMatrices } from './output';
import { registerVerb } from './registry';
import { runSparseFrequencyLimited, runSparseReduce, sparseModelArgument, SPARSE_REDUCE_OPTIONS } from './sparse';
import { runSparseModalReduce } from './sparse-modes';
import { IRKA_OPTIONS, runIrkaReduce } from './irka';
import { modelPoles as modelPolesOf } from '../spectral-split';

const CLI_METHODS = [...REDUCTION_METHODS, 'frequency-limited'] as const;

function methodOf(args: ParsedArgs): ReductionMethod | 'frequency-limited' {
  const method = stringOption(args, 'method');
  if (method === undefined) {
    throw new ModelError('invalid_option', 'method', `--method is required: one of ${CLI_METHODS.join(', ')}`);
  }
  if (!(CLI_METHODS as readonly string[]).includes(method)) {
    throw new ModelError('invalid_option', 'method', `--method must be one of ${CLI_METHODS.join(', ')}, got "${method}"`);
  }
  return method as ReductionMethod | 'frequency-limited';
}

/** `--method frequency-limited --band W1,W2 --order R`. */
function runFrequencyLimited(args: ParsedArgs): Record<string, unknown> {
  const model = loadModelArgument(args.positionals);
  const band = numberListOption(args, 'band');
  if (band === undefined || band.length !== 2) {
    throw new ModelError('invalid_option', 'band', '--method frequency-limited needs --band W1,W2 (rad per time unit, 0 ≤ W1 < W2)');
  }
  if (numberOption(args, 'tolerance') !== undefined) {
    throw new ModelError('invalid_option', 'tolerance', '--method frequency-limited has no error bound to meet a tolerance; give --order');
  }
  if (stringOption(args, 'keep') !== undefined) throw new ModelError('invalid_option', 'keep', '--keep applies to --method modal only');
  const order = integerOption(args, 'order');
  if (order === undefined) throw new ModelError('invalid_option', 'order', '--method frequency-limited needs --order R');
  const r = frequencyLimitedReduction(model, { band: [band[0], band[1]], order, stabilityTolerance: numberOption(args, 'stability-tolerance') });
  return {
    method: r.method,
    band: [...r.band],
    order: r.order,
    ...modelMatrices(r.model),
    errorBound: null,
    errorBoundNote: NO_BAND_BOUND,
    inBandError: r.errors.inBand,
    inBandErrorFrequency: finiteOrNull(r.errors.inBandPeakFrequency),
    outOfBandError: r.errors.outOfBand,
    outOfBandErrorFrequency: finiteOrNull(r.errors.outOfBandPeakFrequency),
    hInfinityError: r.hInfinityError,
    frequencyLimitedSingularValues: numberList(r.singularValues),
    reducedStable: r.reducedStable,
    stableOrder: r.stableOrder,
    unstableStatesKept: r.unstableStatesKept,
    poles: complexPairs(modelPolesOf(r.model.A)),
    notes: r.notes,
  };
}

function selectionOf(args: ParsedArgs, method: ReductionMethod): ModalSelection | undefined {
  const keep = stringOption(args, 'keep');
  const band = numberListOption(args, 'band');
  if ((keep !== undefined || band !== undefined) && method !== 'modal') {
    throw new ModelError('invalid_option', keep !== undefined ? 'keep' : 'band', '--keep and --band apply to --method modal only');
  }
  if (band !== undefined) {
    if (band.length !== 2) throw new ModelError('invalid_option', 'band', '--band must be two frequencies: low,high');
    if (keep !== undefined && keep !== 'band') {
      throw new ModelError('invalid_option', 'keep', `--band goes with --keep band, not --keep ${keep}`);
    }
    return { rule: 'band', band: [band[0], band[1]] };
  }
  if (keep === undefined) return undefined;
  if (keep === 'dominance' || keep === 'slowest') return { rule: keep };
  if (keep === 'band') throw new ModelError('invalid_option', 'band', '--keep band needs --band low,high');
  throw new ModelError('invalid_option', 'keep', `--keep must be dominance, slowest or band, got "${keep}"`);
}

registerVerb({
  name: 'reduce',
  summary: 'reduce a model by balanced truncation, balanced residualization, modal truncation, IRKA or frequency-limited balanced truncation',
  usage:
    'MODEL --method balanced|residualization|modal (--order R | --tolerance T) [--keep dominance|slowest|band --band LOW,HIGH]\n' +
    '      MODEL --method frequency-limited --band W1,W2 --order R   (dense or sparse path)\n' +
    '      MODEL --method irka --order R [--irka-tolerance T] [--irka-max-iterations N]   (dense or sparse path)\n' +
    '      A.mtx B C [D] [--E E.mtx] [--path dense|sparse|auto] --method balanced|residualization|modal --order R   (sparse path)\n' +
    '      --mass M.mtx --stiffness K.mtx [--damping D.mtx] F C [D] --method balanced|residualization|modal|irka --order R   (second order, sparse path)',
  options: {
    method: { value: true, description: 'balanced | residualization | modal | irka | frequency-limited' },
    order: { value: true, description: 'states of the reduced model (including those kept for marginal/unstable poles)' },
    tolerance: { value: true, description: 'smallest order whose error bound is at most T·‖G‖∞' },
    keep: { value: true, description: 'modal: which modes come first — dominance (default), slowest, band' },
    band: { value: true, description: 'modal: keep the modes with natural frequency in LOW,HIGH; frequency-limited: the band W1,W2 to balance on (rad per time unit)' },
    'stability-tolerance': { value: true, description: 'relative tolerance for marginal poles (default 1e-7)' },
    ...SPARSE_REDUCE_OPTIONS,
    ...IRKA_OPTIONS,
  },
  run(args) {
    const method = methodOf(args);
    if (method === 'irka') return runIrkaReduce(args);
    const sparse = sparseModelArgument(args);
    if (sparse) {
      if (method === 'frequency-limited') return runSparseFrequencyLimited(sparse, args);
      return method === 'modal' ? runSparseModalReduce(sparse, args, selectionOf(args, method)) : runSparseReduce(sparse, args, method);
    }
    for (const o of ['adi-tolerance', 'adi-max-iterations', 'memory-budget', 'error-points']) {
      if (args.options.has(o)) throw new ModelError('invalid_option', o, `--${o} applies to the sparse path only`);
    }
    if (method === 'frequency-limited') return runFrequencyLimited(args);
    const model = loadModelArgument(args.positionals);
    const r = reduceModel(model, {
      method,
      order: integerOption(args, 'order'),
      tolerance: numberOption(args, 'tolerance'),
      modalSelection: selectionOf(args, method),
      stabilityTolerance: numberOption(args, 'stability-tolerance'),
    });
    return {
      method: r.method,
      order: r.order,
      ...modelMatrices(r.model),
      errorBound: finiteOrNull(r.errorBound),
      hInfinityError: r.hInfinityError.finite ? r.hInfinityError.value : null,
      hankelSingularValues: r.hankelSingularValues ? numberList(r.hankelSingularValues) : null,
      ...(r.hInfinityError.finite
        ? { hInfinityErrorFrequency: finiteOrNull(r.hInfinityError.peakFrequency), hInfinityErrorCertificate: hInfinityCertificate(r.hInfinityError) }
        : { hInfinityErrorNote: r.hInfinityError.reason }),
      h2Error: r.h2Error.finite ? r.h2Error.value : null,
      ...(r.h2Error.finite ? {} : { h2ErrorNote: r.h2Error.reason }),
      zeroFrequencyGainError: finiteOrNull(r.zeroFrequencyGainError),
      stableOrder: r.stableOrder,
      unstableStatesKept: r.unstableStatesKept,
      poles: complexPairs(r.poles),
      stiffnessRatio: r.stiffnessRatio === null ? null : finiteOrNull(r.stiffnessRatio),
      orderRule: r.orderChoice.rule,
      ...(r.referenceNorm !== null ? { referenceNorm: r.referenceNorm } : {}),
      notes: r.notes,
    };
  },
});
