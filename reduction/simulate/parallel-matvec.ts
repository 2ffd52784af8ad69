/**
 * y = M·x split by rows between the calling thread and one persistent worker thread, for the solvers'
 * long chains of matrix–vector products (the exact solver's recursion x[k+1] = Φx[k] + Γu[k]; the
 * adaptive solvers' right-hand sides). Each product is one hand-off: the caller publishes x in shared
 * memory, wakes the worker with `Atomics.notify`, computes its own rows, and spins briefly on the
 * worker's completion flag. Products are short (≈ 0.3 ms at n = 1000) and strictly sequential, so the
 * hand-off must cost microseconds, not a message round trip; a matrix too small to repay that stays on
 * one thread.
 *
 * The second core is used only when the engine's dense kernels may use two threads (`linalgThreads()`,
 * MODESHELF_LINALG_THREADS) and the worker starts and passes a check product; otherwise every product
 * runs on the calling thread. The arithmetic per row is the same either way (same summation order).
 */
import { linalgThreads } from '../linalg/index';
import type { Matrix } from '../linalg/matrix';
import { matVec, matVecRows } from './linear-system';

/** Below this many entries the hand-off (~10–30 µs) outweighs half a product. */
const PARALLEL_MIN_ENTRIES = 300 * 300;

// Runs in the worker: rows [r0, r1) of M·x into y, on each bump of control[0]; control[0] = −1 stops.
const WORKER_SOURCE = `
const { workerData } = require('node:worker_threads');
const { control, matrix, x, y, rows, cols, r0, r1 } = workerData;
const m = new Float64Array(matrix), xv = new Float64Array(x), yv = new Float64Array(y), c = new Int32Array(control);
let seen = 0;
for (;;) {
  Atomics.wait(c, 0, seen);
  const seq = Atomics.load(c, 0);
  if (seq < 0) break;
  seen = seq;
  let i = r0;
  for (; i + 3 < r1; i += 4) {
    const o0 = i * cols, o1 = o0 + cols, o2 = o1 + cols, o3 = o2 + cols;
    let s0 = 0, s1 = 0, s2 = 0, s3 = 0;
    for (let j = 0; j < cols; j++) {
      const xj = xv[j];
      s0 += m[o0 + j] * xj; s1 += m[o1 + j] * xj; s2 += m[o2 + j] * xj; s3 += m[o3 + j] * xj;
    }
    yv[i] = s0; yv[i + 1] = s1; yv[i + 2] = s2; yv[i + 3] = s3;
  }
  for (; i < r1; i++) {
    const o = i * cols;
    let s = 0;
    for (let j = 0; j < cols; j++) s += m[o + j] * xv[j];
    yv[i] = s;
  }
  Atomics.store(c, 1, seq);
  Atomics.notify(c, 1);
}
`;

interface WorkerHandle {
  terminate(): unknown;
  unref(): void;
}

function loadWorkerThreads(): { Worker: new (src: string, opts: object) => WorkerHandle } | null {
  try {
    // Resolved at run time so that bundlers for the browser never see node:worker_threads.
    const req = (globalThis as { process?: { getBuiltinModule?: (id: string) => unknown } }).process?.getBuiltinModule;
    const mod = req ? req('node:worker_threads') : eval('require')('node:worker_threads');
    return mod as { Worker: new (src: string, opts: object) => WorkerHandle };
  } catch {
    return null;
  }
}

/** Rows of the split: the worker takes [split, rows), the caller [0, split). */
function splitRow(rows: number): number {
  return (rows >> 3) << 2; // about half, a multiple of 4 so both halves use the 4-row kernel
}

export class ParallelMatVec {
  readonly rows: number;
  readonly cols: number;
  /** The vector to multiply: write x here before `apply()`. */
  readonly x: Float64Array;
  /** The product after `apply()`. */
  readonly y: Float64Array;
  private readonly matrix: Float64Array;
  private readonly control: Int32Array | null;
  private worker: WorkerHandle | null = null;
  private seq = 0;
  private split: number;

  constructor(m: Matrix) {
    this.rows = m.rows;
    this.cols = m.cols;
    const useWorker =
      typeof SharedArrayBuffer !== 'undefined' && m.rows * m.cols >= PARALLEL_MIN_ENTRIES && linalgThreads() >= 2;
    const buffer = (length: number) => (useWorker ? new SharedArrayBuffer(length * 8) : new ArrayBuffer(length * 8));
    this.matrix = new Float64Array(buffer(m.rows * m.cols));
    this.matrix.set(m.data);
    this.x = new Float64Array(buffer(m.cols));
    this.y = new Float64Array(buffer(m.rows));
    this.split = useWorker ? splitRow(m.rows) : m.rows;
    this.control = null;
    if (!useWorker) return;
    const threads = loadWorkerThreads();
    if (!threads) {
      this.split = m.rows;
      return;
    }
    const control = new Int32Array(new SharedArrayBuffer(8));
    try {
      this.worker = new threads.Worker(WORKER_SOURCE, {
        eval: true,
        workerData: {
          control: control.buffer,
          matrix: this.matrix.buffer,
          x: this.x.buffer,
          y: this.y.buffer,
          rows: m.rows,
          cols: m.cols,
          r0: this.split,
          r1: m.rows,
        },
      });
      this.worker.unref();
      this.control = control;
    } catch {
      this.worker = null;
      this.split = m.rows;
      return;
    }
    // Check product against the single-thread kernel before trusting the worker.
    for (let j = 0; j < m.cols; j++) this.x[j] = 1 + ((j * 37) % 11) / 11;
    const expected = new Float64Array(m.rows);
    matVec({ rows: m.rows, cols: m.cols, data: this.matrix }, this.x, expected);
    if (!this.applyParallel(2000) || this.y.some((v, i) => v !== expected[i])) this.dispose();
  }

  /** True when a worker thread shares the products. */
  get parallel(): boolean {
    return this.worker !== null;
  }

  /** y ← M·x. */
  apply(): void {
    if (this.worker && this.applyParallel(60_000)) return;
    matVec({ rows: this.rows, cols: this.cols, data: this.matrix }, this.x, this.y);
  }

  /** Hands rows [split, rows) to the worker; false (and single-threaded from now on) if it does not answer. */
  private applyParallel(timeoutMs: number): boolean {
    const c = this.control!;
    const seq = ++this.seq;
    Atomics.store(c, 0, seq);
    Atomics.notify(c, 0);
    this.ownRows();
    // Spin first (the worker's half takes about as long as ours), then block.
    for (let spin = 0; spin < 20000; spin++) if (Atomics.load(c, 1) === seq) return true;
    const deadline = Date.now() + timeoutMs;
    while (Atomics.load(c, 1) !== seq) {
      if (Date.now() > deadline) {
        this.dispose();
        return false;
      }
      Atomics.wait(c, 1, Atomics.load(c, 1), 5);
    }
    return true;
  }

  private ownRows(): void {
    matVecRows(this.matrix, this.cols, this.x, this.y, 0, this.split);
  }

  /** Stops the worker; later products run on the calling thread. */
  dispose(): void {
    if (this.worker && this.control) {
      Atomics.store(this.control, 0, -1);
      Atomics.notify(this.control, 0);
      this.worker.terminate();
    }
    this.worker = null;
    this.split = this.rows;
  }
}
