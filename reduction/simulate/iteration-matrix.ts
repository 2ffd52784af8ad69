/**
 * The iteration matrix W = I − γ·h·A of an implicit method on ẋ = Ax + b, factorised once per step size
 * and reused for every stage solve while h is unchanged. For a linear system the stage equations are
 * linear, so one solve with W is exact (no Newton iteration). A few recent factorisations are kept, so
 * returning to an earlier step size (after a rejection, say) does not refactorise.
 * The factorisation is the engine's LU with partial pivoting (`linalg`); the triangular solves for single
 * vectors are done here in place, without allocating, because they sit in the solver's inner loop: their
 * dot products in the WebAssembly SIMD kernel where it is available, otherwise in the same order in
 * TypeScript (bit-identical either way).
 */
import { ModelError } from '../errors';
import { type LuFactorization, luFactor } from '../linalg/index';
import type { Matrix } from '../linalg/matrix';
import { matVecModule } from './parallel-matvec';
import { acquireKernelMemory, releaseKernelMemory } from './kernel-memory';

/**
 * Σ a[aOff + j]·b[bOff + j] for j < len, formed as (Σ even j + Σ odd j) + the last term when len is odd:
 * the order of the SIMD kernel's `dot` (reduction/linalg/wasm/matvec-kernel.wat), so both give the same bits.
 */
export function dotEvenOdd(a: Float64Array, aOff: number, b: Float64Array, bOff: number, len: number): number {
  const last = len - (len & 1);
  let e = 0;
  let d = 0;
  for (let j = 0; j < last; j += 2) {
    e += a[aOff + j] * b[bOff + j];
    d += a[aOff + j + 1] * b[bOff + j + 1];
  }
  let s = e + d;
  if (last < len) s += a[aOff + last] * b[bOff + last];
  return s;
}

/** x ← W⁻¹x using P·W = L·U (unit lower L and U packed in f.lu); `work` has length n. */
export function luSolveVector(f: LuFactorization, x: Float64Array, work: Float64Array): void {
  const { n, lu, perm } = f;
  for (let k = 0; k < n; k++) work[k] = x[perm[k]];
  for (let i = 1; i < n; i++) work[i] -= dotEvenOdd(lu, i * n, work, 0, i);
  for (let i = n - 1; i >= 0; i--) work[i] = (work[i] - dotEvenOdd(lu, i * n + i + 1, work, i + 1, n - 1 - i)) / lu[i * n + i];
  x.set(work);
}

/** Below this order the copy of the factors into the kernel's memory is not worth it. */
const SIMD_MIN_ORDER = 64;

/**
 * The same solve with the dot products in the SIMD kernel: the factors copied once into the kernel's
 * memory, one call per row. Bit-identical to `luSolveVector` (same order of operations).
 */
class SimdLuSolver {
  private readonly work: Float64Array;
  private readonly lu: Float64Array;
  private readonly dot: (len: number, a: number, b: number) => number;
  private readonly workAt: number;
  /** The kernel memory (pooled, see kernel-memory.ts); handed back by `release`. */
  readonly memory: WebAssembly.Memory;

  constructor(
    private readonly f: LuFactorization,
    module: WebAssembly.Module,
  ) {
    const n = f.n;
    this.workAt = Math.ceil((n * n * 8) / 16) * 16;
    const memory = acquireKernelMemory(this.workAt + n * 8);
    this.memory = memory;
    try {
      this.dot = new WebAssembly.Instance(module, { env: { memory } }).exports.dot as (len: number, a: number, b: number) => number;
    } catch (e) {
      releaseKernelMemory(memory);
      throw e;
    }
    const buf = memory.buffer as ArrayBufferLike;
    this.lu = new Float64Array(buf, 0, n * n);
    this.lu.set(f.lu);
    this.work = new Float64Array(buf, this.workAt, n);
  }

  solve(x: Float64Array): void {
    const { n, perm } = this.f;
    const { work, lu, dot, workAt } = this;
    for (let k = 0; k < n; k++) work[k] = x[perm[k]];
    for (let i = 1; i < n; i++) work[i] -= dot(i, i * n * 8, workAt);
    for (let i = n - 1; i >= 0; i--) work[i] = (work[i] - dot(n - 1 - i, (i * n + i + 1) * 8, workAt + (i + 1) * 8)) / lu[i * n + i];
    x.set(work);
  }
}

export class IterationMatrix {
  /** Factorisations performed (cache hits are not counted). */
  factorizations = 0;
  private readonly cache: { h: number; lu: LuFactorization }[] = [];
  private readonly work: Float64Array;
  /** SIMD solvers of the cached factorisations (dropped with them). */
  private readonly simd = new WeakMap<LuFactorization, SimdLuSolver>();

  constructor(
    private readonly A: Matrix,
    private readonly gamma: number,
    private readonly keep = 3,
  ) {
    this.work = new Float64Array(A.rows);
  }

  /** The factorisation of I − γhA, from the cache when h was used recently. */
  factorFor(h: number): LuFactorization {
    const hit = this.cache.findIndex((c) => c.h === h);
    if (hit >= 0) {
      const [entry] = this.cache.splice(hit, 1);
      this.cache.unshift(entry);
      return entry.lu;
    }
    const n = this.A.rows;
    const W = { rows: n, cols: n, data: new Float64Array(n * n) };
    const gh = this.gamma * h;
    const a = this.A.data;
    for (let k = 0; k < n * n; k++) W.data[k] = -gh * a[k];
    for (let i = 0; i < n; i++) W.data[i * n + i] += 1;
    const lu = luFactor(W);
    this.factorizations++;
    if (lu.zeroPivot >= 0) {
      throw new ModelError(
        'unstable',
        'A',
        `I − ${this.gamma.toPrecision(4)}·h·A is singular at h = ${h}: A has an eigenvalue at 1/(γh) in the right half-plane`,
      );
    }
    this.cache.unshift({ h, lu });
    if (this.cache.length > this.keep) {
      const dropped = this.cache.pop()!;
      const solver = this.simd.get(dropped.lu);
      if (solver) {
        this.simd.delete(dropped.lu);
        releaseKernelMemory(solver.memory);
      }
    }
    const module = n >= SIMD_MIN_ORDER ? matVecModule() : null;
    if (module) {
      try {
        this.simd.set(lu, new SimdLuSolver(lu, module));
      } catch {
        // No memory for the copy: the scalar solve below.
      }
    }
    return lu;
  }

  /** Done with it: the kernel memories go back to the pool (no solves afterwards). */
  dispose(): void {
    for (const { lu } of this.cache) {
      const solver = this.simd.get(lu);
      if (solver) {
        this.simd.delete(lu);
        releaseKernelMemory(solver.memory);
      }
    }
    this.cache.length = 0;
  }

  /** Whether solves with this factorisation run through the SIMD kernel. */
  usesSimd(lu: LuFactorization): boolean {
    return this.simd.has(lu);
  }

  /** x ← (I − γhA)⁻¹ x. */
  solve(lu: LuFactorization, x: Float64Array): void {
    const fast = this.simd.get(lu);
    if (fast) fast.solve(x);
    else luSolveVector(lu, x, this.work);
  }
}
