/**
 * The native backend: LAPACK and BLAS from Debian's OpenBLAS/LAPACKE, and SuiteSparse, through the
 * Node-API addon built from `reduction/native/` (`npm run build:native`). Each kernel keeps the contract
 * of its portable counterpart (row-major storage, same shapes and orderings); LAPACK's routine is named
 * beside each. The addon is loaded with `process.dlopen`, so bundlers leave it alone, once per thread
 * (it is context-aware: worker threads load their own instance).
 *
 * Failures come back as errors with a `code` (`non_finite`, `singular`, `not_converged`,
 * `out_of_memory`, `not_positive_definite`, `invalid_option`, …) and a message naming the matrix; the
 * process lives on.
 */
import { existsSync } from 'node:fs';
import path from 'node:path';
import type { DenseKernels } from './dense-kernels';
import { type Matrix, type ComplexVector, zeros } from './matrix';
import type { LuFactorization } from './lu';
import { linalgThreads, setLinalgThreads } from './parallel';

/** The addon's exports (reduction/native/src/*.cc). */
export interface NativeAddon {
  setThreads(threads: number): void;
  threads(): number;
  blasConfig(): string;
  gemm(
    ta: boolean, tb: boolean, m: number, n: number, k: number, alpha: number, a: Float64Array, offA: number, lda: number,
    b: Float64Array, offB: number, ldb: number, beta: number, c: Float64Array, offC: number, ldc: number,
  ): void;
  luFactor(lu: Float64Array, n: number, perm: Int32Array): [number, number];
  luSolve(lu: Float64Array, n: number, perm: Int32Array, b: Float64Array, columns: number): void;
  luInverse(lu: Float64Array, n: number, perm: Int32Array, out: Float64Array): void;
  luReciprocalCondition(lu: Float64Array, n: number, norm1: number): number;
  eigenvalues(a: Float64Array, n: number, re: Float64Array, im: Float64Array): void;
  eig(a: Float64Array, n: number, re: Float64Array, im: Float64Array, vectors: Float64Array): void;
  schur(t: Float64Array, n: number, z: Float64Array, re: Float64Array, im: Float64Array): void;
  hessenberg(h: Float64Array, n: number, q: Float64Array | null): void;
  svd(a: Float64Array, m: number, n: number, s: Float64Array, u: Float64Array | null, vt: Float64Array | null): void;
  symmetricEig(a: Float64Array, n: number, values: Float64Array, vectors: boolean): void;
  cholesky(a: Float64Array, n: number): number;
  pivotedCholesky(x: Float64Array, n: number, tol: number, f: Float64Array): number;
  qr(a: Float64Array, m: number, n: number, q: Float64Array, r: Float64Array): void;
  pivotedQr(a: Float64Array, m: number, n: number, tol: number, perm: Int32Array, q: Float64Array, r: Float64Array): number;
  pivotedQrOfRows(work: Float64Array, n: number, w: number, tol: number, perm: Int32Array): number;
  trsyl(ta: boolean, tb: boolean, sign: number, m: number, n: number, a: Float64Array, b: Float64Array, c: Float64Array): number;
  hammarlingFactor(t: Float64Array, n: number, w: Float64Array, m: number, transpose: boolean, f: Float64Array): number;
  hessenbergResponse(
    h: Float64Array, n: number, f: Float64Array, m: number, cq: Float64Array, p: number, d: Float64Array,
    w: Float64Array, re: Float64Array, im: Float64Array,
  ): void;
  umfpackSymbolic(n: number, colPtr: Int32Array, rowIndex: Int32Array, values: Float64Array, imag: Float64Array | null, name?: string): [unknown, UmfpackSymbolicInfo];
  umfpackNumeric(symbolic: unknown, n: number, colPtr: Int32Array, rowIndex: Int32Array, values: Float64Array, imag: Float64Array | null, name?: string): [unknown, UmfpackNumericInfo];
  umfpackSolve(
    numeric: unknown, n: number, colPtr: Int32Array, rowIndex: Int32Array, values: Float64Array, imag: Float64Array | null,
    bRe: Float64Array, bIm: Float64Array | null, xRe: Float64Array, xIm: Float64Array | null, transpose: boolean,
  ): void;
  umfpackFree(handle: unknown): void;
  umfpackSweep(
    symbolic: unknown, n: number, colPtr: Int32Array, rowIndex: Int32Array, aValues: Float64Array, eValues: Float64Array,
    frequencies: Float64Array, b: Float64Array, m: number, c: Float64Array, p: number, re: Float64Array, im: Float64Array,
    threads: number, name?: string,
  ): void;
  umfpackShiftedSolves(
    symbolic: unknown, n: number, colPtr: Int32Array, rowIndex: Int32Array, aValues: Float64Array, eValues: Float64Array,
    sigmaRe: Float64Array, sigmaIm: Float64Array, fRe: Float64Array, fIm: Float64Array | null, gRe: Float64Array, gIm: Float64Array | null,
    xRe: Float64Array, xIm: Float64Array | null, yRe: Float64Array, yIm: Float64Array | null, threads: number, name?: string,
  ): void;
  cholmodFactor(n: number, colPtr: Int32Array, rowIndex: Int32Array, values: Float64Array, imag: null, name?: string): [unknown, CholmodInfo];
  cholmodSolve(factor: unknown, b: Float64Array, x: Float64Array, columns: number): void;
  cholmodFree(factor: unknown): void;
  amdOrder(n: number, colPtr: Int32Array, rowIndex: Int32Array, perm: Int32Array): { lnz: number; flops: number };
  colamdOrder(rows: number, cols: number, colPtr: Int32Array, rowIndex: Int32Array, perm: Int32Array): void;
}

export interface UmfpackSymbolicInfo {
  readonly peakMemoryBytes: number;
  readonly numericSizeBytes: number;
  readonly flopsEstimate: number;
  readonly lnzEstimate: number;
  readonly unzEstimate: number;
}
export interface UmfpackNumericInfo {
  readonly lnz: number;
  readonly unz: number;
  readonly flops: number;
  readonly reciprocalCondition: number;
  readonly memoryBytes: number;
}
export interface CholmodInfo {
  readonly lnz: number;
  readonly flops: number;
  readonly memoryBytes: number;
}

const ADDON_FILE = path.join('reduction', 'native', 'build', 'Release', 'modeshelf_native.node');

function candidates(): string[] {
  const out: string[] = [];
  const env = typeof process !== 'undefined' ? process.env?.MODESHELF_NATIVE_ADDON : undefined;
  if (env) out.push(path.resolve(env));
  // From this file (reduction/linalg/) when it runs from source; from the working directory otherwise
  // (a bundled server runs from the repository root).
  if (typeof __dirname === 'string' && __dirname.length > 1) out.push(path.resolve(__dirname, '..', '..', ADDON_FILE));
  out.push(path.resolve(process.cwd(), ADDON_FILE));
  return out;
}

let loaded: { addon: NativeAddon | null; path: string; error: string } | undefined;

/** The addon itself (null with the reason when it cannot be loaded). */
export function nativeAddon(): { addon: NativeAddon | null; path: string; error: string } {
  if (loaded) return loaded;
  const tried: string[] = [];
  for (const file of candidates()) {
    if (!existsSync(file)) {
      tried.push(`${file}: not built`);
      continue;
    }
    try {
      const mod = { exports: {} as NativeAddon };
      process.dlopen(mod, file);
      loaded = { addon: mod.exports, path: file, error: '' };
      mod.exports.setThreads(linalgThreads());
      return loaded;
    } catch (e) {
      tried.push(`${file}: ${(e as Error).message}`);
    }
  }
  loaded = { addon: null, path: '', error: tried.join('; ') || 'no candidate path' };
  return loaded;
}

function square(what: string, a: Matrix): number {
  if (a.rows !== a.cols) throw new Error(`${what}: matrix must be square, got ${a.rows}×${a.cols}`);
  return a.rows;
}

/** A native error with its code and the operation named, as the engine's other kernel errors read. */
function rethrow(what: string, e: unknown): never {
  const err = e as Error & { code?: string };
  const out = new Error(`${what}: ${err.message}`) as Error & { code?: string };
  out.code = err.code;
  throw out;
}

function call<T>(what: string, f: () => T): T {
  try {
    return f();
  } catch (e) {
    rethrow(what, e);
  }
}

function makeKernels(native: NativeAddon): DenseKernels {
  const luFactor = (a: Matrix): LuFactorization => {
    const n = square('luFactor', a);
    const lu = new Float64Array(a.data);
    const perm = new Int32Array(n);
    const [zeroPivot, permutationSign] = call('luFactor', () => native.luFactor(lu, n, perm));
    return { n, lu, perm, permutationSign, zeroPivot };
  };
  const singular = (what: string, f: LuFactorization) =>
    new Error(`${what}: matrix is singular (zero pivot in column ${f.zeroPivot})`);
  const pivotedQrOfRows = (work: Float64Array, n: number, w: number, tol: number, perm: Int32Array): number =>
    call('pivotedQrOfRows', () => native.pivotedQrOfRows(work, n, w, tol, perm));
  return {
    name: 'native',
    gemm: native.gemm,
    luFactor,
    luSolve(f, b) {
      if (b.rows !== f.n) throw new Error(`solve: right-hand side has ${b.rows} rows, the matrix is ${f.n}×${f.n}`);
      if (f.zeroPivot >= 0) throw singular('solve', f);
      const x = { rows: b.rows, cols: b.cols, data: new Float64Array(b.data) };
      call('solve', () => native.luSolve(f.lu, f.n, f.perm, x.data, b.cols));
      return x;
    },
    luInverse(f) {
      if (f.zeroPivot >= 0) throw singular('inverse', f);
      const inv = zeros(f.n, f.n);
      call('inverse', () => native.luInverse(f.lu, f.n, f.perm, inv.data));
      return inv;
    },
    luReciprocalCondition(f, norm1) {
      if (f.zeroPivot >= 0) return 0;
      return call('condition', () => native.luReciprocalCondition(f.lu, f.n, norm1));
    },
    hessenberg(a) {
      const n = square('hessenberg', a);
      const H = { rows: n, cols: n, data: new Float64Array(a.data) };
      const Q = zeros(n, n);
      call('hessenberg', () => native.hessenberg(H.data, n, Q.data));
      return { H, Q };
    },
    schur(a) {
      const n = square('schur', a);
      const T = { rows: n, cols: n, data: new Float64Array(a.data) };
      const Z = zeros(n, n);
      const re = new Float64Array(n), im = new Float64Array(n);
      call('schur', () => native.schur(T.data, n, Z.data, re, im));
      return { T, Z, values: { re, im } };
    },
    eigenvalues(a): ComplexVector {
      const n = square('eigenvalues', a);
      const re = new Float64Array(n), im = new Float64Array(n);
      call('eigenvalues', () => native.eigenvalues(a.data, n, re, im));
      return { re, im };
    },
    eig(a) {
      const n = square('eig', a);
      const re = new Float64Array(n), im = new Float64Array(n);
      const vectors = zeros(n, n);
      call('eig', () => native.eig(a.data, n, re, im, vectors.data));
      return { values: { re, im }, vectors };
    },
    svd(a) {
      const k = Math.min(a.rows, a.cols);
      const s = new Float64Array(k);
      const U = zeros(a.rows, k);
      const Vt = zeros(k, a.cols);
      call('svd', () => native.svd(a.data, a.rows, a.cols, s, U.data, Vt.data));
      const V = zeros(a.cols, k);
      for (let i = 0; i < k; i++) for (let j = 0; j < a.cols; j++) V.data[j * k + i] = Vt.data[i * a.cols + j];
      return { U, s, V };
    },
    singularValues(a) {
      const s = new Float64Array(Math.min(a.rows, a.cols));
      call('singularValues', () => native.svd(a.data, a.rows, a.cols, s, null, null));
      return s;
    },
    symmetricEig(a) {
      const n = square('symmetricEig', a);
      const vectors = { rows: n, cols: n, data: new Float64Array(a.data) };
      const values = new Float64Array(n);
      call('symmetricEig', () => native.symmetricEig(vectors.data, n, values, true));
      return { values, vectors };
    },
    symmetricEigenvalues(a) {
      const n = square('symmetricEigenvalues', a);
      const values = new Float64Array(n);
      call('symmetricEigenvalues', () => native.symmetricEig(new Float64Array(a.data), n, values, false));
      return values;
    },
    cholesky(a) {
      const n = square('cholesky', a);
      const L = { rows: n, cols: n, data: new Float64Array(a.data) };
      const failed = call('cholesky', () => native.cholesky(L.data, n));
      if (failed >= 0) throw new Error(`cholesky: matrix is not positive definite (the leading minor of order ${failed + 1} is not)`);
      return L;
    },
    pivotedCholesky(x, tol) {
      const n = square('pivotedCholesky', x);
      const f = new Float64Array(n * n);
      const rank = call('pivotedCholesky', () => native.pivotedCholesky(new Float64Array(x.data), n, tol, f));
      return { rows: n, cols: rank, data: f.slice(0, n * rank) };
    },
    qr(a) {
      const k = Math.min(a.rows, a.cols);
      const Q = zeros(a.rows, k), R = zeros(k, a.cols);
      call('qr', () => native.qr(a.data, a.rows, a.cols, Q.data, R.data));
      return { Q, R };
    },
    pivotedQr(a, tolerance) {
      const tol = tolerance ?? Math.max(a.rows, a.cols) * Number.EPSILON;
      if (!(tol >= 0)) throw new Error(`pivotedQr: tolerance must be a non-negative number, got ${tolerance}`);
      const k = Math.min(a.rows, a.cols);
      const q = new Float64Array(a.rows * k), r = new Float64Array(k * a.cols);
      const perm = new Int32Array(a.cols);
      const rank = call('pivotedQr', () => native.pivotedQr(a.data, a.rows, a.cols, tol, perm, q, r));
      return {
        Q: { rows: a.rows, cols: rank, data: q.slice(0, a.rows * rank) },
        R: { rows: rank, cols: a.cols, data: r.slice(0, rank * a.cols) },
        perm,
        rank,
      };
    },
    pivotedQrOfRows,
    pivotedQrOfRowsPair(first, second, tol) {
      // OpenBLAS threads each compression itself, so the two run one after the other.
      return [
        pivotedQrOfRows(first.work, first.n, first.w, tol, first.perm),
        pivotedQrOfRows(second.work, second.n, second.w, tol, second.perm),
      ];
    },
    quasiTriangularSylvester(t, s, f, transposeT = false, transposeS = false) {
      const scale = call('sylvester', () => native.trsyl(transposeT, transposeS, 1, t.rows, s.rows, t.data, s.data, f.data));
      if (scale !== 1) {
        // dtrsyl3 scaled the solution to avoid overflow, or perturbed a near-common eigenvalue.
        const c = Math.abs(scale);
        if (c > 0) for (let k = 0; k < f.data.length; k++) f.data[k] /= c;
        return scale < 0 || c < 1e-300;
      }
      return false;
    },
    hessenbergResponse(H, QtB, CQ, D, w) {
      const p = CQ.rows, m = QtB.cols;
      const re = new Float64Array(w.length * p * m), im = new Float64Array(w.length * p * m);
      call('frequency response', () => native.hessenbergResponse(H.data, H.rows, QtB.data, m, CQ.data, p, D.data, w, re, im));
      return { re, im };
    },
    setThreads(threads) {
      setLinalgThreads(threads);
      native.setThreads(linalgThreads());
    },
  };
}

let kernelsOnce: DenseKernels | null | undefined;

/** The native kernels, or the reason they are unavailable. */
export function loadNativeKernels(): { kernels: DenseKernels | null; path: string; error: string } {
  const a = nativeAddon();
  if (kernelsOnce === undefined) kernelsOnce = a.addon ? makeKernels(a.addon) : null;
  return { kernels: kernelsOnce, path: a.path, error: a.error };
}

/**
 * Hammarling's (1982) Cholesky factor F (n×n) of the solution Y = F·Fᵀ of T·Y + Y·Tᵀ + W·Wᵀ = 0
 * (`transpose` false) or Tᵀ·Y + Y·T + W·Wᵀ = 0 (true), T the real Schur form of a stable A and W n×m
 * (reduction/native/src/hammarling.cc). Native backend only: null when the addon is not loaded.
 */
export function nativeHammarlingFactor(t: Matrix, w: Matrix, transpose: boolean): Matrix | null {
  const native = nativeAddon().addon;
  if (!native) return null;
  const n = square('hammarlingFactor', t);
  if (w.rows !== n) throw new Error(`hammarlingFactor: W has ${w.rows} rows, T is ${n}×${n}`);
  const f = new Float64Array(n * n);
  call('hammarlingFactor', () => native.hammarlingFactor(t.data, n, w.data, w.cols, transpose, f));
  return { rows: n, cols: n, data: f };
}
