/**
 * The engine's command line: `npx tsx reduction/cli.ts <verb> MODEL [options]`.
 *
 * Prints one JSON document on stdout and exits 0. Bad input (a malformed model file, a wrong option)
 * prints the error, naming the matrix or option and the problem, on stderr and exits 2; any other failure
 * exits 1. Verbs live in `reduction/cli/`, one module each; importing a module registers its verb.
 */
import { ModelError } from './errors';
import { linalgBackendReport } from './linalg/index';
import { MAX_DENSE_ENTRIES_ENV } from './io/limits';
import { parseArgs } from './cli/args';
import { ENGINE_PATH, findVerb, listVerbs } from './cli/registry';
import './cli/analyze';
import './cli/reduce';
import './cli/sweep';
import './cli/simulate';

function usage(): string {
  const lines = ['usage: npx tsx reduction/cli.ts <verb> MODEL [options]', '', 'MODEL is one .json file, or the A, B, C and optionally D files (.mtx or .csv), or a second-order model:',
    '--mass M.mtx --stiffness K.mtx [--damping D.mtx] F C [D] (sparse path; C maps displacements, or displacements then velocities).', '', 'verbs:'];
  for (const v of listVerbs()) {
    lines.push(`  ${v.name} ${v.usage}`, `      ${v.summary}`);
    for (const [name, spec] of Object.entries(v.options)) lines.push(`      --${name}${spec.value ? ' …' : ''}  ${spec.description}`);
  }
  return lines.join('\n');
}

/** V8's messages when a typed array or buffer cannot be made that large. */
function isAllocationFailure(e: unknown): boolean {
  return e instanceof RangeError && /typed array length|array buffer allocation|array length/i.test(e.message);
}

/** The path a verb reports through `ENGINE_PATH` (registry.ts): 'sparse' or 'dense'. */
function enginePath(document: unknown): 'dense' | 'sparse' {
  return document !== null && typeof document === 'object' && (document as { [ENGINE_PATH]?: string })[ENGINE_PATH] === 'sparse' ? 'sparse' : 'dense';
}

function main(argv: readonly string[]): number {
  const [verbName, ...rest] = argv;
  if (verbName === undefined || verbName === '--help' || verbName === 'help') {
    process.stderr.write(usage() + '\n');
    return verbName === undefined ? 2 : 0;
  }
  const verb = findVerb(verbName);
  if (!verb) {
    process.stderr.write(`error: unknown verb "${verbName}"\n\n${usage()}\n`);
    return 2;
  }
  try {
    const started = performance.now();
    const document = verb.run(parseArgs(rest, verb.options));
    // Which backend and path served the verb, its wall time and the process's peak resident memory.
    const engine = {
      backend: linalgBackendReport().backend,
      path: enginePath(document),
      seconds: (performance.now() - started) / 1000,
      peakMemoryMiB: process.resourceUsage().maxRSS / 1024,
    };
    const out = document !== null && typeof document === 'object' && !Array.isArray(document) ? { ...document, engine } : document;
    process.stdout.write(JSON.stringify(out) + '\n');
    return 0;
  } catch (e) {
    if (e instanceof ModelError) {
      process.stderr.write(`error: ${e.message} (field: ${e.field}, code: ${e.code})\n`);
      return 2;
    }
    if (isAllocationFailure(e)) {
      // The readers refuse declared sizes past the dense limit before allocating (io/limits.ts); an
      // allocation can still fail when that limit is raised beyond the machine's memory. Say so, no stack.
      process.stderr.write(`error: the model does not fit in memory (${(e as Error).message}); lower ${MAX_DENSE_ENTRIES_ENV} or use a smaller model\n`);
      return 2;
    }
    process.stderr.write(`error: ${(e as Error).stack ?? String(e)}\n`);
    return 1;
  }
}

process.exitCode = main(process.argv.slice(2));
