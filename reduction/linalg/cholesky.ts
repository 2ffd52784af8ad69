/**
 * Cholesky factorisation A = L·Lᵀ of a symmetric positive definite matrix.
 *
 * Method: the row-oriented (dot-product) Cholesky–Banachiewicz ordering (Golub & Van Loan, Matrix
 * Computations, 4th ed., 2013, §4.2.5): L(i, j) = (A(i, j) − Σ_{k<j} L(i, k)·L(j, k)) / L(j, j), whose
 * inner loop is a dot product of two rows of L, contiguous in row-major storage. Only the lower
 * triangle of A is read. Backward stable without pivoting (ibid. §4.2.6).
 */
import { type Matrix, zeros } from './matrix';

/** Lower-triangular L with A = L·Lᵀ; throws, naming the column, when A is not numerically positive definite. */
export function cholesky(a: Matrix): Matrix {
  if (a.rows !== a.cols) throw new Error(`cholesky: matrix must be square, got ${a.rows}×${a.cols}`);
  const n = a.rows;
  const l = zeros(n, n);
  const L = l.data;
  const A = a.data;
  for (let i = 0; i < n; i++) {
    const ri = i * n;
    for (let j = 0; j <= i; j++) {
      const rj = j * n;
      let s = A[ri + j];
      if (!Number.isFinite(s)) throw new Error(`cholesky: entry (${i}, ${j}) is not finite`);
      for (let k = 0; k < j; k++) s -= L[ri + k] * L[rj + k];
      if (i === j) {
        if (!(s > 0)) throw new Error(`cholesky: matrix is not positive definite (pivot ${j} is ${s.toExponential(2)})`);
        L[ri + i] = Math.sqrt(s);
      } else {
        L[ri + j] = s / L[rj + j];
      }
    }
  }
  return l;
}
