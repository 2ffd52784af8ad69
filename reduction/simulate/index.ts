/**
 * Time responses of ẋ = Ax + Bu, y = Cx + Du: the exact (zero-order-hold), explicit (Dormand–Prince
 * 5(4)) and stiff (variable-order NDF/BDF 1–5, `bdf.ts`; TR-BDF2 for fixed steps) solvers behind one
 * entry point (`simulate.ts`), plus `auto`. Inputs are steps, impulses and
 * sampled signals (`inputs.ts`); each result carries the solver's cost figures.
 */

export * from './types';
export { simulate } from './simulate';
export { stepInput, impulseInput, parseSampledInput, type InputSignal } from './inputs';
export { chooseSolver, estimateStiffness, STIFF_RATIO } from './auto';
export { SharedExponentials } from './exact';
export { simulationCostReport, type SimulationCostReport, type SolverCostRow } from './cost-report';
