// One process per worker (issue 17): `npm run worker` must leave no worker running after the process it
// started is killed, however hard; the process a supervisor starts (scripts/worker.sh) is the worker
// itself; and SIGTERM hands the running job back to the queue before the process exits 0.
//
// Processes are found through /proc (proc(5): field 5 of /proc/<pid>/stat is the process group), so the
// checks see every process the start made, including helpers, not just the ones this test spawned.
import { spawn, type ChildProcess } from 'node:child_process';
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/lib/db';
import { closeQueue, queue, QUEUE_NAMES } from '@/lib/jobs/queue';
import type { JobRow } from '@/lib/jobs/jobs';
import { registerUpload } from '@/lib/source-models';
import type { SessionUser } from '@/lib/auth';
import { makeUser, migrateTestDatabase } from './helpers';
import { kilnWallFiles, tempUploadsDir, uniqueName, uploadRequest } from './fixtures/model-uploads';

const ROOT = path.resolve(__dirname, '..', '..');
const started: ChildProcess[] = [];
let engineer: SessionUser;

beforeAll(async () => {
  process.env.MODESHELF_UPLOADS_DIR = tempUploadsDir();
  process.env.MODESHELF_QUEUE_PREFIX = `w${Date.now().toString(36)}-`;
  await migrateTestDatabase();
  const row = await makeUser({ role: 'engineer', label: 'workerproc' });
  engineer = { id: row.id, email: row.email, name: row.name, role: 'engineer' };
});

afterEach(() => {
  // Anything a failed check left behind goes, by its own process group.
  for (const child of started.splice(0)) {
    for (const pid of groupMembers(child.pid!)) {
      try {
        process.kill(pid, 'SIGKILL');
      } catch {
        /* gone */
      }
    }
  }
});

afterAll(async () => {
  await closeQueue();
  await closeDb();
});

function stat(pid: number): string[] | null {
  try {
    const text = readFileSync(`/proc/${pid}/stat`, 'utf8');
    return text.slice(text.lastIndexOf(')') + 2).split(' ');
  } catch {
    return null;
  }
}

/** Live processes (not zombies) of a process group. */
function groupMembers(pgid: number): number[] {
  const pids: number[] = [];
  for (const name of readdirSync('/proc')) {
    if (!/^\d+$/.test(name)) continue;
    const fields = stat(Number(name));
    if (fields && fields[0] !== 'Z' && Number(fields[2]) === pgid) pids.push(Number(name));
  }
  return pids;
}

function cmdline(pid: number): string {
  try {
    return readFileSync(`/proc/${pid}/cmdline`, 'utf8').replace(/\0/g, ' ').trim();
  } catch {
    return '';
  }
}

/** Starts a command in a process group of its own and waits for the worker's "started" line; returns the worker's pid. */
async function startInGroup(command: string, args: string[]): Promise<{ child: ChildProcess; workerPid: number; output: () => string }> {
  const child = spawn(command, args, {
    cwd: ROOT,
    detached: true,
    env: { ...process.env, MODESHELF_JOB_STALE_SECONDS: '3', MODESHELF_LINALG_THREADS: '1' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  started.push(child);
  let text = '';
  child.stdout!.on('data', (b: Buffer) => (text += b.toString()));
  child.stderr!.on('data', (b: Buffer) => (text += b.toString()));
  const deadline = Date.now() + 60_000;
  for (;;) {
    const m = /\[modeshelf worker [^\]]*:(\d+)\] started/.exec(text);
    if (m) return { child, workerPid: Number(m[1]), output: () => text };
    if (child.exitCode !== null || Date.now() > deadline) throw new Error(`the worker did not start:\n${text}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

async function untilGone(pgid: number, timeoutMs = 15_000): Promise<string[]> {
  const deadline = Date.now() + timeoutMs;
  let left = groupMembers(pgid);
  while (left.length && Date.now() < deadline) {
    await new Promise((r) => setTimeout(r, 100));
    left = groupMembers(pgid);
  }
  return left.map((pid) => `${pid} ${cmdline(pid)}`);
}

describe('one process per worker', () => {
  it('refuses to start, saying why, when its model store cannot be written and read back', async () => {
    // An S3 endpoint on a loopback port nothing listens on: the start-up store check fails at once.
    const child = spawn(path.join(ROOT, 'node_modules', '.bin', 'tsx'), [path.join(ROOT, 'scripts', 'worker.ts')], {
      cwd: ROOT,
      env: {
        ...process.env,
        MODESHELF_STORAGE: 's3',
        MODESHELF_S3_BUCKET: 'quillmere-models',
        MODESHELF_S3_ENDPOINT: 'http://127.0.0.1:9',
        MODESHELF_S3_ACCESS_KEY_ID: 'test',
        MODESHELF_S3_SECRET_ACCESS_KEY: 'test',
        MODESHELF_S3_FORCE_PATH_STYLE: '1',
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let text = '';
    child.stdout!.on('data', (b: Buffer) => (text += b.toString()));
    child.stderr!.on('data', (b: Buffer) => (text += b.toString()));
    const code = await new Promise<number | null>((resolve) => child.once('exit', (c) => resolve(c)));
    expect(code).toBe(1);
    expect(text).toMatch(/could not start: the store check could not write to s3:\/\/quillmere-models/);
    expect(text).not.toMatch(/\] started/);
  }, 60_000);

  it('scripts/worker.sh becomes the worker: the process a supervisor starts is the one that runs jobs', async () => {
    const { child, workerPid } = await startInGroup('bash', ['scripts/worker.sh']);
    expect(workerPid).toBe(child.pid);
    expect(cmdline(workerPid)).toMatch(/^node --import tsx scripts\/worker\.ts/);
    // Its only other process is tsx's esbuild service, a child that ends with it.
    for (const pid of groupMembers(child.pid!).filter((p) => p !== workerPid)) expect(cmdline(pid)).toMatch(/esbuild --service/);
    process.kill(workerPid, 'SIGKILL');
    expect(await untilGone(child.pid!)).toEqual([]);
  });

  it('killing the worker that `npm run worker` started leaves no process of it alive', async () => {
    const { child, workerPid } = await startInGroup('npm', ['run', 'worker']);
    expect(cmdline(workerPid)).toMatch(/node --import tsx scripts\/worker\.ts/);
    process.kill(workerPid, 'SIGKILL');
    expect(await untilGone(child.pid!)).toEqual([]);
  });

  it('killing `npm run worker` itself (SIGKILL, no chance to pass it on) leaves no worker running', async () => {
    const { child, workerPid, output } = await startInGroup('npm', ['run', 'worker']);
    expect(child.pid).not.toBe(workerPid);
    process.kill(child.pid!, 'SIGKILL');
    expect(await untilGone(child.pid!)).toEqual([]);
    expect(output()).toMatch(/stopped/); // it stopped itself, handing back what it ran
  });

  it('SIGTERM hands the running job back (row queued, delivery to be retried) and exits 0', async () => {
    const { child, workerPid } = await startInGroup('bash', ['scripts/worker.sh']);
    // 240 states: an analysis long enough to be caught running.
    const upload = await registerUpload(uploadRequest({ name: uniqueName('Handed back') }, kilnWallFiles(20, 12)), engineer);
    const deadline = Date.now() + 90_000;
    let row: JobRow | undefined;
    do {
      await new Promise((r) => setTimeout(r, 100));
      row = await db()<JobRow>('jobs').where({ id: upload.job.id }).first();
    } while (row?.status !== 'running' && Date.now() < deadline);
    expect(row?.status).toBe('running');
    const exited = new Promise<number | null>((resolve) => child.once('exit', (code) => resolve(code)));
    process.kill(workerPid, 'SIGTERM');
    expect(await exited).toBe(0);
    const after = (await db()<JobRow>('jobs').where({ id: upload.job.id }).first())!;
    expect(after.status).toBe('queued');
    expect(after.stage).toMatch(/the worker got SIGTERM/);
    const boss = await queue('web');
    const delivery = await boss.getJobById(QUEUE_NAMES.analysis, after.queue_job_id!);
    expect(delivery?.state).toBe('retry');
    expect(await db()('analyses').where({ source_version_id: upload.version.id })).toHaveLength(0);
    expect(await untilGone(child.pid!)).toEqual([]);
  });
});
