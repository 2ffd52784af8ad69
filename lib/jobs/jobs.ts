// The jobs table: what a background job is doing, as people and pages see it (DEVELOPERS.md, "How a
// request becomes a job and a result": a route handler enqueues a job and answers with it; a worker writes
// progress and results).
//
// Life of a row: queued → running → succeeded | failed; a failed attempt that will be retried goes back to
// queued; a person may send a failed or cancelled job round again (retryJob). The job's owner or an admin
// may cancel a queued or running job (cancelJob): a queued one ends `cancelled` at once, with its delivery;
// a running one is asked to stop and its worker ends it `cancelled` (runner.ts). The row and its queue delivery (pg-boss,
// in the same PostgreSQL) are written in one transaction each time either changes: the row is created,
// with its delivery, inside the transaction that registers what the job works on, so a job never refers
// to something that was rolled back and never exists without a delivery. The reaper (reaper.ts) repairs
// any pair that is still found out of step (a row written before this rule, a dead worker's attempt).
import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import { z } from 'zod';
import { db } from '@/lib/db';
import { recordAudit } from '@/lib/audit';
import { ApiError, notFound } from '@/lib/http';
import type { SessionUser } from '@/lib/auth';
import type { ProgressDetail } from '@/lib/engine-tasks/progress';
import { versionLineage } from '@/lib/version-lineage';
import { reducedVersionPath } from '@/lib/reduced-models/paths';
import { queue, queueDb, queueNameOf, sendDelivery, type JobKind, type WorkerClass } from './queue';
import { modelSizeOfPayload, workerClassFor } from './worker-class';
import { estimateTimeLeft, type TimeLeft } from './progress-estimate';

export type JobStatus = 'queued' | 'running' | 'succeeded' | 'failed' | 'cancelled';

export interface JobRow {
  id: string;
  kind: JobKind;
  subject_type: string;
  subject_id: string | null;
  status: JobStatus;
  stage: string;
  fraction: number;
  error: string | null;
  attempts: number;
  attempt: number;
  payload: Record<string, unknown>;
  result: Record<string, unknown> | null;
  queue_job_id: string | null;
  created_by: string | null;
  created_at: Date;
  updated_at: Date;
  started_at: Date | null;
  finished_at: Date | null;
  heartbeat_at: Date | null;
  worker: string | null;
  worker_class: WorkerClass;
  cancel_requested_at: Date | null;
  cancel_requested_by: string | null;
  progress_detail: ProgressDetail | null;
  stage_started_at: Date | null;
  attempt_started_at: Date | null;
}

/** What the job route answers and the progress bar shows. */
export interface JobView {
  id: string;
  kind: JobKind;
  subjectType: string;
  subjectId: string | null;
  status: JobStatus;
  stage: string;
  fraction: number;
  error: string | null;
  attempts: number;
  result: Record<string, unknown> | null;
  createdAt: string;
  updatedAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  /** the queue class it went to: small or large (decided from the model's size when it was queued) */
  workerClass: WorkerClass;
  /** who queued it (its owner, who may cancel it) */
  createdBy: string | null;
  createdByName: string | null;
  /** set once someone asked to stop it; a running job with this set is stopping */
  cancelRequestedAt: string | null;
  cancelledBy: { id: string; name: string | null } | null;
  /** counts within the current stage, when it is a loop */
  detail: ProgressDetail | null;
  /** estimated time left of a running job (progress-estimate.ts), or null while there is too little to go on */
  timeLeft: TimeLeft | null;
}

export const jobIdSchema = z.object({ id: z.uuid({ error: 'The job id must be a UUID.' }) });

/** Names of the people a view mentions, and the clock the time left is measured on (the database's). */
export interface JobViewContext {
  createdByName?: string | null;
  cancelledByName?: string | null;
  now?: Date;
}

export function toJobView(row: JobRow, context: JobViewContext = {}): JobView {
  const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);
  const detail = row.status === 'running' ? (row.progress_detail ?? null) : null;
  return {
    id: row.id,
    kind: row.kind,
    subjectType: row.subject_type,
    subjectId: row.subject_id,
    status: row.status,
    stage: row.stage,
    fraction: Number(row.fraction),
    error: row.error,
    attempts: row.attempts,
    result: row.result,
    createdAt: iso(row.created_at)!,
    updatedAt: iso(row.updated_at)!,
    startedAt: iso(row.started_at),
    finishedAt: iso(row.finished_at),
    workerClass: row.worker_class ?? 'small',
    createdBy: row.created_by,
    createdByName: context.createdByName ?? null,
    cancelRequestedAt: iso(row.cancel_requested_at ?? null),
    cancelledBy: row.cancel_requested_by ? { id: row.cancel_requested_by, name: context.cancelledByName ?? null } : null,
    detail,
    timeLeft: estimateTimeLeft({
      status: row.status,
      fraction: Number(row.fraction),
      detail,
      attemptStartedAt: row.attempt_started_at ?? null,
      stageStartedAt: row.stage_started_at ?? null,
      now: context.now ?? new Date(),
    }),
  };
}

export interface NewJob {
  kind: JobKind;
  subjectType: string;
  subjectId: string | null;
  payload: Record<string, unknown>;
  createdBy: string | null;
  /** the worker class; by default decided from the size of the model the payload names (worker-class.ts) */
  workerClass?: WorkerClass;
}

/**
 * Inserts a queued job and its queue delivery inside the caller's transaction (one is made when the caller
 * passes no transaction): both commit with what the job works on, or neither does. The first delivery uses
 * the job's own id as its queue id, in the queue of the job's worker class.
 */
export async function createJob(trx: Knex.Transaction | Knex, job: NewJob): Promise<JobRow> {
  const boss = await queue('web');
  const insert = async (t: Knex.Transaction): Promise<JobRow> => {
    const id = randomUUID();
    const size = job.workerClass ? null : await modelSizeOfPayload(t, job.payload);
    const workerClass: WorkerClass = job.workerClass ?? (size ? workerClassFor(size) : 'small');
    const [row] = await t<JobRow>('jobs')
      .insert({
        id,
        kind: job.kind,
        subject_type: job.subjectType,
        subject_id: job.subjectId,
        payload: JSON.stringify(job.payload) as unknown as Record<string, unknown>,
        created_by: job.createdBy,
        status: 'queued',
        stage: `Waiting for a worker (${workerClass} jobs)`,
        queue_job_id: id,
        worker_class: workerClass,
      })
      .returning('*');
    await sendDelivery(boss, t, { kind: job.kind, workerClass }, id, id);
    return row;
  };
  return isTransaction(trx) ? insert(trx) : db().transaction(insert);
}

function isTransaction(k: Knex.Transaction | Knex): k is Knex.Transaction {
  return (k as Knex.Transaction).isTransaction === true;
}

/**
 * Makes sure a queued job has its delivery: sends the one the row names (or a first one, for a row written
 * before rows named theirs), in one transaction with the row. Sending an existing delivery again does
 * nothing, so callers may call it after createJob's commit as they always did. Never throws for a queue
 * outage: the reaper repairs the job once the queue is back.
 */
export async function dispatchJob(jobId: string): Promise<boolean> {
  try {
    const boss = await queue('web');
    return await db().transaction(async (trx) => {
      const row = await trx<JobRow>('jobs').where({ id: jobId, status: 'queued' }).forUpdate().first();
      if (!row) return false;
      const queueId = row.queue_job_id ?? row.id;
      await sendDelivery(boss, trx, { kind: row.kind, workerClass: row.worker_class }, row.id, queueId);
      if (!row.queue_job_id) await trx('jobs').where({ id: jobId }).update({ queue_job_id: queueId, updated_at: trx.fn.now() });
      return true;
    });
  } catch (err) {
    console.error(`[modeshelf] could not hand job ${jobId} to the queue yet; a worker's reaper will`, err);
    return false;
  }
}

/** One job as the job route and the job page show it: with its owner's and canceller's names, timed on the database's clock. */
export async function getJob(id: string): Promise<JobView> {
  const row = await db()('jobs as j')
    .leftJoin('users as owner', 'owner.id', 'j.created_by')
    .leftJoin('users as canceller', 'canceller.id', 'j.cancel_requested_by')
    .where('j.id', id)
    .first('j.*', 'owner.name as owner_name', 'canceller.name as canceller_name', db().raw('now() AS db_now'));
  if (!row) throw notFound('The job');
  return toJobView(row as JobRow, { createdByName: row.owner_name, cancelledByName: row.canceller_name, now: new Date(row.db_now) });
}

/** Whether this person may cancel this job: its owner, or an admin. */
export function mayCancel(user: Pick<SessionUser, 'id' | 'role'>, job: { createdBy: string | null }): boolean {
  return user.role === 'admin' || (job.createdBy !== null && job.createdBy === user.id);
}

/** The newest job of a kind for a subject (e.g. the analysis of a source version), or null. */
export async function latestJobFor(kind: JobKind, subjectType: string, subjectId: string): Promise<JobView | null> {
  const row = await db()<JobRow>('jobs')
    .where({ kind, subject_type: subjectType, subject_id: subjectId })
    .orderBy('created_at', 'desc')
    .first();
  return row ? toJobView(row) : null;
}

/**
 * Sends a failed or cancelled job round again, as its own next attempt, with a fresh delivery in the same
 * transaction (to the queue of the class it was given when first queued).
 */
export async function retryJob(id: string, user: SessionUser): Promise<JobView> {
  const boss = await queue('web');
  await db().transaction(async (trx) => {
    const current = await trx<JobRow>('jobs').where({ id }).forUpdate().first();
    if (!current) throw notFound('The job');
    if (current.status !== 'failed' && current.status !== 'cancelled') {
      throw new ApiError(409, 'not_failed', `Only a failed or cancelled job can be sent round again; this one is ${current.status}.`);
    }
    const queueId = randomUUID();
    await trx<JobRow>('jobs')
      .where({ id })
      .update({
        status: 'queued',
        stage: current.status === 'cancelled' ? 'Waiting for a worker (queued again after it was cancelled)' : 'Waiting for a worker (retry)',
        fraction: 0,
        error: null,
        finished_at: null,
        queue_job_id: queueId,
        cancel_requested_at: null,
        cancel_requested_by: null,
        progress_detail: null,
        updated_at: trx.fn.now(),
      } as never);
    await sendDelivery(boss, trx, { kind: current.kind, workerClass: current.worker_class }, id, queueId);
    await recordAudit(trx, {
      actorId: user.id,
      action: current.status === 'cancelled' ? 'job.requeued' : 'job.retried',
      subjectType: 'job',
      subjectId: id,
      details: { kind: current.kind, previousStatus: current.status, previousError: current.error, attempts: current.attempts },
    });
  });
  return getJob(id);
}

/**
 * Cancels a queued or running job; only its owner or an admin may (403 for anyone else, whatever the job's
 * state). In one transaction under the row's lock:
 *   - queued: the row ends `cancelled` and its delivery is cancelled in the queue, so no worker takes it;
 *   - running: the row records the request; the worker running it looks for requests every second, stops
 *     the engine (at its next check, or by terminating the thread after the grace period) and writes
 *     `cancelled` instead of any result (runner.ts), or the reaper does when that worker is gone.
 * The audit log records who asked, once. Asking again while it stops answers the job as it is; a job that
 * has already ended is refused (409).
 */
export async function cancelJob(id: string, user: SessionUser): Promise<JobView> {
  const boss = await queue('web');
  // A worker taking the queued job's delivery at this instant locks the delivery, then the row; this takes
  // the row, then the delivery. PostgreSQL breaks such a deadlock by aborting one side; if it is this one,
  // it runs again (and then finds the job running, or still queued).
  for (let attempt = 1; ; attempt++) {
    try {
      await cancelOnce(boss, id, user);
      return await getJob(id);
    } catch (err) {
      if ((err as { code?: string }).code !== '40P01' || attempt >= 3) throw err;
    }
  }
}

async function cancelOnce(boss: Awaited<ReturnType<typeof queue>>, id: string, user: SessionUser): Promise<void> {
  await db().transaction(async (trx) => {
    const current = await trx<JobRow>('jobs').where({ id }).forUpdate().first();
    if (!current) throw notFound('The job');
    if (!mayCancel(user, { createdBy: current.created_by })) {
      throw new ApiError(403, 'forbidden', 'Only the person who queued this job, or an admin, can cancel it.');
    }
    if (current.status === 'running' && current.cancel_requested_at) return;
    if (current.status !== 'queued' && current.status !== 'running') {
      throw new ApiError(409, 'not_cancellable', `Only a queued or running job can be cancelled; this one is ${current.status}.`);
    }
    if (current.status === 'queued') {
      await trx('jobs')
        .where({ id })
        .update({
          status: 'cancelled',
          stage: 'Cancelled before a worker started it',
          cancel_requested_at: trx.fn.now(),
          cancel_requested_by: user.id,
          finished_at: trx.fn.now(),
          heartbeat_at: null,
          progress_detail: null,
          updated_at: trx.fn.now(),
        });
      if (current.queue_job_id) await boss.cancel(queueNameOf(current.kind, current.worker_class), current.queue_job_id, { db: queueDb(trx) });
    } else {
      await trx('jobs').where({ id }).update({ cancel_requested_at: trx.fn.now(), cancel_requested_by: user.id, updated_at: trx.fn.now() });
    }
    await recordAudit(trx, {
      actorId: user.id,
      action: 'job.cancelled',
      subjectType: 'job',
      subjectId: id,
      details: { kind: current.kind, status: current.status, attempts: current.attempts, workerClass: current.worker_class, stage: current.stage },
    });
  });
}

/** What a job works on, in words, with the page that shows it (the job page links there). */
export async function jobSubject(job: Pick<JobView, 'subjectType' | 'subjectId'>): Promise<{ words: string; href: string | null }> {
  if (job.subjectType === 'source_version' && job.subjectId) {
    const row = await db()('source_versions as v')
      .join('source_models as m', 'm.id', 'v.source_model_id')
      .where('v.id', job.subjectId)
      .first('m.name', 'm.slug', 'v.number', 'v.states');
    if (row) return { words: `${row.name} v${row.number} (${row.states} states)`, href: `/source-models/${row.slug}/versions/${row.number}` };
  }
  if (job.subjectType === 'reduced_version' && job.subjectId) {
    const row = await versionLineage(db()).where('rv.id', job.subjectId).first();
    if (row) return { words: `${row.reducedModelName} v${row.versionNumber}`, href: reducedVersionPath(row.reducedModelSlug, row.versionNumber) };
  }
  return { words: job.subjectType.replace(/_/g, ' '), href: null };
}
