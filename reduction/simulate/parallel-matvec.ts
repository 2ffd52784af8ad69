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
 * runs on the calling thread. Each share of rows runs through the WebAssembly SIMD kernel
 * (reduction/linalg/wasm/matvec-kernel.wat) on shared kernel memory where the runtime accepts it
 * (MODESHELF_LINALG_WASM=0 turns it off), otherwise through the scalar loop `matVecRows`. The arithmetic
 * per row is the same in every case (same summation order), so results do not depend on either choice.
 */
import { linalgThreads } from '../linalg/index';
import { wasmKernelAllowed } from '../linalg/packed-product';
import type { Matrix } from '../linalg/matrix';
import { MATVEC_KERNEL_WASM_HEX } from '../linalg/wasm/matvec-kernel-binary';
import { matVecRows } from '../linalg/matvec';
import { acquireKernelMemory, releaseKernelMemory } from './kernel-memory';

/** Below this many entries the hand-off (~10–30 µs) outweighs half a product. */
const PARALLEL_MIN_ENTRIES = 300 * 300;
/** Below this many entries the copy into the kernel's memory is not worth it. */
const SIMD_MIN_ENTRIES = 32 * 32;

type MatVecKernel = (r0: number, r1: number, cols: number, m: number, x: number, y: number) => void;

// Runs in the worker: rows [r0, r1) of M·x into y, on each bump of control[0]; control[0] = −1 stops.
// With a module it runs the SIMD kernel on the shared kernel memory, otherwise the scalar loop.
function workerSource(): string {
  return `
const { workerData } = require('node:worker_threads');
const __name = (f) => f;
${matVecRows.toString()}
const { control, rows, cols, r0, r1, module, memory, offsets, buffers } = workerData;
const c = new Int32Array(control);
let product;
if (module) {
  const kernel = new WebAssembly.Instance(module, { env: { memory } }).exports.matvec;
  product = () => kernel(r0, r1, cols, offsets.m, offsets.x, offsets.y);
} else {
  const m = new Float64Array(buffers.matrix), xv = new Float64Array(buffers.x), yv = new Float64Array(buffers.y);
  product = () => matVecRows(m, cols, xv, yv, r0, r1);
}
let seen = 0;
for (;;) {
  Atomics.wait(c, 0, seen);
  const seq = Atomics.load(c, 0);
  if (seq < 0) break;
  seen = seq;
  product();
  Atomics.store(c, 1, seq);
  Atomics.notify(c, 1);
}
`;
}

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

let compiled: WebAssembly.Module | null | undefined;

/**
 * The SIMD kernels' module (matvec, dot), compiled once per thread; null where WebAssembly, SIMD or shared
 * memory is missing, or under MODESHELF_LINALG_WASM=0. It imports its memory as env.memory (shared).
 */
export function matVecModule(): WebAssembly.Module | null {
  if (compiled !== undefined) return compiled;
  compiled = null;
  if (!wasmKernelAllowed() || typeof WebAssembly === 'undefined' || typeof SharedArrayBuffer === 'undefined') return null;
  try {
    const hex = MATVEC_KERNEL_WASM_HEX;
    const bytes = new Uint8Array(hex.length / 2);
    for (let i = 0; i < bytes.length; i++) bytes[i] = parseInt(hex.substr(2 * i, 2), 16);
    compiled = new WebAssembly.Module(bytes);
  } catch {
    compiled = null;
  }
  return compiled;
}

/** Rows of the split: the worker takes [split, rows), the caller [0, split). */
function splitRow(rows: number): number {
  return (rows >> 3) << 2; // about half, a multiple of 4 so both halves use the 4-row kernel
}

export class ParallelMatVec {
  readonly rows: number;
  readonly cols: number;
  /** The vector to multiply: write x here before `apply()`. */
  x: Float64Array;
  /** The product after `apply()`. */
  y: Float64Array;
  private matrix: Float64Array;
  private readonly control: Int32Array | null;
  private worker: WorkerHandle | null = null;
  private seq = 0;
  private split: number;
  /** The SIMD kernel on this thread, with the byte offsets of M, x and y in its memory. */
  private kernel: { run: MatVecKernel; m: number; x: number; y: number } | null = null;
  /** The kernel memory, handed back to the pool by `dispose`. */
  private memory: WebAssembly.Memory | null = null;

  constructor(m: Matrix) {
    this.rows = m.rows;
    this.cols = m.cols;
    const entries = m.rows * m.cols;
    const useWorker = typeof SharedArrayBuffer !== 'undefined' && entries >= PARALLEL_MIN_ENTRIES && linalgThreads() >= 2;
    const module = entries >= SIMD_MIN_ENTRIES ? matVecModule() : null;
    let memory: WebAssembly.Memory | null = null;
    const offsets = { m: 0, x: 0, y: 0 };
    if (module) {
      // M, x and y in the kernel's (shared) memory, each 16-byte aligned.
      offsets.x = Math.ceil((entries * 8) / 16) * 16;
      offsets.y = offsets.x + Math.ceil((m.cols * 8) / 16) * 16;
      const bytes = offsets.y + m.rows * 8;
      try {
        memory = acquireKernelMemory(bytes);
        const exports = new WebAssembly.Instance(module, { env: { memory } }).exports;
        this.kernel = { run: exports.matvec as MatVecKernel, ...offsets };
      } catch {
        if (memory) releaseKernelMemory(memory);
        memory = null;
        this.kernel = null;
      }
    }
    const buffer = (length: number) => (useWorker ? new SharedArrayBuffer(length * 8) : new ArrayBuffer(length * 8));
    const copyOf = (src: Float64Array) => {
      const out = new Float64Array(buffer(src.length));
      out.set(src);
      return out;
    };
    if (memory) {
      const buf = memory.buffer as ArrayBufferLike;
      this.matrix = new Float64Array(buf, offsets.m, entries);
      this.x = new Float64Array(buf, offsets.x, m.cols);
      this.y = new Float64Array(buf, offsets.y, m.rows);
    } else {
      this.matrix = new Float64Array(buffer(entries));
      this.x = new Float64Array(buffer(m.cols));
      this.y = new Float64Array(buffer(m.rows));
    }
    this.matrix.set(m.data);
    this.split = m.rows;
    this.control = null;

    // Check the SIMD kernel against the scalar loop (the same order, so the same bits) before trusting it.
    const probe = new Float64Array(m.cols);
    for (let j = 0; j < m.cols; j++) probe[j] = 1 + ((j * 37) % 11) / 11;
    const expected = new Float64Array(m.rows);
    matVecRows(this.matrix, m.cols, probe, expected, 0, m.rows);
    if (this.kernel) {
      this.x.set(probe);
      this.ownRows(0, m.rows);
      if (this.y.some((v, i) => v !== expected[i])) {
        // Not trusted: the scalar loop from now on, on copies outside the kernel memory.
        this.kernel = null;
        this.matrix = copyOf(this.matrix);
        this.x = copyOf(this.x);
        this.y = copyOf(this.y);
        releaseKernelMemory(memory!);
        memory = null;
      }
    }
    this.memory = memory;

    if (!useWorker) return;
    const threads = loadWorkerThreads();
    if (!threads) return;
    const control = new Int32Array(new SharedArrayBuffer(8));
    try {
      this.worker = new threads.Worker(workerSource(), {
        eval: true,
        workerData: {
          control: control.buffer,
          rows: m.rows,
          cols: m.cols,
          r0: splitRow(m.rows),
          r1: m.rows,
          module: this.kernel ? module : null,
          memory: this.kernel ? memory : null,
          offsets,
          buffers: this.kernel ? null : { matrix: this.matrix.buffer, x: this.x.buffer, y: this.y.buffer },
        },
      });
      this.worker.unref();
      this.control = control;
      this.split = splitRow(m.rows);
    } catch {
      this.worker = null;
      return;
    }
    // Check product against the single-thread loop before trusting the worker.
    this.x.set(probe);
    if (!this.applyParallel(2000) || this.y.some((v, i) => v !== expected[i])) this.stopWorker();
  }

  /** True when a worker thread shares the products. */
  get parallel(): boolean {
    return this.worker !== null;
  }

  /** True when the products run through the WebAssembly SIMD kernel. */
  get simd(): boolean {
    return this.kernel !== null;
  }

  /** True when this product is faster than the plain scalar loop (two threads, or the SIMD kernel). */
  get fast(): boolean {
    return this.parallel || this.simd;
  }

  /** out ← M·v (through `x` and `y`). */
  applyTo(v: Float64Array, out: Float64Array): void {
    this.x.set(v);
    this.apply();
    out.set(this.y);
  }

  /** y ← M·x. */
  apply(): void {
    if (this.worker && this.applyParallel(60_000)) return;
    this.ownRows(0, this.rows);
  }

  /** Hands rows [split, rows) to the worker; false (and single-threaded from now on) if it does not answer. */
  private applyParallel(timeoutMs: number): boolean {
    const c = this.control!;
    const seq = ++this.seq;
    Atomics.store(c, 0, seq);
    Atomics.notify(c, 0);
    this.ownRows(0, this.split);
    // Spin first (the worker's half takes about as long as ours), then block.
    for (let spin = 0; spin < 20000; spin++) if (Atomics.load(c, 1) === seq) return true;
    const deadline = Date.now() + timeoutMs;
    while (Atomics.load(c, 1) !== seq) {
      if (Date.now() > deadline) {
        this.stopWorker();
        return false;
      }
      Atomics.wait(c, 1, Atomics.load(c, 1), 5);
    }
    return true;
  }

  private ownRows(r0: number, r1: number): void {
    const k = this.kernel;
    if (k) k.run(r0, r1, this.cols, k.m, k.x, k.y);
    else matVecRows(this.matrix, this.cols, this.x, this.y, r0, r1);
  }

  /** Done with this product: stops the worker and hands the kernel memory back (no use afterwards). */
  dispose(): void {
    this.stopWorker();
    if (this.memory) {
      const m = this.memory;
      this.memory = null;
      this.kernel = null;
      releaseKernelMemory(m);
    }
  }

  /** Stops the worker; later products run on the calling thread. */
  private stopWorker(): void {
    if (this.worker && this.control) {
      Atomics.store(this.control, 0, -1);
      Atomics.notify(this.control, 0);
      this.worker.terminate();
    }
    this.worker = null;
    this.split = this.rows;
  }
}
