// Background jobs end to end against the real PostgreSQL, with real worker processes (scripts/worker.ts)
// on this file's own queues (MODESHELF_QUEUE_PREFIX): an analysis reports its stages and finishes; a worker
// killed in the middle of a job (SIGKILL, no chance to clean up) loses nothing: the job is handed back and
// another worker finishes it, with exactly one analysis written; a failed job shows its error and can be
// retried; a reduction registers a draft version whose digest and figures check out.
//
// References beside the expected values: the canonical digest is recomputed here with node:crypto (FIPS
// 180-4 SHA-256) over JSON.stringify({A,B,C,D}); balanced truncation's error lies between σ_{r+1} and
// 2Σ_{i>r}σ_i (Glover, "All optimal Hankel-norm approximations of linear multivariable systems and their
// L∞-error bounds", Int. J. Control 39(6), 1984, Theorem 7.2 and Lemma 7.1; Enns 1984).
import { spawn, type ChildProcess } from 'node:child_process';
import { createHash } from 'node:crypto';
import { renameSync } from 'node:fs';
import path from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/lib/db';
import { closeQueue } from '@/lib/jobs/queue';
import { getJob, jobSubject, retryJob, type JobView } from '@/lib/jobs/jobs';
import { registerUpload } from '@/lib/source-models';
import { requestInputResponse, requestReduction } from '@/lib/reduced-models';
import { storagePath } from '@/lib/uploads/store';
import type { SessionUser } from '@/lib/auth';
import type { AnalysisRecord } from '@/lib/engine-tasks/records';
import { makeUser, migrateTestDatabase } from './helpers';
import { firstOrderJson, kilnWallFiles, listFiles, tempUploadsDir, uniqueName, uploadRequest } from './fixtures/model-uploads';

const ROOT = path.resolve(__dirname, '..', '..');
let uploads = '';
let engineer: SessionUser;
const workers: ChildProcess[] = [];
const logs = new Map<ChildProcess, string[]>();

beforeAll(async () => {
  uploads = tempUploadsDir();
  process.env.MODESHELF_UPLOADS_DIR = uploads;
  process.env.MODESHELF_QUEUE_PREFIX = `j${Date.now().toString(36)}-`;
  await migrateTestDatabase();
  const row = await makeUser({ role: 'engineer', label: 'jobs' });
  engineer = { id: row.id, email: row.email, name: row.name, role: 'engineer' };
});

function startWorker(args: string[] = []): ChildProcess {
  const child = spawn(path.join(ROOT, 'node_modules', '.bin', 'tsx'), [path.join(ROOT, 'scripts', 'worker.ts'), ...args], {
    cwd: ROOT,
    detached: true, // its own process group, so the kill below takes tsx's node child too
    env: {
      ...process.env,
      MODESHELF_JOB_STALE_SECONDS: '3',
      MODESHELF_LINALG_THREADS: '1',
    },
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

async function waitFor(jobId: string, until: (j: JobView) => boolean, timeoutMs = 90_000, onPoll?: (j: JobView) => void): Promise<JobView> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const job = await getJob(jobId);
    onPoll?.(job);
    if (until(job)) return job;
    if (Date.now() > deadline) {
      const tail = [...logs.values()].map((l) => l.join('').slice(-1500)).join('\n---\n');
      throw new Error(`job ${jobId} is still ${job.status} (${job.stage}) after ${timeoutMs} ms; worker logs:\n${tail}`);
    }
    await new Promise((r) => setTimeout(r, 100));
  }
}

const done = (j: JobView) => j.status === 'succeeded' || j.status === 'failed';

describe('background jobs', () => {
  it('runs an analysis, reporting its stages with a rising fraction, and writes one analysis', async () => {
    startWorker();
    const upload = await registerUpload(uploadRequest({ name: uniqueName('Analysed') }, [{ field: 'model', name: 'm.json', text: firstOrderJson() }]), engineer);
    const seen: { stage: string; fraction: number }[] = [];
    const job = await waitFor(upload.job.id, done, 90_000, (j) => j.status === 'running' && seen.push({ stage: j.stage, fraction: j.fraction }));
    expect(job).toMatchObject({ status: 'succeeded', stage: 'Done', fraction: 1, attempts: 1, error: null });
    for (let k = 1; k < seen.length; k++) expect(seen[k].fraction).toBeGreaterThanOrEqual(seen[k - 1].fraction);
    const analyses = await db()('analyses').where({ source_version_id: upload.version.id });
    expect(analyses).toHaveLength(1);
    const record = analyses[0].result as AnalysisRecord;
    expect(record).toMatchObject({ states: 3, inputs: 1, outputs: 1, stable: true, stablePoles: 3 });
    // poles −0.2 ± 5j and −1 (the matrix is block diagonal): stiffness ratio 1/0.2 = 5
    expect(record.stiffnessRatio).toBeCloseTo(5, 10);
  });

  it('hands back the job of a worker killed mid-run; another worker finishes it, writing one analysis', async () => {
    const first = startWorker();
    // 240 states: long enough an analysis to be caught in the middle.
    const upload = await registerUpload(uploadRequest({ name: uniqueName('Killed mid-run') }, kilnWallFiles(20, 12)), engineer);
    const running = await waitFor(upload.job.id, (j) => j.status === 'running' && j.fraction > 0);
    expect(running.attempts).toBe(1);
    await kill(first, 'SIGKILL');
    const orphan = await db()('jobs').where({ id: upload.job.id }).first();
    expect(orphan.status).toBe('running'); // nobody told the database: the worker died
    expect(await db()('analyses').where({ source_version_id: upload.version.id })).toHaveLength(0);

    const second = startWorker();
    const job = await waitFor(upload.job.id, done, 180_000);
    expect(job).toMatchObject({ status: 'succeeded', attempts: 2 });
    const row = await db()('jobs').where({ id: upload.job.id }).first();
    expect(row.attempt).toBe(2);
    expect(row.worker).not.toBe(orphan.worker);
    const analyses = await db()('analyses').where({ source_version_id: upload.version.id });
    expect(analyses).toHaveLength(1);
    expect((analyses[0].result as AnalysisRecord).states).toBe(240);
    expect(logs.get(second)!.join('')).toMatch(/handed back 1 job/);
  });

  it('shows a failed job with its error, and retries it on request', async () => {
    const upload = await registerUpload(uploadRequest({ name: uniqueName('Missing file') }, [{ field: 'model', name: 'm.json', text: firstOrderJson({ D: [[0.75]] }) }]), engineer);
    const stored = storagePath((await db()('source_versions').where({ id: upload.version.id }).first()).files[0].storageKey);
    renameSync(stored, `${stored}.away`);
    startWorker();
    const failed = await waitFor(upload.job.id, done);
    // Bad input is not retried by the queue: it would fail the same way.
    expect(failed).toMatchObject({ status: 'failed', attempts: 1 });
    expect(failed.error).toMatch(/^model: m\.json: the stored file cannot be read/);

    renameSync(`${stored}.away`, stored);
    const retried = await retryJob(upload.job.id, engineer);
    expect(retried.status).toBe('queued');
    const job = await waitFor(upload.job.id, done);
    expect(job).toMatchObject({ status: 'succeeded', attempts: 2, error: null });
    const audit = await db()('audit_events').where({ subject_type: 'job', subject_id: upload.job.id, action: 'job.retried' });
    expect(audit).toHaveLength(1);
    await expect(retryJob(upload.job.id, engineer)).rejects.toMatchObject({ status: 409, code: 'not_failed' });
  });

  it('refuses a job whose estimated memory exceeds the worker budget, naming both figures; the worker lives on', async () => {
    const upload = await registerUpload(uploadRequest({ name: uniqueName('Memory guard') }, [{ field: 'model', name: 'm.json', text: firstOrderJson({ D: [[0.75]] }) }]), engineer);
    // 64 MiB is below the estimate of any engine task (the runtime alone is counted at 200 MiB).
    const limited = startWorker(['--memory', '64']);
    const failed = await waitFor(upload.job.id, done);
    expect(failed).toMatchObject({ status: 'failed', attempts: 1 });
    expect(failed.error).toMatch(/needs an estimated \d+ MiB, more than this worker's memory budget of 64 MiB/);
    await new Promise((r) => setTimeout(r, 500));
    expect(limited.exitCode).toBeNull();
    expect(limited.signalCode).toBeNull();
    await kill(limited, 'SIGTERM');
    // A worker with the default budget runs it.
    startWorker();
    await retryJob(upload.job.id, engineer);
    expect(await waitFor(upload.job.id, done)).toMatchObject({ status: 'succeeded' });
  });

  it('registers a reduction as a draft version with its recipe, digest, lineage and accuracy report', async () => {
    startWorker();
    const upload = await registerUpload(uploadRequest({ name: uniqueName('To reduce') }, [{ field: 'model', name: 'm.json', text: firstOrderJson({ D: [[0.1]] }) }]), engineer);
    await waitFor(upload.job.id, done);
    const request = await requestReduction(
      {
        sourceVersionId: upload.version.id,
        recipe: { method: 'balanced', orderRule: 'order', order: 2, modalSelection: 'dominance', acceptance: { minFrequency: 0.1, maxFrequency: 1, maxError: 0.5 } },
        target: { kind: 'new', name: uniqueName('Two-state ROM'), description: 'test' },
      },
      engineer,
    );
    const job = await waitFor(request.job.id, done);
    expect(job.status).toBe('succeeded');
    const version = await db()('reduced_versions').where({ id: job.result!.reducedVersionId }).first();
    expect(version).toMatchObject({ status: 'draft', number: 1, order: 2, recipe_id: request.recipeId, source_version_id: upload.version.id, author_id: engineer.id });
    expect(version.engine_version).toMatch(/^modeshelf-engine \d+\.\d+\.\d+/);
    expect(version.input_checksum).toBe(upload.version.checksum);
    const { A, B, C, D } = version.matrices;
    expect(version.matrices_sha256).toBe(createHash('sha256').update(JSON.stringify({ A, B, C, D })).digest('hex'));
    expect(A).toHaveLength(2);
    expect(D).toEqual([[0.1]]); // truncation keeps D

    const report = await db()('accuracy_reports').where({ reduced_version_id: version.id }).first();
    const analysis = (await db()('analyses').where({ source_version_id: upload.version.id }).first()).result as AnalysisRecord;
    const sigma = analysis.hankelSingularValues;
    const tail = 2 * sigma.slice(2).reduce((s, x) => s + x, 0);
    expect(report.figures.errorBound).toBeCloseTo(tail, 12);
    expect(report.figures.hInfinityError).toBeGreaterThanOrEqual(sigma[2] * (1 - 1e-8));
    expect(report.figures.hInfinityError).toBeLessThanOrEqual(tail * (1 + 1e-8));
    expect(report.acceptance_passed).toBe(report.figures.acceptance.worstError <= 0.5);
    // The curves the comparison page draws: a peak at ω > 0 is on the grid; a peak at ω = 0 is the DC error.
    const peak = report.figures.hInfinityErrorFrequency;
    if (peak > 0) expect(report.curves.frequency.frequencies).toContain(peak);
    else expect(report.figures.zeroFrequencyGainError).toBeCloseTo(report.figures.hInfinityError, 9);
    expect(report.curves.step.full).toHaveLength(1);
    expect(report.curves.step.full[0][0]).toHaveLength(report.curves.step.t.length);

    // A second run into the same reduced model is its v2, following v1. The slowest mode is the pair
    // −0.2 ± 5j, so order 1 is raised to 2 rather than splitting it (reduction/order.ts).
    const again = await requestReduction(
      { sourceVersionId: upload.version.id, recipe: { method: 'modal', orderRule: 'order', order: 1, modalSelection: 'slowest' }, target: { kind: 'existing', reducedModelId: version.reduced_model_id } },
      engineer,
    );
    const second = await waitFor(again.job.id, done);
    expect(second.status).toBe('succeeded');
    const v2 = await db()('reduced_versions').where({ id: second.result!.reducedVersionId }).first();
    expect(v2).toMatchObject({ number: 2, predecessor_id: version.id, reduced_model_id: version.reduced_model_id, order: 2 });
    const notes = (await db()('accuracy_reports').where({ reduced_version_id: v2.id }).first()).figures.notes as string[];
    expect(notes.join(' ')).toMatch(/order 1 would split a complex pair; raised to 2/);
  });

  it('simulates both models for an uploaded input signal, and refuses a signal with the wrong columns', async () => {
    startWorker();
    const upload = await registerUpload(uploadRequest({ name: uniqueName('Signal') }, [{ field: 'model', name: 'm.json', text: firstOrderJson({ D: [[0.2]] }) }]), engineer);
    await waitFor(upload.job.id, done);
    const romName = uniqueName('Signal ROM');
    const reduction = await requestReduction(
      { sourceVersionId: upload.version.id, recipe: { method: 'residualization', orderRule: 'order', order: 2, modalSelection: 'dominance' }, target: { kind: 'new', name: romName, description: '' } },
      engineer,
    );
    const reduced = await waitFor(reduction.job.id, done);
    const reducedVersionId = String(reduced.result!.reducedVersionId);
    const url = 'http://127.0.0.1/api/uploads/input-signals';

    const before = listFiles(uploads);
    const wrong = requestInputResponse(uploadRequest({ reducedVersionId }, [{ field: 'signal', name: 'u.csv', text: 'time,u1,u2\n0,1,1\n1,0,0\n' }], url), engineer);
    await expect(wrong).rejects.toMatchObject({ status: 422, field: 'signal', message: expect.stringMatching(/row 2 has 3 columns; expected 2/) });
    expect(listFiles(uploads)).toEqual(before);

    // a pulse of height 2 from t = 1 to t = 3, then nothing
    const { job } = await requestInputResponse(uploadRequest({ reducedVersionId }, [{ field: 'signal', name: 'pulse.csv', text: 'time,u\n0,0\n1,2\n3,0\n' }], url), engineer);
    const finished = await waitFor(job.id, done);
    expect(finished.status).toBe('succeeded');
    // The job page names the version the job worked on, with the version's page.
    expect(await jobSubject(finished)).toEqual({ words: `${romName} v1`, href: reduced.result!.url });
    const result = finished.result as { t: number[]; full: number[][]; reduced: number[][] };
    expect(result.full).toHaveLength(1);
    expect(result.full[0]).toHaveLength(result.t.length);
    // Before the pulse the model is at rest and D·u = 0, so the output is exactly 0 in both models.
    const k = result.t.findIndex((t) => t >= 0.5);
    expect(result.full[0][k]).toBe(0);
    expect(result.reduced[0][k]).toBe(0);
    // The H∞ norm is the L2-induced gain (Zhou, Doyle & Glover, "Robust and Optimal Control", 1996, §4.3), so
    // ‖y − yr‖₂ ≤ ‖G − Gr‖∞·‖u‖₂ with ‖u‖₂ = √(2²·2 s); the output error's L2 norm is taken by the trapezoid
    // rule over the record (5 % slack for the quadrature).
    const hInfinityError = (await db()('accuracy_reports').where({ reduced_version_id: reducedVersionId }).first()).figures.hInfinityError as number;
    let energy = 0;
    for (let i = 1; i < result.t.length; i++) {
      const e0 = result.full[0][i - 1] - result.reduced[0][i - 1];
      const e1 = result.full[0][i] - result.reduced[0][i];
      energy += ((e0 * e0 + e1 * e1) / 2) * (result.t[i] - result.t[i - 1]);
    }
    expect(Math.sqrt(energy)).toBeLessThanOrEqual(1.05 * hInfinityError * Math.sqrt(2 * 2 * 2) + 1e-12);
    expect(Math.sqrt(energy)).toBeGreaterThan(0);
  });
});
