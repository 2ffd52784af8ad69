// Runs the upload check (validate-task.ts) in a child process of the web server and returns its outcome.
// Parsing a model means holding its text and its dense matrices; doing it in a short-lived process keeps
// that memory out of the server, which only ever streams uploads to disk (lib/uploads/receive.ts).
import { spawn } from 'node:child_process';
import { createRequire } from 'node:module';
import path from 'node:path';
import { repoRoot } from '../uploads/settings';
import type { ModelFile } from './model-files';
import type { SignalOutcome, ValidationOutcome } from './validate-task';

export type CheckRequest =
  | { kind: 'model'; files: ModelFile[] }
  | { kind: 'signal'; file: { path: string; name: string }; inputs: number };

/** Heap of the checking process, MiB: room for the text of a maximal upload and its parsed matrices. */
const CHECK_HEAP_MB = 4096;
const CHECK_TIMEOUT_MS = 10 * 60 * 1000;

function runCheck<T>(request: CheckRequest): Promise<T> {
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

export function validateSignalInChildProcess(file: { path: string; name: string }, inputs: number): Promise<SignalOutcome> {
  return runCheck<SignalOutcome>({ kind: 'signal', file, inputs });
}
