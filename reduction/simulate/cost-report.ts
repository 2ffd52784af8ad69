/**
 * The simulation-cost report: a full model and its reduced model simulated under the same input, output
 * grid and tolerances by each solver, with the figures side by side and the ratios full ÷ reduced — the
 * number that tells a controls team what the reduced model buys (DESIGN §5, "Why the solver figures
 * matter"). The largest output difference between the two responses (from the exact solver when it is
 * among those run) shows what the saving costs in accuracy.
 */
import { ModelError } from '../errors';
import type { StateSpaceModel } from '../model';
import type { InputSignal } from './inputs';
import { simulate } from './simulate';
import type { SimulationOptions, SimulationResult, SolverName, SolverStats } from './types';

type StatName = keyof SolverStats;
const STAT_NAMES: readonly StatName[] = ['steps', 'rejectedSteps', 'rhsEvaluations', 'factorizations', 'pointsStored', 'wallMs'];

export interface SolverCostRow {
  solver: SolverName;
  full: SolverStats;
  reduced: SolverStats;
  /** full ÷ reduced per figure; null where the reduced figure is 0 (nothing to divide by). */
  ratios: Record<StatName, number | null>;
  /** max |y_full − y_reduced| over all outputs and times, with this solver. */
  maxOutputDifference: number;
}

export interface SimulationCostReport {
  input: string;
  tEnd: number;
  relTol: number | undefined;
  absTol: number | undefined;
  fullStates: number;
  reducedStates: number;
  rows: SolverCostRow[];
  /** max |y_full − y_reduced| relative to max |y_full|, by the most accurate solver run (exact if run). */
  relativeOutputDifference: number;
}

function maxDifference(a: SimulationResult, b: SimulationResult): { abs: number; scale: number } {
  let abs = 0;
  let scale = 0;
  for (let k = 0; k < a.y.data.length; k++) {
    abs = Math.max(abs, Math.abs(a.y.data[k] - b.y.data[k]));
    scale = Math.max(scale, Math.abs(a.y.data[k]));
  }
  return { abs, scale };
}

/**
 * Run each solver on both models. The input must have as many channels as both models have inputs
 * (build it from the full model; a reduced model keeps the inputs and outputs). Throws ModelError when
 * the models' inputs or outputs differ in number.
 */
export function simulationCostReport(
  full: StateSpaceModel,
  reduced: StateSpaceModel,
  input: InputSignal,
  options: SimulationOptions,
  solvers: readonly SolverName[] = ['exact', 'explicit', 'stiff'],
): SimulationCostReport {
  return costReport(
    { states: full.A.rows, inputs: full.B.cols, outputs: full.C.rows, run: (solver) => simulate(full, input, { ...options, solver }) },
    reduced,
    input,
    options,
    solvers,
  );
}

/**
 * The report's core, for any full model that can be simulated by the solvers named (the sparse path's
 * `sparseSimulationCostReport` runs its full model with `simulateSparse`); the reduced model is dense.
 */
export function costReport(
  full: { states: number; inputs: number; outputs: number; run: (solver: SolverName) => SimulationResult },
  reduced: StateSpaceModel,
  input: InputSignal,
  options: SimulationOptions,
  solvers: readonly SolverName[],
): SimulationCostReport {
  if (full.inputs !== reduced.B.cols || full.outputs !== reduced.C.rows) {
    throw new ModelError(
      'dimension_mismatch',
      'reduced',
      `the reduced model has ${reduced.B.cols} inputs and ${reduced.C.rows} outputs, the full model ${full.inputs} and ${full.outputs}`,
    );
  }
  if (options.initialState !== undefined) {
    throw new ModelError('invalid_option', 'initialState', 'a cost report compares responses from rest; initialState cannot be mapped to the reduced state');
  }
  const rows: SolverCostRow[] = [];
  let reference: { abs: number; scale: number } | null = null;
  for (const solver of solvers) {
    const f = full.run(solver);
    const r = simulate(reduced, input, { ...options, solver });
    const ratios = {} as Record<StatName, number | null>;
    for (const s of STAT_NAMES) ratios[s] = r.stats[s] > 0 ? f.stats[s] / r.stats[s] : null;
    const diff = maxDifference(f, r);
    if (solver === 'exact' || reference === null) reference = diff;
    rows.push({ solver, full: f.stats, reduced: r.stats, ratios, maxOutputDifference: diff.abs });
  }
  return {
    input: input.description,
    tEnd: options.tEnd,
    relTol: options.relTol,
    absTol: options.absTol,
    fullStates: full.states,
    reducedStates: reduced.A.rows,
    rows,
    relativeOutputDifference: reference && reference.scale > 0 ? reference.abs / reference.scale : 0,
  };
}
