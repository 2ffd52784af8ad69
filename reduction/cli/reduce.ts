/**
 * `reduce MODEL --method balanced|residualization|modal (--order R | --tolerance T)`: a reduced model
 * with its a-priori bound and measured errors (methods and papers: `reduction/reduce.ts`).
 */
import { ModelError } from '../errors';
import type { ModalSelection } from '../modal';
import { reduceModel, REDUCTION_METHODS, type ReductionMethod } from '../reduce';
import { integerOption, loadModelArgument, numberListOption, numberOption, stringOption, type ParsedArgs } from './args';
import { complexPairs, finiteOrNull, matrixRows, numberList } from './output';
import { registerVerb } from './registry';

function methodOf(args: ParsedArgs): ReductionMethod {
  const method = stringOption(args, 'method');
  if (method === undefined) {
    throw new ModelError('invalid_option', 'method', `--method is required: one of ${REDUCTION_METHODS.join(', ')}`);
  }
  if (!(REDUCTION_METHODS as readonly string[]).includes(method)) {
    throw new ModelError('invalid_option', 'method', `--method must be one of ${REDUCTION_METHODS.join(', ')}, got "${method}"`);
  }
  return method as ReductionMethod;
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
  summary: 'reduce a model by balanced truncation, balanced residualization or modal truncation',
  usage: 'MODEL --method balanced|residualization|modal (--order R | --tolerance T) [--keep dominance|slowest|band --band LOW,HIGH]',
  options: {
    method: { value: true, description: 'balanced | residualization | modal' },
    order: { value: true, description: 'states of the reduced model (including those kept for marginal/unstable poles)' },
    tolerance: { value: true, description: 'smallest order whose error bound is at most T·‖G‖∞' },
    keep: { value: true, description: 'modal: which modes come first — dominance (default), slowest, band' },
    band: { value: true, description: 'modal: keep the modes with natural frequency in LOW,HIGH (rad per time unit)' },
    'stability-tolerance': { value: true, description: 'relative tolerance for marginal poles (default 1e-7)' },
  },
  run(args) {
    const model = loadModelArgument(args.positionals);
    const method = methodOf(args);
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
      A: matrixRows(r.model.A),
      B: matrixRows(r.model.B),
      C: matrixRows(r.model.C),
      D: matrixRows(r.model.D),
      errorBound: finiteOrNull(r.errorBound),
      hinfError: r.hinfError.finite ? r.hinfError.value : null,
      hankelSingularValues: r.hankelSingularValues ? numberList(r.hankelSingularValues) : null,
      ...(r.hinfError.finite
        ? { hinfErrorFrequency: finiteOrNull(r.hinfError.peakFrequency) }
        : { hinfErrorNote: r.hinfError.reason }),
      h2Error: r.h2Error.finite ? r.h2Error.value : null,
      ...(r.h2Error.finite ? {} : { h2ErrorNote: r.h2Error.reason }),
      dcGainError: finiteOrNull(r.dcGainError),
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
