/**
 * `sweep MODEL (--at w1,w2,… | --grid LOW,HIGH [--count N])`: the frequency response G(jω), one p×m complex
 * matrix per frequency, with σmax(G(jω)) (method: `reduction/frequency.ts`, Laub 1981). Frequencies are in
 * rad per the model's time base (rad/s unless the model says otherwise); the document names the unit.
 * A model on the sparse path (`reduction/cli/sparse.ts`: a large coordinate A, `--E`, or `--mass`/
 * `--stiffness`) is swept by sparse LU solves, the frequencies spread over the cores
 * (`reduction/sparse/frequency.ts`), under `--memory-budget`.
 */
import { ModelError } from '../errors';
import { frequencyEvaluator, largestSingularValue, logFrequencyGrid } from '../frequency';
import { integerOption, loadModelArgument, numberListOption, numberOption, type ParsedArgs } from './args';
import { matrixRows, numberList } from './output';
import { ENGINE_PATH, registerVerb } from './registry';
import { SPARSE_PATH_OPTIONS, sparseModelArgument } from './sparse';
import { memoryBudgetBytes } from '../sparse/budget';
import { sparseFrequencyResponse } from '../sparse/frequency';
import type { ComplexMatrix } from '../frequency';

const DEFAULT_COUNT = 200;

function frequenciesOf(args: ParsedArgs): number[] {
  const at = numberListOption(args, 'at');
  const grid = numberListOption(args, 'grid');
  if ((at === undefined) === (grid === undefined)) {
    throw new ModelError('invalid_option', 'at', 'give the frequencies as --at w1,w2,… or a log-spaced grid as --grid LOW,HIGH [--count N]');
  }
  if (at !== undefined) {
    if (integerOption(args, 'count') !== undefined) {
      throw new ModelError('invalid_option', 'count', '--count applies to --grid only; --at lists every frequency itself');
    }
    if (at.some((x) => x < 0)) throw new ModelError('invalid_option', 'at', '--at frequencies must be ≥ 0');
    return at;
  }
  const [low, high] = grid as number[];
  if (grid!.length !== 2 || !(low > 0 && high > low)) {
    throw new ModelError('invalid_option', 'grid', '--grid must be LOW,HIGH with 0 < LOW < HIGH');
  }
  const count = integerOption(args, 'count') ?? DEFAULT_COUNT;
  if (count < 2) throw new ModelError('invalid_option', 'count', '--count must be at least 2');
  return Array.from(logFrequencyGrid(low, high, count));
}

registerVerb({
  name: 'sweep',
  summary: 'frequency response G(jω) at given frequencies or on a log-spaced grid',
  usage: 'MODEL (--at w1,w2,… | --grid LOW,HIGH [--count N]) [--path dense|sparse|auto] [--E E.mtx]',
  options: {
    ...SPARSE_PATH_OPTIONS,
    at: { value: true, description: 'frequencies in rad per time unit of the model (rad/s for seconds), comma-separated, each ≥ 0' },
    grid: { value: true, description: 'log-spaced grid from LOW to HIGH rad per time unit of the model' },
    count: { value: true, description: `number of grid points for --grid (default ${DEFAULT_COUNT})` },
  },
  run(args) {
    const sparse = sparseModelArgument(args);
    const frequencies = frequenciesOf(args);
    let response: ComplexMatrix[];
    let timeBase: string | undefined;
    if (sparse) {
      for (const o of ['adi-tolerance', 'adi-max-iterations']) {
        if (args.options.has(o)) throw new ModelError('invalid_option', o, `--${o} does not apply to sweep`);
      }
      response = sparseFrequencyResponse(sparse, frequencies, memoryBudgetBytes(numberOption(args, 'memory-budget'))).response;
    } else {
      const model = loadModelArgument(args.positionals);
      timeBase = model.timeBase;
      const evaluator = frequencyEvaluator(model);
      response = frequencies.map((w) => evaluator.at(w));
    }
    return {
      ...(sparse ? { [ENGINE_PATH]: 'sparse' } : {}),
      frequencies,
      frequencyUnit: `rad/${timeBase ?? 's'}`,
      response: response.map((g) => ({ re: matrixRows(g.re), im: matrixRows(g.im) })),
      largestSingularValue: numberList(response.map((g) => largestSingularValue(g))),
    };
  },
});
