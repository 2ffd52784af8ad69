/**
 * The engine's public surface for the rest of Modeshelf (`lib/`, workers, scripts). Framework-free:
 * nothing here imports from `app/`, `lib/` or React. Each module named below cites its method.
 *
 *   model input         io/ (JSON, Matrix Market, CSV; second-order models), model.ts, errors.ts
 *   analysis            analysis.ts, spectral-split.ts, norms.ts, frequency.ts, step-limits.ts
 *   reduction           reduce.ts (entry), balanced.ts, modal.ts, irka.ts, order.ts
 *   time responses      simulate/, discretize.ts
 *   large sparse models sparse/ (sparse model type, coordinate reader, low-rank ADI and balancing, sweeps)
 *
 * Dense kernels stay behind `reduction/linalg`; only the matrix type and its helpers are re-exported.
 */
export type { Matrix, ComplexVector } from './linalg/matrix';
export { zeros, identity, fromRows, toRows } from './linalg/matrix';
export { type StateSpaceModel, stateCount, inputCount, outputCount } from './model';
export { ModelError, type ModelErrorCode } from './errors';
export { StoppedError, throwIfStopped, type StopSignal, type LoopHooks } from './stop';
export * from './io/index';
export * as sparse from './sparse/index';

export {
  analyzeModel,
  snapMarginalPoles,
  poleData,
  zeroFrequencyGain,
  stiffnessRatio,
  type ModelAnalysis,
  type AnalysisOptions,
  type PoleData,
  type ZeroFrequencyGain,
  type ModalDominance,
} from './analysis';
export { stiffnessFromRates } from './poles';
export {
  splitStableUnstable,
  classifyPoles,
  modelPoles,
  DEFAULT_STABILITY_TOLERANCE,
  type SpectralSplit,
  type PoleClassification,
  type PoleStability,
} from './spectral-split';
export { hInfinityNorm, h2Norm, type HInfinityNorm, type HInfinityResult, type NormValue, type NormOptions } from './norms';
export {
  frequencyResponse,
  frequencyEvaluator,
  bodeData,
  logFrequencyGrid,
  defaultFrequencyBand,
  complexSingularValues,
  largestSingularValue,
  type ComplexMatrix,
  type FrequencyEvaluator,
  type FrequencyResponse,
  type BodeData,
} from './frequency';
export { controllabilityGramian, observabilityGramian } from './gramians';

export {
  reduceModel,
  prepareReduction,
  PreparationCache,
  assessReduction,
  REDUCTION_METHODS,
  IRKA_NO_BOUND_NOTE,
  type ReductionMethod,
  type ReductionOptions,
  type ReductionRecipe,
  type ReductionBasis,
  type ReducedModel,
  type ReductionResult,
  type AccuracyFigures,
  type OrderSummary,
} from './reduce';
export {
  hankelSingularValues,
  balancedRealization,
  type BalancedRealization,
} from './balanced';
export { balancedErrorBound, balancedErrorBounds, numericalOrder, roundingFloor, DEFAULT_RANK_TOLERANCE } from './hankel-figures';
export { modalForm, rankedModalForm, type Mode, type ModalForm } from './modal';
export { modeComparator, rankStoredModes, statesInBand, type ModalSelection, type RankedModeFacts, type StoredMode } from './mode-ranking';
export {
  irka,
  logSpacedShifts,
  slowestPoleShifts,
  DEFAULT_IRKA_TOLERANCE,
  DEFAULT_IRKA_MAX_ITERATIONS,
  type IrkaOptions,
  type IrkaReport,
  type IrkaResult,
  type IrkaStep,
  type InitialShiftRule,
  type InterpolationPoint,
  type Shift as IrkaShift,
} from './irka';
export { chooseOrder, type OrderRule, type OrderChoice } from './order';
export { acceptanceVerdict, checkAcceptanceBand, type AcceptanceBand, type AcceptanceStatus, type AcceptanceVerdict } from './acceptance';
export { errorSystem } from './realization';

export {
  stepLimits,
  stepLimitsFromPoles,
  realTimeReadiness,
  explicitStabilitySteps,
  type StepLimit,
  type StepLimits,
  type RealTimeReadiness,
} from './step-limits';
export { discretizeZoh, discretePoles, type DiscreteModel } from './discretize';
export * from './simulate/index';
