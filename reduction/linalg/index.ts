/**
 * The engine's dense linear-algebra surface. Everything in `reduction/` outside `linalg/` calls these
 * functions and nothing else for dense kernels, so a kernel can be replaced by a faster one without
 * touching the methods that use it.
 *
 * The kernels are typed-array implementations, one algorithm per file (`gemm.ts`, `lu.ts`,
 * `hessenberg.ts`, `schur.ts`, `lyapunov.ts`, `svd.ts`, …), each citing its paper. Contracts (argument
 * order, shapes, what is returned) do not change when a kernel is replaced.
 */
import type { Matrix, ComplexVector } from './matrix';
import { multiply } from './gemm';
import { solve as luSolveMatrix, inverse as luInverseMatrix } from './lu';
import { eigenvalues as schurEigenvalues, eig as schurEig } from './schur';
import { lyapunov as signLyapunov } from './lyapunov';
import { svd as gkSvd } from './svd';
import { symmetricEig as qlSymmetricEig } from './symmetric-eig';
import { cholesky as rowCholesky } from './cholesky';

export * from './matrix';
export { gemm, multiply, multiplyTransposeA, multiplyTransposeB } from './gemm';
export { luFactor, luSolve, luInverse, luLogDeterminant, type LuFactorization } from './lu';
export { hessenberg } from './hessenberg';
export { schur, triangularEigenvectors, standardise2x2 } from './schur';
export {
  lyapunovFactor,
  lowRankGramianFactors,
  lyapunovResidual,
  type SignIterationOptions,
  type SignIterationReport,
} from './lyapunov';
export { setLinalgThreads, linalgThreads } from './parallel';
export { qr, pivotedQr, orthonormalBasis } from './qr';
export { singularValues } from './svd';
export { symmetricEigenvalues } from './symmetric-eig';
export { sylvester, lyapunovBartelsStewart } from './sylvester';
export { pivotedCholesky } from './cholesky';
export { balance } from './balance';

/** C = A·B (blocked, packed product; see `gemm.ts`). */
export function matmul(a: Matrix, b: Matrix): Matrix {
  if (a.cols !== b.rows) throw new Error(`matmul: ${a.rows}×${a.cols} times ${b.rows}×${b.cols}`);
  return multiply(a, b);
}

/** Solution X of A·X = B for square nonsingular A. Throws when A is numerically singular. */
export function solve(a: Matrix, b: Matrix): Matrix {
  return luSolveMatrix(a, b);
}

export function inverse(a: Matrix): Matrix {
  return luInverseMatrix(a);
}

/** Eigenvalues of a general real square matrix (balancing, Hessenberg, Francis double-shift QR: `schur.ts`). */
export function eigenvalues(a: Matrix): ComplexVector {
  return schurEigenvalues(a);
}

/**
 * Eigenvalues and right eigenvectors of a general real matrix. Vectors in the real packed form:
 * for a complex pair at j, j+1 (im[j] > 0), columns j and j+1 hold the real and imaginary parts of the
 * eigenvector of values[j]; the conjugate vector belongs to values[j+1]. Each vector has unit 2-norm.
 */
export function eig(a: Matrix): { values: ComplexVector; vectors: Matrix } {
  return schurEig(a);
}

/** Thin SVD A = U·diag(s)·Vᵀ with s descending (Golub–Kahan–Reinsch, `svd.ts`). */
export function svd(a: Matrix): { U: Matrix; s: Float64Array; V: Matrix } {
  return gkSvd(a);
}

/** Eigen-decomposition of a symmetric matrix, eigenvalues ascending, orthonormal vectors in columns. */
export function symmetricEig(a: Matrix): { values: Float64Array; vectors: Matrix } {
  return qlSymmetricEig(a);
}

/** Lower-triangular L with A = L·Lᵀ; throws when A is not numerically positive definite. */
export function cholesky(a: Matrix): Matrix {
  return rowCholesky(a);
}

/**
 * X solving A·X + X·Aᵀ + Q = 0 for stable A (all eigenvalues in the open left half-plane), by the
 * scaled matrix sign-function iteration (Roberts 1971; Byers 1987), see `lyapunov.ts`.
 */
export function lyapunov(a: Matrix, q: Matrix): Matrix {
  return signLyapunov(a, q);
}
