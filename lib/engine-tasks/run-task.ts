// Runs one engine task in a fresh worker thread (node:worker_threads) and resolves with its result. A new
// thread per task keeps memory bounded: everything the engine allocated goes when the thread ends, and
// the thread's JavaScript heap is capped (typed-array matrices live outside it and are freed with it).
//
// Stopping a task (a cancelled job): `stop` sets a flag in memory shared with the thread (a
// SharedArrayBuffer). The task looks at it between iterations of its loops and at every progress report
// (thread.ts) and ends with StoppedError; a thread that has not ended within the grace period (it is inside
// one long engine call) is terminated. Either way the result rejects with TaskStopped at once, and the
// worker's next task runs in a fresh thread: a terminated thread is replaced, never reused.
//
// The thread loads the TypeScript sources through tsx's require hook, so the worker needs no build step.
import { createRequire } from 'node:module';
import os from 'node:os';
import path from 'node:path';
import { Worker } from 'node:worker_threads';
import { ModelError, type ModelErrorCode } from '../../reduction/index';
import { repoRoot } from '../uploads/settings';
import { cleanDetail, type ProgressReporter } from './progress';
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

/** The result of a task that was stopped on request; `how` says whether the engine stopped at its own check. */
export class TaskStopped extends Error {
  constructor(
    readonly reason: string,
    readonly how: 'at a check' | 'terminated',
    readonly afterMs: number,
  ) {
    super(`stopped: ${reason}`);
    this.name = 'TaskStopped';
  }
}

export interface RunningTask<T> {
  readonly result: Promise<T>;
  /** Stops the thread at once; the result then rejects. */
  cancel(reason: string): void;
  /**
   * Asks the task to stop at its next check; after `graceMs` without an answer the thread is terminated.
   * The result then rejects with TaskStopped (unless it had already settled).
   */
  stop(reason: string, graceMs: number): void;
}

/** How long a task asked to stop may take to reach its next check before its thread is terminated. */
export function stopGraceMs(): number {
  const raw = Number(process.env.MODESHELF_CANCEL_GRACE_MS);
  return Number.isFinite(raw) && raw >= 0 ? raw : 2000;
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
  // One Int32 shared with the thread: 0 runs, 1 stop (thread.ts reads it with Atomics.load).
  const stopFlag = new Int32Array(new SharedArrayBuffer(4));
  const worker = new Worker(bootstrap(), {
    eval: true,
    workerData: { request, stopFlag },
    env: { ...process.env, MODESHELF_LINALG_THREADS: String(engineThreadsPerTask()) },
    resourceLimits: { maxOldGenerationSizeMb: THREAD_HEAP_MB },
  });
  let cancelled: string | null = null;
  let stopping: { reason: string; at: number; timer: NodeJS.Timeout } | null = null;
  let settle: (fn: () => void) => void = () => undefined;
  let rejectWith: (err: Error) => void = () => undefined;
  const result = new Promise<T>((resolve, reject) => {
    let settled = false;
    settle = (fn: () => void) => {
      if (settled) return;
      settled = true;
      if (stopping) clearTimeout(stopping.timer);
      fn();
      void worker.terminate();
    };
    rejectWith = (err) => settle(() => reject(err));
    worker.on('message', (msg: { type: string; stage?: string; fraction?: number; detail?: unknown; value?: unknown; error?: { name: string; code?: string; field?: string; message: string; stack?: string } }) => {
      if (msg.type === 'progress') onProgress(msg.stage ?? '', msg.fraction ?? 0, cleanDetail(msg.detail));
      else if (msg.type === 'result') settle(() => resolve(msg.value as T));
      else if (msg.type === 'error' && msg.error) {
        const e = msg.error;
        settle(() =>
          reject(
            stopping
              ? new TaskStopped(stopping.reason, 'at a check', Date.now() - stopping.at)
              : e.name === 'ModelError' && e.code && e.field !== undefined
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
    stop(reason: string, graceMs: number) {
      if (stopping) return;
      Atomics.store(stopFlag, 0, 1);
      const at = Date.now();
      // The thread is not awaited: one stuck inside a native call ends when that call returns, and the
      // worker goes on with a fresh thread meanwhile.
      const timer = setTimeout(() => {
        void worker.terminate();
        rejectWith(new TaskStopped(reason, 'terminated', Date.now() - at));
      }, graceMs);
      timer.unref();
      stopping = { reason, at, timer };
    },
  };
}

export function runEngineTask<T>(request: TaskRequest, onProgress: ProgressReporter = () => {}): Promise<T> {
  return startEngineTask<T>(request, onProgress).result;
}
