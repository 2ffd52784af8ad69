/**
 * Householder QR factorisation A = Q·R, and QR with column pivoting A·Π = Q·R (rank-revealing).
 *
 * Method: Householder reflections (A. S. Householder, "Unitary triangularization of a nonsymmetric
 * matrix", J. ACM 5, 1958; Golub & Van Loan, Matrix Computations, 4th ed., 2013, §5.2), with the
 * column pivoting of Businger & Golub ("Linear least squares solutions by Householder
 * transformations", Numer. Math. 7, 1965; Golub & Van Loan §5.4) and the safe norm downdating of
 * LAPACK's dlaqp2 (Drmač & Bujanović, LAPACK Working Note 176, 2008). In row-major storage each
 * reflector is applied as one combination of rows (w = vᵀ·A) and one rank-one row update.
 *
 * Uses: an orthonormal basis of the range of a matrix of uncertain rank (`orthonormalBasis`), least
 * squares, the compression of low-rank factors.
 */
import { type Matrix, zeros } from './matrix';

interface HouseholderResult {
  /** m×n work array: R in the upper triangle, reflector k below the diagonal of column k (v[k] = 1 implied). */
  readonly work: Float64Array;
  readonly tau: Float64Array;
  readonly perm: Int32Array;
  /** Number of reflectors computed (all min(m, n), or fewer when a pivoted run stopped at its rank). */
  readonly steps: number;
}

function checkFinite(what: string, a: Matrix): void {
  for (let k = 0; k < a.data.length; k++) {
    if (!Number.isFinite(a.data[k])) throw new Error(`${what}: entry (${Math.floor(k / a.cols)}, ${k % a.cols}) is not finite`);
  }
}

/** Householder triangularisation in place; with `pivot`, the largest remaining column goes first. */
function triangularise(a: Matrix, pivot: boolean, tol: number): HouseholderResult {
  const m = a.rows, n = a.cols;
  const work = new Float64Array(a.data);
  const kmax = Math.min(m, n);
  const tau = new Float64Array(kmax);
  const perm = new Int32Array(n);
  for (let j = 0; j < n; j++) perm[j] = j;
  const norms = new Float64Array(n);
  const exact = new Float64Array(n);
  if (pivot) {
    for (let i = 0; i < m; i++) for (let j = 0; j < n; j++) norms[j] += work[i * n + j] ** 2;
    for (let j = 0; j < n; j++) exact[j] = norms[j] = Math.sqrt(norms[j]);
  }
  const w = new Float64Array(n);
  const tol3z = Math.sqrt(Number.EPSILON);
  let first = 0;
  let steps = 0;
  for (let k = 0; k < kmax; k++) {
    if (pivot) {
      let p = k;
      for (let j = k + 1; j < n; j++) if (norms[j] > norms[p]) p = j;
      if (k === 0) first = norms[p];
      if (norms[p] === 0 || norms[p] <= tol * first) break;
      if (p !== k) {
        for (let i = 0; i < m; i++) {
          const t = work[i * n + k];
          work[i * n + k] = work[i * n + p];
          work[i * n + p] = t;
        }
        let t = perm[k];
        perm[k] = perm[p];
        perm[p] = t;
        t = norms[k];
        norms[k] = norms[p];
        norms[p] = t;
        t = exact[k];
        exact[k] = exact[p];
        exact[p] = t;
      }
    }
    const alpha = work[k * n + k];
    let xn = 0;
    for (let i = k + 1; i < m; i++) xn += work[i * n + k] ** 2;
    let t = 0;
    if (xn > 0) {
      const beta = -(alpha >= 0 ? 1 : -1) * Math.sqrt(alpha * alpha + xn);
      t = (beta - alpha) / beta;
      const sc = 1 / (alpha - beta);
      for (let i = k + 1; i < m; i++) work[i * n + k] *= sc;
      work[k * n + k] = beta;
    }
    tau[k] = t;
    steps = k + 1;
    if (t !== 0 && k + 1 < n) {
      // w = vᵀ·A[k:, k+1:], then A[k:, k+1:] −= τ·v·wᵀ.
      for (let j = k + 1; j < n; j++) w[j] = work[k * n + j];
      for (let i = k + 1; i < m; i++) {
        const vi = work[i * n + k];
        if (vi === 0) continue;
        const ri = i * n;
        for (let j = k + 1; j < n; j++) w[j] += vi * work[ri + j];
      }
      for (let j = k + 1; j < n; j++) work[k * n + j] -= t * w[j];
      for (let i = k + 1; i < m; i++) {
        const f = t * work[i * n + k];
        if (f === 0) continue;
        const ri = i * n;
        for (let j = k + 1; j < n; j++) work[ri + j] -= f * w[j];
      }
    }
    if (pivot) {
      for (let j = k + 1; j < n; j++) {
        if (norms[j] === 0) continue;
        let r = Math.abs(work[k * n + j]) / norms[j];
        r = Math.max(0, (1 + r) * (1 - r));
        if (r * (norms[j] / exact[j]) ** 2 <= tol3z) {
          let s = 0;
          for (let i = k + 1; i < m; i++) s += work[i * n + j] ** 2;
          exact[j] = norms[j] = Math.sqrt(s);
        } else {
          norms[j] *= Math.sqrt(r);
        }
      }
    }
  }
  return { work, tau, perm, steps };
}

/** The first `cols` columns of Q = H₀·H₁·…, accumulated backwards (row operations). */
function formQ(h: HouseholderResult, m: number, n: number, cols: number): Matrix {
  const q = zeros(m, cols);
  const d = q.data;
  for (let i = 0; i < Math.min(m, cols); i++) d[i * cols + i] = 1;
  const w = new Float64Array(cols);
  for (let k = h.steps - 1; k >= 0; k--) {
    const t = h.tau[k];
    if (t === 0) continue;
    // w = vᵀ·Q[k:, :], v = (1, work[k+1.., k]).
    for (let j = 0; j < cols; j++) w[j] = d[k * cols + j];
    for (let i = k + 1; i < m; i++) {
      const vi = h.work[i * n + k];
      if (vi === 0) continue;
      const ri = i * cols;
      for (let j = 0; j < cols; j++) w[j] += vi * d[ri + j];
    }
    for (let j = 0; j < cols; j++) d[k * cols + j] -= t * w[j];
    for (let i = k + 1; i < m; i++) {
      const f = t * h.work[i * n + k];
      if (f === 0) continue;
      const ri = i * cols;
      for (let j = 0; j < cols; j++) d[ri + j] -= f * w[j];
    }
  }
  return q;
}

function upperPart(h: HouseholderResult, n: number, rows: number): Matrix {
  const r = zeros(rows, n);
  for (let i = 0; i < rows; i++) for (let j = i; j < n; j++) r.data[i * n + j] = h.work[i * n + j];
  return r;
}

/**
 * Thin QR: A (m×n) = Q·R with Q m×k orthonormal columns and R k×n upper triangular, k = min(m, n).
 * ‖A − QR‖ and ‖QᵀQ − I‖ are of order ε (Golub & Van Loan §5.2).
 */
export function qr(a: Matrix): { Q: Matrix; R: Matrix } {
  checkFinite('qr', a);
  const k = Math.min(a.rows, a.cols);
  const h = triangularise(a, false, 0);
  return { Q: formQ(h, a.rows, a.cols, k), R: upperPart(h, a.cols, k) };
}

/**
 * QR with column pivoting: A·Π = Q·R, |R₁₁| ≥ |R₂₂| ≥ …, stopped at the numerical rank r where the
 * largest remaining column norm falls to `tolerance`·|R₁₁| (default max(m, n)·ε). Returns Q (m×r),
 * R (r×n, columns in pivoted order), `perm` (column j of A·Π is column perm[j] of A) and `rank` r.
 */
export function pivotedQr(a: Matrix, tolerance?: number): { Q: Matrix; R: Matrix; perm: Int32Array; rank: number } {
  checkFinite('pivotedQr', a);
  const tol = tolerance ?? Math.max(a.rows, a.cols) * Number.EPSILON;
  if (!(tol >= 0)) throw new Error(`pivotedQr: tolerance must be a non-negative number, got ${tolerance}`);
  const h = triangularise(a, true, tol);
  const rank = h.steps;
  return { Q: formQ(h, a.rows, a.cols, rank), R: upperPart(h, a.cols, rank), perm: h.perm, rank };
}

/**
 * Orthonormal basis (m×r, r the numerical rank) of the range of A, by QR with column pivoting.
 * `tolerance` as in `pivotedQr`.
 */
export function orthonormalBasis(a: Matrix, tolerance?: number): Matrix {
  return pivotedQr(a, tolerance).Q;
}

/**
 * Column-pivoted Householder QR of Mᵀ where M is the n×w row-major array `work`, in place: the columns
 * of Mᵀ are the rows of M, so every operation runs along rows with unit stride. Stops at the rank r
 * where the largest remaining column norm falls below `tol` times the first pivot's. On return,
 * `perm[j]` is the original index of row j, and row j holds column j of [R₁₁ R₁₂] (entries 0..r−1,
 * zeros after): with Mᵀ·Π ≈ U·[R₁₁ R₁₂], M·Mᵀ ≈ (Π·[R₁₁ R₁₂]ᵀ)·(Π·[R₁₁ R₁₂]ᵀ)ᵀ. Returns r.
 * Norm downdating as in LAPACK's dlaqp2. Self-contained (no outside references) because the worker
 * thread runs the same source.
 */
export function pivotedQrOfRows(work: Float64Array, n: number, w: number, tol: number, perm: Int32Array): number {
  for (let i = 0; i < n; i++) perm[i] = i;
  const norms = new Float64Array(n);
  const exact = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    let s = 0;
    for (let c = 0; c < w; c++) s += work[j * w + c] * work[j * w + c];
    norms[j] = Math.sqrt(s);
    exact[j] = norms[j];
  }
  const steps = Math.min(n, w);
  let rank = 0;
  let first = 0;
  const v = new Float64Array(w);
  const tol3z = Math.sqrt(2.220446049250313e-16);
  for (let k = 0; k < steps; k++) {
    let p = k;
    for (let j = k + 1; j < n; j++) if (norms[j] > norms[p]) p = j;
    if (k === 0) first = norms[p];
    if (norms[p] === 0 || norms[p] <= tol * first) break;
    if (p !== k) {
      for (let c = 0; c < w; c++) {
        const t = work[k * w + c];
        work[k * w + c] = work[p * w + c];
        work[p * w + c] = t;
      }
      let t = perm[k];
      perm[k] = perm[p];
      perm[p] = t;
      t = norms[k];
      norms[k] = norms[p];
      norms[p] = t;
      t = exact[k];
      exact[k] = exact[p];
      exact[p] = t;
    }
    const rk = k * w;
    const alpha = work[rk + k];
    let xn = 0;
    for (let c = k + 1; c < w; c++) xn += work[rk + c] * work[rk + c];
    let tau = 0;
    let beta = alpha;
    if (xn > 0) {
      beta = -(alpha >= 0 ? 1 : -1) * Math.sqrt(alpha * alpha + xn);
      tau = (beta - alpha) / beta;
      const sc = 1 / (alpha - beta);
      v[k] = 1;
      for (let c = k + 1; c < w; c++) v[c] = work[rk + c] * sc;
    }
    work[rk + k] = beta;
    for (let c = k + 1; c < w; c++) work[rk + c] = 0;
    rank = k + 1;
    for (let j = k + 1; j < n; j++) {
      const rj = j * w;
      if (tau !== 0) {
        let d = work[rj + k];
        for (let c = k + 1; c < w; c++) d += work[rj + c] * v[c];
        const f = tau * d;
        work[rj + k] -= f;
        for (let c = k + 1; c < w; c++) work[rj + c] -= f * v[c];
      }
      if (norms[j] !== 0) {
        let t = Math.abs(work[rj + k]) / norms[j];
        t = Math.max(0, (1 + t) * (1 - t));
        const t2 = t * (norms[j] / exact[j]) * (norms[j] / exact[j]);
        if (t2 <= tol3z) {
          let s = 0;
          for (let c = k + 1; c < w; c++) s += work[rj + c] * work[rj + c];
          norms[j] = Math.sqrt(s);
          exact[j] = norms[j];
        } else {
          norms[j] *= Math.sqrt(t);
        }
      }
    }
  }
  return rank;
}
