/**
 * A per-thread pool of the shared WebAssembly memories that the SIMD matrix–vector and triangular-solve
 * kernels work in (parallel-matvec.ts, iteration-matrix.ts). Shared memories are not reclaimed promptly by
 * V8's collector (measured here: 400 dropped 8 MB SharedArrayBuffers kept 3.1 GB resident, plain
 * ArrayBuffers 128 MB), and the solvers make one per product chain and per factorisation, so they are
 * handed back on dispose and reused rather than dropped.
 */

const PAGE = 65536;
/** Memories kept for reuse beyond this many bytes are dropped (left to the collector). */
const POOL_LIMIT_BYTES = 256 * 1024 * 1024;

const free: WebAssembly.Memory[] = [];

/** A shared memory of at least `bytes` bytes (from the pool when one fits without wasting half of it). */
export function acquireKernelMemory(bytes: number): WebAssembly.Memory {
  let best = -1;
  for (let i = 0; i < free.length; i++) {
    const size = free[i].buffer.byteLength;
    if (size >= bytes && size <= 2 * bytes + PAGE && (best < 0 || size < free[best].buffer.byteLength)) best = i;
  }
  if (best >= 0) return free.splice(best, 1)[0];
  const pages = Math.max(1, Math.ceil(bytes / PAGE));
  return new WebAssembly.Memory({ initial: pages, maximum: pages, shared: true });
}

/** Hands a memory back; its contents are left as they are (the next user overwrites what it reads). */
export function releaseKernelMemory(memory: WebAssembly.Memory): void {
  if (free.includes(memory)) return;
  free.push(memory);
  let total = free.reduce((s, m) => s + m.buffer.byteLength, 0);
  while (total > POOL_LIMIT_BYTES && free.length > 0) total -= free.shift()!.buffer.byteLength;
}

/** Bytes held in the pool (for tests). */
export function pooledKernelBytes(): number {
  return free.reduce((s, m) => s + m.buffer.byteLength, 0);
}
