// Keeping jobs moving when a process dies, run by every worker every few seconds (repairJobs). Our `jobs`
// row and its pg-boss delivery are changed together in one transaction everywhere (runner.ts, jobs.ts), so
// a crash leaves only states this sweep recognises and mends, each in one transaction of its own:
//
//   row running, heartbeat silent for the stale limit      the worker is gone (killed, out of memory, machine
//                                                          gone): its active delivery is failed, and the row
//                                                          follows the delivery: queued for the retry, or
//                                                          failed when no retry is left; a job someone asked
//                                                          to cancel ends cancelled instead, with its delivery
//   row queued, delivery active for the stale limit        taken and never claimed (a worker of an earlier
//                                                          release that died between the two): as above
//   row queued, delivery completed, failed, cancelled or   no delivery will come: failed → the row fails;
//   missing (for the grace period)                         otherwise a fresh delivery, unless the job already
//                                                          had all its attempts
//   row succeeded, failed or cancelled, delivery still     the worker died between the two writes (an earlier
//   active (for the grace period)                          release): the delivery is completed
//
// So a worker that dies at any instant costs its job at most one stale limit plus one reaper period. The
// reaper's clock can be driven (`now`), so a test checks all this without waiting. Several workers may
// repair at once: each takes the row with FOR UPDATE SKIP LOCKED and re-checks it before writing.
import type PgBoss from 'pg-boss';
import type { Knex } from 'knex';
import { randomUUID } from 'node:crypto';
import { db } from '@/lib/db';
import type { JobRow } from './jobs';
import { allQueues, EXPIRE_SECONDS, queueDb, queueNameOf, queuePrefix, RETRY_LIMIT, sendDelivery, type JobKind, type WorkerClass } from './queue';
import { crashPoint, type CrashHook } from './crash';

/** Heartbeats come every few seconds (runner.ts); a minute of silence means the worker is gone. */
export function staleSeconds(): number {
  const raw = Number(process.env.MODESHELF_JOB_STALE_SECONDS);
  return Number.isFinite(raw) && raw > 0 ? raw : 60;
}

/** How long a queued row may be without an open delivery before it is mended (the web server sends in the row's transaction). */
export const GRACE_SECONDS = 10;

export interface RepairOptions {
  /** the reaper's clock; default the database's now() */
  now?: Date;
  staleSeconds?: number;
  graceSeconds?: number;
  /** only these jobs (a test's); a namespaced worker (MODESHELF_QUEUE_PREFIX) also mends jobs without a delivery only when listed */
  jobIds?: string[];
  crash?: CrashHook;
  /** at most this many jobs per pass */
  limit?: number;
}

export type Repair =
  | 'handed back' // queued again for the next retry of its delivery
  | 'cancelled' // someone asked to stop it and its worker is gone
  | 'failed' // no retries left
  | 'redelivered' // a fresh delivery
  | 'delivery completed'; // a final row's open delivery closed

export interface RepairResult {
  jobId: string;
  problem: Problem;
  repair: Repair;
}

type Problem = 'no heartbeat' | 'taken, never claimed' | 'no open delivery' | 'final row, open delivery';

type DeliveryState = 'created' | 'retry' | 'active' | 'completed' | 'cancelled' | 'failed';

interface Candidate {
  id: string;
  kind: JobKind;
  worker_class: WorkerClass;
}

function queueNameSql(): { sql: string; bindings: string[] } {
  const queues = allQueues();
  return {
    sql: `CASE j.kind || ':' || j.worker_class ${queues.map(() => 'WHEN ? THEN ?').join(' ')} END`,
    bindings: queues.flatMap((q) => [`${q.kind}:${q.workerClass}`, q.name]),
  };
}

/** Jobs whose row and delivery are out of step, by one query over `jobs` and pg-boss's job table. */
async function findCandidates(options: Required<Pick<RepairOptions, 'staleSeconds' | 'graceSeconds' | 'limit'>> & RepairOptions): Promise<Candidate[]> {
  const queueName = queueNameSql();
  const now = options.now ?? null;
  // A delivery found in our queues, or none anywhere (never sent, or a row from before rows named theirs);
  // never one of another namespace's queues. A namespaced worker takes jobs without any only when named them.
  const ours = `(q.id IS NOT NULL OR (${queuePrefix() && !options.jobIds ? 'FALSE' : 'NOT EXISTS (SELECT 1 FROM pgboss.job x WHERE x.id::text = j.queue_job_id)'}))`;
  const rows = await db().raw(
    `SELECT j.id, j.kind, j.worker_class
       FROM jobs j
       LEFT JOIN pgboss.job q ON q.name = (${queueName.sql}) AND q.id::text = j.queue_job_id
      WHERE (${options.jobIds ? 'j.id = ANY(?::uuid[])' : 'TRUE'})
        AND ${ours}
        AND (
             (j.status = 'running' AND COALESCE(j.heartbeat_at, j.updated_at) < COALESCE(?::timestamptz, now()) - make_interval(secs => ?))
          OR (j.status = 'queued' AND q.state = 'active' AND q.started_on < COALESCE(?::timestamptz, now()) - make_interval(secs => ?))
          OR (j.status = 'queued' AND (q.id IS NULL OR q.state IN ('completed', 'failed', 'cancelled'))
              AND j.updated_at < COALESCE(?::timestamptz, now()) - make_interval(secs => ?))
          OR (j.status IN ('succeeded', 'failed', 'cancelled') AND q.state = 'active'
              AND j.updated_at < COALESCE(?::timestamptz, now()) - make_interval(secs => ?)
              -- pg-boss itself fails an active delivery after its expiry, so older final rows need no look
              AND j.updated_at > COALESCE(?::timestamptz, now()) - make_interval(secs => ?))
        )
      ORDER BY j.updated_at
      LIMIT ?`,
    [
      ...queueName.bindings,
      ...(options.jobIds ? [options.jobIds] : []),
      now, options.staleSeconds,
      now, options.staleSeconds,
      now, options.graceSeconds,
      now, options.graceSeconds,
      now, EXPIRE_SECONDS + 3600,
      options.limit,
    ],
  );
  return rows.rows as Candidate[];
}

interface DeliveryFacts {
  state: DeliveryState;
  startedOn: Date | null;
}

/** The delivery a row names, in our queue (or its archive); 'elsewhere' when that id is another namespace's. */
async function deliveryOf(boss: PgBoss, trx: Knex.Transaction, row: JobRow): Promise<DeliveryFacts | null | 'elsewhere'> {
  if (!row.queue_job_id) return null;
  const found = await boss.getJobById(queueNameOf(row.kind, row.worker_class), row.queue_job_id, { db: queueDb(trx), includeArchive: true });
  if (found) return { state: found.state as DeliveryState, startedOn: found.startedOn ?? null };
  const other = await trx.raw(
    `SELECT 1 FROM pgboss.job WHERE id::text = ? UNION ALL SELECT 1 FROM pgboss.archive WHERE id::text = ? LIMIT 1`,
    [row.queue_job_id, row.queue_job_id],
  );
  return other.rows.length ? 'elsewhere' : null;
}

const olderThan = (at: Date | null, now: Date, seconds: number) => at !== null && new Date(at).getTime() < now.getTime() - seconds * 1000;

/** What is wrong with this pair now (re-checked under the row's lock), or null when nothing is. */
function diagnose(row: JobRow, delivery: DeliveryFacts | null, now: Date, stale: number, grace: number): Problem | null {
  const open = delivery !== null && (delivery.state === 'created' || delivery.state === 'retry' || delivery.state === 'active');
  if (row.status === 'running') return olderThan(row.heartbeat_at ?? row.updated_at, now, stale) ? 'no heartbeat' : null;
  if (row.status === 'queued') {
    if (delivery?.state === 'active') return olderThan(delivery.startedOn, now, stale) ? 'taken, never claimed' : null;
    return !open && olderThan(row.updated_at, now, grace) ? 'no open delivery' : null;
  }
  return delivery?.state === 'active' && olderThan(row.updated_at, now, grace) ? 'final row, open delivery' : null;
}

async function repairOne(boss: PgBoss, candidate: Candidate, options: Required<Pick<RepairOptions, 'staleSeconds' | 'graceSeconds'>> & RepairOptions): Promise<RepairResult | null> {
  const name = queueNameOf(candidate.kind, candidate.worker_class);
  return db().transaction(async (trx) => {
    const row = await trx<JobRow>('jobs').where({ id: candidate.id }).forUpdate().skipLocked().first();
    if (!row) return null; // a worker or another reaper holds it now
    const now: Date = options.now ?? (await trx.raw('SELECT now() AS t')).rows[0].t;
    const found = await deliveryOf(boss, trx, row);
    // A namespaced worker (a test's) leaves jobs delivered through other namespaces to their own workers,
    // and jobs with no delivery at all unless they were named to it.
    if (found === 'elsewhere') return null;
    if (found === null && queuePrefix() && !options.jobIds?.includes(row.id)) return null;
    let delivery = found;
    const problem = diagnose(row, delivery, now, options.staleSeconds, options.graceSeconds);
    if (!problem) return null;
    const q = queueDb(trx);

    if (problem === 'final row, open delivery') {
      await boss.complete(name, row.queue_job_id!, { repaired: `the job was already ${row.status}` }, { db: q });
      return { jobId: row.id, problem, repair: 'delivery completed' as Repair };
    }

    if (row.status === 'running' && row.cancel_requested_at) {
      // Someone asked to stop it and its worker is gone: it ends as asked, not handed back for a retry.
      await trx('jobs').where({ id: row.id }).update({
        status: 'cancelled',
        stage: 'Cancelled (its worker stopped responding)',
        heartbeat_at: null,
        worker: null,
        progress_detail: null,
        finished_at: trx.fn.now(),
        updated_at: trx.fn.now(),
      });
      if (row.queue_job_id && delivery && delivery.state !== 'completed' && delivery.state !== 'failed' && delivery.state !== 'cancelled') {
        await boss.cancel(name, row.queue_job_id, { db: q });
      }
      return { jobId: row.id, problem, repair: 'cancelled' as Repair };
    }

    if (delivery?.state === 'active') {
      // The attempt that held it is gone: the queue counts it as a failed try and schedules the retry.
      await boss.fail(name, row.queue_job_id!, { reason: 'the worker running this job stopped responding' }, { db: q });
      await crashPoint(options.crash, 'repair:delivery-failed-in-transaction', row.id);
      const after = await boss.getJobById(name, row.queue_job_id!, { db: q, includeArchive: false });
      delivery = after ? { state: after.state as DeliveryState, startedOn: after.startedOn ?? null } : null;
    }

    const why = problem === 'no open delivery' ? 'its queue delivery was closed' : 'the worker running this job stopped responding';
    let repair: Repair;
    if (delivery && (delivery.state === 'created' || delivery.state === 'retry')) {
      await trx('jobs')
        .where({ id: row.id })
        .update({ status: 'queued', stage: `Waiting for a worker (${why})`, heartbeat_at: null, worker: null, updated_at: trx.fn.now() });
      repair = 'handed back';
    } else if (delivery?.state === 'failed' || row.attempts > RETRY_LIMIT) {
      await trx('jobs').where({ id: row.id }).update({
        status: 'failed',
        error: `${why}, and it has been tried ${row.attempts} times`,
        heartbeat_at: null,
        worker: null,
        finished_at: trx.fn.now(),
        updated_at: trx.fn.now(),
      });
      repair = 'failed';
    } else {
      // Completed by an attempt that no longer owned the row, cancelled, or never sent: deliver afresh.
      const queueId = randomUUID();
      await sendDelivery(boss, trx, { kind: row.kind, workerClass: row.worker_class }, row.id, queueId);
      await crashPoint(options.crash, 'repair:redispatched-in-transaction', row.id);
      await trx('jobs').where({ id: row.id }).update({
        status: 'queued',
        stage: `Waiting for a worker (${why})`,
        queue_job_id: queueId,
        heartbeat_at: null,
        worker: null,
        updated_at: trx.fn.now(),
      });
      repair = 'redelivered';
    }
    return { jobId: row.id, problem, repair };
  });
}

/** One pass of the repair sweep: finds every job whose row and delivery are out of step and mends each. */
export async function repairJobs(boss: PgBoss, options: RepairOptions = {}): Promise<RepairResult[]> {
  const settings = { staleSeconds: staleSeconds(), graceSeconds: GRACE_SECONDS, limit: 200, ...options };
  const candidates = await findCandidates(settings);
  const repaired: RepairResult[] = [];
  for (const candidate of candidates) {
    const result = await repairOne(boss, candidate, settings);
    if (!result) continue;
    repaired.push(result);
    await crashPoint(options.crash, 'repair:committed', result.jobId);
  }
  return repaired;
}
