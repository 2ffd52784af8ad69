// Fault injection for background jobs (issue 17): the job runner and the reaper take a "crash here" hook
// (lib/jobs/crash.ts) at every boundary between their writes. For each boundary a job is crashed there
// (the hook throws SimulatedCrash: nothing after that instant is written, an open transaction is rolled
// back as PostgreSQL does when a dead process's connection closes), then one reaper pass runs on a clock
// driven to one stale limit plus one reaper period after the crash, and a fresh "worker" takes whatever
// the queue hands it. Each job must end succeeded (or failed with its retries counted), with exactly one
// analysis written (none for a failed one), its row and queue delivery both final, and nothing left for a
// later reaper pass. No sleeping: the reaper's clock is passed in, and the test's queues retry at once
// (MODESHELF_JOB_RETRY_DELAY_SECONDS=0).
//
// The expected outcomes come from the queue's contract, not from the code under test: pg-boss 10 makes at
// most 1 + retryLimit (= 3) deliveries of a job (its README, "retryLimit"), and a job's row counts one
// attempt per claim. The three "earlier release" cases build the inconsistent pairs an older worker left
// behind (delivery taken and never claimed, delivery completed under a queued row, final row with an open
// delivery) through pg-boss's own API, and check that one pass mends each.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type PgBoss from 'pg-boss';
import { closeDb, db } from '@/lib/db';
import { closeQueue, queue, QUEUE_NAMES, type QueueMessage } from '@/lib/jobs/queue';
import { claimNext, releaseRunning, runClaimed, runningJobs, type Outcome } from '@/lib/jobs/runner';
import { repairJobs, staleSeconds } from '@/lib/jobs/reaper';
import { REAP_EVERY_MS } from '@/lib/jobs/worker-loop';
import { CRASH_POINTS, SimulatedCrash, type CrashHook, type CrashPoint } from '@/lib/jobs/crash';
import type { JobRow } from '@/lib/jobs/jobs';
import { registerUpload } from '@/lib/source-models';
import type { SessionUser } from '@/lib/auth';
import { makeUser, migrateTestDatabase } from './helpers';
import { firstOrderJson, tempUploadsDir, uniqueName, uploadRequest } from './fixtures/model-uploads';

let engineer: SessionUser;
let boss: PgBoss;
const STALE = staleSeconds();
const PERIOD = REAP_EVERY_MS / 1000;

beforeAll(async () => {
  process.env.MODESHELF_UPLOADS_DIR = tempUploadsDir();
  process.env.MODESHELF_QUEUE_PREFIX = `f${Date.now().toString(36)}-`;
  process.env.MODESHELF_JOB_RETRY_DELAY_SECONDS = '0';
  await migrateTestDatabase();
  const row = await makeUser({ role: 'engineer', label: 'jobfaults' });
  engineer = { id: row.id, email: row.email, name: row.name, role: 'engineer' };
  boss = await queue('worker');
});

afterAll(async () => {
  await closeQueue();
  await closeDb();
});

/** A new analysis job (its row and first delivery are written with the upload). */
async function newJob(): Promise<{ jobId: string; sourceVersionId: string }> {
  const upload = await registerUpload(uploadRequest({ name: uniqueName('Fault') }, [{ field: 'model', name: 'm.json', text: firstOrderJson() }]), engineer);
  return { jobId: upload.job.id, sourceVersionId: upload.version.id };
}

/**
 * A process that dies at `point` of job `jobId`: the first time it gets there the hook throws, and every
 * later point of that job in the same "process" throws too (a dead process writes nothing more).
 */
function crashAt(point: CrashPoint, jobId: string, before?: CrashHook): CrashHook & { fired: () => boolean } {
  let dead = false;
  const hook = async (p: CrashPoint, id: string) => {
    if (id !== jobId) return;
    if (dead) throw new SimulatedCrash(p);
    if (p === point) {
      dead = true;
      throw new SimulatedCrash(p);
    }
    await before?.(p, id);
  };
  return Object.assign(hook, { fired: () => dead });
}

/** An engine task that fails (a transient fault) once it has finished, before anything of it is written. */
const transientFailure: CrashHook = (p) => {
  if (p === 'run:task-finished') throw new Error('the engine thread was lost (injected)');
};

/** One worker step on the test's analysis queue: take a delivery, claim and run it. */
async function workOnce(crash?: CrashHook): Promise<Outcome | null> {
  const claimed = await claimNext(boss, 'analysis', { crash });
  if (!claimed) return null;
  return runClaimed(boss, claimed, { crash });
}

/** A fresh worker takes what the queue hands it until the job's row is final (bounded: 1 + retries deliveries). */
async function workUntilFinal(jobId: string): Promise<JobRow> {
  for (let k = 0; k < 6; k++) {
    const row = await jobRow(jobId);
    if (row.status === 'succeeded' || row.status === 'failed') return row;
    const outcome = await workOnce();
    if (outcome === null) break;
  }
  return jobRow(jobId);
}

const jobRow = async (id: string): Promise<JobRow> => (await db()<JobRow>('jobs').where({ id }).first())!;
const dbNow = async (): Promise<Date> => (await db().raw('SELECT now() AS t')).rows[0].t;
const plus = (t: Date, seconds: number) => new Date(t.getTime() + seconds * 1000);

/** Every delivery of the job in the test's analysis queue, by state. */
async function deliveries(jobId: string): Promise<Record<string, number>> {
  const rows = await db().raw(`SELECT state::text AS state, count(*)::int AS n FROM pgboss.job WHERE name = ? AND data->>'jobId' = ? GROUP BY state`, [
    QUEUE_NAMES.analysis,
    jobId,
  ]);
  return Object.fromEntries(rows.rows.map((r: { state: string; n: number }) => [r.state, r.n]));
}

async function deliveryState(row: JobRow): Promise<string | null> {
  const d = row.queue_job_id ? await boss.getJobById(QUEUE_NAMES.analysis, row.queue_job_id) : null;
  return d?.state ?? null;
}

/** The job ended and nothing is half-written: one analysis (or none), the row's delivery closed, no open delivery left. */
async function expectSettled(jobId: string, sourceVersionId: string, expected: { status: 'succeeded' | 'failed'; attempts: number }): Promise<JobRow> {
  const row = await jobRow(jobId);
  expect({ status: row.status, attempts: row.attempts }).toEqual(expected);
  const analyses = await db()('analyses').where({ source_version_id: sourceVersionId });
  expect(analyses).toHaveLength(expected.status === 'succeeded' ? 1 : 0);
  if (expected.status === 'succeeded') {
    expect(row).toMatchObject({ stage: 'Done', fraction: 1, error: null });
    expect(row.result).toMatchObject({ sourceVersionId, states: 3 });
    expect(await deliveryState(row)).toBe('completed');
  } else {
    expect(row.finished_at).not.toBeNull();
    expect(['failed', 'completed']).toContain(await deliveryState(row));
  }
  const open = await deliveries(jobId);
  expect(open.created ?? 0).toBe(0);
  expect(open.retry ?? 0).toBe(0);
  expect(open.active ?? 0).toBe(0);
  // A later pass of the reaper, however late, finds nothing more to do.
  expect(await repairJobs(boss, { now: plus(await dbNow(), 100 * STALE), jobIds: [jobId] })).toEqual([]);
  return row;
}

/** Runs the job into the crash; returns the database's time just after it. */
async function crashJob(jobId: string, crash: CrashHook & { fired: () => boolean }): Promise<Date> {
  await expect(workOnce(crash)).rejects.toBeInstanceOf(SimulatedCrash);
  expect(crash.fired()).toBe(true);
  return dbNow();
}

// Each runner boundary: where it lies, the hook (a transient failure first, for the failure path), and the
// attempts the job has counted when it ends (one more when the crash lost a claimed attempt).
const RUNNER_CASES: { point: CrashPoint; before?: CrashHook; attempts: number; status?: 'succeeded' | 'failed' }[] = [
  { point: 'claim:fetched-in-transaction', attempts: 1 },
  { point: 'run:claimed', attempts: 2 },
  { point: 'run:progress-written', attempts: 2 },
  { point: 'run:task-finished', attempts: 2 },
  { point: 'result:written-in-transaction', attempts: 2 },
  { point: 'result:committed', attempts: 1 },
  { point: 'failure:written-in-transaction', before: transientFailure, attempts: 2 },
  { point: 'failure:committed', before: transientFailure, attempts: 2 },
];

describe('a job crashed at any boundary between writes ends within one reaper period', () => {
  for (const c of RUNNER_CASES) {
    it(`runner: crash at ${c.point}`, async () => {
      const { jobId, sourceVersionId } = await newJob();
      const crashedAt = await crashJob(jobId, crashAt(c.point, jobId, c.before));
      const after = await jobRow(jobId);
      // Never half-written: a row that says succeeded has its analysis, and the reverse.
      expect(await db()('analyses').where({ source_version_id: sourceVersionId })).toHaveLength(after.status === 'succeeded' ? 1 : 0);
      if (after.status === 'running') {
        // A live worker's heartbeat is trusted for the stale limit: the reaper leaves the job alone until then.
        expect(await repairJobs(boss, { now: plus(crashedAt, STALE - 1), jobIds: [jobId] })).toEqual([]);
      }
      // One pass, one stale limit plus one reaper period after the crash.
      const repaired = await repairJobs(boss, { now: plus(crashedAt, STALE + PERIOD), jobIds: [jobId] });
      if (after.status === 'running') expect(repaired).toEqual([{ jobId, problem: 'no heartbeat', repair: 'handed back' }]);
      else expect(repaired).toEqual([]); // the crash left a consistent pair: the queue hands it on by itself
      await workUntilFinal(jobId);
      await expectSettled(jobId, sourceVersionId, { status: c.status ?? 'succeeded', attempts: c.attempts });
    });
  }

  it('runner: crash at release:written-in-transaction (a SIGTERM hand-back cut short)', async () => {
    const { jobId, sourceVersionId } = await newJob();
    // The attempt waits at its first progress write until the shutdown has crashed; then this process is dead.
    let release!: () => void;
    const released = new Promise<void>((r) => (release = r));
    const crash = crashAt('release:written-in-transaction', jobId, async (p) => {
      if (p === 'run:progress-written') await released;
    });
    const claimed = await claimNext(boss, 'analysis', { crash });
    expect(claimed?.row?.id).toBe(jobId);
    const running = runClaimed(boss, claimed!, { crash });
    const deadline = Date.now() + 30_000;
    while (!runningJobs().some((r) => r.jobId === jobId) && Date.now() < deadline) await new Promise((r) => setImmediate(r));
    await expect(releaseRunning(boss, 'the worker got SIGTERM', { crash })).rejects.toBeInstanceOf(SimulatedCrash);
    release();
    await expect(running).rejects.toBeInstanceOf(SimulatedCrash);
    const crashedAt = await dbNow();
    expect((await jobRow(jobId)).status).toBe('running'); // the hand-back was rolled back with its delivery
    const repaired = await repairJobs(boss, { now: plus(crashedAt, STALE + PERIOD), jobIds: [jobId] });
    expect(repaired).toEqual([{ jobId, problem: 'no heartbeat', repair: 'handed back' }]);
    await workUntilFinal(jobId);
    await expectSettled(jobId, sourceVersionId, { status: 'succeeded', attempts: 2 });
  });

  it('a SIGTERM hand-back that completes: row queued and delivery retried together, then finished', async () => {
    const { jobId, sourceVersionId } = await newJob();
    let release!: () => void;
    const released = new Promise<void>((r) => (release = r));
    const claimed = await claimNext(boss, 'analysis');
    const running = runClaimed(boss, claimed!, { crash: async (p) => (p === 'run:progress-written' ? released : undefined) });
    const deadline = Date.now() + 30_000;
    while (!runningJobs().some((r) => r.jobId === jobId) && Date.now() < deadline) await new Promise((r) => setImmediate(r));
    expect(await releaseRunning(boss, 'the worker got SIGTERM')).toEqual([jobId]);
    release();
    expect(await running).toBe('superseded');
    const row = await jobRow(jobId);
    expect(row.status).toBe('queued');
    expect(await deliveryState(row)).toBe('retry');
    await workUntilFinal(jobId);
    await expectSettled(jobId, sourceVersionId, { status: 'succeeded', attempts: 2 });
  });

  it('reaper: crash at repair:delivery-failed-in-transaction; the next pass hands the job back', async () => {
    const { jobId, sourceVersionId } = await newJob();
    const crashedAt = await crashJob(jobId, crashAt('run:claimed', jobId));
    const due = plus(crashedAt, STALE + PERIOD);
    await expect(repairJobs(boss, { now: due, jobIds: [jobId], crash: crashAt('repair:delivery-failed-in-transaction', jobId) })).rejects.toBeInstanceOf(
      SimulatedCrash,
    );
    const row = await jobRow(jobId);
    expect(row.status).toBe('running');
    expect(await deliveryState(row)).toBe('active'); // rolled back together
    const repaired = await repairJobs(boss, { now: plus(due, PERIOD), jobIds: [jobId] });
    expect(repaired).toEqual([{ jobId, problem: 'no heartbeat', repair: 'handed back' }]);
    await workUntilFinal(jobId);
    await expectSettled(jobId, sourceVersionId, { status: 'succeeded', attempts: 2 });
  });

  it('reaper: crash at repair:redispatched-in-transaction and at repair:committed; the next pass finishes the repair', async () => {
    const { jobId, sourceVersionId } = await newJob();
    // A row whose delivery was closed under it (an earlier release's attempt that did not own the row).
    const row = await jobRow(jobId);
    const [taken] = await boss.fetch<QueueMessage>(QUEUE_NAMES.analysis, { batchSize: 1 });
    expect(taken.id).toBe(row.queue_job_id);
    await boss.complete(QUEUE_NAMES.analysis, taken.id);
    const at = plus(await dbNow(), STALE + PERIOD);
    await expect(repairJobs(boss, { now: at, jobIds: [jobId], crash: crashAt('repair:redispatched-in-transaction', jobId) })).rejects.toBeInstanceOf(
      SimulatedCrash,
    );
    expect(await deliveries(jobId)).toEqual({ completed: 1 }); // the fresh delivery was rolled back with the row
    await expect(repairJobs(boss, { now: plus(at, PERIOD), jobIds: [jobId], crash: crashAt('repair:committed', jobId) })).rejects.toBeInstanceOf(SimulatedCrash);
    const mended = await jobRow(jobId);
    expect(mended.status).toBe('queued');
    expect(mended.queue_job_id).not.toBe(row.queue_job_id);
    expect(await deliveryState(mended)).toBe('created');
    expect(await repairJobs(boss, { now: plus(at, 2 * PERIOD), jobIds: [jobId] })).toEqual([]);
    await workUntilFinal(jobId);
    await expectSettled(jobId, sourceVersionId, { status: 'succeeded', attempts: 1 });
  });

  it('a job whose worker dies on every attempt fails with its three tries counted', async () => {
    const { jobId, sourceVersionId } = await newJob();
    let repaired: unknown[] = [];
    for (let attempt = 1; attempt <= 3; attempt++) {
      const crashedAt = await crashJob(jobId, crashAt('run:claimed', jobId));
      expect((await jobRow(jobId)).attempts).toBe(attempt);
      repaired = await repairJobs(boss, { now: plus(crashedAt, STALE + PERIOD), jobIds: [jobId] });
    }
    expect(repaired).toEqual([{ jobId, problem: 'no heartbeat', repair: 'failed' }]);
    const row = await expectSettled(jobId, sourceVersionId, { status: 'failed', attempts: 3 });
    expect(row.error).toBe('the worker running this job stopped responding, and it has been tried 3 times');
    expect(await deliveryState(row)).toBe('failed');
  });

  it('covers every crash point the runner and the reaper declare', () => {
    const covered = new Set<CrashPoint>([
      ...RUNNER_CASES.map((c) => c.point),
      'release:written-in-transaction',
      'repair:delivery-failed-in-transaction',
      'repair:redispatched-in-transaction',
      'repair:committed',
    ]);
    expect([...CRASH_POINTS].filter((p) => !covered.has(p))).toEqual([]);
  });
});

describe('pairs an earlier release could leave out of step are mended in one pass', () => {
  it('row queued, delivery taken and never claimed (the worker died between the two)', async () => {
    const { jobId, sourceVersionId } = await newJob();
    const [taken] = await boss.fetch<QueueMessage>(QUEUE_NAMES.analysis, { batchSize: 1 });
    expect(taken.data.jobId).toBe(jobId);
    const at = await dbNow();
    expect(await repairJobs(boss, { now: plus(at, STALE - 1), jobIds: [jobId] })).toEqual([]);
    const repaired = await repairJobs(boss, { now: plus(at, STALE + PERIOD), jobIds: [jobId] });
    expect(repaired).toEqual([{ jobId, problem: 'taken, never claimed', repair: 'handed back' }]);
    await workUntilFinal(jobId);
    await expectSettled(jobId, sourceVersionId, { status: 'succeeded', attempts: 1 });
  });

  it('row queued with no delivery at all (written before rows named theirs)', async () => {
    const { jobId, sourceVersionId } = await newJob();
    // Take the delivery away (as if never sent) and clear the row's queue id.
    const row = await jobRow(jobId);
    await boss.deleteJob(QUEUE_NAMES.analysis, row.queue_job_id!);
    await db()('jobs').where({ id: jobId }).update({ queue_job_id: null });
    const repaired = await repairJobs(boss, { now: plus(await dbNow(), PERIOD + 10), jobIds: [jobId] });
    expect(repaired).toEqual([{ jobId, problem: 'no open delivery', repair: 'redelivered' }]);
    await workUntilFinal(jobId);
    await expectSettled(jobId, sourceVersionId, { status: 'succeeded', attempts: 1 });
  });

  it('row final, delivery still active (the worker died between writing the row and telling the queue)', async () => {
    const { jobId, sourceVersionId } = await newJob();
    const claimed = await claimNext(boss, 'analysis');
    expect(claimed?.row?.id).toBe(jobId);
    // An earlier release wrote a bad-input failure to the row alone, then died.
    await db()('jobs').where({ id: jobId }).update({ status: 'failed', error: 'model: bad input (injected)', finished_at: db().fn.now(), heartbeat_at: null });
    const repaired = await repairJobs(boss, { now: plus(await dbNow(), PERIOD + 10), jobIds: [jobId] });
    expect(repaired).toEqual([{ jobId, problem: 'final row, open delivery', repair: 'delivery completed' }]);
    await expectSettled(jobId, sourceVersionId, { status: 'failed', attempts: 1 });
  });
});
