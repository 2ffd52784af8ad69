// The worker's memory guard: each engine task's resident memory is estimated from the model's size before
// it starts, and a task that would not fit the worker's budget is refused with a message naming both, so
// the job fails at once (it would fail the same way on a retry by this worker) and the worker lives on.
//
// Budget: MODESHELF_WORKER_MEMORY_MIB, or `npm run worker -- --memory MiB` (which sets it); unset, 80 % of
// the machine's memory (common practice: headroom for the web server and PostgreSQL on the same machine).
import os from 'node:os';
import type { JobKind } from './queue';
import { JobInputError } from './errors';

/**
 * Resident memory of the runtime and one engine thread before any matrix, MiB, and the peak as a multiple
 * of one dense n×n matrix of doubles. Measured on the native backend (2026-12-04, README "Web benchmark"
 * and "Engine benchmark"): a 1000-state wall's reduction peaked at 393 MiB in the worker, a 2000-state
 * dense analysis at 493 MiB in one process; 200 + 32·(8n² bytes) covers both with room (444 and 1177 MiB).
 */
const BASE_MIB = 200;
const DENSE_MATRICES = 32;

/** Estimated peak resident memory of one engine task on an n-state model, MiB (dense engine). */
export function estimateTaskMemoryMiB(_kind: JobKind, states: number): number {
  const matrixMiB = (8 * states * states) / 1048576;
  return Math.ceil(BASE_MIB + DENSE_MATRICES * matrixMiB);
}

/** The worker's budget in MiB; throws on a value that is not a positive number. */
export function workerMemoryBudgetMiB(): number {
  const raw = process.env.MODESHELF_WORKER_MEMORY_MIB;
  if (raw === undefined || raw.trim() === '') return Math.floor((0.8 * os.totalmem()) / 1048576);
  const v = Number(raw);
  if (!Number.isFinite(v) || v <= 0) {
    throw new Error(`MODESHELF_WORKER_MEMORY_MIB (or --memory) must be a positive number of MiB, got "${raw}"`);
  }
  return v;
}

/** Refuses a task whose estimate exceeds the budget (JobInputError: failed at once, not retried). */
export function requireWithinMemoryBudget(kind: JobKind, states: number): void {
  const estimate = estimateTaskMemoryMiB(kind, states);
  const budget = workerMemoryBudgetMiB();
  if (estimate > budget) {
    throw new JobInputError(
      `this ${kind} of a ${states}-state model needs an estimated ${estimate} MiB, more than this worker's memory budget of ${budget} MiB ` +
        '(MODESHELF_WORKER_MEMORY_MIB, or npm run worker -- --memory MiB): run it on a worker with a larger budget',
    );
  }
}
