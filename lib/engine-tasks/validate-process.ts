// Runs the upload check (validate-task.ts) in a child process of the web server and returns its outcome.
// Parsing a model means holding its text and its dense matrices; doing it in a short-lived process keeps
// that memory out of the server, which only ever streams uploads to disk (lib/uploads/receive.ts).
import { spawn } from 'node:child_process';
import { createRequire } from 'node:module';
import path from 'node:path';
import { repoRoot } from '../uploads/settings';
import type { ModelFile } from './model-files';
import type { SignalOutcome, ValidationOutcome } from './validate-task';
import type { ArchiveOutcome } from '../uploads/archive';

export type CheckRequest =
  | { kind: 'model'; files: ModelFile[] }
  | { kind: 'archive'; archive: { path: string; name: string }; outDir: string; maxBytes: number }
  | { kind: 'signal'; file: { path: string; name: string }; inputs: number };

/** A zip archive unpacked (its members on disk, lib/uploads/archive.ts) and, when that worked, its model checked. */
export interface ArchiveCheck {
  archive: ArchiveOutcome;
  check: ValidationOutcome | null;
}

/** Heap of the checking process, MiB: room for the text of a maximal upload and its parsed matrices. */
const CHECK_HEAP_MB = 4096;
const CHECK_TIMEOUT_MS = 10 * 60 * 1000;

/**
 * Checks at once per server (MODESHELF_CHECK_CONCURRENCY, default 2): twenty uploads arriving together
 * would otherwise start twenty parsers, each holding its model's text and matrices (bench:web measured
 * about 1 GiB for twenty 100-state models); the rest wait their turn.
 */
function checkSlots(): number {
  const n = Number(process.env.MODESHELF_CHECK_CONCURRENCY);
  return Number.isInteger(n) && n > 0 ? n : 2;
}

let running = 0;
const waiting: (() => void)[] = [];

export async function inSlot<T>(work: () => Promise<T>): Promise<T> {
  // A finished check hands its slot straight to the next in line, so the count never overshoots.
  if (running >= checkSlots()) await new Promise<void>((resolve) => waiting.push(resolve));
  else running++;
  try {
    return await work();
  } finally {
    const next = waiting.shift();
    if (next) next();
    else running--;
  }
}

function runCheck<T>(request: CheckRequest): Promise<T> {
  return inSlot(() => spawnCheck<T>(request));
}

function spawnCheck<T>(request: CheckRequest): Promise<T> {
  const root = repoRoot();
  const require = createRequire(path.join(root, 'package.json'));
  const args = [
    `--max-old-space-size=${CHECK_HEAP_MB}`,
    '--require',
    require.resolve('tsx/cjs'),
    path.join(root, 'lib', 'engine-tasks', 'validate-cli.ts'),
    JSON.stringify(request),
  ];
  return new Promise((resolve, reject) => {
    // One linear-algebra thread: a check parses; it does not factorise anything large.
    const child = spawn(process.execPath, args, {
      cwd: root,
      env: { ...process.env, MODESHELF_LINALG_THREADS: '1' },
      stdio: ['ignore', 'pipe', 'pipe'],
      timeout: CHECK_TIMEOUT_MS,
    });
    const out: Buffer[] = [];
    const err: Buffer[] = [];
    child.stdout.on('data', (b: Buffer) => out.push(b));
    child.stderr.on('data', (b: Buffer) => err.push(b));
    child.on('error', reject);
    child.on('close', (code, signal) => {
      const text = Buffer.concat(out).toString('utf8');
      if (code === 0 && text) {
        try {
          resolve(JSON.parse(text) as T);
          return;
        } catch {
          // fall through to the failure below
        }
      }
      const detail = Buffer.concat(err).toString('utf8').trim().split('\n').slice(-3).join(' ');
      reject(new Error(`the model check stopped (${signal ?? `exit ${code}`})${detail ? `: ${detail}` : ''}`));
    });
  });
}

export function validateInChildProcess(files: readonly ModelFile[]): Promise<ValidationOutcome> {
  return runCheck<ValidationOutcome>({ kind: 'model', files: [...files] });
}

/** Unpacks a zip archive of model files into `outDir` and checks the model they make. */
export function checkArchiveInChildProcess(archive: { path: string; name: string }, outDir: string, maxBytes: number): Promise<ArchiveCheck> {
  return runCheck<ArchiveCheck>({ kind: 'archive', archive, outDir, maxBytes });
}

export function validateSignalInChildProcess(file: { path: string; name: string }, inputs: number): Promise<SignalOutcome> {
  return runCheck<SignalOutcome>({ kind: 'signal', file, inputs });
}
