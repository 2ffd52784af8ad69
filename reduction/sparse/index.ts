/**
 * The large-model (sparse) path: models with sparse A and E stay in compressed columns from file to result.
 *
 *   model.ts            the sparse model type and CSC helpers (coordinates, products, transpose, A − σE pattern)
 *   matrix-market.ts    Matrix Market coordinate files straight into CSC
 *   adi.ts              low-rank ADI gramian factors with Penzl's shifts
 *   balanced.ts         low-rank square-root balanced truncation and residualization
 *   frequency.ts        the full model's frequency response by sparse solves, the sampled error of a reduction
 *   irka.ts             IRKA (H2-optimal tangential interpolation) with UMFPACK solves of σE − A
 *   budget.ts           the memory budget checked before each sparse factorization
 *   eigs.ts             shift-invert Krylov–Schur (eigenvalues nearest a shift, left and right), the fastest pole
 *   dominant.ts         dominant poles by the subspace-accelerated dominant pole algorithm (SISO and MIMO)
 *   modal.ts            modal truncation of the computed modes (E-biorthogonal projection)
 *   norms.ts            ‖G‖∞ from below: a sweep with local refinement
 *   analysis.ts         the whole analysis of a sparse model (command line and web task alike)
 *   path.ts             which path a model takes (the crossover)
 *   second-order.ts     M, D, K in descriptor form without M⁻¹
 *   simulate.ts         time responses: the NDF/BDF solver on sparse LU factors of E − c·A, Dormand–Prince on
 *                       sparse products, and the simulation-cost report against a dense reduced model
 */
export * from './model';
export { parseSparseMatrixMarket, writeSparseMatrixMarket, isMatrixMarketCoordinate, coordinateRowCount } from './matrix-market';
export { lowRankGramians, heuristicShifts, penzlShifts, arnoldiRitzValues, type AdiOptions, type AdiResult, type AdiFactor, type AdiStep, type Shift } from './adi';
export { sparseBalancedReduction, lowRankBalancedRealization, type SparseBalancedOptions, type SparseBalancedResult } from './balanced';
export { sparseFrequencyResponse, sampledErrorPeak, type SparseFrequencyResponse } from './frequency';
export { memoryBudgetBytes, checkFactorBudget, MEMORY_BUDGET_ENV } from './budget';
export { sparseIrka, sparseSpectrumEstimate, type SparseIrkaOptions, type SparseIrkaResult, type SpectrumEstimate } from './irka';
export { krylovSchur, sparseEigs, fastestPole, ShiftInvert, eigenResidual, type SparseEigsOptions, type SparseEigsResult, type FastestPoleResult } from './eigs';
export { dominantPoles, sweepPeakShifts, type DominantPole, type DominantPoleOptions, type DominantPoleResult } from './dominant';
export { sparseModalReduction, projectOnModes, type SparseModalOptions, type SparseModalResult } from './modal';
export { hInfinityLowerBound, sweepGridFromPoles, SparseFrequencyEvaluator, type HInfinityLowerBound } from './norms';
export { analyzeSparseModel, sparseModes, sparseZeroFrequencyGain, DEFAULT_POLE_COUNT, DEFAULT_SWEEP_POINTS, DEFAULT_ADI_TOLERANCE, type SparseAnalysis, type SparseAnalysisProgress, type SparseAnalysisStage, type SparseModes } from './analysis';
export { autoPathIsSparse, sparseCrossover, SPARSE_CROSSOVER_STATES, SPARSE_CROSSOVER_ENV } from './path';
export { secondOrderToDescriptor, type SparseSecondOrder } from './second-order';
export { simulateSparse, sparseSimulationCostReport, type SparseSimulationOptions, type SparseSolverChoice } from './simulate';
