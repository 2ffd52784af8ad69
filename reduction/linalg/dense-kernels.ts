/**
 * The dense engine's backend interface, on its own so the backends (`native.ts`, `portable.ts`) can name
 * it without importing the selection in `kernels.ts` that imports them. What each operation promises is
 * documented beside it and in the portable kernel files; both backends pass the same reference tests.
 */
import type { Matrix, ComplexVector } from './matrix';
import type { LuFactorization } from './lu';

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
