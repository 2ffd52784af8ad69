/**
 * Which path a model takes, dense or sparse: written once for the command line (`reduction/cli/sparse.ts`)
 * and the web's upload check and engine tasks (`lib/engine-tasks/model-files.ts`).
 *
 * A model takes the sparse path when its A (or, for a second-order model, its stiffness K) is a Matrix
 * Market coordinate file and either it has more states than the crossover (`SPARSE_CROSSOVER_STATES`, or
 * the `MODESHELF_SPARSE_CROSSOVER` environment variable), or a descriptor matrix E is given (which only the
 * sparse path reads), or the sparse path is asked for. Everything else takes the dense path.
 */
import { ModelError } from '../errors';

/**
 * Default state count above which the sparse path is taken. Measured (2-core machine shared with other
 * jobs, so ±30 %): `reduce --method balanced --order 6` on the 2-D heat plate (5-point Laplacian, one input,
 * one output) took on the dense / sparse path 1.0 s / 0.13 s at 196 states, 3.1 s / 0.11 s at 400 and
 * 12.5 s / 0.15 s at 900 (dense grows as n³: about 20 s at 1000, minutes at 3000). The dense path gives more
 * below the crossover (every Hankel singular value, poles, a certified H∞ error); above 1000 states its cost
 * stops being worth that.
 */
export const SPARSE_CROSSOVER_STATES = 1000;
export const SPARSE_CROSSOVER_ENV = 'MODESHELF_SPARSE_CROSSOVER';

/** The crossover in force (the environment variable, else the default); a malformed value is a ModelError. */
export function sparseCrossover(): number {
  const env = typeof process !== 'undefined' ? process.env?.[SPARSE_CROSSOVER_ENV] : undefined;
  if (env === undefined || env === '') return SPARSE_CROSSOVER_STATES;
  const v = Number(env);
  if (!Number.isInteger(v) || v < 1) throw new ModelError('invalid_option', 'path', `${SPARSE_CROSSOVER_ENV} must be a whole number ≥ 1, got "${env}"`);
  return v;
}

/**
 * The automatic choice: sparse when A is a coordinate file (`coordinateStates` its declared size; null when
 * it is not a coordinate file) and either a descriptor matrix is given or the states pass the crossover.
 */
export function autoPathIsSparse(coordinateStates: number | null, descriptor: boolean): boolean {
  if (coordinateStates === null) return false;
  return descriptor || coordinateStates > sparseCrossover();
}
