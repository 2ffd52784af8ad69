/**
 * Real Schur form A = Z·T·Zᵀ (T quasi-upper-triangular, Z orthogonal), eigenvalues, and right
 * eigenvectors of a general real matrix: the portable backend's `schur`, `eigenvalues` and `eig`
 * (`portable.ts`; the native backend calls LAPACK for the same contracts).
 *
 * Method: balancing (`balance.ts`, eigenvalues and vectors), Hessenberg reduction (`hessenberg.ts`), then the
 * Francis double-shift QR algorithm (`francis-qr.ts`); eigenvectors come from back substitution on T
 * (`triangular-eigenvectors.ts`) followed by one product with Z (as in LAPACK's dgeev).
 */
import { type Matrix, type ComplexVector, zeros } from './matrix';
import { reduceToHessenberg, formHessenbergQ } from './hessenberg';
import { gemm } from './gemm';
import { balance } from './balance';
import { hessenbergQR } from './francis-qr';
import { triangularEigenvectors } from './triangular-eigenvectors';

function checkInput(what: string, a: Matrix): void {
  if (a.rows !== a.cols) throw new Error(`${what}: matrix must be square, got ${a.rows}×${a.cols}`);
  const n = a.rows;
  for (let k = 0; k < a.data.length; k++) {
    if (!Number.isFinite(a.data[k])) throw new Error(`${what}: entry (${Math.floor(k / n)}, ${k % n}) is not finite`);
  }
}

/**
 * Real Schur form A = Z·T·Zᵀ with T quasi-upper-triangular (1×1 blocks for real eigenvalues,
 * standardised 2×2 blocks with equal diagonal for complex pairs) and Z orthogonal.
 * Guarantees ‖A − Z·T·Zᵀ‖_F and ‖ZᵀZ − I‖_F of order n·ε relative (backward stability of the QR
 * algorithm, Golub & Van Loan §7.5). The eigenvalues are returned in T's diagonal order.
 */
export function schur(a: Matrix): { T: Matrix; Z: Matrix; values: ComplexVector } {
  checkInput('schur', a);
  const n = a.rows;
  const T = zeros(n, n);
  T.data.set(a.data);
  const refl = reduceToHessenberg(T.data, n, true);
  const Z = formHessenbergQ(refl!, n);
  const re = new Float64Array(n), im = new Float64Array(n);
  hessenbergQR(T.data, n, true, Z.data, re, im);
  return { T, Z, values: { re, im } };
}

/**
 * Eigenvalues of a general real square matrix (complex pairs consecutive, positive imaginary part
 * first), by balancing (`balance.ts`), Hessenberg reduction and the eigenvalue-only double-shift QR.
 * About 10n³ flops.
 */
export function eigenvalues(a: Matrix): ComplexVector {
  checkInput('eigenvalues', a);
  const n = a.rows;
  const h = new Float64Array(a.data);
  balance(h, n);
  reduceToHessenberg(h, n, false);
  const re = new Float64Array(n), im = new Float64Array(n);
  hessenbergQR(h, n, false, null, re, im);
  return { re, im };
}

/**
 * Eigenvalues and right eigenvectors A·V = V·Λ in the real packed form (see `triangularEigenvectors`),
 * each vector (complex vector for a pair) scaled to unit 2-norm; A is balanced first (`balance.ts`). Eigenvalues in Schur order, complex
 * pairs consecutive with the positive imaginary part first. For a defective A the vectors of a
 * repeated eigenvalue are nearly parallel, as with any backward-stable method.
 */
export function eig(a: Matrix): { values: ComplexVector; vectors: Matrix } {
  checkInput('eig', a);
  const n = a.rows;
  // Balance first (as LAPACK's dgeev does); the vectors of D⁻¹·A·D map back through D.
  const balanced = zeros(n, n);
  balanced.data.set(a.data);
  const d = balance(balanced.data, n);
  const { T, Z, values } = schur(balanced);
  const X = triangularEigenvectors(T, values.re, values.im);
  const V = zeros(n, n);
  gemm(false, false, n, n, n, 1, Z.data, 0, n, X.data, 0, n, 0, V.data, 0, n);
  const v = V.data;
  for (let r = 0; r < n; r++) {
    const dr = d[r];
    if (dr !== 1) for (let k = 0; k < n; k++) v[r * n + k] *= dr;
  }
  for (let k = 0; k < n; k++) {
    const pair = values.im[k] > 0;
    let s = 0;
    for (let r = 0; r < n; r++) {
      s += v[r * n + k] * v[r * n + k];
      if (pair) s += v[r * n + k + 1] * v[r * n + k + 1];
    }
    const f = s > 0 ? 1 / Math.sqrt(s) : 1;
    for (let r = 0; r < n; r++) {
      v[r * n + k] *= f;
      if (pair) v[r * n + k + 1] *= f;
    }
    if (pair) k++;
  }
  return { values, vectors: V };
}
