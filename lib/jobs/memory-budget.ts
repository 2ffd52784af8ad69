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

/**
 * The large-model path never forms an n×n matrix: its memory grows with the states (ADI factor columns,
 * Krylov and dominant-pole bases, the frequency sweep's vectors: a few hundred vectors of n doubles) and
 * with the nonzeros of A (the fill of each sparse LU of A − σE and the factorizations the ADI keeps). Per
 * state 16 KiB and per nonzero of A 2 KiB (common practice: generous multiples of those counts); measured
 * for scale: the 22,500-state hearth plate (111,900 nonzeros) peaked at 335 MiB in the command line's
 * process for its analysis and its reduction each, and the worker running both through `npm run bench:web`
 * at 421–460 MiB (README, "Web benchmark"), against an estimate of 771 MiB here. Each
 * sparse factorization is checked again against the budget from UMFPACK's own estimate before it is made
 * (reduction/sparse/budget.ts), so an estimate too low here still fails with both figures named.
 */
const SPARSE_KIB_PER_STATE = 16;
const SPARSE_KIB_PER_NONZERO = 2;

/** The model a task works on: its states, and on the large-model path the nonzeros of its A. */
export interface TaskModelSize {
  readonly states: number;
  /** 'sparse' on the large-model path (lib/engine-tasks/model-files.ts, enginePathOf); dense otherwise */
  readonly path?: 'dense' | 'sparse';
  readonly nonzeros?: number;
}

/** Estimated peak resident memory of one engine task, MiB (dense engine; or the large-model path by its nonzeros). */
export function estimateTaskMemoryMiB(_kind: JobKind, size: number | TaskModelSize): number {
  const model = typeof size === 'number' ? { states: size } : size;
  if (model.path === 'sparse') {
    return Math.ceil(BASE_MIB + (SPARSE_KIB_PER_STATE * model.states + SPARSE_KIB_PER_NONZERO * (model.nonzeros ?? 0)) / 1024);
  }
  const matrixMiB = (8 * model.states * model.states) / 1048576;
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
export function requireWithinMemoryBudget(kind: JobKind, size: number | TaskModelSize): void {
  const estimate = estimateTaskMemoryMiB(kind, size);
  const states = typeof size === 'number' ? size : size.states;
  const budget = workerMemoryBudgetMiB();
  if (estimate > budget) {
    throw new JobInputError(
      `this ${kind} of a ${states}-state model needs an estimated ${estimate} MiB, more than this worker's memory budget of ${budget} MiB ` +
        '(MODESHELF_WORKER_MEMORY_MIB, or npm run worker -- --memory MiB): run it on a worker with a larger budget',
    );
  }
}
