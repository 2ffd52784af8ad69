/**
 * Command-line arguments: positionals and `--name value` / `--name=value` / `--flag` options, checked
 * against the options a verb declares, with number parsers that fail with a ModelError naming the option.
 */
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
  const positionals: string[] = [];
  const options = new Map<string, string | true>();
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    if (!arg.startsWith('--') || arg === '--') {
      positionals.push(arg);
      continue;
    }
    const eq = arg.indexOf('=');
    const name = eq >= 0 ? arg.slice(2, eq) : arg.slice(2);
    const option = spec[name];
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
      if (eq >= 0) throw new ModelError('invalid_option', name, `option --${name} takes no value`);
      options.set(name, true);
      continue;
    }
    let value: string | undefined;
    if (eq >= 0) value = arg.slice(eq + 1);
    else if (i + 1 < argv.length) value = argv[++i];
    if (value === undefined || value === '') {
      throw new ModelError('invalid_option', name, `option --${name} needs a value`);
    }
    options.set(name, value);
  }
  return { positionals, options };
}

export function stringOption(args: ParsedArgs, name: string): string | undefined {
  const v = args.options.get(name);
  return typeof v === 'string' ? v : undefined;
}

export function flagOption(args: ParsedArgs, name: string): boolean {
  return args.options.get(name) === true;
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

/** A comma-separated list of numbers, e.g. `--w 0.1,1,10`. */
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
