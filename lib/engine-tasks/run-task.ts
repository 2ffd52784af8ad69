// Runs one engine task in a fresh worker thread (node:worker_threads) and resolves with its result. A new
// thread per task keeps memory bounded: everything the engine allocated goes when the thread ends, and
// the thread's JavaScript heap is capped (typed-array matrices live outside it and are freed with it).
//
// The thread loads the TypeScript sources through tsx's require hook, so the worker needs no build step.
import { createRequire } from 'node:module';
import os from 'node:os';
import path from 'node:path';
import { Worker } from 'node:worker_threads';
import { ModelError, type ModelErrorCode } from '../../reduction/index';
import { repoRoot } from '../uploads/settings';
import type { ProgressReporter } from './progress';
import type { TaskRequest } from './tasks';

/** Heap of one engine thread, MiB (common practice: matrices are off-heap; the heap holds result JSON). */
export const THREAD_HEAP_MB = 1024;

/** Raised when the thread failed for a reason other than bad input: it may succeed on a retry. */
export class EngineTaskError extends Error {
  constructor(message: string, readonly stack_?: string) {
    super(message);
    this.name = 'EngineTaskError';
  }
}

export interface RunningTask<T> {
  readonly result: Promise<T>;
  /** Stops the thread; the result then rejects. */
  cancel(reason: string): void;
}

function bootstrap(): string {
  const require = createRequire(path.join(repoRoot(), 'package.json'));
  const tsx = require.resolve('tsx/cjs/api');
  return `require(${JSON.stringify(tsx)}).register();\nrequire(${JSON.stringify(path.join(repoRoot(), 'lib', 'engine-tasks', 'thread.ts'))});`;
}

/**
 * Threads the dense kernels (OpenBLAS) may use in one engine task: this machine's cores shared among the
 * tasks the worker runs at once (MODESHELF_WORKER_CONCURRENCY), so two tasks on two cores do not
 * oversubscribe them. MODESHELF_LINALG_THREADS, when set, wins.
 */
export function engineThreadsPerTask(): number {
  const explicit = Number(process.env.MODESHELF_LINALG_THREADS);
  if (Number.isInteger(explicit) && explicit >= 1) return explicit;
  const cores = os.availableParallelism ? os.availableParallelism() : os.cpus().length;
  const slots = Math.max(1, Math.floor(Number(process.env.MODESHELF_WORKER_CONCURRENCY) || 1));
  return Math.max(1, Math.floor(cores / slots));
}

export function startEngineTask<T>(request: TaskRequest, onProgress: ProgressReporter): RunningTask<T> {
  const worker = new Worker(bootstrap(), {
    eval: true,
    workerData: request,
    env: { ...process.env, MODESHELF_LINALG_THREADS: String(engineThreadsPerTask()) },
    resourceLimits: { maxOldGenerationSizeMb: THREAD_HEAP_MB },
  });
  let cancelled: string | null = null;
  const result = new Promise<T>((resolve, reject) => {
    let settled = false;
    const settle = (fn: () => void) => {
      if (settled) return;
      settled = true;
      fn();
      void worker.terminate();
    };
    worker.on('message', (msg: { type: string; stage?: string; fraction?: number; value?: unknown; error?: { name: string; code?: string; field?: string; message: string; stack?: string } }) => {
      if (msg.type === 'progress') onProgress(msg.stage ?? '', msg.fraction ?? 0);
      else if (msg.type === 'result') settle(() => resolve(msg.value as T));
      else if (msg.type === 'error' && msg.error) {
        const e = msg.error;
        settle(() =>
          reject(
            e.name === 'ModelError' && e.code && e.field !== undefined
              ? new ModelError(e.code as ModelErrorCode, e.field, e.message)
              : new EngineTaskError(e.message, e.stack),
          ),
        );
      }
    });
    worker.on('error', (err: Error & { code?: string }) => {
      const message =
        err.code === 'ERR_WORKER_OUT_OF_MEMORY'
          ? `the engine ran out of memory (its heap is limited to ${THREAD_HEAP_MB} MiB)`
          : `the engine thread failed: ${err.message}`;
      settle(() => reject(new EngineTaskError(message, err.stack)));
    });
    worker.on('exit', (code) => {
      settle(() => reject(new EngineTaskError(cancelled ? `stopped: ${cancelled}` : `the engine thread exited (code ${code}) without a result`)));
    });
  });
  return {
    result,
    cancel(reason: string) {
      cancelled = reason;
      void worker.terminate();
    },
  };
}

export function runEngineTask<T>(request: TaskRequest, onProgress: ProgressReporter = () => {}): Promise<T> {
  return startEngineTask<T>(request, onProgress).result;
}
