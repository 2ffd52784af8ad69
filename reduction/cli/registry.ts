/**
 * The command line's verbs. Each verb module registers itself when imported; `reduction/cli.ts` imports
 * the verb modules, so a new verb is one module plus one import line there.
 */
import type { OptionSpec, ParsedArgs } from './args';

export interface CliVerb {
  readonly name: string;
  /** One line for the usage text. */
  readonly summary: string;
  /** Arguments after the verb, e.g. `MODEL --at w1,w2,…`. */
  readonly usage: string;
  readonly options: Readonly<Record<string, OptionSpec>>;
  /** Computes the verb's JSON document (printed by cli.ts). Throws ModelError on bad input. */
  run(args: ParsedArgs): unknown;
}

/**
 * A verb's document may carry the path that served it under this key ('dense' when absent); cli.ts reports
 * it as `engine.path`. A symbol, so it never reaches the JSON.
 */
export const ENGINE_PATH: unique symbol = Symbol('engine path');

const verbs = new Map<string, CliVerb>();

export function registerVerb(verb: CliVerb): void {
  if (verbs.has(verb.name)) throw new Error(`command-line verb "${verb.name}" registered twice`);
  verbs.set(verb.name, verb);
}

export function findVerb(name: string): CliVerb | undefined {
  return verbs.get(name);
}

export function listVerbs(): CliVerb[] {
  return [...verbs.values()];
}
