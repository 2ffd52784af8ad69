/**
 * Cholesky factorisation A = L·Lᵀ of a symmetric positive definite matrix.
 *
 * Method: the row-oriented (dot-product) Cholesky–Banachiewicz ordering (Golub & Van Loan, Matrix
 * Computations, 4th ed., 2013, §4.2): L(i, j) = (A(i, j) − Σ_{k<j} L(i, k)·L(j, k)) / L(j, j), whose
 * inner loop is a dot product of two rows of L, contiguous in row-major storage. Only the lower
 * triangle of A is read. Backward stable without pivoting (ibid. §4.2).
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

/**
 * Rank-revealing Cholesky factorisation with diagonal pivoting of a symmetric positive semidefinite X:
 * X ≈ F·Fᵀ with F n×r, stopping when the largest remaining diagonal falls to tol²·max(diag X), so a
 * semidefinite X (a gramian of a non-minimal model) never fails (N. J. Higham, "Analysis of the
 * Cholesky decomposition of a semi-definite matrix", in Reliable Numerical Computation, 1990; LAPACK
 * dpstrf). Left-looking: column k comes from dot products of rows of F, contiguous in row-major
 * storage; X is read through the permutation, never swapped. F's rows are in X's original order.
 */
export function pivotedCholesky(x: Matrix, tol: number): Matrix {
  if (x.rows !== x.cols) throw new Error(`pivotedCholesky: matrix must be square, got ${x.rows}×${x.cols}`);
  const n = x.rows;
  const X = x.data;
  const perm = new Int32Array(n);
  const d = new Float64Array(n);
  let dmax = 0;
  for (let i = 0; i < n; i++) {
    perm[i] = i;
    d[i] = X[i * n + i];
    if (!Number.isFinite(d[i])) throw new Error(`pivotedCholesky: entry (${i}, ${i}) is not finite`);
    dmax = Math.max(dmax, d[i]);
  }
  // Rows in pivot order; row i holds F[perm[i], 0..k).
  const L = new Float64Array(n * n);
  let rank = 0;
  const stop = tol * tol * dmax;
  for (let k = 0; k < n; k++) {
    let p = k;
    for (let j = k + 1; j < n; j++) if (d[j] > d[p]) p = j;
    if (!(d[p] > stop) || d[p] <= 0) break;
    if (p !== k) {
      let t = perm[k];
      perm[k] = perm[p];
      perm[p] = t;
      t = d[k];
      d[k] = d[p];
      d[p] = t;
      for (let c = 0; c < k; c++) {
        const u = L[k * n + c];
        L[k * n + c] = L[p * n + c];
        L[p * n + c] = u;
      }
    }
    const lkk = Math.sqrt(d[k]);
    L[k * n + k] = lkk;
    const pk = perm[k];
    const rk = k * n;
    for (let i = k + 1; i < n; i++) {
      const ri = i * n;
      let s = X[perm[i] * n + pk];
      for (let c = 0; c < k; c++) s -= L[ri + c] * L[rk + c];
      const lik = s / lkk;
      L[ri + k] = lik;
      d[i] -= lik * lik;
    }
    rank = k + 1;
  }
  const f = zeros(n, rank);
  for (let i = 0; i < n; i++) f.data.set(L.subarray(i * n, i * n + rank), perm[i] * rank);
  return f;
}
