/**
 * `analyze MODEL`: poles with modal data, stability, stiffness ratio, Hankel singular values, norms,
 * DC gain and modal dominance of a model (methods and papers: `reduction/analysis.ts`).
 */
import { analyzeModel } from '../analysis';
import { loadModelArgument, numberOption } from './args';
import { finiteOrNull, matrixRows, numberList, hInfinityCertificate } from './output';
import { registerVerb } from './registry';
import { ModelError } from '../errors';
import { runSparseAnalyze, sparseModelArgument, SPARSE_PATH_OPTIONS } from './sparse';
import { SPARSE_ANALYSIS_OPTIONS, SPARSE_ANALYSIS_OPTION_NAMES } from './sparse-modes';

registerVerb({
  name: 'analyze',
  summary: 'poles, stability, stiffness ratio, Hankel singular values, H2/H∞ norms and DC gain of a model',
  usage: 'MODEL [--stability-tolerance T] [--path dense|sparse|auto] [--E E.mtx]',
  options: {
    'stability-tolerance': {
      value: true,
      description: 'relative tolerance for marginal poles: Re λ ≥ −T·max|λ| (default 1e-7)',
    },
    ...SPARSE_PATH_OPTIONS,
    ...SPARSE_ANALYSIS_OPTIONS,
  },
  run(args) {
    const sparse = sparseModelArgument(args);
    if (sparse) return runSparseAnalyze(sparse, args);
    for (const o of ['adi-tolerance', 'adi-max-iterations', 'memory-budget', ...SPARSE_ANALYSIS_OPTION_NAMES]) {
      if (args.options.has(o)) throw new ModelError('invalid_option', o, `--${o} applies to the sparse path only`);
    }
    const model = loadModelArgument(args.positionals);
    const a = analyzeModel(model, { stabilityTolerance: numberOption(args, 'stability-tolerance') });
    return {
      states: a.states,
      inputs: a.inputs,
      outputs: a.outputs,
      poles: a.poles.map((p) => [p.re, p.im]),
      stable: a.stable,
      stiffnessRatio: a.stiffnessRatio === null ? null : finiteOrNull(a.stiffnessRatio),
      hankelSingularValues: numberList(a.hankelSingularValues),
      hInfinityNorm: a.hInfinityNorm.finite ? a.hInfinityNorm.value : null,
      h2Norm: a.h2Norm.finite ? a.h2Norm.value : null,
      zeroFrequencyGain: a.zeroFrequencyGain.defined ? matrixRows(a.zeroFrequencyGain.value) : null,
      ...(a.hInfinityNorm.finite
        ? { hInfinityPeakFrequency: finiteOrNull(a.hInfinityNorm.peakFrequency), hInfinityNormCertificate: hInfinityCertificate(a.hInfinityNorm) }
        : { hInfinityNormNote: a.hInfinityNorm.reason }),
      ...(a.h2Norm.finite ? {} : { h2NormNote: a.h2Norm.reason }),
      ...(a.zeroFrequencyGain.defined ? {} : { zeroFrequencyGainNote: a.zeroFrequencyGain.reason }),
      stablePoles: a.stablePoles,
      marginalPoles: a.marginalPoles,
      unstablePoles: a.unstablePoles,
      stabilityTolerance: a.stabilityTolerance,
      slowestDecayRate: a.slowestDecayRate,
      fastestDecayRate: a.fastestDecayRate,
      modalData: a.poles.map((p) => ({
        naturalFrequency: p.naturalFrequency,
        dampingRatio: p.dampingRatio,
        timeConstant: p.timeConstant,
        stability: p.stability,
      })),
      stepLimits: {
        forwardEuler: {
          maxStep: finiteOrNull(a.stepLimits.forwardEuler.maxStep),
          limitingPole: a.stepLimits.forwardEuler.limitingPole,
        },
        rk4: { maxStep: finiteOrNull(a.stepLimits.rk4.maxStep), limitingPole: a.stepLimits.rk4.limitingPole },
      },
      modalDominance: {
        reliable: a.modalDominance.reliable,
        eigenvectorCondition: finiteOrNull(a.modalDominance.eigenvectorCondition),
        modes: a.modalDominance.modes.map((m) => ({
          pole: [m.re, m.im],
          states: m.states,
          naturalFrequency: m.naturalFrequency,
          dampingRatio: m.dampingRatio,
          dominance: finiteOrNull(m.dominance),
        })),
      },
    };
  },
});
