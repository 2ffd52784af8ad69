/**
 * The one entry point of the time-response solvers: checks the input against the model and the options,
 * picks the solver (`auto`: `auto.ts`) and runs the exact (zero-order-hold), explicit (Dormand–Prince
 * 5(4)) or stiff (variable-order NDF/BDF 1–5, `bdf.ts`; TR-BDF2 for fixed steps) one.
 */
import type { StateSpaceModel } from '../model';
import { chooseSolver } from './auto';
import { simulateExplicit } from './dormand-prince';
import { simulateExact } from './exact';
import type { InputSignal } from './inputs';
import { checkOptions } from './output-grid';
import { simulateStiff } from './tr-bdf2';
import { simulateBdf } from './bdf';
import type { SimulationOptions, SimulationResult, SolverChoice } from './types';
import { ModelError } from '../errors';

/** Simulate `model` under `input` with the named solver (or `auto`). Throws ModelError on bad options. */
export function simulate(
  model: StateSpaceModel,
  input: InputSignal,
  options: SimulationOptions & { solver?: SolverChoice },
): SimulationResult {
  if (input.inputs !== model.B.cols) {
    throw new ModelError('dimension_mismatch', 'input', `the input has ${input.inputs} channels but the model has ${model.B.cols} inputs`);
  }
  const opts = checkOptions(options, model.A.rows);
  const choice = options.solver ?? 'auto';
  let reason: string | undefined;
  let solver = choice;
  if (choice === 'auto') {
    const picked = chooseSolver(model.A, input, opts);
    solver = picked.solver;
    reason = picked.reason;
  }
  let result: SimulationResult;
  switch (solver) {
    case 'exact':
      result = simulateExact(model, input, opts);
      break;
    case 'explicit':
      result = simulateExplicit(model, input, opts);
      break;
    case 'stiff':
      // Adaptive runs take the variable-order NDFs; a fixed step (emulating a fixed-step target) takes the
      // one-step, L-stable TR-BDF2, whose order does not change along the run.
      result = opts.fixedStep === undefined ? simulateBdf(model, input, opts) : simulateStiff(model, input, opts);
      break;
    default:
      throw new ModelError('invalid_option', 'solver', `solver must be exact, explicit, stiff or auto, got "${String(choice)}"`);
  }
  return reason === undefined ? result : { ...result, reason };
}
