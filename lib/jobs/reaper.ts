// Keeping jobs moving when a process dies, run by every worker every few seconds:
//
//   reapStaleJobs: a running job whose heartbeat is older than the stale limit lost its worker (killed,
//     out of memory, machine gone). Its row goes back to queued and its queue delivery is failed, which
//     makes pg-boss deliver it again after the retry delay, to whichever worker asks first; when the
//     delivery has no retries left, the job fails with a message saying why.
//   sweepUndispatched: a queued job the web server created but never handed to the queue (it stopped
//     between its commit and the hand-over) is handed over here.
//
// Several workers may reap at once: the conditional UPDATE lets exactly one of them take each job.
import { db } from '@/lib/db';
import type PgBoss from 'pg-boss';
import { dispatchJob, type JobRow } from './jobs';
import { QUEUE_NAMES, queuePrefix } from './queue';

/** Heartbeats come every few seconds (runner.ts); a minute of silence means the worker is gone. */
export function staleSeconds(): number {
  const raw = Number(process.env.MODESHELF_JOB_STALE_SECONDS);
  return Number.isFinite(raw) && raw > 0 ? raw : 60;
}

export async function reapStaleJobs(boss: PgBoss, limitSeconds = staleSeconds()): Promise<string[]> {
  const candidates: Pick<JobRow, 'id' | 'kind' | 'queue_job_id'>[] = await db()('jobs')
    .where({ status: 'running' })
    .whereRaw('heartbeat_at < now() - make_interval(secs => ?)', [limitSeconds])
    .select('id', 'kind', 'queue_job_id');
  const reaped: string[] = [];
  for (const candidate of candidates) {
    const name = QUEUE_NAMES[candidate.kind];
    const delivery = candidate.queue_job_id ? await boss.getJobById(name, candidate.queue_job_id) : null;
    // A namespaced worker (a test's) leaves jobs delivered through other namespaces to their own workers.
    if (queuePrefix() && !delivery) continue;
    const [row]: JobRow[] = await db()<JobRow>('jobs')
      .where({ id: candidate.id, status: 'running' })
      .whereRaw('heartbeat_at < now() - make_interval(secs => ?)', [limitSeconds])
      .update({
        status: 'queued',
        stage: 'Waiting for a worker (the previous worker stopped responding)',
        heartbeat_at: null,
        worker: null,
        updated_at: db().fn.now(),
      })
      .returning('*');
    if (!row) continue; // another worker took it, or its worker spoke up again
    reaped.push(row.id);
    if (delivery?.state === 'active') await boss.fail(name, row.queue_job_id!, { reason: 'worker stopped responding' });
    const after = row.queue_job_id ? await boss.getJobById(name, row.queue_job_id) : null;
    if (after && (after.state === 'retry' || after.state === 'created')) continue;
    if (after?.state === 'failed') {
      await db()('jobs')
        .where({ id: row.id, status: 'queued' })
        .update({
          status: 'failed',
          error: `the worker running this job stopped responding, and it has been tried ${row.attempts} times`,
          finished_at: db().fn.now(),
          updated_at: db().fn.now(),
        });
      continue;
    }
    // The delivery is gone or was closed by an attempt that did not own the row: deliver afresh.
    await db()('jobs').where({ id: row.id, status: 'queued' }).update({ queue_job_id: null });
    await dispatchJob(row.id, { fresh: true });
  }
  return reaped;
}

export async function sweepUndispatched(olderThanSeconds = 10): Promise<number> {
  // A namespaced worker (a test's) would hand other namespaces' jobs to its own queues; it leaves them.
  if (queuePrefix()) return 0;
  const ids: string[] = await db()('jobs')
    .where({ status: 'queued' })
    .whereNull('queue_job_id')
    .whereRaw('created_at < now() - make_interval(secs => ?)', [olderThanSeconds])
    .pluck('id');
  for (const id of ids) await dispatchJob(id);
  return ids.length;
}
