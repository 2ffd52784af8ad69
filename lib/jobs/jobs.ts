// The jobs table: what a background job is doing, as people and pages see it (DEVELOPERS.md, "How a
// request becomes a job and a result": a route handler enqueues a job and answers with it; a worker writes
// progress and results).
//
// Life of a row: queued → running → succeeded | failed; a failed attempt that will be retried goes back to
// queued; a person may send a failed job round again (retryJob). The row and its queue delivery (pg-boss,
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
import { queue, sendDelivery, type JobKind } from './queue';

export type JobStatus = 'queued' | 'running' | 'succeeded' | 'failed';

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
}

export const jobIdSchema = z.object({ id: z.uuid({ error: 'The job id must be a UUID.' }) });

export function toJobView(row: JobRow): JobView {
  const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);
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
  };
}

export interface NewJob {
  kind: JobKind;
  subjectType: string;
  subjectId: string | null;
  payload: Record<string, unknown>;
  createdBy: string | null;
}

/**
 * Inserts a queued job and its queue delivery inside the caller's transaction (one is made when the caller
 * passes no transaction): both commit with what the job works on, or neither does. The first delivery uses
 * the job's own id as its queue id.
 */
export async function createJob(trx: Knex.Transaction | Knex, job: NewJob): Promise<JobRow> {
  const boss = await queue('web');
  const insert = async (t: Knex.Transaction): Promise<JobRow> => {
    const id = randomUUID();
    const [row] = await t<JobRow>('jobs')
      .insert({
        id,
        kind: job.kind,
        subject_type: job.subjectType,
        subject_id: job.subjectId,
        payload: JSON.stringify(job.payload) as unknown as Record<string, unknown>,
        created_by: job.createdBy,
        status: 'queued',
        stage: 'Waiting for a worker',
        queue_job_id: id,
      })
      .returning('*');
    await sendDelivery(boss, t, job.kind, id, id);
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
      await sendDelivery(boss, trx, row.kind, row.id, queueId);
      if (!row.queue_job_id) await trx('jobs').where({ id: jobId }).update({ queue_job_id: queueId, updated_at: trx.fn.now() });
      return true;
    });
  } catch (err) {
    console.error(`[modeshelf] could not hand job ${jobId} to the queue yet; a worker's reaper will`, err);
    return false;
  }
}

export async function getJob(id: string): Promise<JobView> {
  const row = await db()<JobRow>('jobs').where({ id }).first();
  if (!row) throw notFound('The job');
  return toJobView(row);
}

/** The newest job of a kind for a subject (e.g. the analysis of a source version), or null. */
export async function latestJobFor(kind: JobKind, subjectType: string, subjectId: string): Promise<JobView | null> {
  const row = await db()<JobRow>('jobs')
    .where({ kind, subject_type: subjectType, subject_id: subjectId })
    .orderBy('created_at', 'desc')
    .first();
  return row ? toJobView(row) : null;
}

/** Sends a failed job round again, as its own next attempt, with a fresh delivery in the same transaction. */
export async function retryJob(id: string, user: SessionUser): Promise<JobView> {
  const boss = await queue('web');
  const row = await db().transaction(async (trx) => {
    const current = await trx<JobRow>('jobs').where({ id }).forUpdate().first();
    if (!current) throw notFound('The job');
    if (current.status !== 'failed') {
      throw new ApiError(409, 'not_failed', `Only a failed job can be retried; this one is ${current.status}.`);
    }
    const queueId = randomUUID();
    const [updated] = await trx<JobRow>('jobs')
      .where({ id })
      .update({
        status: 'queued',
        stage: 'Waiting for a worker (retry)',
        fraction: 0,
        error: null,
        finished_at: null,
        queue_job_id: queueId,
        updated_at: trx.fn.now(),
      })
      .returning('*');
    await sendDelivery(boss, trx, current.kind, id, queueId);
    await recordAudit(trx, {
      actorId: user.id,
      action: 'job.retried',
      subjectType: 'job',
      subjectId: id,
      details: { kind: current.kind, previousError: current.error, attempts: current.attempts },
    });
    return updated;
  });
  return toJobView(row);
}
