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
//
// Cancelling (jobs.ts, cancelJob, records the request on a running row): while the task runs, the row is
// looked at every CANCEL_POLL_MS; once a request is found the engine thread is asked to stop, and
// terminated after the grace period (run-task.ts, stop). Step 3 then writes `cancelled` with the delivery
// cancelled, whatever the task ended with (a result that arrived first is not written), so a cancelled
// job never has half of a result. Both finishing transactions re-read the request under the row's lock, so
// a request that lands while the result is being written either comes first (cancelled) or finds the job
// already succeeded (cancelJob refuses it).
import os from 'node:os';
import type PgBoss from 'pg-boss';
import type { Knex } from 'knex';
import { db } from '@/lib/db';
import { ModelError } from '@/reduction/index';
import { startEngineTask, stopGraceMs, TaskStopped, type RunningTask } from '@/lib/engine-tasks/run-task';
import type { ProgressDetail } from '@/lib/engine-tasks/progress';
import { HANDLERS, JobInputError } from './handlers';
import type { JobRow } from './jobs';
import { queueDb, queueNameOf, type JobKind, type QueueMessage, type WorkerClass } from './queue';
import { crashPoint, SimulatedCrash, type CrashHook } from './crash';

export const HEARTBEAT_MS = 3000;
/** Progress is written at most this often, plus on every change of stage. */
const PROGRESS_MS = 400;
/** How often a running job's row is looked at for a cancel request (the job is to stop within 5 s). */
export const CANCEL_POLL_MS = 1000;

export interface Delivery {
  jobId: string;
  queueJobId: string;
  /** retries pg-boss has already made of this delivery, and how many it allows */
  retryCount: number;
  retryLimit: number;
}

export type Outcome = 'succeeded' | 'failed' | 'retry' | 'superseded' | 'skipped' | 'cancelled';

export interface RunOptions {
  /** fault injection (crash.ts); none in production */
  crash?: CrashHook;
  /** the class whose queue claimNext takes from (default small) */
  workerClass?: WorkerClass;
  /** told how a cancelled job's engine stopped (the worker logs it) */
  onStopped?: (jobId: string, how: string) => void;
}

export const workerName = `${os.hostname()}:${process.pid}`;

const running = new Map<string, { task: RunningTask<unknown> | null; attempt: number }>();

/** Jobs this process is running now (for shutdown). */
export function runningJobs(): { jobId: string; attempt: number; cancel(reason: string): void }[] {
  return [...running.entries()].map(([jobId, r]) => ({ jobId, attempt: r.attempt, cancel: (reason: string) => r.task?.cancel(reason) }));
}

export interface Claimed {
  kind: JobKind;
  workerClass: WorkerClass;
  delivery: Delivery;
  /** null when the row was already final (or gone): its delivery was completed in the same transaction */
  row: JobRow | null;
}

/**
 * Takes the next delivery of one kind of job and claims its row as a new attempt, in one transaction:
 * a crash before the commit leaves the delivery untaken and the row untouched.
 */
export async function claimNext(boss: PgBoss, kind: JobKind, options: RunOptions = {}): Promise<Claimed | null> {
  const workerClass = options.workerClass ?? 'small';
  const name = queueNameOf(kind, workerClass);
  return db().transaction(async (trx) => {
    const queueDbOfTrx = queueDb(trx);
    const [job] = (await boss.fetch<QueueMessage>(name, { batchSize: 1, includeMetadata: true, db: queueDbOfTrx })) as PgBoss.JobWithMetadata<QueueMessage>[];
    if (!job) return null;
    const delivery: Delivery = { jobId: job.data.jobId, queueJobId: job.id, retryCount: job.retryCount, retryLimit: job.retryLimit };
    await crashPoint(options.crash, 'claim:fetched-in-transaction', delivery.jobId);
    const [row] = await trx<JobRow>('jobs')
      .where({ id: delivery.jobId })
      .whereIn('status', ['queued', 'running'])
      // A running job someone asked to stop is never taken again: its worker or the reaper ends it cancelled.
      .whereNull('cancel_requested_at')
      .update({
        status: 'running',
        attempt: trx.raw('attempt + 1'),
        attempts: trx.raw('attempts + 1'),
        stage: 'Starting',
        fraction: 0,
        error: null,
        progress_detail: null,
        started_at: trx.raw('COALESCE(started_at, now())'),
        attempt_started_at: trx.fn.now(),
        stage_started_at: trx.fn.now(),
        heartbeat_at: trx.fn.now(),
        worker: workerName,
        queue_job_id: delivery.queueJobId,
        updated_at: trx.fn.now(),
      } as never)
      .returning('*');
    if (!row) {
      // Already succeeded, failed for good, cancelled, or gone: this delivery has nothing left to do.
      await boss.complete(name, job.id, { skipped: true }, { db: queueDbOfTrx });
      return { kind, workerClass, delivery, row: null };
    }
    return { kind, workerClass, delivery, row };
  });
}

function owned(k: Knex | Knex.Transaction, jobId: string, attempt: number) {
  return k('jobs').where({ id: jobId, attempt, status: 'running' });
}

/**
 * Ends a running attempt `cancelled` (row and delivery, in the caller's transaction). The row must be owned
 * by the attempt and carry a cancel request; answers whether it was.
 */
async function writeCancelled(trx: Knex.Transaction, boss: PgBoss, name: string, row: JobRow, attempt: number, queueJobId: string, words: string): Promise<boolean> {
  const updated = await owned(trx, row.id, attempt)
    .whereNotNull('cancel_requested_at')
    .update({ status: 'cancelled', stage: words, finished_at: trx.fn.now(), heartbeat_at: null, progress_detail: null, updated_at: trx.fn.now() });
  if (updated === 0) return false;
  await boss.cancel(name, queueJobId, { db: queueDb(trx) });
  return true;
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
  const name = queueNameOf(kind, claimed.workerClass ?? row.worker_class ?? 'small');
  const { attempt } = row;
  const handler = HANDLERS[row.kind];
  const entry: { task: RunningTask<unknown> | null; attempt: number } = { task: null, attempt };
  running.set(row.id, entry);

  let crashed: SimulatedCrash | null = null;
  let lastWrite = 0;
  let lastStage = '';
  let progressWrites = 0;
  let pending: Promise<unknown> = Promise.resolve();
  // Set once a cancel request is seen: the engine is asked to stop (now, or as soon as it has started).
  let stopAsked = false;
  const stopEngine = () => {
    if (!stopAsked || !entry.task) return;
    entry.task.stop('the job was cancelled', stopGraceMs());
  };
  const die = (err: SimulatedCrash) => {
    crashed = err;
    entry.task?.cancel(err.message);
  };
  const progress = (stage: string, fraction: number, detail?: ProgressDetail | null) => {
    const now = Date.now();
    if (crashed || (stage === lastStage && now - lastWrite < PROGRESS_MS)) return;
    const newStage = stage !== lastStage;
    lastWrite = now;
    lastStage = stage;
    const f = Math.min(0.99, Math.max(0, Number.isFinite(fraction) ? fraction : 0));
    pending = pending.then(async () => {
      if (crashed) return;
      await owned(db(), row.id, attempt)
        .update({
          stage,
          fraction: f,
          progress_detail: detail ? (JSON.stringify(detail) as never) : null,
          ...(newStage ? { stage_started_at: db().fn.now() } : {}),
          heartbeat_at: db().fn.now(),
          updated_at: db().fn.now(),
        })
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
  let looking = false;
  const cancelWatch = setInterval(() => {
    if (stopAsked || crashed || looking) return;
    looking = true;
    db()('jobs')
      .where({ id: row.id, attempt })
      .first('cancel_requested_at')
      .then((r: { cancel_requested_at: Date | null } | undefined) => {
        if (!r?.cancel_requested_at || stopAsked) return;
        stopAsked = true;
        stopEngine();
      })
      .catch((err: unknown) => console.error(`[modeshelf] job ${row.id}: could not look for a cancel request`, err))
      .finally(() => {
        looking = false;
      });
  }, CANCEL_POLL_MS);
  const stopTimers = () => {
    clearInterval(heartbeat);
    clearInterval(cancelWatch);
  };

  /** The attempt's end when someone asked to stop it: row and delivery cancelled together, no result. */
  const finishCancelled = async (words: string): Promise<Outcome> => {
    const written = await db().transaction((trx) => writeCancelled(trx, boss, name, row, attempt, delivery.queueJobId, words));
    return written ? 'cancelled' : 'superseded';
  };

  try {
    await crashPoint(options.crash, 'run:claimed', row.id);
    const request = await handler.prepare(row);
    entry.task = startEngineTask(request, progress);
    stopEngine();
    const result = await entry.task.result;
    await pending;
    if (crashed) throw crashed;
    await crashPoint(options.crash, 'run:task-finished', row.id);
    stopTimers();
    const written = await db().transaction(async (trx): Promise<Outcome | false> => {
      const current = await trx<JobRow>('jobs').where({ id: row.id }).forUpdate().first();
      if (!current || current.attempt !== attempt || current.status !== 'running') return false;
      // Asked to stop while the result was on its way: the request wins, nothing of the result is written.
      if (current.cancel_requested_at) {
        return (await writeCancelled(trx, boss, name, current, attempt, delivery.queueJobId, 'Cancelled (it had just finished; its result was not kept)')) ? 'cancelled' : false;
      }
      const summary = await handler.write(trx, current, result as never);
      await trx('jobs')
        .where({ id: row.id })
        .update({
          status: 'succeeded',
          stage: 'Done',
          fraction: 1,
          error: null,
          result: JSON.stringify(summary),
          progress_detail: null,
          finished_at: trx.fn.now(),
          heartbeat_at: null,
          updated_at: trx.fn.now(),
        });
      await crashPoint(options.crash, 'result:written-in-transaction', row.id);
      await boss.complete(name, delivery.queueJobId, {}, { db: queueDb(trx) });
      return 'succeeded';
    });
    if (written === 'succeeded') await crashPoint(options.crash, 'result:committed', row.id);
    return written || 'superseded';
  } catch (caught) {
    // The process is gone at this point: nothing after it runs, no failure is written.
    if (crashed) throw crashed;
    if (caught instanceof SimulatedCrash) {
      die(caught);
      throw caught;
    }
    stopTimers();
    await pending;
    const err = caught;
    if (err instanceof TaskStopped) {
      options.onStopped?.(row.id, err.how === 'terminated' ? `engine thread terminated after the ${err.afterMs} ms grace period` : `engine stopped at its check after ${err.afterMs} ms`);
    }
    // A request to stop wins over whatever the attempt ended with.
    const asked = stopAsked || (await db()('jobs').where({ id: row.id, attempt }).whereNotNull('cancel_requested_at').first('id')) !== undefined;
    if (asked) return finishCancelled(`Cancelled during “${lastStage || 'Starting'}”`);
    // Bad input (the engine's ModelError) or a vanished subject fails for good: a retry would fail the same way.
    const badInput = err instanceof ModelError || err instanceof JobInputError;
    const final = badInput || delivery.retryCount >= delivery.retryLimit;
    const message = messageOf(err);
    const outcome = await db().transaction(async (trx): Promise<Outcome> => {
      const current = await trx<JobRow>('jobs').where({ id: row.id }).forUpdate().first();
      if (!current || current.attempt !== attempt || current.status !== 'running') return 'superseded';
      // Asked to stop since the look above: cancelled, not failed.
      if (current.cancel_requested_at) {
        return (await writeCancelled(trx, boss, name, current, attempt, delivery.queueJobId, `Cancelled during “${lastStage || 'Starting'}”`)) ? 'cancelled' : 'superseded';
      }
      const updated = await owned(trx, row.id, attempt).update(
        final
          ? { status: 'failed', error: message, finished_at: trx.fn.now(), heartbeat_at: null, progress_detail: null, updated_at: trx.fn.now() }
          : {
              status: 'queued',
              stage: `Waiting to retry (attempt ${row.attempts} stopped: ${message.slice(0, 200)})`,
              error: message,
              heartbeat_at: null,
              progress_detail: null,
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
    if (outcome !== 'superseded' && outcome !== 'cancelled') await crashPoint(options.crash, 'failure:committed', row.id);
    return outcome;
  } finally {
    stopTimers();
    running.delete(row.id);
  }
}

/**
 * On shutdown: hand this process's jobs back (row queued and delivery failed, together), then stop their
 * threads. A job someone asked to stop is not handed back: it ends cancelled here.
 */
export async function releaseRunning(boss: PgBoss, reason: string, options: RunOptions = {}): Promise<string[]> {
  const released: string[] = [];
  for (const r of runningJobs()) {
    // The row first: the stopped attempt's own failure handling then finds it no longer owned.
    const done = await db().transaction(async (trx) => {
      const current = await trx<JobRow>('jobs').where({ id: r.jobId, attempt: r.attempt, status: 'running' }).forUpdate().first();
      if (!current) return false;
      if (current.cancel_requested_at) {
        return writeCancelled(trx, boss, queueNameOf(current.kind, current.worker_class), current, r.attempt, current.queue_job_id ?? current.id, 'Cancelled (its worker was stopping)');
      }
      const [row] = await trx<JobRow>('jobs')
        .where({ id: r.jobId, attempt: r.attempt, status: 'running' })
        .update({ status: 'queued', stage: `Waiting for a worker (${reason})`, heartbeat_at: null, worker: null, progress_detail: null, updated_at: trx.fn.now() })
        .returning('*');
      if (!row) return false;
      await crashPoint(options.crash, 'release:written-in-transaction', row.id);
      if (!row.queue_job_id) return true;
      const name = queueNameOf(row.kind, row.worker_class);
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
