/**
 * Orthogonal reduction to upper Hessenberg form, A = Q·H·Qᵀ.
 *
 * Method: Householder reflections applied from both sides (Golub & Van Loan, Matrix Computations,
 * 4th ed., 2013, §7.4), with Q accumulated backwards from the stored reflectors (ibid. §5.1).
 * Both one-sided updates are written as row operations, which is what row-major storage favours:
 * the left update combines rows, the right update is one dot product and one axpy per row.
 *
 * Uses: the first step of the Francis QR algorithm (`schur.ts`), and frequency response on a Hessenberg
 * form (Laub, "Efficient multivariable frequency response computations", IEEE TAC 26(2), 1981), where
 * (jωI − H)⁻¹ costs O(n²) per frequency instead of O(n³).
 */
import { type Matrix, zeros, identity } from './matrix';
import { gemm } from './gemm';
import { matVecRows } from './matvec';

/** Householder vectors v (v[0] = 1 implied) and scalars τ of each step, as `reduceToHessenberg` leaves them. */
interface Reflectors {
  readonly tau: Float64Array;
  /** Row-major (n−2)×n: row k holds v for step k at positions k+1..n−1 (position k+1 is 1). */
  readonly v: Float64Array;
}

/** Panel width of the blocked reduction, and the order below which it is not worth blocking. */
const NB = 32;
const BLOCKED_FROM = 128;

/**
 * Reduces the n×n row-major array `h` in place to upper Hessenberg form (entries below the first
 * subdiagonal set to zero). Returns the reflectors when `keepReflectors` is set, so Q can be formed.
 * Above order 128 the leading columns go in blocked panels (see `reduceBlocked`), the rest unblocked.
 */
export function reduceToHessenberg(h: Float64Array, n: number, keepReflectors: boolean): Reflectors | null {
  const steps = Math.max(0, n - 2);
  const tauAll = new Float64Array(steps);
  const vAll = keepReflectors ? new Float64Array(steps * n) : null;
  const start = n >= BLOCKED_FROM ? reduceBlocked(h, n, tauAll, vAll) : 0;
  reduceUnblocked(h, n, start, tauAll, vAll);
  return vAll ? { tau: tauAll, v: vAll } : null;
}

/** Householder steps start..n−3, one reflector at a time (Golub & Van Loan §7.4). */
function reduceUnblocked(h: Float64Array, n: number, start: number, tauAll: Float64Array, vAll: Float64Array | null): void {
  const steps = Math.max(0, n - 2);
  const v = new Float64Array(n);
  const w = new Float64Array(n);
  for (let k = start; k < steps; k++) {
    const k1 = k + 1;
    const alpha = h[k1 * n + k];
    let xnorm2 = 0;
    for (let i = k1 + 1; i < n; i++) xnorm2 += h[i * n + k] * h[i * n + k];
    if (xnorm2 === 0) {
      tauAll[k] = 0;
      continue;
    }
    // dlarfg: β = −sign(α)·‖x‖, τ = (β − α)/β, v = x/(α − β) with v[0] = 1.
    const beta = -(alpha >= 0 ? 1 : -1) * Math.sqrt(alpha * alpha + xnorm2);
    const tau = (beta - alpha) / beta;
    const scal = 1 / (alpha - beta);
    v[k1] = 1;
    for (let i = k1 + 1; i < n; i++) {
      v[i] = h[i * n + k] * scal;
      h[i * n + k] = 0;
    }
    h[k1 * n + k] = beta;
    tauAll[k] = tau;
    if (vAll) for (let i = k1; i < n; i++) vAll[k * n + i] = v[i];

    // Left: rows k1..n−1, columns k1..n−1 ← (I − τvvᵀ)·(…); w = vᵀ·H as a combination of rows.
    w.fill(0, k1, n);
    for (let i = k1; i < n; i++) {
      const vi = v[i];
      const ri = i * n;
      for (let j = k1; j < n; j++) w[j] += vi * h[ri + j];
    }
    for (let i = k1; i < n; i++) {
      const f = tau * v[i];
      const ri = i * n;
      for (let j = k1; j < n; j++) h[ri + j] -= f * w[j];
    }
    // Right: all rows, columns k1..n−1 ← (…)·(I − τvvᵀ).
    for (let r = 0; r < n; r++) {
      const rr = r * n;
      let d = 0;
      for (let j = k1; j < n; j++) d += h[rr + j] * v[j];
      const f = tau * d;
      if (f !== 0) for (let j = k1; j < n; j++) h[rr + j] -= f * v[j];
    }
  }
}

/**
 * Blocked reduction in the manner of LAPACK's dgehrd/dlahr2 (Quintana-Ortí & van de Geijn, "Improving
 * the performance of reduction to Hessenberg form", ACM TOMS 32(2), 2006): for a panel of nb
 * reflectors, the block Q = H_k…H_{k+nb−1} = I − V·T·Vᵀ (compact WY, Schreiber & Van Loan 1989) and
 * Y = A·V·T are built column by column, each panel column being brought up to date from V, T and Y
 * just before its reflector is formed; the trailing matrix then gets A ← (I − V·Tᵀ·Vᵀ)·(A − Y·Vᵀ)
 * by matrix products. Only the products A·v for Y stay level-2 (about a third of the flops).
 * Returns the first column left for the unblocked code.
 */
function reduceBlocked(h: Float64Array, n: number, tauAll: Float64Array, vAll: Float64Array | null): number {
  const V = new Float64Array(n * NB);
  const Y = new Float64Array(n * NB);
  const T = new Float64Array(NB * NB);
  const W = new Float64Array(NB * n);
  const z = new Float64Array(NB);
  const u = new Float64Array(NB);
  const vcol = new Float64Array(n);
  const av = new Float64Array(n);
  let k0 = 0;
  for (; n - 2 - k0 > 2 * NB; k0 += NB) {
    const nb = NB;
    V.fill(0);
    T.fill(0);
    for (let p = 0; p < nb; p++) {
      const j = k0 + p;
      if (p > 0) {
        // Column j ← column j of (A − Y·Vᵀ): all rows.
        const vj = j * nb;
        for (let r = 0; r < n; r++) {
          const yr = r * nb;
          let s = 0;
          for (let q = 0; q < p; q++) s += Y[yr + q] * V[vj + q];
          h[r * n + j] -= s;
        }
        // Column j ← (I − V·Tᵀ·Vᵀ)·column j, rows k0+1..n−1.
        z.fill(0, 0, p);
        for (let r = k0 + 1; r < n; r++) {
          const x = h[r * n + j];
          if (x === 0) continue;
          const vr = r * nb;
          for (let q = 0; q < p; q++) z[q] += V[vr + q] * x;
        }
        for (let q = 0; q < p; q++) {
          let s = 0;
          for (let i = 0; i <= q; i++) s += T[i * nb + q] * z[i];
          u[q] = s;
        }
        for (let r = k0 + 1; r < n; r++) {
          const vr = r * nb;
          let s = 0;
          for (let q = 0; q < p; q++) s += V[vr + q] * u[q];
          h[r * n + j] -= s;
        }
      }
      // Reflector from rows j+1..n−1 of column j.
      const j1 = j + 1;
      const alpha = h[j1 * n + j];
      let xnorm2 = 0;
      for (let i = j1 + 1; i < n; i++) xnorm2 += h[i * n + j] * h[i * n + j];
      let tau = 0;
      V[j1 * nb + p] = 1;
      if (xnorm2 > 0) {
        const beta = -(alpha >= 0 ? 1 : -1) * Math.sqrt(alpha * alpha + xnorm2);
        tau = (beta - alpha) / beta;
        const scal = 1 / (alpha - beta);
        for (let i = j1 + 1; i < n; i++) {
          V[i * nb + p] = h[i * n + j] * scal;
          h[i * n + j] = 0;
        }
        h[j1 * n + j] = beta;
      } else {
        for (let i = j1 + 1; i < n; i++) V[i * nb + p] = 0;
      }
      tauAll[j] = tau;
      if (vAll) for (let i = j1; i < n; i++) vAll[j * n + i] = V[i * nb + p];
      // z = V[:, 0:p]ᵀ·v;  Y[:, p] = τ·(A·v − Y[:, 0:p]·z);  T[0:p, p] = −τ·T·z, T[p, p] = τ.
      z.fill(0, 0, p);
      for (let i = j1; i < n; i++) {
        const vi = V[i * nb + p];
        if (vi === 0) continue;
        const vr = i * nb;
        for (let q = 0; q < p; q++) z[q] += V[vr + q] * vi;
      }
      // A·v, the level-2 part: v contiguous, four rows of A per pass over it (columns j1… only).
      for (let c = j1; c < n; c++) vcol[c] = V[c * nb + p];
      matVecRows(h, n - j1, vcol, av, 0, n, n, j1);
      for (let r = 0; r < n; r++) {
        let s = av[r];
        const yr = r * nb;
        for (let q = 0; q < p; q++) s -= Y[yr + q] * z[q];
        Y[yr + p] = tau * s;
      }
      for (let i = 0; i < p; i++) {
        let s = 0;
        for (let q = i; q < p; q++) s += T[i * nb + q] * z[q];
        T[i * nb + p] = -tau * s;
      }
      T[p * nb + p] = tau;
    }
    const kEnd = k0 + nb;
    const m = n - kEnd;
    // Right: A[:, kEnd:] −= Y·V[kEnd:, :]ᵀ.
    gemm(false, true, n, m, nb, -1, Y, 0, nb, V, kEnd * nb, nb, 1, h, kEnd, n);
    // Left: A[k0+1:, kEnd:] −= V·(Tᵀ·(Vᵀ·A[k0+1:, kEnd:])).
    const rows = n - k0 - 1;
    gemm(true, false, nb, m, rows, 1, V, (k0 + 1) * nb, nb, h, (k0 + 1) * n + kEnd, n, 0, W, 0, m);
    for (let q = nb - 1; q >= 0; q--) {
      // Row q of Tᵀ·W = Σ_{i≤q} T[i, q]·W[i, :], computed bottom-up in place.
      const wq = q * m;
      const tqq = T[q * nb + q];
      for (let c = 0; c < m; c++) W[wq + c] *= tqq;
      for (let i = 0; i < q; i++) {
        const t = T[i * nb + q];
        if (t === 0) continue;
        const wi = i * m;
        for (let c = 0; c < m; c++) W[wq + c] += t * W[wi + c];
      }
    }
    gemm(false, false, rows, m, nb, -1, V, (k0 + 1) * nb, nb, W, 0, m, 1, h, (k0 + 1) * n + kEnd, n);
  }
  return k0;
}

/** Q = H₀·H₁·…·H_{n−3} from the stored reflectors, accumulated backwards (row operations). */
export function formHessenbergQ(r: Reflectors, n: number): Matrix {
  const q = identity(n);
  const d = q.data;
  const w = new Float64Array(n);
  for (let k = n - 3; k >= 0; k--) {
    const tau = r.tau[k];
    if (tau === 0) continue;
    const k1 = k + 1;
    const vo = k * n;
    w.fill(0, k1, n);
    for (let i = k1; i < n; i++) {
      const vi = r.v[vo + i];
      const ri = i * n;
      for (let j = k1; j < n; j++) w[j] += vi * d[ri + j];
    }
    for (let i = k1; i < n; i++) {
      const f = tau * r.v[vo + i];
      const ri = i * n;
      for (let j = k1; j < n; j++) d[ri + j] -= f * w[j];
    }
  }
  return q;
}

/**
 * Upper Hessenberg H and orthogonal Q with A = Q·H·Qᵀ.
 *
 * Parameters: `a`, square, finite. Returns new matrices (A untouched). ‖A − Q·H·Qᵀ‖ and ‖QᵀQ − I‖ are
 * of the order n·ε·‖A‖ and n·ε (Householder backward stability, Golub & Van Loan §5.1).
 */
export function hessenberg(a: Matrix): { H: Matrix; Q: Matrix } {
  if (a.rows !== a.cols) throw new Error(`hessenberg: matrix must be square, got ${a.rows}×${a.cols}`);
  const n = a.rows;
  const h = zeros(n, n);
  h.data.set(a.data);
  for (let i = 0; i < h.data.length; i++) {
    if (!Number.isFinite(h.data[i])) throw new Error(`hessenberg: entry (${Math.floor(i / n)}, ${i % n}) is not finite`);
  }
  const refl = reduceToHessenberg(h.data, n, true);
  const Q = refl ? formHessenbergQ(refl, n) : identity(n);
  return { H: h, Q };
}
