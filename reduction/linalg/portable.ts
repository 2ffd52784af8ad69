/**
 * The portable backend: Modeshelf's own TypeScript/WebAssembly kernels, one algorithm per file (each
 * cites its paper there), for machines where the native addon cannot be built. Slower than LAPACK by a
 * factor of 3–40 depending on the operation (see the README's benchmark), same contracts.
 */
import type { DenseKernels } from './dense-kernels';
import { type Matrix, norm1 } from './matrix';
import { gemm } from './gemm';
import { luFactor, luSolve, luInverse, type LuFactorization } from './lu';
import { hessenberg } from './hessenberg';
import { schur, eigenvalues, eig } from './schur';
import { svd, singularValues } from './svd';
import { symmetricEig, symmetricEigenvalues } from './symmetric-eig';
import { cholesky, pivotedCholesky } from './cholesky';
import { qr, pivotedQr, pivotedQrOfRows } from './qr';
import { quasiTriangularSylvester } from './sylvester-kernel';
import { hessenbergResponse } from './hessenberg-solve';
import { pairOnWorker, setLinalgThreads } from './parallel';

function reciprocalCondition(f: LuFactorization, anorm: number): number {
  if (f.zeroPivot >= 0) return 0;
  const inv: Matrix = luInverse(f);
  const denominator = anorm * norm1(inv);
  return denominator > 0 ? 1 / denominator : 0;
}

/** J·Mᵀ·J (J the reversal): upper quasi-triangular again when M is, with the same diagonal blocks. */
function reversedTranspose(m: Matrix): Matrix {
  const n = m.rows;
  const out = { rows: n, cols: n, data: new Float64Array(n * n) };
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out.data[i * n + j] = m.data[(n - 1 - j) * n + (n - 1 - i)];
  return out;
}

/**
 * op(T)·Y + Y·op(S) = F through the upper-triangular kernel: with J the reversal, Tᵀ·Y = J·(J·Tᵀ·J)·J·Y,
 * so (J·Tᵀ·J)·(J·Y) + (J·Y)·S = J·F, and likewise on the right for Sᵀ.
 */
function transposedSylvester(t: Matrix, s: Matrix, f: Matrix, transposeT = false, transposeS = false): boolean {
  if (!transposeT && !transposeS) return quasiTriangularSylvester(t, s, f);
  const n = f.rows, m = f.cols;
  const src = f.data.slice();
  const at = (i: number, j: number) => src[(transposeT ? n - 1 - i : i) * m + (transposeS ? m - 1 - j : j)];
  for (let i = 0; i < n; i++) for (let j = 0; j < m; j++) f.data[i * m + j] = at(i, j);
  const perturbed = quasiTriangularSylvester(transposeT ? reversedTranspose(t) : t, transposeS ? reversedTranspose(s) : s, f);
  const y = f.data.slice();
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < m; j++) f.data[(transposeT ? n - 1 - i : i) * m + (transposeS ? m - 1 - j : j)] = y[i * m + j];
  }
  return perturbed;
}

export const portableKernels: DenseKernels = {
  name: 'portable',
  gemm,
  luFactor,
  luSolve,
  luInverse,
  luReciprocalCondition: reciprocalCondition,
  hessenberg,
  schur,
  eigenvalues,
  eig,
  svd,
  singularValues,
  symmetricEig,
  symmetricEigenvalues,
  cholesky,
  pivotedCholesky,
  qr,
  pivotedQr,
  pivotedQrOfRows,
  pivotedQrOfRowsPair(first, second, tol) {
    return pairOnWorker(
      () => pivotedQrOfRows(first.work, first.n, first.w, tol, first.perm),
      { kind: 'pivotedQrOfRows', work: second.work, n: second.n, w: second.w, tol, perm: second.perm },
    );
  },
  quasiTriangularSylvester: transposedSylvester,
  hessenbergResponse,
  setThreads: setLinalgThreads,
};
