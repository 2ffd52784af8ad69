/**
 * Orthogonal reduction to upper Hessenberg form, A = Q·H·Qᵀ.
 *
 * Method: Householder reflections applied from both sides (Golub & Van Loan, Matrix Computations,
 * 4th ed., 2013, Algorithm 7.4.2), with Q accumulated backwards from the stored reflectors (ibid. §5.1.6).
 * Both one-sided updates are written as row operations, which is what row-major storage favours:
 * the left update combines rows, the right update is one dot product and one axpy per row.
 *
 * Uses: the first step of the Francis QR algorithm (`schur.ts`), and frequency response on a Hessenberg
 * form (Laub, "Efficient multivariable frequency response computations", IEEE TAC 26(2), 1981), where
 * (jωI − H)⁻¹ costs O(n²) per frequency instead of O(n³).
 */
import { type Matrix, zeros, identity } from './matrix';

/** Householder vectors v (v[0] = 1 implied) and scalars τ of each step, as `reduceToHessenberg` leaves them. */
interface Reflectors {
  readonly tau: Float64Array;
  /** Row-major (n−2)×n: row k holds v for step k at positions k+1..n−1 (position k+1 is 1). */
  readonly v: Float64Array;
}

/**
 * Reduces the n×n row-major array `h` in place to upper Hessenberg form (entries below the first
 * subdiagonal set to zero). Returns the reflectors when `keepReflectors` is set, so Q can be formed.
 */
export function reduceToHessenberg(h: Float64Array, n: number, keepReflectors: boolean): Reflectors | null {
  const steps = Math.max(0, n - 2);
  const tauAll = new Float64Array(steps);
  const vAll = keepReflectors ? new Float64Array(steps * n) : null;
  const v = new Float64Array(n);
  const w = new Float64Array(n);
  for (let k = 0; k < steps; k++) {
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
  return vAll ? { tau: tauAll, v: vAll } : null;
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
 * of the order n·ε·‖A‖ and n·ε (Householder backward stability, Golub & Van Loan §5.1.12).
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
