/**
 * The memory budget of the sparse path: checked after a sparse LU's symbolic analysis and before its numeric
 * factorization, from UMFPACK's estimate of the factorization's peak memory (`UmfpackSymbolicInfo.
 * peakMemoryBytes`), so that a model too large for the machine fails with a clear error naming the estimate
 * and the budget instead of swapping or being killed.
 */
import { ModelError } from '../errors';
import type { SparseLu } from '../linalg/sparse';

export const MEMORY_BUDGET_ENV = 'MODESHELF_MEMORY_BUDGET_MIB';

/** Budget in bytes: the option (MiB) when given, else the environment variable (MiB), else unlimited. */
export function memoryBudgetBytes(optionMiB?: number): number {
  if (optionMiB !== undefined) {
    if (!(optionMiB > 0)) throw new ModelError('invalid_option', 'memory-budget', `--memory-budget must be a positive number of MiB, got ${optionMiB}`);
    return optionMiB * 2 ** 20;
  }
  const env = process.env[MEMORY_BUDGET_ENV];
  if (env === undefined || env === '') return Infinity;
  const v = Number(env);
  if (!(v > 0)) throw new ModelError('invalid_option', 'memory-budget', `${MEMORY_BUDGET_ENV} must be a positive number of MiB, got "${env}"`);
  return v * 2 ** 20;
}

const mib = (b: number) => String(Number((b / 2 ** 20).toPrecision(3)));

/** Throws ModelError('too_large') when the analysed factorization's estimated peak memory plus `held` exceeds the budget. */
export function checkFactorBudget(lu: SparseLu, budgetBytes: number, what: string, heldBytes = 0): void {
  if (!Number.isFinite(budgetBytes)) return;
  const need = lu.analysis.peakMemoryBytes + heldBytes;
  if (need > budgetBytes) {
    lu.dispose();
    throw new ModelError(
      'too_large',
      'memory-budget',
      `the sparse LU of ${what} needs an estimated ${mib(need)} MiB (UMFPACK's symbolic analysis` +
        (heldBytes > 0 ? `, with ${mib(heldBytes)} MiB of factorizations already held` : '') +
        `), over the memory budget of ${mib(budgetBytes)} MiB (--memory-budget or ${MEMORY_BUDGET_ENV})`,
    );
  }
}

/**
 * Throws ModelError('too_large') when a factorization's estimated memory `needBytes` (from an ordering's fill
 * count, say) exceeds the budget; `source` says where the estimate comes from.
 */
export function checkMemoryEstimate(needBytes: number, budgetBytes: number, what: string, source: string): void {
  if (!Number.isFinite(budgetBytes) || needBytes <= budgetBytes) return;
  throw new ModelError(
    'too_large',
    'memory-budget',
    `the sparse factorization of ${what} needs an estimated ${mib(needBytes)} MiB (${source}), over the memory budget of ${mib(budgetBytes)} MiB (--memory-budget or ${MEMORY_BUDGET_ENV})`,
  );
}
