// The jobs table: what a background job is doing, as people and pages see it (DESIGN.md §3, "a route
// handler enqueues a job and returns its id; a worker ... writes progress and results").
//
// Life of a row: queued → running → succeeded | failed; a failed attempt that will be retried goes back to
// queued; a person may send a failed job round again (retryJob). The row is created inside the
// transaction that registers what the job works on, and handed to the queue once that has committed
// (dispatchJob), so a job never refers to something that was rolled back; a job whose hand-over was lost
// (the server stopped in between) is handed over by the workers' sweeper (reaper.ts).
import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import { z } from 'zod';
import { db } from '@/lib/db';
import { recordAudit } from '@/lib/audit';
import { ApiError, notFound } from '@/lib/http';
import type { SessionUser } from '@/lib/auth';
import { queue, QUEUE_NAMES, RETRY_LIMIT, type JobKind, type QueueMessage } from './queue';

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

/** Inserts a queued job inside the caller's transaction. Hand it to the queue after commit (dispatchJob). */
export async function createJob(trx: Knex.Transaction | Knex, job: NewJob): Promise<JobRow> {
  const [row] = await trx<JobRow>('jobs')
    .insert({
      kind: job.kind,
      subject_type: job.subjectType,
      subject_id: job.subjectId,
      payload: JSON.stringify(job.payload) as unknown as Record<string, unknown>,
      created_by: job.createdBy,
      status: 'queued',
      stage: 'Waiting for a worker',
    })
    .returning('*');
  return row;
}

/**
 * Hands a queued job to the queue. The first delivery uses the job's own id as the queue id, so sending
 * it twice (the sweeper and the server racing) delivers it once; a person's retry gets a fresh queue id.
 * Never throws for a queue outage: the sweeper hands the job over once the queue is back.
 */
export async function dispatchJob(jobId: string, options: { fresh?: boolean } = {}): Promise<boolean> {
  const row = await db()<JobRow>('jobs').where({ id: jobId }).first();
  if (!row || row.status !== 'queued') return false;
  const queueId = options.fresh ? randomUUID() : row.id;
  try {
    const boss = await queue('web');
    const message: QueueMessage = { jobId };
    await boss.send(QUEUE_NAMES[row.kind], message, { id: queueId, retryLimit: RETRY_LIMIT });
    await db()('jobs').where({ id: jobId, status: 'queued' }).update({ queue_job_id: queueId, updated_at: db().fn.now() });
    return true;
  } catch (err) {
    console.error(`[modeshelf] could not hand job ${jobId} to the queue yet; a worker's sweeper will`, err);
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

/** Sends a failed job round again, as its own next attempt. */
export async function retryJob(id: string, user: SessionUser): Promise<JobView> {
  const row = await db().transaction(async (trx) => {
    const current = await trx<JobRow>('jobs').where({ id }).forUpdate().first();
    if (!current) throw notFound('The job');
    if (current.status !== 'failed') {
      throw new ApiError(409, 'not_failed', `Only a failed job can be retried; this one is ${current.status}.`);
    }
    const [updated] = await trx<JobRow>('jobs')
      .where({ id })
      .update({
        status: 'queued',
        stage: 'Waiting for a worker (retry)',
        fraction: 0,
        error: null,
        finished_at: null,
        queue_job_id: null,
        updated_at: trx.fn.now(),
      })
      .returning('*');
    await recordAudit(trx, {
      actorId: user.id,
      action: 'job.retried',
      subjectType: 'job',
      subjectId: id,
      details: { kind: current.kind, previousError: current.error, attempts: current.attempts },
    });
    return updated;
  });
  await dispatchJob(row.id, { fresh: true });
  return getJob(row.id);
}
