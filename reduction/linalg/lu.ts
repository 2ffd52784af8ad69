/**
 * LU factorisation with partial pivoting, P·A = L·U, and the solves and inverse built on it.
 *
 * Method: the right-looking blocked algorithm of LAPACK's dgetrf (Anderson et al., LAPACK Users' Guide,
 * 3rd ed., SIAM 1999; Golub & Van Loan, Matrix Computations, 4th ed., 2013, §3.4): an nb-column
 * panel is factorised with level-2 operations, the block row of U is found by a unit-lower triangular
 * solve, and the trailing matrix is updated by one matrix product (`gemm`), which carries ~all the flops.
 * The inverse follows dgetri's operation count (2n³ in all): L⁻¹ exploiting its triangular shape, then
 * U⁻¹·L⁻¹ by blocked back substitution, then the column permutation.
 */
import { type Matrix, zeros } from './matrix';
import { gemm } from './gemm';
import { sharedFloat64 } from './parallel';

/** Panel width: measured flat between 32 and 96 for n = 500…2000. */
const NB = 64;

export interface LuFactorization {
  readonly n: number;
  /** L (strictly lower part, unit diagonal implied) and U (upper part) in one row-major n×n array. */
  readonly lu: Float64Array;
  /** Row k of P·A is row perm[k] of A. */
  readonly perm: Int32Array;
  /** (−1)^(number of row interchanges), for the determinant. */
  readonly permutationSign: number;
  /** First column with an exactly zero pivot, or −1 when U has a nonzero diagonal. */
  readonly zeroPivot: number;
}

function assertSquare(what: string, a: Matrix): void {
  if (a.rows !== a.cols) throw new Error(`${what}: matrix must be square, got ${a.rows}×${a.cols}`);
}

/**
 * Factorises P·A = L·U. Never throws for singular A (a zero pivot is recorded in `zeroPivot` and the
 * elimination continues past it, as dgetrf does); throws for a non-square or non-finite A.
 */
export function luFactor(a: Matrix): LuFactorization {
  assertSquare('luFactor', a);
  const n = a.rows;
  const lu = sharedFloat64(n * n);
  lu.set(a.data);
  for (let i = 0; i < lu.length; i++) {
    if (!Number.isFinite(lu[i])) throw new Error(`luFactor: entry (${Math.floor(i / n)}, ${i % n}) is not finite`);
  }
  const perm = new Int32Array(n);
  for (let i = 0; i < n; i++) perm[i] = i;
  let sign = 1;
  let zeroPivot = -1;

  for (let j0 = 0; j0 < n; j0 += NB) {
    const nb = Math.min(NB, n - j0);
    const jEnd = j0 + nb;
    // Panel: columns j0..jEnd−1, rows j0..n−1, with full-row interchanges.
    for (let j = j0; j < jEnd; j++) {
      let p = j;
      let best = Math.abs(lu[j * n + j]);
      for (let i = j + 1; i < n; i++) {
        const v = Math.abs(lu[i * n + j]);
        if (v > best) {
          best = v;
          p = i;
        }
      }
      if (p !== j) {
        const rj = j * n, rp = p * n;
        for (let c = 0; c < n; c++) {
          const t = lu[rj + c];
          lu[rj + c] = lu[rp + c];
          lu[rp + c] = t;
        }
        const t = perm[j];
        perm[j] = perm[p];
        perm[p] = t;
        sign = -sign;
      }
      const pivot = lu[j * n + j];
      if (pivot === 0) {
        if (zeroPivot < 0) zeroPivot = j;
        continue;
      }
      const inv = 1 / pivot;
      const rj = j * n;
      for (let i = j + 1; i < n; i++) {
        const ri = i * n;
        const l = (lu[ri + j] *= inv);
        if (l !== 0) for (let c = j + 1; c < jEnd; c++) lu[ri + c] -= l * lu[rj + c];
      }
    }
    if (jEnd >= n) break;
    // U12 ← L11⁻¹·A12 (row operations within the panel's rows).
    for (let r = j0 + 1; r < jEnd; r++) {
      const rr = r * n;
      for (let q = j0; q < r; q++) {
        const l = lu[rr + q];
        if (l === 0) continue;
        const rq = q * n;
        for (let c = jEnd; c < n; c++) lu[rr + c] -= l * lu[rq + c];
      }
    }
    // A22 ← A22 − L21·U12.
    const m2 = n - jEnd;
    gemm(false, false, m2, m2, nb, -1, lu, jEnd * n + j0, n, lu, j0 * n + jEnd, n, 1, lu, jEnd * n + jEnd, n);
  }
  return { n, lu, perm, permutationSign: sign, zeroPivot };
}

function singularError(what: string, f: LuFactorization): Error {
  return new Error(`${what}: matrix is singular (zero pivot in column ${f.zeroPivot} of its LU factorisation)`);
}

/** Below this many rows a diagonal block of a triangular solve is done by row operations. */
const TRIANGLE_LEAF = 8;

/**
 * Rows [i0, i1) of L·Y = B (unit-lower L from `lu`) once rows before i0 are final: recursive halving
 * (Elmroth, Gustavson, Jonsson & Kågström, "Recursive blocked algorithms and hybrid data structures for
 * dense matrix library software", SIAM Review 46(1), 2004), so nearly all the flops are matrix products
 * and only TRIANGLE_LEAF-row diagonal blocks use row operations.
 */
function lowerBlock(lu: Float64Array, n: number, b: Float64Array, w: number, i0: number, i1: number): void {
  if (i1 - i0 <= TRIANGLE_LEAF) {
    for (let r = i0 + 1; r < i1; r++) {
      const rr = r * w;
      for (let q = i0; q < r; q++) {
        const l = lu[r * n + q];
        if (l === 0) continue;
        const rq = q * w;
        for (let c = 0; c < w; c++) b[rr + c] -= l * b[rq + c];
      }
    }
    return;
  }
  const mid = i0 + ((i1 - i0) >> 1);
  lowerBlock(lu, n, b, w, i0, mid);
  gemm(false, false, i1 - mid, w, mid - i0, -1, lu, mid * n + i0, n, b, i0 * w, w, 1, b, mid * w, w);
  lowerBlock(lu, n, b, w, mid, i1);
}

/** Rows [i0, i1) of U·X = B (upper U from `lu`) once rows from i1 on are final; recursive as above. */
function upperBlock(lu: Float64Array, n: number, b: Float64Array, w: number, i0: number, i1: number): void {
  if (i1 - i0 <= TRIANGLE_LEAF) {
    for (let r = i1 - 1; r >= i0; r--) {
      const rr = r * w;
      for (let q = r + 1; q < i1; q++) {
        const u = lu[r * n + q];
        if (u === 0) continue;
        const rq = q * w;
        for (let c = 0; c < w; c++) b[rr + c] -= u * b[rq + c];
      }
      const d = lu[r * n + r];
      for (let c = 0; c < w; c++) b[rr + c] /= d;
    }
    return;
  }
  const mid = i0 + ((i1 - i0) >> 1);
  upperBlock(lu, n, b, w, mid, i1);
  gemm(false, false, mid - i0, w, i1 - mid, -1, lu, i0 * n + mid, n, b, mid * w, w, 1, b, i0 * w, w);
  upperBlock(lu, n, b, w, i0, mid);
}

/** Solves L·Y = B in place for unit-lower L from `lu`, B being n×w at `b` (row-major, leading dim w). */
function forwardUnitLower(lu: Float64Array, n: number, b: Float64Array, w: number): void {
  for (let i0 = 0; i0 < n; i0 += NB) {
    const i1 = Math.min(n, i0 + NB);
    if (i0 > 0) gemm(false, false, i1 - i0, w, i0, -1, lu, i0 * n, n, b, 0, w, 1, b, i0 * w, w);
    lowerBlock(lu, n, b, w, i0, i1);
  }
}

/** Solves U·X = B in place for upper U from `lu`, B being n×w (row-major, leading dim w). */
function backUpper(lu: Float64Array, n: number, b: Float64Array, w: number): void {
  const lastStart = Math.floor((n - 1) / NB) * NB;
  for (let i0 = lastStart; i0 >= 0; i0 -= NB) {
    const i1 = Math.min(n, i0 + NB);
    if (i1 < n) gemm(false, false, i1 - i0, w, n - i1, -1, lu, i0 * n + i1, n, b, i1 * w, w, 1, b, i0 * w, w);
    upperBlock(lu, n, b, w, i0, i1);
  }
}

/** X with A·X = B from a factorisation of A; throws when A is singular. */
export function luSolve(f: LuFactorization, b: Matrix): Matrix {
  if (b.rows !== f.n) throw new Error(`solve: right-hand side has ${b.rows} rows, the matrix is ${f.n}×${f.n}`);
  if (f.zeroPivot >= 0) throw singularError('solve', f);
  const n = f.n, w = b.cols;
  const x = zeros(n, w);
  const work = sharedFloat64(n * w);
  for (let k = 0; k < n; k++) work.set(b.data.subarray(f.perm[k] * w, f.perm[k] * w + w), k * w);
  forwardUnitLower(f.lu, n, work, w);
  backUpper(f.lu, n, work, w);
  x.data.set(work);
  return x;
}

/** A⁻¹ from a factorisation of A (2n³ flops in all with the factorisation); throws when A is singular. */
export function luInverse(f: LuFactorization): Matrix {
  if (f.zeroPivot >= 0) throw singularError('inverse', f);
  const { n, lu } = f;
  // W ← L⁻¹, lower triangular: block row i needs only columns 0..i1 of the rows above.
  const w = sharedFloat64(n * n);
  for (let i0 = 0; i0 < n; i0 += NB) {
    const i1 = Math.min(n, i0 + NB);
    for (let r = i0; r < i1; r++) w[r * n + r] = 1;
    if (i0 > 0) gemm(false, false, i1 - i0, i0, i0, -1, lu, i0 * n, n, w, 0, n, 1, w, i0 * n, n);
    for (let r = i0 + 1; r < i1; r++) {
      const rr = r * n;
      for (let q = i0; q < r; q++) {
        const l = lu[rr + q];
        if (l === 0) continue;
        const rq = q * n;
        for (let c = 0; c <= q; c++) w[rr + c] -= l * w[rq + c];
      }
    }
  }
  backUpper(lu, n, w, n);
  // A⁻¹ = U⁻¹·L⁻¹·P: column perm[k] of A⁻¹ is column k of W.
  const inv = zeros(n, n);
  const { perm } = f;
  for (let i = 0; i < n; i++) {
    const ri = i * n;
    for (let k = 0; k < n; k++) inv.data[ri + perm[k]] = w[ri + k];
  }
  return inv;
}

/** log|det A| and the sign of det A (sign 0 for singular A); safe from overflow for large n. */
export function luLogDeterminant(f: LuFactorization): { logAbs: number; sign: number } {
  if (f.zeroPivot >= 0) return { logAbs: -Infinity, sign: 0 };
  let logAbs = 0;
  let sign = f.permutationSign;
  for (let i = 0; i < f.n; i++) {
    const d = f.lu[i * f.n + i];
    logAbs += Math.log(Math.abs(d));
    if (d < 0) sign = -sign;
  }
  return { logAbs, sign };
}

/** X with A·X = B for square nonsingular A; throws with the pivot's column when A is singular. */
export function solve(a: Matrix, b: Matrix): Matrix {
  assertSquare('solve', a);
  return luSolve(luFactor(a), b);
}

/** A⁻¹ for square nonsingular A; throws with the pivot's column when A is singular. */
export function inverse(a: Matrix): Matrix {
  assertSquare('inverse', a);
  return luInverse(luFactor(a));
}
