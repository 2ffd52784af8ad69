// Running one delivery of a job in this worker. Three transactions, each changing our `jobs` row and its
// pg-boss delivery together (the queue lives in the same PostgreSQL; queue.ts, queueDb):
//   1. claim: take the next delivery and claim its row as a new attempt (a delivery whose row is already
//      final is completed instead);
//   2. run the engine task in a worker thread while writing stage, fraction and a heartbeat (row only);
//   3. finish: the result and "succeeded" with the delivery completed; or, when the attempt fails, the row
//      queued for a retry (or failed for good) with the delivery failed (or completed).
// A process that dies anywhere leaves either a claimed row whose heartbeat stops (the reaper hands it back,
// reaper.ts) or a transaction that PostgreSQL rolls back. The attempt number makes every write conditional:
// an attempt that was given up for dead and comes back later finds its row owned by a newer attempt and
// writes nothing, so a job is never half-written and never written twice.
import os from 'node:os';
import type PgBoss from 'pg-boss';
import type { Knex } from 'knex';
import { db } from '@/lib/db';
import { ModelError } from '@/reduction/index';
import { startEngineTask, type RunningTask } from '@/lib/engine-tasks/run-task';
import { HANDLERS, JobInputError } from './handlers';
import type { JobRow } from './jobs';
import { QUEUE_NAMES, queueDb, type JobKind, type QueueMessage } from './queue';
import { crashPoint, SimulatedCrash, type CrashHook } from './crash';

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

export interface RunOptions {
  /** fault injection (crash.ts); none in production */
  crash?: CrashHook;
}

export const workerName = `${os.hostname()}:${process.pid}`;

const running = new Map<string, { task: RunningTask<unknown> | null; attempt: number }>();

/** Jobs this process is running now (for shutdown). */
export function runningJobs(): { jobId: string; attempt: number; cancel(reason: string): void }[] {
  return [...running.entries()].map(([jobId, r]) => ({ jobId, attempt: r.attempt, cancel: (reason: string) => r.task?.cancel(reason) }));
}

export interface Claimed {
  kind: JobKind;
  delivery: Delivery;
  /** null when the row was already final (or gone): its delivery was completed in the same transaction */
  row: JobRow | null;
}

/**
 * Takes the next delivery of one kind of job and claims its row as a new attempt, in one transaction:
 * a crash before the commit leaves the delivery untaken and the row untouched.
 */
export async function claimNext(boss: PgBoss, kind: JobKind, options: RunOptions = {}): Promise<Claimed | null> {
  const name = QUEUE_NAMES[kind];
  return db().transaction(async (trx) => {
    const queueDbOfTrx = queueDb(trx);
    const [job] = (await boss.fetch<QueueMessage>(name, { batchSize: 1, includeMetadata: true, db: queueDbOfTrx })) as PgBoss.JobWithMetadata<QueueMessage>[];
    if (!job) return null;
    const delivery: Delivery = { jobId: job.data.jobId, queueJobId: job.id, retryCount: job.retryCount, retryLimit: job.retryLimit };
    await crashPoint(options.crash, 'claim:fetched-in-transaction', delivery.jobId);
    const [row] = await trx<JobRow>('jobs')
      .where({ id: delivery.jobId })
      .whereIn('status', ['queued', 'running'])
      .update({
        status: 'running',
        attempt: trx.raw('attempt + 1'),
        attempts: trx.raw('attempts + 1'),
        stage: 'Starting',
        fraction: 0,
        error: null,
        started_at: trx.raw('COALESCE(started_at, now())'),
        heartbeat_at: trx.fn.now(),
        worker: workerName,
        queue_job_id: delivery.queueJobId,
        updated_at: trx.fn.now(),
      } as never)
      .returning('*');
    if (!row) {
      // Already succeeded, failed for good, or gone: this delivery has nothing left to do.
      await boss.complete(name, job.id, { skipped: true }, { db: queueDbOfTrx });
      return { kind, delivery, row: null };
    }
    return { kind, delivery, row };
  });
}

function owned(k: Knex | Knex.Transaction, jobId: string, attempt: number) {
  return k('jobs').where({ id: jobId, attempt, status: 'running' });
}

function messageOf(err: unknown): string {
  if (err instanceof ModelError) return err.field ? `${err.field}: ${err.message}` : err.message;
  return err instanceof Error ? err.message : String(err);
}

/**
 * Runs a claimed attempt to its end and settles its delivery with it. Resolves with what happened; throws
 * only SimulatedCrash (fault injection), after which nothing more has been written.
 */
export async function runClaimed(boss: PgBoss, claimed: Claimed, options: RunOptions = {}): Promise<Outcome> {
  const { row, delivery, kind } = claimed;
  if (!row) return 'skipped';
  const name = QUEUE_NAMES[kind];
  const { attempt } = row;
  const handler = HANDLERS[row.kind];
  const entry: { task: RunningTask<unknown> | null; attempt: number } = { task: null, attempt };
  running.set(row.id, entry);

  let crashed: SimulatedCrash | null = null;
  let lastWrite = 0;
  let lastStage = '';
  let progressWrites = 0;
  let pending: Promise<unknown> = Promise.resolve();
  const die = (err: SimulatedCrash) => {
    crashed = err;
    entry.task?.cancel(err.message);
  };
  const progress = (stage: string, fraction: number) => {
    const now = Date.now();
    if (crashed || (stage === lastStage && now - lastWrite < PROGRESS_MS)) return;
    lastWrite = now;
    lastStage = stage;
    const f = Math.min(0.99, Math.max(0, Number.isFinite(fraction) ? fraction : 0));
    pending = pending.then(async () => {
      if (crashed) return;
      await owned(db(), row.id, attempt)
        .update({ stage, fraction: f, heartbeat_at: db().fn.now(), updated_at: db().fn.now() })
        .catch((err: unknown) => console.error(`[modeshelf] job ${row.id}: progress not written`, err));
      if (++progressWrites === 1) await crashPoint(options.crash, 'run:progress-written', row.id).catch((err: unknown) => (err instanceof SimulatedCrash ? die(err) : undefined));
    });
  };
  const heartbeat = setInterval(() => {
    pending = pending.then(() =>
      crashed
        ? undefined
        : owned(db(), row.id, attempt)
            .update({ heartbeat_at: db().fn.now() })
            .catch((err: unknown) => console.error(`[modeshelf] job ${row.id}: heartbeat not written`, err)),
    );
  }, HEARTBEAT_MS);

  try {
    await crashPoint(options.crash, 'run:claimed', row.id);
    const request = await handler.prepare(row);
    entry.task = startEngineTask(request, progress);
    const result = await entry.task.result;
    await pending;
    if (crashed) throw crashed;
    await crashPoint(options.crash, 'run:task-finished', row.id);
    clearInterval(heartbeat);
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
      await crashPoint(options.crash, 'result:written-in-transaction', row.id);
      await boss.complete(name, delivery.queueJobId, {}, { db: queueDb(trx) });
      return true;
    });
    if (written) await crashPoint(options.crash, 'result:committed', row.id);
    return written ? 'succeeded' : 'superseded';
  } catch (caught) {
    // The process is gone at this point: nothing after it runs, no failure is written.
    if (crashed) throw crashed;
    if (caught instanceof SimulatedCrash) {
      die(caught);
      throw caught;
    }
    clearInterval(heartbeat);
    await pending;
    const err = caught;
    // Bad input (the engine's ModelError) or a vanished subject fails for good: a retry would fail the same way.
    const badInput = err instanceof ModelError || err instanceof JobInputError;
    const final = badInput || delivery.retryCount >= delivery.retryLimit;
    const message = messageOf(err);
    const outcome = await db().transaction(async (trx): Promise<Outcome> => {
      const updated = await owned(trx, row.id, attempt).update(
        final
          ? { status: 'failed', error: message, finished_at: trx.fn.now(), heartbeat_at: null, updated_at: trx.fn.now() }
          : {
              status: 'queued',
              stage: `Waiting to retry (attempt ${row.attempts} stopped: ${message.slice(0, 200)})`,
              error: message,
              heartbeat_at: null,
              updated_at: trx.fn.now(),
            },
      );
      // Superseded: the delivery belongs to whoever took the row over (the reaper or a shutdown).
      if (updated === 0) return 'superseded';
      await crashPoint(options.crash, 'failure:written-in-transaction', row.id);
      if (badInput) {
        // No retry: the queue is told the delivery is done; the row carries the error.
        await boss.complete(name, delivery.queueJobId, { error: message.slice(0, 500) }, { db: queueDb(trx) });
        return 'failed';
      }
      await boss.fail(name, delivery.queueJobId, { message: message.slice(0, 500) }, { db: queueDb(trx) });
      return final ? 'failed' : 'retry';
    });
    if (outcome !== 'superseded') await crashPoint(options.crash, 'failure:committed', row.id);
    return outcome;
  } finally {
    clearInterval(heartbeat);
    running.delete(row.id);
  }
}

/** On shutdown: hand this process's jobs back (row queued and delivery failed, together), then stop their threads. */
export async function releaseRunning(boss: PgBoss, reason: string, options: RunOptions = {}): Promise<string[]> {
  const released: string[] = [];
  for (const r of runningJobs()) {
    // The row first: the stopped attempt's own failure handling then finds it no longer owned.
    const done = await db().transaction(async (trx) => {
      const [row] = await trx<JobRow>('jobs')
        .where({ id: r.jobId, attempt: r.attempt, status: 'running' })
        .update({ status: 'queued', stage: `Waiting for a worker (${reason})`, heartbeat_at: null, worker: null, updated_at: trx.fn.now() })
        .returning('*');
      if (!row) return false;
      await crashPoint(options.crash, 'release:written-in-transaction', row.id);
      if (!row.queue_job_id) return true;
      const name = QUEUE_NAMES[row.kind];
      await boss.fail(name, row.queue_job_id, { reason }, { db: queueDb(trx) });
      const after = await boss.getJobById(name, row.queue_job_id, { db: queueDb(trx), includeArchive: false });
      if (after?.state === 'failed') {
        // That was its last retry: the job fails, saying why, rather than waiting for a delivery that never comes.
        await trx('jobs')
          .where({ id: row.id })
          .update({ status: 'failed', error: `${reason}, and this job has no retries left (tried ${row.attempts} times)`, finished_at: trx.fn.now(), updated_at: trx.fn.now() });
      }
      return true;
    });
    r.cancel(reason);
    if (done) released.push(r.jobId);
  }
  return released;
}
