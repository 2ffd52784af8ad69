/**
 * The benchmark's case registry. Each file `scripts/bench/*-cases.ts` exports `cases: BenchCase[]`;
 * `scripts/bench.ts` imports every such file, so a helper adds cases without touching the runner.
 *
 * Protocol for one case at one size n, in a scratch directory DIR:
 *   1. the reference command runs (default: /usr/bin/python3 tests/reference/bench_reference.py ID N DIR):
 *      it writes the inputs (seeded, as .npy files) and its own results into DIR, times its numpy/scipy
 *      code itself, and prints as its LAST stdout line a JSON object with at least `seconds` (number),
 *      optionally `peakRssKb`, `blas`, `method`;
 *   2. a fresh Node process (so peak memory is the case's own) calls `prepare(DIR, n)` untimed, then
 *      `run(input)` timed (best of at least three runs and one second of runs, stopping once they pass 10 s:
 *      the rule of the reference side too), then `check(DIR, output)`
 *      untimed, which returns a short agreement figure against the reference's saved results.
 * Before timing, the child process runs the case once at `warmupSize` so the JIT has compiled it.
 */
export interface BenchCase<Input = unknown, Output = unknown> {
  /** Identifier, also the reference script's case name: lower-case letters and hyphens. */
  readonly id: string;
  /** What is timed, in a few words, for the table. */
  readonly title: string;
  readonly sizes: readonly number[];
  /** Sizes for `npm run bench -- --quick`. */
  readonly quickSizes: readonly number[];
  /** Extra sizes for `npm run bench -- --large` (slow on both sides). */
  readonly largeSizes?: readonly number[];
  /** Largest n at which the portable backend is also timed (default: every size). */
  readonly maxPortableSize?: number;
  /**
   * False when the reference times other work than the engine (it only computes what the check needs, as
   * the frame cases' full-model sweep): both times are printed, the ratio is not (default true).
   */
  readonly likeForLike?: boolean;
  /** Size for the untimed JIT warm-up run (default 60). */
  readonly warmupSize?: number;
  /** Command and arguments for the reference (default: bench_reference.py ID N DIR). */
  reference?(n: number, dir: string): { command: string; args: string[] };
  /** Reads the inputs from DIR. Not timed. */
  prepare(dir: string, n: number): Input;
  /**
   * Ways of doing the same work, each timed against the same reference run (e.g. three Lyapunov
   * solvers); the table names them beside the backend. Default: one, unnamed.
   */
  readonly variants?: readonly string[];
  /** Whether a variant runs on a backend (default: every variant on every backend). */
  supports?(backend: 'native' | 'portable', variant: string): boolean;
  /** The engine's work. Timed. */
  run(input: Input, variant: string): Output;
  /** Agreement with the reference's saved results, e.g. "max rel diff 3e-12". Not timed. */
  check(dir: string, input: Input, output: Output): string;
}
