// Cancelling jobs and worker classes end to end (issue 14), against the real PostgreSQL with real worker
// processes (scripts/worker.ts) on this file's own queues (MODESHELF_QUEUE_PREFIX):
//   - a queued job is cancelled by its owner through POST /api/jobs/{id}/cancel (another engineer and a
//     viewer 403, no session 401), its delivery cancelled with it; no worker runs it; queued again, it
//     completes;
//   - a running job cancelled by an admin ends `cancelled` within 5 s, with no analysis written, the audit
//     event naming the admin, and the worker goes on to the next job in a fresh engine thread;
//   - small and large jobs go to separate queues: a worker serving only small jobs leaves a large one queued,
//     and a small job completes while a large one runs on a worker of the large class; the large job's
//     owner then cancels it while it runs.
// The large job is the kiln wall of the demo scenario at 1200 states (db/seeds/demo/models.ts): its dense
// analysis runs for tens of seconds on this machine, so it is still running when it is cancelled. This
// file's process sets the class threshold low (MODESHELF_LARGE_JOB_STATES=200) so that wall is large and
// the 3-state model small, and the engine's crossover high (MODESHELF_SPARSE_CROSSOVER=5000) so that the
// wall stays on the dense path.
import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';

vi.mock('next-auth', async (importOriginal) => ({ ...(await importOriginal<typeof import('next-auth')>()), getServerSession: vi.fn() }));

import { getServerSession } from 'next-auth';
import { closeDb, db } from '@/lib/db';
import { closeQueue, queueNameOf } from '@/lib/jobs/queue';
import { cancelJob, getJob, retryJob, type JobView } from '@/lib/jobs/jobs';
import { registerUpload } from '@/lib/source-models';
import { recentActivity } from '@/lib/activity';
import type { SessionUser } from '@/lib/auth';
import { POST as cancelRoute } from '@/app/api/jobs/[id]/cancel/route';
import { makeUser, migrateTestDatabase } from './helpers';
import { firstOrderJson, kilnWallFiles, tempUploadsDir, uniqueName, uploadRequest } from './fixtures/model-uploads';

const ROOT = path.resolve(__dirname, '..', '..');
let owner: SessionUser;
let otherEngineer: SessionUser;
let viewer: SessionUser;
let admin: SessionUser;
const workers: ChildProcess[] = [];
const logs = new Map<ChildProcess, string[]>();

beforeAll(async () => {
  process.env.MODESHELF_UPLOADS_DIR = tempUploadsDir();
  process.env.MODESHELF_QUEUE_PREFIX = `c${Date.now().toString(36)}-`;
  process.env.MODESHELF_LARGE_JOB_STATES = '200';
  // The 1200-state wall must stay on the dense path (a long analysis to cancel): above the default crossover
  // of 1000 states its coordinate files would take the large-model path, which analyses it in a second or two.
  process.env.MODESHELF_SPARSE_CROSSOVER = '5000';
  await migrateTestDatabase();
  const as = (row: { id: string; email: string; name: string }, role: SessionUser['role']): SessionUser => ({ id: row.id, email: row.email, name: row.name, role });
  owner = as(await makeUser({ role: 'engineer', label: 'job-owner' }), 'engineer');
  otherEngineer = as(await makeUser({ role: 'engineer', label: 'colleague' }), 'engineer');
  viewer = as(await makeUser({ role: 'viewer', label: 'viewer' }), 'viewer');
  // Admins are made only by people.test.ts (it counts them); an admin here is the acting role, not a stored one.
  admin = as(await makeUser({ role: 'reviewer', label: 'admin-actor' }), 'admin');
});

function startWorker(args: string[] = []): ChildProcess {
  const child = spawn(path.join(ROOT, 'node_modules', '.bin', 'tsx'), [path.join(ROOT, 'scripts', 'worker.ts'), ...args], {
    cwd: ROOT,
    detached: true, // its own process group, so the kill below takes tsx's node child too
    env: { ...process.env, MODESHELF_JOB_STALE_SECONDS: '30', MODESHELF_LINALG_THREADS: '1' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const lines: string[] = [];
  logs.set(child, lines);
  child.stdout?.on('data', (b: Buffer) => lines.push(b.toString()));
  child.stderr?.on('data', (b: Buffer) => lines.push(b.toString()));
  workers.push(child);
  return child;
}

function kill(child: ChildProcess, signal: NodeJS.Signals): Promise<void> {
  return new Promise((resolve) => {
    if (child.exitCode !== null || child.signalCode !== null) return resolve();
    child.once('exit', () => resolve());
    try {
      process.kill(-child.pid!, signal);
    } catch {
      resolve();
    }
  });
}

afterEach(async () => {
  await Promise.all(workers.splice(0).map((w) => kill(w, 'SIGTERM')));
});

afterAll(async () => {
  await closeQueue();
  await closeDb();
});

const logText = () => [...logs.values()].map((l) => l.join('')).join('\n---\n');

async function waitFor(jobId: string, until: (j: JobView) => boolean, timeoutMs = 120_000, pollMs = 100): Promise<JobView> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const job = await getJob(jobId);
    if (until(job)) return job;
    if (Date.now() > deadline) throw new Error(`job ${jobId} is still ${job.status} (${job.stage}) after ${timeoutMs} ms; worker logs:\n${logText().slice(-3000)}`);
    await new Promise((r) => setTimeout(r, pollMs));
  }
}

const ended = (j: JobView) => j.status === 'succeeded' || j.status === 'failed' || j.status === 'cancelled';

async function smallUpload(label: string) {
  return registerUpload(uploadRequest({ name: uniqueName(label) }, [{ field: 'model', name: 'm.json', text: firstOrderJson() }]), owner);
}

/** The 1200-state kiln wall (30 layers × 40 zones), uploaded as Matrix Market files. */
async function largeUpload(label: string) {
  return registerUpload(uploadRequest({ name: uniqueName(label) }, kilnWallFiles(30, 40)), owner);
}

const asUser = (user: SessionUser | null) => vi.mocked(getServerSession).mockResolvedValue(user ? ({ user: { id: user.id } } as never) : null);
const postCancel = (jobId: string) => cancelRoute(new Request(`http://127.0.0.1/api/jobs/${jobId}/cancel`, { method: 'POST' }), { params: Promise.resolve({ id: jobId }) });

async function deliveryState(jobId: string): Promise<string | null> {
  const row = await db()('jobs').where({ id: jobId }).first();
  const found = await db().raw(`SELECT state::text AS state FROM pgboss.job WHERE name = ? AND id::text = ?`, [queueNameOf(row.kind, row.worker_class), row.queue_job_id]);
  return found.rows[0]?.state ?? null;
}

const auditOf = (jobId: string) => db()('audit_events').where({ subject_type: 'job', subject_id: jobId }).orderBy('id');

describe('cancelling jobs', () => {
  it('cancels a queued job for its owner only; no worker runs it; queued again, it completes', async () => {
    const upload = await smallUpload('Cancelled while queued');
    expect(upload.job).toMatchObject({ status: 'queued', workerClass: 'small', createdBy: owner.id });

    asUser(null);
    expect((await postCancel(upload.job.id)).status).toBe(401);
    asUser(viewer);
    expect((await postCancel(upload.job.id)).status).toBe(403);
    asUser(otherEngineer);
    const refused = await postCancel(upload.job.id);
    expect(refused.status).toBe(403);
    expect(await refused.json()).toMatchObject({ error: { code: 'forbidden' } });
    expect((await getJob(upload.job.id)).status).toBe('queued');
    expect(await auditOf(upload.job.id)).toHaveLength(0);

    asUser(owner);
    const response = await postCancel(upload.job.id);
    expect(response.status).toBe(200);
    const { job } = (await response.json()) as { job: JobView };
    expect(job).toMatchObject({ status: 'cancelled', attempts: 0, cancelledBy: { id: owner.id, name: owner.name } });
    expect(job.finishedAt).not.toBeNull();
    expect(await deliveryState(upload.job.id)).toBe('cancelled');
    const [event] = await auditOf(upload.job.id);
    expect(event).toMatchObject({ action: 'job.cancelled', actor_id: owner.id, details: expect.objectContaining({ status: 'queued' }) });

    // A worker takes the next job but never this one.
    startWorker();
    const next = await smallUpload('Runs after the cancelled one');
    expect((await waitFor(next.job.id, ended)).status).toBe('succeeded');
    expect(await getJob(upload.job.id)).toMatchObject({ status: 'cancelled', attempts: 0 });
    expect(await db()('analyses').where({ source_version_id: upload.version.id })).toHaveLength(0);
    // An ended job cannot be cancelled again.
    await expect(cancelJob(upload.job.id, owner)).rejects.toMatchObject({ status: 409, code: 'not_cancellable' });

    const requeued = await retryJob(upload.job.id, otherEngineer);
    expect(requeued).toMatchObject({ status: 'queued', cancelRequestedAt: null, cancelledBy: null });
    const done = await waitFor(upload.job.id, ended);
    expect(done).toMatchObject({ status: 'succeeded', attempts: 1, error: null });
    expect(await db()('analyses').where({ source_version_id: upload.version.id })).toHaveLength(1);
    expect((await auditOf(upload.job.id)).map((e) => [e.action, e.actor_id])).toEqual([
      ['job.cancelled', owner.id],
      ['job.requeued', otherEngineer.id],
    ]);
    // The activity feed says it in words.
    const items = (await recentActivity(500)).filter((i) => i.subjectId === upload.job.id);
    expect(items.map((i) => [i.actorName, i.verb])).toEqual([
      [otherEngineer.name, 'queued a cancelled analysis job again'],
      [owner.name, 'cancelled a queued analysis job'],
    ]);
    // Succeeded: neither cancelled nor sent round again.
    await expect(cancelJob(upload.job.id, owner)).rejects.toMatchObject({ status: 409 });
    await expect(retryJob(upload.job.id, owner)).rejects.toMatchObject({ status: 409, code: 'not_failed' });
  });

  it('stops a running job within 5 s when an admin cancels it: nothing written, the audit names the admin, the worker goes on', async () => {
    const worker = startWorker(['--concurrency', '1']);
    const upload = await largeUpload('Cancelled while running');
    expect(upload.job.workerClass).toBe('large');
    // Running, inside the analysis of 1200 states.
    await waitFor(upload.job.id, (j) => j.status === 'running' && /Computing poles/.test(j.stage), 120_000, 50);
    await expect(cancelJob(upload.job.id, otherEngineer)).rejects.toMatchObject({ status: 403 });

    const asked = Date.now();
    const stopping = await cancelJob(upload.job.id, admin);
    expect(stopping).toMatchObject({ status: 'running', cancelledBy: { id: admin.id } });
    expect(stopping.cancelRequestedAt).not.toBeNull();
    // Asking twice records it once.
    await cancelJob(upload.job.id, admin);
    const job = await waitFor(upload.job.id, ended, 10_000, 50);
    const tookMs = Date.now() - asked;
    expect(job.status).toBe('cancelled');
    expect(tookMs).toBeLessThan(5000);
    expect(job.stage).toMatch(/^Cancelled during “Computing poles/);
    expect(job.detail).toBeNull();
    expect(job.timeLeft).toBeNull();
    expect(await db()('analyses').where({ source_version_id: upload.version.id })).toHaveLength(0);
    expect(await deliveryState(upload.job.id)).toBe('cancelled');
    const events = await auditOf(upload.job.id);
    expect(events).toHaveLength(1);
    expect(events[0]).toMatchObject({ action: 'job.cancelled', actor_id: admin.id, details: expect.objectContaining({ status: 'running', workerClass: 'large' }) });
    await waitFor(upload.job.id, () => /job .*: cancelled; engine (thread terminated|stopped at its check)/.test(logs.get(worker)!.join('')), 5000);

    // The same worker (one large slot) takes the next large job in a fresh thread.
    const next = await registerUpload(uploadRequest({ name: uniqueName('Large, after the cancel') }, kilnWallFiles(15, 20)), owner);
    expect(next.job.workerClass).toBe('large');
    expect((await waitFor(next.job.id, ended)).status).toBe('succeeded');
    expect(worker.exitCode).toBeNull();
  });
});

describe('worker classes', () => {
  it('keeps small and large jobs apart: a small job completes while a large one runs', async () => {
    const small = startWorker(['--classes', 'small']);
    const large = await largeUpload('Large job');
    const first = await smallUpload('Small job beside a large one');
    expect(large.job.workerClass).toBe('large');
    expect(first.job.workerClass).toBe('small');
    expect(await db()('jobs').where({ id: large.job.id }).first('worker_class')).toEqual({ worker_class: 'large' });
    expect((await waitFor(first.job.id, ended)).status).toBe('succeeded');
    // The small-class worker never takes the large job.
    expect(await getJob(large.job.id)).toMatchObject({ status: 'queued', attempts: 0 });
    expect(logs.get(small)!.join('')).toMatch(/classes small,/);

    const big = startWorker(['--classes', 'large']);
    await waitFor(large.job.id, (j) => j.status === 'running');
    const second = await smallUpload('Small job while a large one runs');
    const done = await waitFor(second.job.id, ended);
    expect(done.status).toBe('succeeded');
    // Still running when the small one finished: it did not wait behind it.
    expect((await getJob(large.job.id)).status).toBe('running');

    // Its owner cancels it while it runs.
    await expect(cancelJob(large.job.id, otherEngineer)).rejects.toMatchObject({ status: 403 });
    const asked = Date.now();
    await cancelJob(large.job.id, owner);
    const cancelled = await waitFor(large.job.id, ended, 10_000, 50);
    expect(cancelled).toMatchObject({ status: 'cancelled', cancelledBy: { id: owner.id } });
    expect(Date.now() - asked).toBeLessThan(5000);
    expect(await db()('analyses').where({ source_version_id: large.version.id })).toHaveLength(0);
    // It ran on the large-class worker, and the small-class worker never saw it.
    await waitFor(large.job.id, () => logs.get(big)!.join('').includes(`large analysis job ${large.job.id}: cancelled`), 5000);
    expect(logs.get(small)!.join('')).not.toContain(large.job.id);
  });
});
