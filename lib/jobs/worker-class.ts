// Which worker class a job goes to, decided once when it is queued from the size of the model it works on
// (the source version's state count and the nonzeros of its A; for an input response, the full model of
// the reduced version), and stored on the job's row.
//
// A job is large when its model has more than MODESHELF_LARGE_JOB_STATES states (default 500) or its A more
// than MODESHELF_LARGE_JOB_NONZEROS nonzeros (default 250,000, a dense 500-state A). Why 500: the dense
// engine's work grows as n³; a dense balanced reduction took 3.1 s at 400 states and 12.5 s at 900 on this
// project's two-core machine (measured, reduction/cli/sparse.ts), so a 500-state job takes a few seconds,
// which is what "small" has to mean for the people waiting behind it. Past that, jobs take tens of seconds
// to hours (a large sparse model).
import type { Knex } from 'knex';
import type { WorkerClass } from './queue';

export const DEFAULT_LARGE_JOB_STATES = 500;
export const DEFAULT_LARGE_JOB_NONZEROS = 250_000;

function positiveInteger(name: string, fallback: number): number {
  const raw = process.env[name];
  if (raw === undefined || raw.trim() === '') return fallback;
  const v = Number(raw);
  if (!Number.isInteger(v) || v < 1) throw new Error(`${name} must be a whole number ≥ 1, got "${raw}"`);
  return v;
}

/** The thresholds in force (read at each use, so the environment may change them). */
export function largeJobThresholds(): { states: number; nonzeros: number } {
  return {
    states: positiveInteger('MODESHELF_LARGE_JOB_STATES', DEFAULT_LARGE_JOB_STATES),
    nonzeros: positiveInteger('MODESHELF_LARGE_JOB_NONZEROS', DEFAULT_LARGE_JOB_NONZEROS),
  };
}

/** The class of a job on a model of this size. */
export function workerClassFor(size: { states: number; nonzeros: number }): WorkerClass {
  const t = largeJobThresholds();
  return size.states > t.states || size.nonzeros > t.nonzeros ? 'large' : 'small';
}

/**
 * The size of the model a job works on, read inside the transaction that queues it (which may have just
 * written that model's row): `sourceVersionId` (analysis, reduction) or `reducedVersionId` (input response:
 * the full model is simulated too). Null when the payload names neither or the row is not found.
 */
export async function modelSizeOfPayload(trx: Knex | Knex.Transaction, payload: Record<string, unknown>): Promise<{ states: number; nonzeros: number } | null> {
  let sourceVersionId = typeof payload.sourceVersionId === 'string' ? payload.sourceVersionId : null;
  if (!sourceVersionId && typeof payload.reducedVersionId === 'string') {
    const reduced = await trx('reduced_versions').where({ id: payload.reducedVersionId }).first('source_version_id');
    sourceVersionId = reduced?.source_version_id ?? null;
  }
  if (!sourceVersionId) return null;
  const version = await trx('source_versions').where({ id: sourceVersionId }).first('states', 'nonzeros_a');
  return version ? { states: Number(version.states), nonzeros: Number(version.nonzeros_a) } : null;
}
