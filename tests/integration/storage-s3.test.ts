// Uploads with the S3 store (issue 14, "Storage"): against the real PostgreSQL and s3rver started here on a
// loopback port. An accepted upload's files go to the bucket under their SHA-256 and nowhere on the web
// server's disk; a worker's engine task reads them back from the bucket into its own scratch folder, in a
// thread and in real worker processes (scripts/worker.ts) that have their own scratch and uploads folders,
// one of them killed mid-job while the other finishes with nothing lost or half-written; a refused upload, or one the store will not take, leaves no row and no object.
//
// Expected values come from the inputs: digests by node:crypto over the same bytes, the poles of the
// block-diagonal test model by hand (−0.2 ± 5j from its 2×2 block, −1 from its last entry), its DC gain
// D − C A⁻¹ B by hand.
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { ListObjectsV2Command, S3Client } from '@aws-sdk/client-s3';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/lib/db';
import { closeQueue } from '@/lib/jobs/queue';
import { getJob, type JobView } from '@/lib/jobs/jobs';
import { modelFilesOfVersion, registerUpload } from '@/lib/source-models';
import { ApiError } from '@/lib/http';
import { ModelError } from '@/reduction/index';
import type { SessionUser } from '@/lib/auth';
import { fetchModelFiles, loadModel } from '@/lib/engine-tasks/model-files';
import { runEngineTask } from '@/lib/engine-tasks/run-task';
import { ENGINE_VERSION } from '@/lib/engine-tasks/engine-version';
import type { AnalysisRecord } from '@/lib/engine-tasks/records';
import { makeUser, migrateTestDatabase } from './helpers';
import { SMALL, kilnWallFiles, listFiles, matrixMarketArray, rowsBy, sha256, tempUploadsDir, uniqueName, uploadRequest, type UploadFile } from './fixtures/model-uploads';
import { startS3Fake, type S3Fake } from '../fixtures/storage/s3-fake';

let fake: S3Fake;
let uploads = '';
let engineer: SessionUser;
const saved: Record<string, string | undefined> = {};
const scratchRoots: string[] = [];

function setEnv(vars: Record<string, string>) {
  for (const [k, v] of Object.entries(vars)) {
    if (!(k in saved)) saved[k] = process.env[k];
    process.env[k] = v;
  }
}

function scratch(label: string): string {
  const dir = mkdtempSync(path.join(os.tmpdir(), `modeshelf-scratch-${label}-`));
  scratchRoots.push(dir);
  return dir;
}

async function bucketKeys(): Promise<string[]> {
  const client = new S3Client({
    region: 'us-east-1',
    endpoint: fake.endpoint,
    forcePathStyle: true,
    credentials: { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' },
  });
  const out = await client.send(new ListObjectsV2Command({ Bucket: fake.bucket }));
  client.destroy();
  return (out.Contents ?? []).map((c) => c.Key!).sort();
}

const matrixFiles = (m: typeof SMALL): UploadFile[] =>
  (['A', 'B', 'C', 'D'] as const).map((role) => ({ field: role, name: `${role}.mtx`, text: matrixMarketArray(m[role]) }));

beforeAll(async () => {
  fake = await startS3Fake();
  uploads = tempUploadsDir();
  setEnv({
    ...fake.env,
    MODESHELF_UPLOADS_DIR: uploads,
    // The scratch folder of this process; each "worker" below gets another one.
    MODESHELF_SCRATCH_DIR: scratch('web'),
    MODESHELF_QUEUE_PREFIX: `t${Date.now().toString(36)}-s3-`,
  });
  await migrateTestDatabase();
  const row = await makeUser({ role: 'engineer', label: 's3-uploader' });
  engineer = { id: row.id, email: row.email, name: row.name, role: 'engineer' };
});

const workers: ChildProcess[] = [];

/** A worker process as on another machine: its own scratch folder and an uploads folder of its own (empty). */
function startWorker(scratchDir: string, lines: string[]): ChildProcess {
  const root = path.resolve(__dirname, '..', '..');
  const child = spawn(path.join(root, 'node_modules', '.bin', 'tsx'), [path.join(root, 'scripts', 'worker.ts')], {
    cwd: root,
    detached: true, // its own process group, so stopping it takes tsx's node child too
    env: {
      ...process.env,
      MODESHELF_SCRATCH_DIR: scratchDir,
      MODESHELF_UPLOADS_DIR: scratch('worker-own-uploads'),
      MODESHELF_LINALG_THREADS: '1',
      MODESHELF_JOB_STALE_SECONDS: '3',
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout?.on('data', (b: Buffer) => lines.push(b.toString()));
  child.stderr?.on('data', (b: Buffer) => lines.push(b.toString()));
  workers.push(child);
  return child;
}

function stop(child: ChildProcess, signal: NodeJS.Signals = 'SIGTERM'): Promise<void> {
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

const finished = (j: JobView) => j.status === 'succeeded' || j.status === 'failed';

async function waitForJob(id: string, lines: string[], timeoutMs = 120_000, until: (j: JobView) => boolean = finished): Promise<JobView> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const job = await getJob(id);
    if (until(job)) return job;
    if (Date.now() > deadline) throw new Error(`job ${id} is still ${job.status} after ${timeoutMs} ms; worker log:\n${lines.join('').slice(-2000)}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

afterEach(async () => {
  await Promise.all(workers.splice(0).map((w) => stop(w)));
});

afterAll(async () => {
  await Promise.all(workers.splice(0).map((w) => stop(w)));
  await closeQueue();
  await closeDb();
  await fake?.close();
  for (const [k, v] of Object.entries(saved)) {
    if (v === undefined) delete process.env[k];
    else process.env[k] = v;
  }
  for (const dir of [uploads, ...scratchRoots]) rmSync(dir, { recursive: true, force: true });
});

describe('uploads with the S3 store', () => {
  it('stores the files in the bucket by SHA-256, and a worker reads them back from another scratch folder', async () => {
    const files = matrixFiles(SMALL);
    const result = await registerUpload(uploadRequest({ name: uniqueName('Kiln burner loop'), description: 'S3 store' }, files), engineer);
    expect(result.version).toMatchObject({ number: 1, states: 3, inputs: 1, outputs: 1 });

    const row = await db()('source_versions').where({ id: result.version.id }).first();
    const expectedKeys = files.map((f) => `sha256/${sha256(f.text).slice(0, 2)}/${sha256(f.text)}`);
    expect(row.files.map((f: { storageKey: string }) => f.storageKey)).toEqual(expectedKeys);
    for (const key of expectedKeys) expect(await bucketKeys()).toContain(key);
    // The web server's folder holds no stored file: only its (now empty) temporary folder.
    expect(listFiles(uploads)).toEqual([]);

    // What a job hands the worker: keys, not paths.
    const refs = modelFilesOfVersion(row);
    expect(refs.map((r) => ('storageKey' in r ? r.storageKey : null))).toEqual(expectedKeys);
    expect(refs.some((r) => 'path' in r)).toBe(false);

    // The model loader on "another machine": fetch into a scratch folder of its own, then load.
    const workerA = scratch('worker-a');
    const local = await fetchModelFiles(refs, { scratchDir: workerA });
    local.forEach((f, k) => {
      expect(f.path).toBe(path.join(workerA, expectedKeys[k]));
      expect(readFileSync(f.path, 'utf8')).toBe(files[k].text);
    });
    const { model, format } = loadModel(local);
    expect(format).toBe('matrix-market');
    expect(Array.from({ length: 3 }, (_, i) => Array.from({ length: 3 }, (_, j) => model.A.data[i * 3 + j]))).toEqual(SMALL.A);

    // The engine task itself, in a worker thread whose scratch folder is a third one, with the web server's
    // uploads folder gone: the analysis can only have read the bucket.
    rmSync(uploads, { recursive: true, force: true });
    const workerB = scratch('worker-b');
    process.env.MODESHELF_SCRATCH_DIR = workerB;
    const analysis = await runEngineTask<AnalysisRecord>({ task: 'analysis', files: refs, engineVersion: ENGINE_VERSION });
    expect(analysis).toMatchObject({ states: 3, inputs: 1, outputs: 1 });
    const poles = analysis.poles.re.map((re, k) => [re, Math.abs(analysis.poles.im[k])]).sort((a, b) => a[0] - b[0] || a[1] - b[1]);
    expect(poles.length).toBe(3);
    expect(poles[0][0]).toBeCloseTo(-1, 10);
    expect(poles[0][1]).toBeCloseTo(0, 10);
    for (const p of poles.slice(1)) {
      expect(p[0]).toBeCloseTo(-0.2, 10);
      expect(p[1]).toBeCloseTo(5, 10);
    }
    expect(listFiles(workerB).sort()).toEqual([...expectedKeys].sort());
  });

  it('a worker process with its own scratch folder runs the analysis from the bucket alone', async () => {
    const files = matrixFiles({ ...SMALL, D: [[0.25]] });
    const result = await registerUpload(uploadRequest({ name: uniqueName('Kiln burner, remote worker') }, files), engineer);
    // The web server's folder is gone before the worker starts: the bucket is the only place the files are.
    rmSync(uploads, { recursive: true, force: true });
    const workerScratch = scratch('worker-process');
    const lines: string[] = [];
    startWorker(workerScratch, lines);
    const job = await waitForJob(result.job.id, lines);
    expect(job.error).toBeNull();
    expect(job.status).toBe('succeeded');
    const analysis = await db()('analyses').where({ source_version_id: result.version.id }).first('result');
    expect((analysis.result as AnalysisRecord).states).toBe(3);
    // D − C A⁻¹ B by hand: the 2×2 block's inverse is [[−0.2, −5], [5, −0.2]] / 25.04, the last entry −1,
    // so C A⁻¹ B = −0.2/25.04 − 1 and the DC gain is 0.25 + 0.2/25.04 + 1.
    const dc = (analysis.result as AnalysisRecord).zeroFrequencyGain;
    expect(dc.defined).toBe(true);
    expect(dc.defined && dc.value[0][0]).toBeCloseTo(0.25 + 0.2 / 25.04 + 1, 10);
    const keys = files.map((f) => `sha256/${sha256(f.text).slice(0, 2)}/${sha256(f.text)}`);
    // (The worker also runs the analysis queued by the first upload above, so its scratch may hold more.)
    const fetched = listFiles(workerScratch);
    for (const key of keys) expect(fetched).toContain(key);
    expect(fetched.filter((f) => !f.startsWith('sha256/'))).toEqual([]);
  });

  it('two workers share only the bucket: one killed mid-job, the other fetches into its own scratch and finishes', async () => {
    const files = kilnWallFiles(20, 12); // 240 states: an analysis long enough to be caught in the middle
    const result = await registerUpload(uploadRequest({ name: uniqueName('Kiln wall, two workers') }, files), engineer);
    rmSync(uploads, { recursive: true, force: true });
    const [scratchA, scratchB] = [scratch('killed'), scratch('survivor')];
    const linesA: string[] = [];
    const linesB: string[] = [];
    const first = startWorker(scratchA, linesA);
    const running = await waitForJob(result.job.id, linesA, 120_000, (j) => j.status === 'running' && j.fraction > 0);
    expect(running.attempts).toBe(1);
    await stop(first, 'SIGKILL');
    expect(await db()('analyses').where({ source_version_id: result.version.id })).toHaveLength(0);

    startWorker(scratchB, linesB);
    const job = await waitForJob(result.job.id, linesB, 180_000);
    expect(job, linesB.join('').slice(-3000)).toMatchObject({ status: 'succeeded', attempts: 2, error: null });
    const analyses = await db()('analyses').where({ source_version_id: result.version.id });
    expect(analyses).toHaveLength(1);
    expect((analyses[0].result as AnalysisRecord).states).toBe(240);

    const keys = files.map((f) => `sha256/${sha256(f.text).slice(0, 2)}/${sha256(f.text)}`);
    const fetchedB = listFiles(scratchB);
    for (const key of keys) expect(fetchedB).toContain(key);
    // Whatever either worker kept is whole: every copy hashes to its key, and no temporary file is left.
    for (const [dir, list] of [[scratchA, listFiles(scratchA)], [scratchB, fetchedB]] as const) {
      expect(list.filter((f) => !f.startsWith('sha256/'))).toEqual([]);
      for (const f of list) expect(`sha256/${sha256(readFileSync(path.join(dir, f))).slice(0, 2)}/${sha256(readFileSync(path.join(dir, f)))}`).toBe(f);
    }
  });

  it('a refused model leaves no row and no object in the bucket', async () => {
    const before = await bucketKeys();
    const rows = await rowsBy(engineer.id);
    const bad = matrixFiles(SMALL).map((f) => (f.field === 'B' ? { ...f, text: matrixMarketArray([[1], [0]]) } : f));
    const err = await registerUpload(uploadRequest({ name: uniqueName('Mismatched burner') }, bad), engineer).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ApiError);
    expect((err as ApiError).status).toBe(422);
    expect(await bucketKeys()).toEqual(before);
    expect(await rowsBy(engineer.id)).toEqual(rows);
  });

  it('a store that refuses the write answers 503 naming the file, with no row, no object and no temporary file', async () => {
    const rows = await rowsBy(engineer.id);
    const before = await bucketKeys();
    const bucket = process.env.MODESHELF_S3_BUCKET;
    process.env.MODESHELF_S3_BUCKET = 'no-such-quillmere-bucket';
    try {
      const files = matrixFiles({ ...SMALL, D: [[0.5]] });
      const err = await registerUpload(uploadRequest({ name: uniqueName('Unstorable burner') }, files), engineer).catch((e: unknown) => e);
      expect(err).toBeInstanceOf(ApiError);
      expect((err as ApiError).status).toBe(503);
      expect((err as ApiError).code).toBe('storage_unavailable');
      expect((err as ApiError).field).toBe('A');
      expect((err as ApiError).message).toMatch(/could not be stored/);
    } finally {
      process.env.MODESHELF_S3_BUCKET = bucket;
    }
    expect(await rowsBy(engineer.id)).toEqual(rows);
    expect(await bucketKeys()).toEqual(before);
    expect(listFiles(uploads)).toEqual([]);
  });

  it('a worker pointed at a store without the file fails the task with a message naming the file and the store', async () => {
    const refs = [
      { role: 'A' as const, name: 'A.mtx', storageKey: `sha256/00/${'0'.repeat(64)}` },
      { role: 'B' as const, name: 'B.mtx', storageKey: `sha256/00/${'0'.repeat(64)}` },
      { role: 'C' as const, name: 'C.mtx', storageKey: `sha256/00/${'0'.repeat(64)}` },
    ];
    const err = await fetchModelFiles(refs, { scratchDir: scratch('worker-c') }).catch((e: unknown) => e);
    // Bad input as far as the job is concerned (a retry would not bring the file back): the engine's error.
    expect(err).toBeInstanceOf(ModelError);
    expect(err).toMatchObject({ code: 'unreadable_file', field: 'A' });
    expect((err as Error).message).toMatch(/^A\.mtx: the stored file cannot be read/);
    expect((err as Error).message).toContain(`s3://${fake.bucket}/`);
    expect((err as Error).message).toMatch(/same store/);
  });
});
