/**
 * `freq MODEL --w w1,w2,…`: the frequency response G(jω), one p×m complex matrix per frequency
 * (method: `reduction/frequency.ts`, Laub 1981).
 */
import { ModelError } from '../errors';
import { frequencyEvaluator, largestSingularValue, logFrequencyGrid } from '../frequency';
import { integerOption, loadModelArgument, numberListOption, type ParsedArgs } from './args';
import { matrixRows, numberList } from './output';
import { registerVerb } from './registry';

function frequenciesOf(args: ParsedArgs): number[] {
  const w = numberListOption(args, 'w');
  const range = numberListOption(args, 'range');
  if ((w === undefined) === (range === undefined)) {
    throw new ModelError('invalid_option', 'w', 'give the frequencies as --w w1,w2,… or a log grid as --range LOW,HIGH');
  }
  if (w !== undefined) {
    if (w.some((x) => x < 0)) throw new ModelError('invalid_option', 'w', '--w frequencies must be ≥ 0');
    return w;
  }
  const [lo, hi] = range as number[];
  if (range!.length !== 2 || !(lo > 0 && hi > lo)) {
    throw new ModelError('invalid_option', 'range', '--range must be LOW,HIGH with 0 < LOW < HIGH');
  }
  const points = integerOption(args, 'points') ?? 200;
  if (points < 2) throw new ModelError('invalid_option', 'points', '--points must be at least 2');
  return Array.from(logFrequencyGrid(lo, hi, points));
}

registerVerb({
  name: 'freq',
  summary: 'frequency response G(jω) at given frequencies or on a log grid',
  usage: 'MODEL (--w w1,w2,… | --range LOW,HIGH [--points N])',
  options: {
    w: { value: true, description: 'frequencies in rad per time unit, comma-separated' },
    range: { value: true, description: 'log-spaced grid from LOW to HIGH rad per time unit' },
    points: { value: true, description: 'number of grid points for --range (default 200)' },
  },
  run(args) {
    const model = loadModelArgument(args.positionals);
    const w = frequenciesOf(args);
    const evaluator = frequencyEvaluator(model);
    const H = w.map((wk) => evaluator.at(wk));
    return {
      w,
      H: H.map((h) => ({ re: matrixRows(h.re), im: matrixRows(h.im) })),
      largestSingularValue: numberList(H.map((h) => largestSingularValue(h))),
    };
  },
});
