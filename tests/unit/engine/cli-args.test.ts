// The command line's argument reader (reduction/cli/args.ts, over Node's util.parseArgs): what it accepts,
// and the ModelError, naming the option, for each thing it refuses. The expected messages are the ones the
// command line has always printed (tests/unit/engine/cli.test.ts checks them end to end through the CLI).
import { describe, expect, it } from 'vitest';
import { integerOption, numberListOption, numberOption, parseArgs, stringOption, type OptionSpec } from '@/reduction/cli/args';
import { ModelError } from '@/reduction/errors';

const SPEC: Record<string, OptionSpec> = {
  order: { value: true, description: 'order' },
  shift: { value: true, description: 'shift' },
  at: { value: true, description: 'frequencies' },
  pretty: { value: false, description: 'a flag' },
};

function refusal(argv: string[]): { field: string; message: string } {
  try {
    parseArgs(argv, SPEC);
  } catch (e) {
    expect(e).toBeInstanceOf(ModelError);
    return { field: (e as ModelError).field ?? '', message: (e as Error).message };
  }
  throw new Error(`${argv.join(' ')} was accepted`);
}

describe('parseArgs', () => {
  it('reads positionals, --name value, --name=value and flags, in any order', () => {
    const args = parseArgs(['a.mtx', '--order', '8', 'b.mtx', '--at=0.1,1,10', '--pretty', 'c.mtx'], SPEC);
    expect(args.positionals).toEqual(['a.mtx', 'b.mtx', 'c.mtx']);
    expect([...args.options]).toEqual([['order', '8'], ['at', '0.1,1,10'], ['pretty', true]]);
    expect(integerOption(args, 'order')).toBe(8);
    expect(numberListOption(args, 'at')).toEqual([0.1, 1, 10]);
    expect(stringOption(args, 'shift')).toBeUndefined();
  });

  it('takes a value that starts with a dash, and keeps single-dash arguments as positionals', () => {
    const args = parseArgs(['--shift', '-5', '-model.json'], SPEC);
    expect(numberOption(args, 'shift')).toBe(-5);
    expect(args.positionals).toEqual(['-model.json']);
  });

  it('treats everything after -- as positional', () => {
    const args = parseArgs(['m.json', '--', '--order'], SPEC);
    expect(args.positionals).toEqual(['m.json', '--order']);
    expect(args.options.size).toBe(0);
  });

  it('refuses an unknown option, listing the known ones', () => {
    expect(refusal(['--frobnicate', '1'])).toEqual({
      field: 'frobnicate',
      message: 'unknown option --frobnicate (known: --order, --shift, --at, --pretty)',
    });
    // A name that exists on every object is still unknown.
    expect(refusal(['--constructor']).message).toMatch(/^unknown option --constructor/);
  });

  it('refuses an option given twice, a value on a flag, and a missing or empty value', () => {
    expect(refusal(['--order', '4', '--order=5'])).toEqual({ field: 'order', message: 'option --order given twice' });
    expect(refusal(['--pretty=yes'])).toEqual({ field: 'pretty', message: 'option --pretty takes no value' });
    expect(refusal(['m.json', '--order'])).toEqual({ field: 'order', message: 'option --order needs a value' });
    expect(refusal(['--order='])).toEqual({ field: 'order', message: 'option --order needs a value' });
  });

  it('refuses a value that is not a number, or not whole, naming the option', () => {
    expect(() => numberOption(parseArgs(['--shift', 'abc'], SPEC), 'shift')).toThrow('--shift must be a number, got "abc"');
    expect(() => integerOption(parseArgs(['--order', '2.5'], SPEC), 'order')).toThrow('--order must be a whole number, got 2.5');
    expect(() => numberListOption(parseArgs(['--at', '1,,3'], SPEC), 'at')).toThrow('--at must be a number, got ""');
  });
});
