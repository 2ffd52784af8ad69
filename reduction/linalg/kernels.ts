/**
 * The one backend interface of the dense engine. Every kernel the engine needs (products, LU, Schur and
 * Hessenberg forms, eigenvalues and vectors, SVD, symmetric eigenproblems, Cholesky and QR variants,
 * quasi-triangular Sylvester solves, the batched Hessenberg frequency response) is an operation of
 * `DenseKernels`; the algorithms above it (`lyapunov.ts`, `expm.ts`, `sylvester.ts`, the methods in
 * `reduction/`) ask `kernels()` and do not care who serves them.
 *
 * Two backends implement it:
 *   native    Debian's OpenBLAS/LAPACK (LAPACKE) through the Node-API addon in `reduction/native/`
 *             (`native.ts`); the default when the addon is built.
 *   portable  our TypeScript/WebAssembly kernels (`portable.ts`), for machines without a compiler.
 * `MODESHELF_LINALG=native|portable` chooses; unset, native is used when it loads and portable otherwise
 * (`linalgBackendReport()` says which and why). `MODESHELF_LINALG=native` with no loadable addon is an error.
 * Contracts (argument order, shapes, layouts, what is returned) are those documented in the portable
 * kernel files; both backends pass the same reference tests.
 */
import type { Matrix, ComplexVector } from './matrix';
import type { LuFactorization } from './lu';
import { portableKernels } from './portable';
import { loadNativeKernels } from './native';

export interface DenseKernels {
  readonly name: 'native' | 'portable';
  /** C[offC..] ← α·op(A)·op(B) + β·C, row-major with leading dimensions (BLAS dgemm's contract). */
  gemm(
    transposeA: boolean, transposeB: boolean, m: number, n: number, k: number, alpha: number,
    a: Float64Array, offsetA: number, lda: number, b: Float64Array, offsetB: number, ldb: number,
    beta: number, c: Float64Array, offsetC: number, ldc: number,
  ): void;
  luFactor(a: Matrix): LuFactorization;
  luSolve(f: LuFactorization, b: Matrix): Matrix;
  luInverse(f: LuFactorization): Matrix;
  /** Estimate of 1/κ₁(A) from A's factorisation and ‖A‖₁ (LAPACK dgecon's contract; portable: exact from A⁻¹). */
  luReciprocalCondition(f: LuFactorization, norm1: number): number;
  hessenberg(a: Matrix): { H: Matrix; Q: Matrix };
  schur(a: Matrix): { T: Matrix; Z: Matrix; values: ComplexVector };
  eigenvalues(a: Matrix): ComplexVector;
  eig(a: Matrix): { values: ComplexVector; vectors: Matrix };
  svd(a: Matrix): { U: Matrix; s: Float64Array; V: Matrix };
  singularValues(a: Matrix): Float64Array;
  symmetricEig(a: Matrix): { values: Float64Array; vectors: Matrix };
  symmetricEigenvalues(a: Matrix): Float64Array;
  cholesky(a: Matrix): Matrix;
  pivotedCholesky(x: Matrix, tol: number): Matrix;
  qr(a: Matrix): { Q: Matrix; R: Matrix };
  pivotedQr(a: Matrix, tolerance?: number): { Q: Matrix; R: Matrix; perm: Int32Array; rank: number };
  /** Two independent `pivotedQrOfRows` compressions (see qr.ts); returns both ranks. */
  pivotedQrOfRowsPair(
    first: { work: Float64Array; n: number; w: number; perm: Int32Array },
    second: { work: Float64Array; n: number; w: number; perm: Int32Array },
    tol: number,
  ): [number, number];
  pivotedQrOfRows(work: Float64Array, n: number, w: number, tol: number, perm: Int32Array): number;
  /**
   * op(T)·Y + Y·op(S) = F for upper quasi-triangular T, S (op = transpose when asked; F overwritten by
   * Y); true when a pivot was perturbed (T and −S share an eigenvalue to working precision).
   */
  quasiTriangularSylvester(t: Matrix, s: Matrix, f: Matrix, transposeT?: boolean, transposeS?: boolean): boolean;
  /**
   * G(jω) = CQ·(jωI − H)⁻¹·QtB + D for every ω (Laub 1981), H upper Hessenberg; results as
   * [frequency][p][m] in `re`/`im` (length w.length·p·m).
   */
  hessenbergResponse(H: Matrix, QtB: Matrix, CQ: Matrix, D: Matrix, w: Float64Array): { re: Float64Array; im: Float64Array };
  /** Sets the kernels' thread count (BLAS threads, or the portable second core). */
  setThreads(threads: number): void;
}

interface Selection {
  readonly kernels: DenseKernels;
  readonly reason: string;
}

let selection: Selection | undefined;

function select(): Selection {
  const wanted = (typeof process !== 'undefined' ? process.env?.MODESHELF_LINALG : undefined)?.trim() ?? '';
  if (wanted === 'portable') return { kernels: portableKernels, reason: 'MODESHELF_LINALG=portable' };
  if (wanted !== '' && wanted !== 'native') {
    throw new Error(`MODESHELF_LINALG must be "native" or "portable", got "${wanted}"`);
  }
  const loaded = loadNativeKernels();
  if (loaded.kernels) return { kernels: loaded.kernels, reason: `native addon ${loaded.path}` };
  if (wanted === 'native') {
    throw new Error(`MODESHELF_LINALG=native but the native addon could not be loaded: ${loaded.error} (build it with \`npm run build:native\`)`);
  }
  return { kernels: portableKernels, reason: `native addon unavailable (${loaded.error}); portable kernels` };
}

/** The active backend (chosen once per thread on first use). */
export function kernels(): DenseKernels {
  if (!selection) selection = select();
  return selection.kernels;
}

/** Which backend serves the engine and why. */
export function linalgBackendReport(): { backend: 'native' | 'portable'; reason: string } {
  const k = kernels();
  return { backend: k.name, reason: selection!.reason };
}

/** Switches the backend for this thread (tests and benchmarks run both on the same inputs). */
export function useLinalgBackend(name: 'native' | 'portable'): void {
  if (name === 'portable') {
    selection = { kernels: portableKernels, reason: 'chosen by useLinalgBackend' };
    return;
  }
  const loaded = loadNativeKernels();
  if (!loaded.kernels) throw new Error(`the native backend is not available: ${loaded.error}`);
  selection = { kernels: loaded.kernels, reason: 'chosen by useLinalgBackend' };
}
