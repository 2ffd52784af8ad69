/**
 * `simulate MODEL --input step|impulse|FILE.csv --t-end T --solver exact|explicit|stiff|auto
 *  [--rel-tol R --abs-tol A --points N | --times t1,t2,… --channel K --initial-state x1,x2,…]`: a time response with the
 * solver's cost figures (methods: `reduction/simulate/`).
 */
import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import { ModelError } from '../errors';
import { impulseInput, parseSampledInput, simulate, stepInput, type SolverChoice } from '../simulate/index';
import { integerOption, loadModelArgument, numberListOption, numberOption, stringOption, type ParsedArgs } from './args';
import { matrixRows, numberList } from './output';
import { registerVerb } from './registry';

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
  usage: 'MODEL --input step|impulse|FILE.csv --t-end T [--solver exact|explicit|stiff|auto] [--rel-tol R] [--abs-tol A] [--points N | --times t1,…] [--channel K] [--initial-state x1,…]',
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
  },
  run(args) {
    const model = loadModelArgument(args.positionals);
    const inputArg = stringOption(args, 'input');
    if (inputArg === undefined) throw new ModelError('invalid_option', 'input', '--input is required: step, impulse or a .csv file');
    const tEnd = numberOption(args, 't-end');
    if (tEnd === undefined) throw new ModelError('invalid_option', 't-end', '--t-end is required (the end time)');
    const channel = channelOf(args);
    let input;
    if (inputArg === 'step') input = stepInput(model, channel);
    else if (inputArg === 'impulse') input = impulseInput(model, channel);
    else {
      if (channel !== undefined) {
        throw new ModelError('invalid_option', 'channel', '--channel applies to step and impulse inputs; a CSV input gives every channel');
      }
      let text: string;
      try {
        text = readFileSync(inputArg, 'utf8');
      } catch (e) {
        throw new ModelError('unreadable_file', 'input', `cannot read the input file ${inputArg}: ${(e as Error).message}`);
      }
      input = parseSampledInput(text, model.B.cols, basename(inputArg));
    }
    const result = simulate(model, input, {
      tEnd,
      solver: solverOf(args),
      relTol: numberOption(args, 'rel-tol'),
      absTol: numberOption(args, 'abs-tol'),
      points: integerOption(args, 'points'),
      times: numberListOption(args, 'times'),
      initialState: numberListOption(args, 'initial-state'),
    });
    const s = result.stats;
    return {
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
