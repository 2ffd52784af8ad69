/**
 * Sylvester equations A·X + X·B = C, and Lyapunov equations as a special case, by the method of
 * Bartels & Stewart ("Algorithm 432: Solution of the matrix equation AX + XB = C", Comm. ACM 15(9),
 * 1972): real Schur forms A = U·T·Uᵀ and B = V·S·Vᵀ (`schur.ts`), then T·Y + Y·S = Uᵀ·C·V solved by
 * substitution over the quasi-triangular blocks (1×1 or 2×2 on each side, so small systems of order
 * 1, 2 or 4, as in LAPACK's dtrsyl), and X = U·Y·Vᵀ.
 *
 * A second, independent route to the gramians besides the sign function (`lyapunov.ts`): its cost is
 * dominated by the two Schur forms (≈ 25n³ flops each), so the sign function is faster here, but the
 * two methods share no code beyond the products, which makes each a check on the other.
 */
import { type Matrix, zeros, transpose } from './matrix';
import { kernels } from './kernels';

function multiply(a: Matrix, b: Matrix, transposeA = false, transposeB = false): Matrix {
  const m = transposeA ? a.cols : a.rows, k = transposeA ? a.rows : a.cols, n = transposeB ? b.rows : b.cols;
  const c = zeros(m, n);
  kernels().gemm(transposeA, transposeB, m, n, k, 1, a.data, 0, a.cols, b.data, 0, b.cols, 0, c.data, 0, n);
  return c;
}

function checkFinite(what: string, name: string, a: Matrix): void {
  for (let k = 0; k < a.data.length; k++) {
    if (!Number.isFinite(a.data[k])) throw new Error(`${what}: ${name}(${Math.floor(k / a.cols)}, ${k % a.cols}) is not finite`);
  }
}

/**
 * X with A·X + X·B = C (A n×n, B m×m, C n×m), unique when A and −B have no common eigenvalue; throws
 * when they share one to working precision (the equation is then singular or nearly so).
 */
export function sylvester(a: Matrix, b: Matrix, c: Matrix): Matrix {
  const what = 'sylvester';
  if (a.rows !== a.cols) throw new Error(`${what}: A must be square, got ${a.rows}×${a.cols}`);
  if (b.rows !== b.cols) throw new Error(`${what}: B must be square, got ${b.rows}×${b.cols}`);
  if (c.rows !== a.rows || c.cols !== b.rows) throw new Error(`${what}: C is ${c.rows}×${c.cols}, expected ${a.rows}×${b.rows}`);
  checkFinite(what, 'A', a);
  checkFinite(what, 'B', b);
  checkFinite(what, 'C', c);
  if (a.rows === 0 || b.rows === 0) return zeros(a.rows, b.rows);
  const k = kernels();
  const sa = k.schur(a);
  const sb = k.schur(b);
  const f = multiply(multiply(sa.Z, c, true), sb.Z);
  if (k.quasiTriangularSylvester(sa.T, sb.T, f)) {
    throw new Error(`${what}: A and −B have an eigenvalue in common (to working precision), so the solution is not unique`);
  }
  return multiply(multiply(sa.Z, f), sb.Z, false, true);
}

/** X with A·X + X·Aᵀ + Q = 0 by Bartels–Stewart (A stable for a positive semidefinite X from Q ⪰ 0). */
export function lyapunovBartelsStewart(a: Matrix, q: Matrix): Matrix {
  if (a.rows !== a.cols) throw new Error(`lyapunovBartelsStewart: A must be square, got ${a.rows}×${a.cols}`);
  if (q.rows !== a.rows || q.cols !== a.cols) throw new Error(`lyapunovBartelsStewart: Q is ${q.rows}×${q.cols}, A is ${a.rows}×${a.cols}`);
  const minusQ = zeros(q.rows, q.cols);
  for (let k = 0; k < q.data.length; k++) minusQ.data[k] = -q.data[k];
  return sylvester(a, transpose(a), minusQ);
}
