/**
 * Optional second core for large matrix products: one persistent worker thread computes half of the
 * columns (or rows) of C while the calling thread computes the other half, then the caller blocks on an
 * `Atomics.wait` until the worker is done. The call stays synchronous, so every kernel above it keeps a
 * plain function signature.
 *
 * What runs there: halves of large products (the blocked LU, inverse and sign-function iterations
 * spend nearly all their flops in `gemm`), and one of two independent column-pivoted QR compressions
 * of the factored Lyapunov iteration (`pairOnWorker`), which are level-2 work too large to leave on one
 * core. Other level-2 reductions (Hessenberg, QR sweeps) stay on the calling thread.
 *
 * Robustness: threads are used only in Node, only above a size where the copy and hand-off cost is
 * negligible, and never when `MODESHELF_LINALG_THREADS=1` (or `setLinalgThreads(1)`). Any failure to
 * start the worker, or an answer that does not match a small check product, turns threading off for the
 * rest of the process and the product is computed on the calling thread.
 */
import { blockedProduct, microKernel4x4, threadKernel, wasmKernelAllowed, MC, KC } from './packed-product';
import { createPackedKernel } from './wasm/packed-kernel';
import { GEMM_KERNEL_WASM_HEX } from './wasm/gemm-kernel-binary';
import { pivotedQrOfRows } from './qr';

/** Multiply-adds below which a product stays on one thread (≈ 200³; the hand-off costs ~0.1 ms). */
const PARALLEL_THRESHOLD = 8_000_000;

interface WorkerState {
  worker: { postMessage(msg: unknown): void; terminate(): unknown; unref(): void };
  control: Int32Array;
}

let requestedThreads: number | undefined;
let state: WorkerState | null | undefined; // undefined: not tried; null: unavailable or turned off
const staging: Record<'a' | 'b' | 'c', Float64Array> = { a: new Float64Array(0), b: new Float64Array(0), c: new Float64Array(0) };

/**
 * Number of threads the dense kernels may use: all of them for the native backend's OpenBLAS, and the
 * portable kernels use a second core when this is 2 or more. The default is the machine's core count,
 * overridden by the environment variable `MODESHELF_LINALG_THREADS` (the worker sets it per engine task).
 */
export function setLinalgThreads(threads: number): void {
  if (!Number.isInteger(threads) || threads < 1) throw new Error(`setLinalgThreads: threads must be a positive integer, got ${threads}`);
  requestedThreads = threads;
  if (requestedThreads === 1 && state) {
    state.worker.terminate();
    state = undefined;
  }
}

export function linalgThreads(): number {
  if (requestedThreads !== undefined) return requestedThreads;
  const env = typeof process !== 'undefined' ? process.env?.MODESHELF_LINALG_THREADS : undefined;
  if (env !== undefined && env !== '') {
    const t = Number(env);
    requestedThreads = Number.isInteger(t) && t >= 1 ? t : 1;
    return requestedThreads;
  }
  const os = nodeModule<{ availableParallelism?: () => number; cpus: () => unknown[] }>('node:os');
  requestedThreads = os ? Math.max(1, os.availableParallelism ? os.availableParallelism() : os.cpus().length) : 1;
  return requestedThreads;
}

/** A zero matrix's storage on a SharedArrayBuffer, so the worker reads and writes it without copies. */
export function sharedFloat64(length: number): Float64Array {
  if (typeof SharedArrayBuffer === 'undefined') return new Float64Array(length);
  return new Float64Array(new SharedArrayBuffer(length * 8));
}

/** An Int32Array on a SharedArrayBuffer (a plain one where shared memory is unavailable). */
export function sharedInt32(length: number): Int32Array {
  if (typeof SharedArrayBuffer === 'undefined') return new Int32Array(length);
  return new Int32Array(new SharedArrayBuffer(length * 4));
}

function isShared(x: Float64Array): boolean {
  return typeof SharedArrayBuffer !== 'undefined' && x.buffer instanceof SharedArrayBuffer;
}

function nodeModule<T>(name: string): T | undefined {
  const p = typeof process !== 'undefined' ? (process as unknown as { getBuiltinModule?: (n: string) => unknown }) : undefined;
  if (!p || typeof p.getBuiltinModule !== 'function') return undefined;
  try {
    return p.getBuiltinModule(name) as T;
  } catch {
    return undefined;
  }
}

function workerSource(): string {
  // `__name` covers bundlers that wrap functions to keep their names (esbuild keepNames).
  return `
const { parentPort, workerData } = require('node:worker_threads');
const __name = (f) => f;
${microKernel4x4.toString()}
${createPackedKernel.toString()}
${blockedProduct.toString()}
${pivotedQrOfRows.toString()}
const control = new Int32Array(workerData.control);
const kernel = createPackedKernel(workerData.wasmHex, microKernel4x4, workerData.packALength);
Atomics.store(control, 2, kernel.simd ? 1 : 2);
parentPort.on('message', (job) => {
  let status = job.id;
  try {
    if (job.kind === 'pivotedQrOfRows') {
      const rank = pivotedQrOfRows(new Float64Array(job.work), job.n, job.w, job.tol, new Int32Array(job.perm));
      Atomics.store(control, 1, rank);
      Atomics.store(control, 0, job.id);
      Atomics.notify(control, 0);
      return;
    }
    blockedProduct(job.transA, job.transB, job.m, job.k, job.alpha,
      new Float64Array(job.a), job.aOff, job.lda, new Float64Array(job.b), job.bOff, job.ldb,
      new Float64Array(job.c), job.cOff, job.ldc, 0, job.width, kernel);
  } catch (e) {
    status = -job.id;
  }
  Atomics.store(control, 0, status);
  Atomics.notify(control, 0);
});
`;
}

function startWorker(): WorkerState | null {
  const wt = nodeModule<{ Worker: new (src: string, opts: unknown) => WorkerState['worker'] & { on(e: string, f: (x: unknown) => void): void } }>('node:worker_threads');
  if (!wt || typeof SharedArrayBuffer === 'undefined' || typeof Atomics?.wait !== 'function') return null;
  try {
    const control = new Int32Array(new SharedArrayBuffer(16));
    const worker = new wt.Worker(workerSource(), {
      eval: true,
      workerData: { control: control.buffer, wasmHex: wasmKernelAllowed() ? GEMM_KERNEL_WASM_HEX : null, packALength: MC * KC },
    });
    worker.on('error', () => {
      state = null;
    });
    worker.unref();
    const s: WorkerState = { worker, control };
    if (!selfCheck(s)) {
      worker.terminate();
      return null;
    }
    return s;
  } catch {
    return null;
  }
}

/** A 6×5 by 5×7 product through the worker, compared with the direct sum. */
function selfCheck(s: WorkerState): boolean {
  const m = 6, k = 5, n = 7;
  const a = sharedFloat64(m * k), b = sharedFloat64(k * n), c = sharedFloat64(m * n);
  for (let i = 0; i < a.length; i++) a[i] = ((i * 7) % 11) - 5;
  for (let i = 0; i < b.length; i++) b[i] = ((i * 5) % 13) - 6;
  if (!dispatch(s, { transA: false, transB: false, m, k, alpha: 1, a: a.buffer, aOff: 0, lda: k, b: b.buffer, bOff: 0, ldb: n, c: c.buffer, cOff: 0, ldc: n, width: n }, 10_000)) return false;
  for (let i = 0; i < m; i++)
    for (let j = 0; j < n; j++) {
      let sum = 0;
      for (let p = 0; p < k; p++) sum += a[i * k + p] * b[p * n + j];
      if (sum !== c[i * n + j]) return false;
    }
  return true;
}

interface Job {
  transA: boolean;
  transB: boolean;
  m: number;
  k: number;
  alpha: number;
  a: ArrayBufferLike;
  aOff: number;
  lda: number;
  b: ArrayBufferLike;
  bOff: number;
  ldb: number;
  c: ArrayBufferLike;
  cOff: number;
  ldc: number;
  width: number;
}

let jobSequence = 0;

/**
 * Posts a job under a fresh id; the worker writes that id (negated on failure) to control[0] when done,
 * so a late answer to an abandoned job can never be taken for the current one.
 */
function post(s: WorkerState, job: Job | Record<string, unknown>): number {
  jobSequence = (jobSequence % 1_000_000_000) + 1;
  Atomics.store(s.control, 0, 0);
  s.worker.postMessage({ ...job, id: jobSequence });
  return jobSequence;
}

/** Blocks until the worker reports job `id`; false on failure or timeout. */
function await_(s: WorkerState, id: number, timeoutMs: number): boolean {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const v = Atomics.load(s.control, 0);
    if (v === id) return true;
    if (v === -id) return false;
    const left = deadline - Date.now();
    if (left <= 0) return false;
    Atomics.wait(s.control, 0, v, left);
  }
}

function dispatch(s: WorkerState, job: Job, timeoutMs: number): boolean {
  return await_(s, post(s, job), timeoutMs);
}

function grow(name: 'a' | 'b' | 'c', length: number): Float64Array {
  if (staging[name].length < length) staging[name] = sharedFloat64(Math.max(length, staging[name].length * 2));
  return staging[name];
}

/**
 * C += α·op(A)·op(B) split across the calling thread and the worker; returns false (having done nothing)
 * when the product is too small or threading is unavailable, so the caller computes it alone.
 */
export function parallelProduct(
  transA: boolean,
  transB: boolean,
  m: number,
  n: number,
  k: number,
  alpha: number,
  a: Float64Array,
  aOff: number,
  lda: number,
  b: Float64Array,
  bOff: number,
  ldb: number,
  c: Float64Array,
  cOff: number,
  ldc: number,
): boolean {
  if (m * n * k < PARALLEL_THRESHOLD || Math.max(m, n) < 64) return false;
  if (linalgThreads() < 2) return false;
  if (state === undefined) state = startWorker();
  if (!state) return false;
  const s = state;

  // The worker takes the second half of the columns of C (or of the rows, when C is tall).
  const byColumns = n >= m;
  const split = byColumns ? (Math.floor(n / 2 / 4) * 4 || Math.floor(n / 2)) : Math.floor(m / 2);
  const wm = byColumns ? m : m - split;
  const wn = byColumns ? n - split : n;

  // op(A) rows seen by the worker: all of them (column split) or rows split..m (row split).
  let aBuf: Float64Array, aO: number, aL: number;
  const aRow0 = byColumns ? 0 : split;
  if (isShared(a)) {
    aBuf = a;
    aO = transA ? aOff + aRow0 : aOff + aRow0 * lda;
    aL = lda;
  } else if (transA) {
    aBuf = grow('a', k * wm);
    for (let p = 0; p < k; p++) aBuf.set(a.subarray(aOff + p * lda + aRow0, aOff + p * lda + aRow0 + wm), p * wm);
    aO = 0;
    aL = wm;
  } else {
    aBuf = grow('a', wm * k);
    for (let i = 0; i < wm; i++) aBuf.set(a.subarray(aOff + (aRow0 + i) * lda, aOff + (aRow0 + i) * lda + k), i * k);
    aO = 0;
    aL = k;
  }

  // op(B) columns seen by the worker: split..n (column split) or all (row split).
  let bBuf: Float64Array, bO: number, bL: number;
  const bCol0 = byColumns ? split : 0;
  if (isShared(b)) {
    bBuf = b;
    bO = transB ? bOff + bCol0 * ldb : bOff + bCol0;
    bL = ldb;
  } else if (transB) {
    bBuf = grow('b', wn * k);
    for (let j = 0; j < wn; j++) bBuf.set(b.subarray(bOff + (bCol0 + j) * ldb, bOff + (bCol0 + j) * ldb + k), j * k);
    bO = 0;
    bL = k;
  } else {
    bBuf = grow('b', k * wn);
    for (let p = 0; p < k; p++) bBuf.set(b.subarray(bOff + p * ldb + bCol0, bOff + p * ldb + bCol0 + wn), p * wn);
    bO = 0;
    bL = wn;
  }

  const cRow0 = byColumns ? 0 : split;
  const cCol0 = byColumns ? split : 0;
  const cShared = isShared(c);
  let cBuf: Float64Array, cO: number, cL: number;
  if (cShared) {
    cBuf = c;
    cO = cOff + cRow0 * ldc + cCol0;
    cL = ldc;
  } else {
    cBuf = grow('c', wm * wn);
    for (let i = 0; i < wm; i++) {
      const src = cOff + (cRow0 + i) * ldc + cCol0;
      cBuf.set(c.subarray(src, src + wn), i * wn);
    }
    cO = 0;
    cL = wn;
  }

  const id = post(s, { transA, transB, m: wm, k, alpha, a: aBuf.buffer, aOff: aO, lda: aL, b: bBuf.buffer, bOff: bO, ldb: bL, c: cBuf.buffer, cOff: cO, ldc: cL, width: wn });

  // The calling thread's half, straight from the original arrays.
  const mm = byColumns ? m : split;
  const nn = byColumns ? split : n;
  blockedProduct(transA, transB, mm, k, alpha, a, aOff, lda, b, bOff, ldb, c, cOff, ldc, 0, nn, threadKernel());

  // Generous: at a pessimistic 0.05 GFLOP/s, plus a minute for a descheduled thread.
  const timeoutMs = 60_000 + (2 * wm * wn * k) / 5e7;
  if (!await_(s, id, timeoutMs)) {
    state = null;
    s.worker.terminate();
    throw new Error('gemm: the linear-algebra worker thread failed or timed out; set MODESHELF_LINALG_THREADS=1 to compute on one thread');
  }
  if (!cShared) {
    for (let i = 0; i < wm; i++) {
      const dst = cOff + (cRow0 + i) * ldc + cCol0;
      c.set(cBuf.subarray(i * wn, i * wn + wn), dst);
    }
  }
  return true;
}

/** Whether the worker thread is running (it starts on the first product large enough to split). */
export function workerRunning(): boolean {
  return !!state;
}

/** Whether the running worker's products use the WebAssembly kernel (undefined: no worker running). */
export function workerUsesSimd(): boolean | undefined {
  if (!state) return undefined;
  const v = Atomics.load(state.control, 2);
  return v === 0 ? undefined : v === 1;
}

export interface RowQrJob {
  readonly kind: 'pivotedQrOfRows';
  /** n×w row-major, on a SharedArrayBuffer (see `sharedFloat64`). */
  readonly work: Float64Array;
  readonly n: number;
  readonly w: number;
  readonly tol: number;
  /** Length n, on a SharedArrayBuffer. */
  readonly perm: Int32Array;
}

/** Work (≈ n·w·min(n, w) flops) below which the pair runs on the calling thread. */
const PAIR_THRESHOLD = 4_000_000;

/**
 * Runs `local()` on the calling thread while the worker runs `pivotedQrOfRows` on `job`; returns both
 * ranks. Falls back to running both here when threading is off, unavailable, the job is small, or its
 * arrays are not shared.
 */
export function pairOnWorker(local: () => number, job: RowQrJob): [number, number] {
  const big = job.n * job.w * Math.min(job.n, job.w) >= PAIR_THRESHOLD;
  const shared = isShared(job.work) && typeof SharedArrayBuffer !== 'undefined' && job.perm.buffer instanceof SharedArrayBuffer;
  if (big && shared && linalgThreads() >= 2) {
    if (state === undefined) state = startWorker();
    const s = state;
    if (s) {
      const id = post(s, { kind: job.kind, work: job.work.buffer, n: job.n, w: job.w, tol: job.tol, perm: job.perm.buffer });
      const mine = local();
      const timeoutMs = 60_000 + (4 * job.n * job.w * Math.min(job.n, job.w)) / 5e7;
      if (!await_(s, id, timeoutMs)) {
        state = null;
        s.worker.terminate();
        throw new Error('lyapunov: the linear-algebra worker thread failed or timed out; set MODESHELF_LINALG_THREADS=1 to compute on one thread');
      }
      return [mine, Atomics.load(s.control, 1)];
    }
  }
  const mine = local();
  return [mine, pivotedQrOfRows(job.work, job.n, job.w, job.tol, job.perm)];
}
