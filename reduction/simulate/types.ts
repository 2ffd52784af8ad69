/**
 * Shared types of the time-response solvers. Every solver reports the same cost figures so that a full
 * and a reduced model, or two solvers, can be compared line by line (issue 4, simulation-cost report).
 */
import type { Matrix } from '../linalg/matrix';

export type SolverName = 'exact' | 'explicit' | 'stiff';
export type SolverChoice = SolverName | 'auto';

export interface SolverStats {
  /** Accepted steps (exact: recursion steps x[k+1] = Φx[k] + Γu[k]). */
  steps: number;
  /** Steps tried and rejected by the error control. */
  rejectedSteps: number;
  /** Evaluations of f(x) = Ax + Bu (one matrix–vector product with A each). */
  rhsEvaluations: number;
  /** LU factorisations (stiff: of I − γhA; exact: one per matrix exponential, in its Padé solve). */
  factorizations: number;
  /** Output points kept: the solvers keep only the requested outputs, never every internal step. */
  pointsStored: number;
  /** Wall-clock time of the solve, milliseconds. */
  wallMs: number;
}

/** An adaptive solver's report after each accepted step (the progress of a long run: `t` of `tEnd`). */
export interface TimeStepReport {
  /** Time reached. */
  t: number;
  tEnd: number;
  /** Accepted and rejected steps so far. */
  steps: number;
  rejectedSteps: number;
  /** The step just taken, and the order of the formula that took it (5 for Dormand–Prince). */
  h: number;
  order: number;
}

export interface SimulationOptions {
  /** End time (the simulation starts at t = 0). */
  tEnd: number;
  /** Relative and absolute tolerances of the adaptive solvers (ignored by `exact`). */
  relTol?: number;
  absTol?: number;
  /** Output on a uniform grid of this many points over [0, tEnd] (default 201)… */
  points?: number;
  /** …or at these times (increasing, inside [0, tEnd]). */
  times?: readonly number[];
  /** Initial state (zeros by default). */
  initialState?: readonly number[];
  /**
   * Fixed step instead of error control (adaptive solvers only): for order checks and to emulate a
   * fixed-step real-time target. The last step of each input interval is shortened to land on it.
   */
  fixedStep?: number;
  /** Safety limit on accepted + rejected steps (default one million). */
  maxSteps?: number;
  /**
   * Exact solver only: exponentials shared with other runs of the same model on the same grid (step and
   * impulse responses of every input; make one with `new SharedExponentials(A, B)`). Leave it out of a
   * run whose cost is being measured.
   */
  sharedExponentials?: SharedExponentialStore;
}

/** What the exact solver needs of a shared exponential store (`SharedExponentials` in exact.ts). */
export interface SharedExponentialStore {
  readonly A: Matrix;
  readonly B: Matrix;
  get(L: number): { zoh: { Phi: Matrix; Gamma: Matrix }; computed: boolean };
}

export interface SimulationResult {
  /** Output times, length N. */
  t: Float64Array;
  /** Outputs, N×p: one row per time point, one column per output. */
  y: Matrix;
  solver: SolverName;
  stats: SolverStats;
  /** Why `auto` chose this solver (absent when the solver was named). */
  reason?: string;
}

export const DEFAULT_REL_TOL = 1e-6;
export const DEFAULT_ABS_TOL = 1e-9;
export const DEFAULT_POINTS = 201;
