/**
 * Reordering a real Schur form: T = Zᵀ·A·Z quasi-upper-triangular (1×1 blocks for real eigenvalues,
 * standardised 2×2 blocks for complex pairs, as `schur()` returns it) is brought by orthogonal
 * transformations into another real Schur form whose diagonal blocks come in a chosen order, so that the
 * leading columns of the updated Z span the invariant subspace of the leading eigenvalues. Krylov–Schur
 * restarts need this (G. W. Stewart, SIAM J. Matrix Anal. Appl. 23(3), 2001, §3), as do projections on an
 * invariant subspace.
 *
 * Method: adjacent blocks are swapped by the direct swapping algorithm of Z. Bai & J. W. Demmel, "On
 * swapping diagonal blocks in real Schur form", Linear Algebra Appl. 186, 1993 (the method of LAPACK's
 * dlaexc): for T = [T11 T12; 0 T22] solve the small Sylvester equation T11·X − X·T22 = T12, so the
 * columns of [−X; I] span T22's invariant subspace; an orthogonal Q from the QR factorization of [−X; I]
 * gives Qᵀ·T·Q = [T22' *; E T11'] with E of the order of rounding, which is checked (the swap is refused
 * and the blocks left as they were when ‖E‖ is not small, as dlaexc refuses an unstable swap) and set to
 * zero. Swapped 2×2 blocks are standardised again (`standardise2x2`, after LAPACK's dlanv2).
 *
 * Written once above the kernel interface: it works on the small Schur forms of Krylov methods (tens to a
 * few hundred rows), O(m²) per swap.
 */
import { type Matrix } from './matrix';
import { standardise2x2 } from './schur-2x2';

const ULP = Number.EPSILON;

/** Starts and sizes (1 or 2) of the diagonal blocks of a quasi-upper-triangular T. */
export function schurBlocks(T: Matrix): { start: number; size: 1 | 2 }[] {
  const n = T.rows, t = T.data;
  const out: { start: number; size: 1 | 2 }[] = [];
  for (let j = 0; j < n; ) {
    if (j + 1 < n && t[(j + 1) * n + j] !== 0) {
      out.push({ start: j, size: 2 });
      j += 2;
    } else {
      out.push({ start: j, size: 1 });
      j += 1;
    }
  }
  return out;
}

/** Eigenvalue of the block at `start` (the member with Im ≥ 0 for a pair). */
export function blockEigenvalue(T: Matrix, start: number, size: 1 | 2): { re: number; im: number } {
  const n = T.rows, t = T.data;
  if (size === 1) return { re: t[start * n + start], im: 0 };
  const a = t[start * n + start], b = t[start * n + start + 1], c = t[(start + 1) * n + start], d = t[(start + 1) * n + start + 1];
  const s = standardise2x2(a, b, c, d);
  return { re: s.rt1r, im: Math.abs(s.rt1i) };
}

/** Applies the k×k orthogonal Q (row-major) to rows and columns j..j+k−1 of T (T ← Qᵀ T Q) and to columns of Z (Z ← Z Q). */
function applyOrthogonal(T: Matrix, Z: Matrix | null, j: number, k: number, q: Float64Array): void {
  const n = T.rows, t = T.data;
  const tmp = new Float64Array(k);
  // Rows: T[j..j+k, :] ← Qᵀ · T[j..j+k, :]
  for (let c = 0; c < n; c++) {
    for (let a = 0; a < k; a++) {
      let s = 0;
      for (let b = 0; b < k; b++) s += q[b * k + a] * t[(j + b) * n + c];
      tmp[a] = s;
    }
    for (let a = 0; a < k; a++) t[(j + a) * n + c] = tmp[a];
  }
  // Columns: T[:, j..j+k] ← T[:, j..j+k] · Q
  for (let r = 0; r < n; r++) {
    for (let a = 0; a < k; a++) {
      let s = 0;
      for (let b = 0; b < k; b++) s += t[r * n + j + b] * q[b * k + a];
      tmp[a] = s;
    }
    for (let a = 0; a < k; a++) t[r * n + j + a] = tmp[a];
  }
  if (Z) {
    const zc = Z.cols, z = Z.data;
    for (let r = 0; r < Z.rows; r++) {
      for (let a = 0; a < k; a++) {
        let s = 0;
        for (let b = 0; b < k; b++) s += z[r * zc + j + b] * q[b * k + a];
        tmp[a] = s;
      }
      for (let a = 0; a < k; a++) z[r * zc + j + a] = tmp[a];
    }
  }
}

/** Standardises the 2×2 block at j (dlanv2) and applies its rotation to T and Z. */
function standardiseBlock(T: Matrix, Z: Matrix | null, j: number): void {
  const n = T.rows, t = T.data;
  const s = standardise2x2(t[j * n + j], t[j * n + j + 1], t[(j + 1) * n + j], t[(j + 1) * n + j + 1]);
  // original = R·std·Rᵀ with R = [cs −sn; sn cs]: T ← Rᵀ T R on rows/columns j, j+1.
  applyOrthogonal(T, Z, j, 2, Float64Array.of(s.cs, -s.sn, s.sn, s.cs));
  t[j * n + j] = s.a;
  t[j * n + j + 1] = s.b;
  t[(j + 1) * n + j] = s.c;
  t[(j + 1) * n + j + 1] = s.d;
}

/**
 * X (p×q) with T11·X − X·T22 = T12 by Gaussian elimination with complete pivoting on the Kronecker form
 * (pq ≤ 4 unknowns); a pivot below smin is replaced by smin (LAPACK's dlasy2 perturbation).
 */
function smallSylvester(t11: number[][], t22: number[][], t12: number[][], p: number, q: number, smin: number): number[][] {
  const N = p * q;
  const M: number[][] = Array.from({ length: N }, () => new Array(N + 1).fill(0));
  // unknown index u = i + l·p for X[i][l]; equation (i, l).
  for (let i = 0; i < p; i++) {
    for (let l = 0; l < q; l++) {
      const row = i + l * p;
      for (let k = 0; k < p; k++) M[row][k + l * p] += t11[i][k];
      for (let k = 0; k < q; k++) M[row][i + k * p] -= t22[k][l];
      M[row][N] = t12[i][l];
    }
  }
  const colOf = Array.from({ length: N }, (_, k) => k);
  for (let k = 0; k < N; k++) {
    let pr = k, pc = k, best = -1;
    for (let r = k; r < N; r++) for (let c = k; c < N; c++) if (Math.abs(M[r][c]) > best) { best = Math.abs(M[r][c]); pr = r; pc = c; }
    [M[k], M[pr]] = [M[pr], M[k]];
    if (pc !== k) {
      for (const row of M) [row[k], row[pc]] = [row[pc], row[k]];
      [colOf[k], colOf[pc]] = [colOf[pc], colOf[k]];
    }
    if (Math.abs(M[k][k]) < smin) M[k][k] = smin;
    for (let r = k + 1; r < N; r++) {
      const f = M[r][k] / M[k][k];
      if (f === 0) continue;
      for (let c = k; c <= N; c++) M[r][c] -= f * M[k][c];
    }
  }
  const y = new Array(N).fill(0);
  for (let k = N - 1; k >= 0; k--) {
    let s = M[k][N];
    for (let c = k + 1; c < N; c++) s -= M[k][c] * y[c];
    y[k] = s / M[k][k];
  }
  const x = new Array(N).fill(0);
  for (let k = 0; k < N; k++) x[colOf[k]] = y[k];
  return Array.from({ length: p }, (_, i) => Array.from({ length: q }, (_, l) => x[i + l * p]));
}

/** Full k×k orthogonal Q (row-major) of the QR factorization of the k×q matrix G (Householder). */
function fullQ(G: number[][], k: number, q: number): Float64Array {
  const a = G.map((r) => r.slice());
  const Q = new Float64Array(k * k);
  for (let i = 0; i < k; i++) Q[i * k + i] = 1;
  for (let c = 0; c < q; c++) {
    let norm = 0;
    for (let r = c; r < k; r++) norm += a[r][c] * a[r][c];
    norm = Math.sqrt(norm);
    if (norm === 0) continue;
    const alpha = a[c][c] > 0 ? -norm : norm;
    const v = new Array(k).fill(0);
    for (let r = c; r < k; r++) v[r] = a[r][c];
    v[c] -= alpha;
    let vv = 0;
    for (let r = c; r < k; r++) vv += v[r] * v[r];
    if (vv === 0) continue;
    // a ← (I − 2vvᵀ/vᵀv) a ; Q ← Q (I − 2vvᵀ/vᵀv)
    for (let cc = c; cc < q; cc++) {
      let s = 0;
      for (let r = c; r < k; r++) s += v[r] * a[r][cc];
      s = (2 * s) / vv;
      for (let r = c; r < k; r++) a[r][cc] -= s * v[r];
    }
    for (let r = 0; r < k; r++) {
      let s = 0;
      for (let m = c; m < k; m++) s += Q[r * k + m] * v[m];
      s = (2 * s) / vv;
      for (let m = c; m < k; m++) Q[r * k + m] -= s * v[m];
    }
  }
  return Q;
}

/**
 * Swaps the adjacent diagonal blocks of sizes p (at j) and q (at j + p) of the real Schur form T, updating
 * Z (Z ← Z·Q) when given. Returns false, leaving T and Z unchanged, when the swap would not be backward
 * stable (eigenvalues too close to be told apart: Bai & Demmel 1993, §3).
 */
export function swapSchurBlocks(T: Matrix, Z: Matrix | null, j: number, p: 1 | 2, q: 1 | 2): boolean {
  const n = T.rows, t = T.data;
  const k = p + q;
  let tnorm = 0;
  for (let r = j; r < j + k; r++) for (let c = j; c < j + k; c++) tnorm = Math.max(tnorm, Math.abs(t[r * n + c]));
  if (tnorm === 0) return true;
  const smin = Math.max(ULP * tnorm, Number.MIN_VALUE * 1e10);
  const blk = (r0: number, c0: number, rr: number, cc: number) =>
    Array.from({ length: rr }, (_, r) => Array.from({ length: cc }, (_, c) => t[(r0 + r) * n + c0 + c]));
  const t11 = blk(j, j, p, p), t22 = blk(j + p, j + p, q, q), t12 = blk(j, j + p, p, q);
  const X = smallSylvester(t11, t22, t12, p, q, smin);
  // [−X; I] spans T22's invariant subspace; Q from its QR factorization.
  const G: number[][] = [];
  for (let r = 0; r < p; r++) G.push(X[r].map((x) => -x));
  for (let r = 0; r < q; r++) G.push(Array.from({ length: q }, (_, c) => (c === r ? 1 : 0)));
  const Q = fullQ(G, k, q);
  // Test on a copy of the block first (dlaexc's stability test): the new (2,1) block must be negligible.
  const local: Matrix = { rows: k, cols: k, data: new Float64Array(k * k) };
  for (let r = 0; r < k; r++) for (let c = 0; c < k; c++) local.data[r * k + c] = t[(j + r) * n + j + c];
  applyOrthogonal(local, null, 0, k, Q);
  let lower = 0;
  for (let r = q; r < k; r++) for (let c = 0; c < q; c++) lower = Math.max(lower, Math.abs(local.data[r * k + c]));
  if (lower > 20 * ULP * tnorm * k) return false;
  applyOrthogonal(T, Z, j, k, Q);
  for (let r = j + q; r < j + k; r++) for (let c = j; c < j + q; c++) t[r * n + c] = 0;
  // Keep everything below the block structure exactly zero, and restandardise 2×2 blocks.
  if (q === 2) standardiseBlock(T, Z, j);
  else if (p === 2) t[(j + 1) * n + j] = 0; // (the new 1×1 block at j)
  if (p === 2) standardiseBlock(T, Z, j + q);
  else if (q === 2) t[(j + 2) * n + j + 1] = 0;
  return true;
}

/**
 * Reorders the real Schur form (T, Z) in place so that its diagonal blocks come in descending `priority`
 * (stable insertion sort by adjacent swaps; a swap refused as unstable stops that block where it is).
 * `priority` sees each block's eigenvalue (the member with Im ≥ 0 for a pair). Returns the eigenvalues in
 * the new diagonal order (pairs consecutive, Im > 0 first).
 */
export function sortSchur(T: Matrix, Z: Matrix | null, priority: (re: number, im: number) => number): { re: Float64Array; im: Float64Array } {
  const blocks = schurBlocks(T).map((b) => ({ ...b, ...blockEigenvalue(T, b.start, b.size) }));
  const keys = blocks.map((b) => priority(b.re, b.im));
  // Insertion sort: move block i up while its key is larger than the one before it.
  for (let i = 1; i < blocks.length; i++) {
    let pos = i;
    while (pos > 0 && keys[pos] > keys[pos - 1]) {
      const above = blocks[pos - 1], here = blocks[pos];
      if (!swapSchurBlocks(T, Z, above.start, above.size, here.size)) break;
      const movedUp = { ...here, start: above.start };
      const movedDown = { ...above, start: above.start + here.size };
      blocks[pos - 1] = movedUp;
      blocks[pos] = movedDown;
      [keys[pos - 1], keys[pos]] = [keys[pos], keys[pos - 1]];
      pos--;
    }
  }
  const n = T.rows;
  const re = new Float64Array(n), im = new Float64Array(n);
  for (const b of schurBlocks(T)) {
    const e = blockEigenvalue(T, b.start, b.size);
    re[b.start] = e.re;
    im[b.start] = e.im;
    if (b.size === 2) {
      re[b.start + 1] = e.re;
      im[b.start + 1] = -e.im;
    }
  }
  return { re, im };
}
