/**
 * The engine's dense linear-algebra surface. Everything in `reduction/` outside `linalg/` calls these
 * functions and nothing else for dense kernels, so a kernel can be replaced by a faster one without
 * touching the methods that use it.
 *
 * BOOTSTRAP NOTE: the first versions below delegate to ml-matrix so that the methods can be written
 * against a stable interface; each is being replaced by a typed-array kernel in its own file
 * (`gemm.ts`, `lu.ts`, `schur.ts`, `svd.ts`, `lyapunov.ts`, …) as measured speed requires.
 * Contracts (argument order, shapes, what is returned) must not change when that happens.
 */
import {
  Matrix as MlMatrix,
  EigenvalueDecomposition,
  SingularValueDecomposition,
  LuDecomposition,
  CholeskyDecomposition,
  inverse as mlInverse,
} from 'ml-matrix';
import { type Matrix, type ComplexVector, zeros } from './matrix';

export * from './matrix';

function toMl(m: Matrix): MlMatrix {
  const out = new MlMatrix(m.rows, m.cols);
  for (let i = 0; i < m.rows; i++) for (let j = 0; j < m.cols; j++) out.set(i, j, m.data[i * m.cols + j]);
  return out;
}

function fromMl(m: MlMatrix): Matrix {
  const out = zeros(m.rows, m.columns);
  for (let i = 0; i < m.rows; i++) for (let j = 0; j < m.columns; j++) out.data[i * m.columns + j] = m.get(i, j);
  return out;
}

/** C = A·B. */
export function matmul(a: Matrix, b: Matrix): Matrix {
  if (a.cols !== b.rows) throw new Error(`matmul: ${a.rows}×${a.cols} times ${b.rows}×${b.cols}`);
  return fromMl(toMl(a).mmul(toMl(b)));
}

/** Solution X of A·X = B for square nonsingular A. Throws when A is numerically singular. */
export function solve(a: Matrix, b: Matrix): Matrix {
  const lu = new LuDecomposition(toMl(a));
  if (lu.isSingular()) throw new Error('solve: matrix is singular');
  return fromMl(lu.solve(toMl(b)));
}

export function inverse(a: Matrix): Matrix {
  return fromMl(mlInverse(toMl(a)));
}

/** Eigenvalues of a general real square matrix. */
export function eigenvalues(a: Matrix): ComplexVector {
  const e = new EigenvalueDecomposition(toMl(a), { assumeSymmetric: false });
  return { re: Float64Array.from(e.realEigenvalues), im: Float64Array.from(e.imaginaryEigenvalues) };
}

/**
 * Eigenvalues and right eigenvectors of a general real matrix. Vectors in the real packed form:
 * for a complex pair at j, j+1 (im[j] > 0), columns j and j+1 hold the real and imaginary parts of the
 * eigenvector of values[j]; the conjugate vector belongs to values[j+1].
 */
export function eig(a: Matrix): { values: ComplexVector; vectors: Matrix } {
  const e = new EigenvalueDecomposition(toMl(a), { assumeSymmetric: false });
  return {
    values: { re: Float64Array.from(e.realEigenvalues), im: Float64Array.from(e.imaginaryEigenvalues) },
    vectors: fromMl(e.eigenvectorMatrix),
  };
}

/** Thin SVD A = U·diag(s)·Vᵀ with s descending. */
export function svd(a: Matrix): { U: Matrix; s: Float64Array; V: Matrix } {
  const d = new SingularValueDecomposition(toMl(a), { autoTranspose: true });
  return { U: fromMl(d.leftSingularVectors), s: Float64Array.from(d.diagonal), V: fromMl(d.rightSingularVectors) };
}

/** Eigen-decomposition of a symmetric matrix, eigenvalues ascending, orthonormal vectors in columns. */
export function symmetricEig(a: Matrix): { values: Float64Array; vectors: Matrix } {
  const e = new EigenvalueDecomposition(toMl(a), { assumeSymmetric: true });
  return { values: Float64Array.from(e.realEigenvalues), vectors: fromMl(e.eigenvectorMatrix) };
}

/** Lower-triangular L with A = L·Lᵀ; throws when A is not numerically positive definite. */
export function cholesky(a: Matrix): Matrix {
  const c = new CholeskyDecomposition(toMl(a));
  if (!c.isPositiveDefinite()) throw new Error('cholesky: matrix is not positive definite');
  return fromMl(c.lowerTriangularMatrix);
}

/**
 * X solving A·X + X·Aᵀ + Q = 0 for stable A (all eigenvalues in the open left half-plane).
 * Bootstrap: the matrix sign-function iteration (Roberts 1971) with determinant scaling.
 */
export function lyapunov(a: Matrix, q: Matrix): Matrix {
  let ak = toMl(a);
  let qk = toMl(q);
  const n = a.rows;
  for (let it = 0; it < 100; it++) {
    const ai = mlInverse(ak);
    const det = Math.abs(new LuDecomposition(ak).determinant);
    const c = det > 0 && Number.isFinite(det) ? Math.pow(det, -1 / n) : 1;
    const aNext = ak.clone().mul(c).add(ai.clone().mul(1 / c)).mul(0.5);
    const qNext = qk.clone().mul(c).add(ai.mmul(qk).mmul(ai.transpose()).mul(1 / c)).mul(0.5);
    const diff = aNext.clone().sub(ak).norm('frobenius') / aNext.norm('frobenius');
    ak = aNext;
    qk = qNext;
    if (diff < 1e-12) break;
  }
  return fromMl(qk.mul(0.5));
}
