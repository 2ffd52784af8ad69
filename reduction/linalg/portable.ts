/**
 * The portable backend: Modeshelf's own TypeScript/WebAssembly kernels, one algorithm per file (each
 * cites its paper there), for machines where the native addon cannot be built. Slower than LAPACK by a
 * factor of 3–40 depending on the operation (see the README's benchmark), same contracts.
 */
import type { DenseKernels } from './kernels';
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
  quasiTriangularSylvester,
  hessenbergResponse,
  setThreads: setLinalgThreads,
};
