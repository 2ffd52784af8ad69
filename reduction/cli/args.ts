/**
 * Command-line arguments, read by Node's `util.parseArgs` against the options a verb declares (its
 * `options` table in the verb's module: one entry per option, so renaming an option is one line there plus
 * the name it is read by), with number parsers that fail with a ModelError naming the option.
 *
 * Accepted: positionals, `--name value`, `--name=value` and `--flag`; a value may start with a dash
 * (`--shift -5`); `--` ends the options (everything after it is positional). An argument with a single
 * dash (`-5`, `-x`) is positional, as it always was here. Refused, each with a ModelError naming the option:
 * an option the verb does not declare (the message lists the known ones), an option given twice, a value
 * on a flag, a missing or empty value.
 */
import { parseArgs as parseWithNode } from 'node:util';
import { ModelError } from '../errors';
import { loadModelFiles } from '../io/index';
import type { StateSpaceModel } from '../model';

export interface OptionSpec {
  /** True when the option takes a value (`--order 8`); false for a flag (`--pretty`). */
  readonly value: boolean;
  readonly description: string;
}

export interface ParsedArgs {
  readonly positionals: readonly string[];
  readonly options: ReadonlyMap<string, string | true>;
}

export function parseArgs(argv: readonly string[], spec: Readonly<Record<string, OptionSpec>>): ParsedArgs {
  const declared = Object.fromEntries(
    Object.entries(spec).map(([name, option]) => [name, { type: option.value ? ('string' as const) : ('boolean' as const) }]),
  );
  // Not strict: the checks below word the errors themselves, in the order the arguments come.
  const { tokens } = parseWithNode({ args: [...argv], options: declared, strict: false, allowPositionals: true, tokens: true });
  const positionals: string[] = [];
  const options = new Map<string, string | true>();
  let lastShortIndex = -1;
  for (const token of tokens) {
    if (token.kind === 'positional') {
      positionals.push(token.value);
      continue;
    }
    if (token.kind === 'option-terminator') continue;
    if (!token.rawName.startsWith('--')) {
      // A single-dash argument (a group like -abc gives one token per letter): positional, whole.
      if (token.index !== lastShortIndex) positionals.push(argv[token.index]);
      lastShortIndex = token.index;
      continue;
    }
    const name = token.name;
    const option = Object.hasOwn(spec, name) ? spec[name] : undefined;
    if (!option) {
      const known = Object.keys(spec).map((k) => `--${k}`);
      throw new ModelError(
        'invalid_option',
        name,
        `unknown option --${name}` + (known.length > 0 ? ` (known: ${known.join(', ')})` : ''),
      );
    }
    if (options.has(name)) throw new ModelError('invalid_option', name, `option --${name} given twice`);
    if (!option.value) {
      if (token.inlineValue) throw new ModelError('invalid_option', name, `option --${name} takes no value`);
      options.set(name, true);
      continue;
    }
    if (token.value === undefined || token.value === '') {
      throw new ModelError('invalid_option', name, `option --${name} needs a value`);
    }
    options.set(name, token.value);
  }
  return { positionals, options };
}

export function stringOption(args: ParsedArgs, name: string): string | undefined {
  const v = args.options.get(name);
  return typeof v === 'string' ? v : undefined;
}

function toNumber(text: string, name: string): number {
  const t = text.trim();
  const v = t === '' ? NaN : Number(t);
  if (!Number.isFinite(v)) throw new ModelError('invalid_option', name, `--${name} must be a number, got "${text}"`);
  return v;
}

export function numberOption(args: ParsedArgs, name: string): number | undefined {
  const v = stringOption(args, name);
  return v === undefined ? undefined : toNumber(v, name);
}

export function integerOption(args: ParsedArgs, name: string): number | undefined {
  const v = numberOption(args, name);
  if (v !== undefined && !Number.isInteger(v)) {
    throw new ModelError('invalid_option', name, `--${name} must be a whole number, got ${v}`);
  }
  return v;
}

/** A comma-separated list of numbers, e.g. `--at 0.1,1,10`. */
export function numberListOption(args: ParsedArgs, name: string): number[] | undefined {
  const v = stringOption(args, name);
  if (v === undefined) return undefined;
  return v.split(',').map((part) => toNumber(part, name));
}

/** The MODEL positionals of a verb: one .json file, or the A, B, C (and D) files. */
export function loadModelArgument(positionals: readonly string[]): StateSpaceModel {
  if (positionals.length === 0) {
    throw new ModelError('invalid_option', 'model', 'no model given: pass one .json file, or the A, B, C (and D) files');
  }
  return loadModelFiles(positionals);
}
