// Running one delivery of a job in this worker: claim the row as a new attempt, run the engine task in a
// worker thread while writing its progress and a heartbeat, then write the result and "succeeded" in one
// transaction. The attempt number makes every write conditional: an attempt that was given up for dead
// (its heartbeat stopped; reaper.ts) and comes back later finds its row owned by a newer attempt and
// writes nothing, so a job is never half-written and never written twice.
import os from 'node:os';
import { db } from '@/lib/db';
import { ModelError } from '@/reduction/index';
import { startEngineTask, type RunningTask } from '@/lib/engine-tasks/run-task';
import { HANDLERS, JobInputError } from './handlers';
import type { JobRow } from './jobs';

export const HEARTBEAT_MS = 3000;
/** Progress is written at most this often, plus on every change of stage. */
const PROGRESS_MS = 400;

export interface Delivery {
  jobId: string;
  queueJobId: string;
  /** retries pg-boss has already made of this delivery, and how many it allows */
  retryCount: number;
  retryLimit: number;
}

export type Outcome = 'succeeded' | 'failed' | 'retry' | 'superseded' | 'skipped';

export const workerName = `${os.hostname()}:${process.pid}`;

const running = new Map<string, { task: RunningTask<unknown> | null; attempt: number }>();

/** Jobs this process is running now (for shutdown). */
export function runningJobs(): { jobId: string; attempt: number; cancel(reason: string): void }[] {
  return [...running.entries()].map(([jobId, r]) => ({ jobId, attempt: r.attempt, cancel: (reason: string) => r.task?.cancel(reason) }));
}

async function claim(delivery: Delivery): Promise<JobRow | null> {
  const [row] = await db()<JobRow>('jobs')
    .where({ id: delivery.jobId })
    .whereIn('status', ['queued', 'running'])
    .update({
      status: 'running',
      attempt: db().raw('attempt + 1'),
      attempts: db().raw('attempts + 1'),
      stage: 'Starting',
      fraction: 0,
      error: null,
      started_at: db().raw('COALESCE(started_at, now())'),
      heartbeat_at: db().fn.now(),
      worker: workerName,
      queue_job_id: delivery.queueJobId,
      updated_at: db().fn.now(),
    } as never)
    .returning('*');
  return row ?? null;
}

function owned(jobId: string, attempt: number) {
  return db()('jobs').where({ id: jobId, attempt, status: 'running' });
}

function messageOf(err: unknown): string {
  if (err instanceof ModelError) return err.field ? `${err.field}: ${err.message}` : err.message;
  return err instanceof Error ? err.message : String(err);
}

/**
 * Runs a delivery to its end. Resolves with what happened; throws only when pg-boss should count the
 * delivery as failed (and retry it if it has retries left).
 */
export async function runDelivery(delivery: Delivery): Promise<Outcome> {
  const row = await claim(delivery);
  if (!row) return 'skipped'; // already succeeded, failed for good, or gone
  const { attempt } = row;
  const handler = HANDLERS[row.kind];
  const entry: { task: RunningTask<unknown> | null; attempt: number } = { task: null, attempt };
  running.set(row.id, entry);

  let lastWrite = 0;
  let lastStage = '';
  let pending: Promise<unknown> = Promise.resolve();
  const progress = (stage: string, fraction: number) => {
    const now = Date.now();
    if (stage === lastStage && now - lastWrite < PROGRESS_MS) return;
    lastWrite = now;
    lastStage = stage;
    const f = Math.min(0.99, Math.max(0, Number.isFinite(fraction) ? fraction : 0));
    pending = pending.then(() =>
      owned(row.id, attempt)
        .update({ stage, fraction: f, heartbeat_at: db().fn.now(), updated_at: db().fn.now() })
        .catch((err: unknown) => console.error(`[modeshelf] job ${row.id}: progress not written`, err)),
    );
  };
  const heartbeat = setInterval(() => {
    pending = pending.then(() =>
      owned(row.id, attempt)
        .update({ heartbeat_at: db().fn.now() })
        .catch((err: unknown) => console.error(`[modeshelf] job ${row.id}: heartbeat not written`, err)),
    );
  }, HEARTBEAT_MS);

  try {
    const request = await handler.prepare(row);
    entry.task = startEngineTask(request, progress);
    const result = await entry.task.result;
    clearInterval(heartbeat);
    await pending;
    const written = await db().transaction(async (trx) => {
      const current = await trx<JobRow>('jobs').where({ id: row.id }).forUpdate().first();
      if (!current || current.attempt !== attempt || current.status !== 'running') return false;
      const summary = await handler.write(trx, current, result as never);
      await trx('jobs')
        .where({ id: row.id })
        .update({
          status: 'succeeded',
          stage: 'Done',
          fraction: 1,
          error: null,
          result: JSON.stringify(summary),
          finished_at: trx.fn.now(),
          heartbeat_at: null,
          updated_at: trx.fn.now(),
        });
      return true;
    });
    return written ? 'succeeded' : 'superseded';
  } catch (err) {
    clearInterval(heartbeat);
    await pending;
    // Bad input (the engine's ModelError) or a vanished subject fails for good: a retry would fail the same way.
    const final = err instanceof ModelError || err instanceof JobInputError || delivery.retryCount >= delivery.retryLimit;
    const message = messageOf(err);
    const updated = await owned(row.id, attempt).update(
      final
        ? { status: 'failed', error: message, finished_at: db().fn.now(), heartbeat_at: null, updated_at: db().fn.now() }
        : {
            status: 'queued',
            stage: `Waiting to retry (attempt ${row.attempts} stopped: ${message.slice(0, 200)})`,
            error: message,
            heartbeat_at: null,
            updated_at: db().fn.now(),
          },
    );
    if (updated === 0) return 'superseded';
    if (final && (err instanceof ModelError || err instanceof JobInputError)) return 'failed';
    throw err;
  } finally {
    running.delete(row.id);
  }
}

/** On shutdown: stop this process's engine threads and hand their jobs back for another worker. */
export async function releaseRunning(reason: string): Promise<{ jobId: string; queueJobId: string | null; kind: string }[]> {
  const released: { jobId: string; queueJobId: string | null; kind: string }[] = [];
  for (const r of runningJobs()) {
    // The row first: the stopped attempt's own failure handling then finds it no longer owned.
    const [row] = await db()<JobRow>('jobs')
      .where({ id: r.jobId, attempt: r.attempt, status: 'running' })
      .update({ status: 'queued', stage: `Waiting for a worker (${reason})`, heartbeat_at: null, updated_at: db().fn.now() })
      .returning('*');
    r.cancel(reason);
    if (row) released.push({ jobId: row.id, queueJobId: row.queue_job_id, kind: row.kind });
  }
  return released;
}
