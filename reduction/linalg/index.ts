/**
 * The engine's dense linear-algebra surface. Everything in `reduction/` outside `linalg/` calls these
 * functions and nothing else for dense kernels. Each one asks the active backend (`kernels.ts`: the
 * native LAPACK/BLAS addon by default, the portable TypeScript/WebAssembly kernels otherwise) and does
 * not care who serves it; the algorithms built on the kernels (the sign-function Lyapunov solvers,
 * Bartels–Stewart, the matrix exponential) are written once, above the interface.
 * Contracts (argument order, shapes, what is returned) are the same for both backends.
 */
import { type Matrix, type ComplexVector, zeros } from './matrix';
import type { LuFactorization } from './lu';
import { kernels } from './kernels';
import { lyapunov as signLyapunov } from './lyapunov';

export * from './matrix';
export { luLogDeterminant, type LuFactorization } from './lu';
export { sortSchur, schurBlocks, blockEigenvalue } from './schur-reorder';
export { lyapunovFactor, lowRankGramianFactors } from './lyapunov';
export { linalgThreads } from './parallel';
export { kernels, linalgBackendReport, useLinalgBackend } from './kernels';

/** Sets the dense kernels' thread count (BLAS threads for the native backend, 1 or 2 for the portable one). */
export function setLinalgThreads(threads: number): void {
  kernels().setThreads(threads);
}

/** C ← α·op(A)·op(B) + β·C on row-major arrays with offsets and leading dimensions (BLAS dgemm). */
export function gemm(
  transposeA: boolean, transposeB: boolean, m: number, n: number, k: number, alpha: number,
  a: Float64Array, offsetA: number, lda: number, b: Float64Array, offsetB: number, ldb: number,
  beta: number, c: Float64Array, offsetC: number, ldc: number,
): void {
  kernels().gemm(transposeA, transposeB, m, n, k, alpha, a, offsetA, lda, b, offsetB, ldb, beta, c, offsetC, ldc);
}

function product(a: Matrix, b: Matrix, ta: boolean, tb: boolean): Matrix {
  const m = ta ? a.cols : a.rows, k = ta ? a.rows : a.cols;
  const kb = tb ? b.cols : b.rows, n = tb ? b.rows : b.cols;
  if (k !== kb) throw new Error(`matmul: ${ta ? 'Aᵀ' : 'A'} is ${m}×${k}, ${tb ? 'Bᵀ' : 'B'} is ${kb}×${n}`);
  const c = zeros(m, n);
  if (m > 0 && n > 0) kernels().gemm(ta, tb, m, n, k, 1, a.data, 0, a.cols, b.data, 0, b.cols, 0, c.data, 0, n);
  return c;
}

/** C = A·B. */
export function multiply(a: Matrix, b: Matrix): Matrix {
  return product(a, b, false, false);
}
/** C = Aᵀ·B. */
export function multiplyTransposeA(a: Matrix, b: Matrix): Matrix {
  return product(a, b, true, false);
}
/** C = A·Bᵀ. */
export function multiplyTransposeB(a: Matrix, b: Matrix): Matrix {
  return product(a, b, false, true);
}
/** C = A·B (the engine's usual name). */
export function matmul(a: Matrix, b: Matrix): Matrix {
  return product(a, b, false, false);
}

/** P·A = L·U with partial pivoting; never throws for a singular A (see `LuFactorization.zeroPivot`). */
export function luFactor(a: Matrix): LuFactorization {
  return kernels().luFactor(a);
}
/** X with A·X = B from a factorisation of A; throws when A is singular. */
export function luSolve(f: LuFactorization, b: Matrix): Matrix {
  return kernels().luSolve(f, b);
}
/** A⁻¹ from a factorisation of A; throws when A is singular. */
export function luInverse(f: LuFactorization): Matrix {
  return kernels().luInverse(f);
}
/** An estimate of 1/κ₁(A) from A's factorisation and ‖A‖₁ (0 for a singular A). */
export function luReciprocalCondition(f: LuFactorization, norm1: number): number {
  return kernels().luReciprocalCondition(f, norm1);
}

/** Solution X of A·X = B for square nonsingular A. Throws when A is numerically singular. */
export function solve(a: Matrix, b: Matrix): Matrix {
  if (a.rows !== a.cols) throw new Error(`solve: matrix must be square, got ${a.rows}×${a.cols}`);
  return luSolve(luFactor(a), b);
}

export function inverse(a: Matrix): Matrix {
  if (a.rows !== a.cols) throw new Error(`inverse: matrix must be square, got ${a.rows}×${a.cols}`);
  return luInverse(luFactor(a));
}

/** Upper Hessenberg H and orthogonal Q with A = Q·H·Qᵀ. */
export function hessenberg(a: Matrix): { H: Matrix; Q: Matrix } {
  return kernels().hessenberg(a);
}

/** Real Schur form A = Z·T·Zᵀ, T quasi-upper-triangular with standardised 2×2 blocks. */
export function schur(a: Matrix): { T: Matrix; Z: Matrix; values: ComplexVector } {
  return kernels().schur(a);
}

/**
 * The last eigenvalues (and eigenvectors, once asked for) of each matrix object, per backend: the analysis
 * asks for the poles, the modal form and the frequency response's modal form of the same A, a reduction
 * and its simulations ask for the poles several times, and an O(n³) decomposition is done once. The
 * engine treats a model's matrices as immutable once validated; a shared result is read-only.
 */
const eigMemo = new WeakMap<
  Matrix,
  { backend: string; values: ComplexVector; result?: { values: ComplexVector; vectors: Matrix } }
>();

/** Drops what is kept for this matrix object (the benchmark times repeated runs on one matrix). */
export function forgetDecompositions(a: Matrix): void {
  eigMemo.delete(a);
}

/** Eigenvalues of a general real square matrix (complex pairs consecutive, positive imaginary part first). */
export function eigenvalues(a: Matrix): ComplexVector {
  const backend = kernels().name;
  let memo = eigMemo.get(a);
  if (!memo || memo.backend !== backend) {
    memo = { backend, values: kernels().eigenvalues(a) };
    eigMemo.set(a, memo);
  }
  return { re: memo.values.re.slice(), im: memo.values.im.slice() };
}

/**
 * Eigenvalues and right eigenvectors of a general real matrix. Vectors in the real packed form:
 * for a complex pair at j, j+1 (im[j] > 0), columns j and j+1 hold the real and imaginary parts of the
 * eigenvector of values[j]; the conjugate vector belongs to values[j+1]. Each vector has unit 2-norm.
 * The result is shared with later calls on the same matrix object: do not modify it.
 */
export function eig(a: Matrix): { values: ComplexVector; vectors: Matrix } {
  const backend = kernels().name;
  const memo = eigMemo.get(a);
  if (memo && memo.backend === backend && memo.result) return memo.result;
  const result = kernels().eig(a);
  // The eigenvalues from the vectors' computation replace any earlier values-only ones, so poles and
  // modes always come from the same decomposition.
  eigMemo.set(a, { backend, values: result.values, result });
  return result;
}

/** Thin SVD A = U·diag(s)·Vᵀ with s descending. */
export function svd(a: Matrix): { U: Matrix; s: Float64Array; V: Matrix } {
  return kernels().svd(a);
}

/** Singular values only, descending. */
export function singularValues(a: Matrix): Float64Array {
  return kernels().singularValues(a);
}

/** Eigen-decomposition of a symmetric matrix (lower triangle read), eigenvalues ascending, orthonormal vectors in columns. */
export function symmetricEig(a: Matrix): { values: Float64Array; vectors: Matrix } {
  return kernels().symmetricEig(a);
}

/** Eigenvalues of a symmetric matrix, ascending. */
export function symmetricEigenvalues(a: Matrix): Float64Array {
  return kernels().symmetricEigenvalues(a);
}

/** Lower-triangular L with A = L·Lᵀ; throws when A is not numerically positive definite. */
export function cholesky(a: Matrix): Matrix {
  return kernels().cholesky(a);
}

/** F (n×r) with X ≈ F·Fᵀ for a positive semidefinite X, by Cholesky with diagonal pivoting (stops at tol²·max diag X). */
export function pivotedCholesky(x: Matrix, tol: number): Matrix {
  return kernels().pivotedCholesky(x, tol);
}

/** Thin QR: A (m×n) = Q·R, Q m×k with orthonormal columns, R k×n upper triangular, k = min(m, n). */
export function qr(a: Matrix): { Q: Matrix; R: Matrix } {
  return kernels().qr(a);
}

/** QR with column pivoting truncated at the numerical rank (see qr.ts for the contract). */
export function pivotedQr(a: Matrix, tolerance?: number): { Q: Matrix; R: Matrix; perm: Int32Array; rank: number } {
  return kernels().pivotedQr(a, tolerance);
}

/**
 * X solving A·X + X·Aᵀ + Q = 0 for stable A (all eigenvalues in the open left half-plane), by the
 * scaled matrix sign-function iteration (Roberts 1971; Byers 1987), see `lyapunov.ts`.
 */
export function lyapunov(a: Matrix, q: Matrix): Matrix {
  return signLyapunov(a, q);
}
