/**
 * `simulate MODEL --input step|impulse|FILE.csv --t-end T --solver exact|explicit|stiff|auto
 *  [--rel-tol R --abs-tol A --points N | --times t1,t2,… --channel K --initial-state x1,x2,…]`: a time response with the
 * solver's cost figures (methods: `reduction/simulate/`). On the sparse path (`--path`, `--E`, the crossover of
 * `cli/sparse.ts`) the stiff and explicit solvers run on the compressed matrices (`reduction/sparse/simulate.ts`),
 * with `--memory-budget`; the exact solver is dense only.
 */
import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import { ModelError } from '../errors';
import { impulseInput, parseSampledInput, simulate, stepInput, type InputSignal, type SimulationResult, type SolverChoice } from '../simulate/index';
import { simulateSparse } from '../sparse/simulate';
import { memoryBudgetBytes } from '../sparse/budget';
import type { StateSpaceModel } from '../model';
import type { SparseStateSpaceModel } from '../sparse/model';
import { integerOption, loadModelArgument, numberListOption, numberOption, stringOption, type ParsedArgs } from './args';
import { matrixRows, numberList } from './output';
import { ENGINE_PATH, registerVerb } from './registry';
import { SPARSE_PATH_OPTIONS, sparseModelArgument } from './sparse';

const SOLVERS: readonly SolverChoice[] = ['exact', 'explicit', 'stiff', 'auto'];

function solverOf(args: ParsedArgs): SolverChoice {
  const s = stringOption(args, 'solver') ?? 'auto';
  if (!(SOLVERS as readonly string[]).includes(s)) {
    throw new ModelError('invalid_option', 'solver', `--solver must be one of ${SOLVERS.join(', ')}, got "${s}"`);
  }
  return s as SolverChoice;
}

function channelOf(args: ParsedArgs): string | undefined {
  return stringOption(args, 'channel');
}

registerVerb({
  name: 'simulate',
  summary: 'time response to a step, an impulse or a sampled input, with the solver’s cost figures',
  usage:
    'MODEL --input step|impulse|FILE.csv --t-end T [--solver exact|explicit|stiff|auto] [--rel-tol R] [--abs-tol A] [--points N | --times t1,…] [--channel K] [--initial-state x1,…] [--path dense|sparse|auto] [--E E.mtx] [--memory-budget MiB]',
  options: {
    input: { value: true, description: 'step, impulse, or a CSV file: time, then one column per input (held between samples)' },
    't-end': { value: true, description: 'end time (the simulation starts at 0)' },
    solver: { value: true, description: 'exact (zero-order hold), explicit (Dormand–Prince 5(4)), stiff (variable-order NDF/BDF 1–5; TR-BDF2 at a fixed step) or auto (default)' },
    'rel-tol': { value: true, description: 'relative tolerance of the adaptive solvers (default 1e-6)' },
    'abs-tol': { value: true, description: 'absolute tolerance of the adaptive solvers (default 1e-9)' },
    points: { value: true, description: 'number of output points on a uniform grid over [0, T] (default 201)' },
    times: { value: true, description: 'output times instead of a grid, comma-separated, increasing' },
    channel: { value: true, description: 'input channel of the step or impulse: 1-based number, input name, or all (default)' },
    'initial-state': { value: true, description: 'initial state, comma-separated (default zeros)' },
    path: SPARSE_PATH_OPTIONS.path,
    E: SPARSE_PATH_OPTIONS.E,
    'memory-budget': SPARSE_PATH_OPTIONS['memory-budget'],
  },
  run(args) {
    const sparse = sparseModelArgument(args);
    if (!sparse && args.options.has('memory-budget')) {
      throw new ModelError('invalid_option', 'memory-budget', '--memory-budget applies to the sparse path only');
    }
    const model = sparse ?? loadModelArgument(args.positionals);
    const input = inputOf(args, model);
    const tEnd = numberOption(args, 't-end');
    if (tEnd === undefined) throw new ModelError('invalid_option', 't-end', '--t-end is required (the end time)');
    const common = {
      tEnd,
      relTol: numberOption(args, 'rel-tol'),
      absTol: numberOption(args, 'abs-tol'),
      points: integerOption(args, 'points'),
      times: numberListOption(args, 'times'),
      initialState: numberListOption(args, 'initial-state'),
    };
    const solver = solverOf(args);
    let result: SimulationResult;
    if (sparse) {
      if (solver === 'exact') {
        throw new ModelError('invalid_option', 'solver', '--solver exact needs dense matrix exponentials; on the sparse path use stiff, explicit or auto (or --path dense for a model small enough)');
      }
      result = simulateSparse(sparse, input, { ...common, solver, memoryBudgetBytes: memoryBudgetBytes(numberOption(args, 'memory-budget')) });
    } else {
      result = simulate(model as StateSpaceModel, input, { ...common, solver });
    }
    const s = result.stats;
    return {
      ...(sparse ? { [ENGINE_PATH]: 'sparse', states: sparse.A.n, descriptor: sparse.E !== undefined } : {}),
      t: numberList(result.t),
      y: matrixRows(result.y),
      solver: result.solver,
      stats: {
        steps: s.steps,
        rejectedSteps: s.rejectedSteps,
        rhsEvaluations: s.rhsEvaluations,
        factorizations: s.factorizations,
        pointsStored: s.pointsStored,
        wallMs: Math.round(s.wallMs * 1000) / 1000,
      },
      ...(result.reason !== undefined ? { reason: result.reason } : {}),
    };
  },
});

function inputOf(args: ParsedArgs, model: StateSpaceModel | SparseStateSpaceModel): InputSignal {
  const inputArg = stringOption(args, 'input');
  if (inputArg === undefined) throw new ModelError('invalid_option', 'input', '--input is required: step, impulse or a .csv file');
  const channel = channelOf(args);
  if (inputArg === 'step') return stepInput(model, channel);
  if (inputArg === 'impulse') return impulseInput(model, channel);
  if (channel !== undefined) {
    throw new ModelError('invalid_option', 'channel', '--channel applies to step and impulse inputs; a CSV input gives every channel');
  }
  let text: string;
  try {
    text = readFileSync(inputArg, 'utf8');
  } catch (e) {
    throw new ModelError('unreadable_file', 'input', `cannot read the input file ${inputArg}: ${(e as Error).message}`);
  }
  return parseSampledInput(text, model.B.cols, basename(inputArg));
}
