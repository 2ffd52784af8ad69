/**
 * Singular value decomposition A = U·diag(s)·Vᵀ.
 *
 * Method: Golub–Kahan bidiagonalisation by Householder reflections (G. Golub & W. Kahan, "Calculating
 * the singular values and pseudo-inverse of a matrix", SIAM J. Numer. Anal. B 2(2), 1965), then the
 * implicitly shifted QR iteration on the bidiagonal (G. Golub & C. Reinsch, "Singular value
 * decomposition and least squares solutions", Numer. Math. 14, 1970), in the deflation and shift
 * organisation of LINPACK's dsvdc (Dongarra, Bunch, Moler & Stewart, LINPACK Users' Guide, SIAM 1979).
 * Wide matrices are handled through Aᵀ. Rotations act on rows of Uᵀ and Vᵀ, which row-major storage
 * keeps contiguous; `singularValues` skips the vectors entirely (about 4mn² − 4n³/3 flops).
 *
 * Accuracy: backward stable; each σᵢ has an absolute error of order ε·σ₁ (Golub & Van Loan,
 * Matrix Computations, 4th ed., 2013, §8.6).
 */
import { type Matrix, zeros } from './matrix';

const EPS = Number.EPSILON;
const TINY = 2 ** -966;

function checkFinite(what: string, a: Matrix): void {
  for (let k = 0; k < a.data.length; k++) {
    if (!Number.isFinite(a.data[k])) throw new Error(`${what}: entry (${Math.floor(k / a.cols)}, ${k % a.cols}) is not finite`);
  }
}

interface Bidiagonal {
  s: Float64Array;
  e: Float64Array;
  /** n×m rows of Uᵀ (thin), or null. */
  ut: Float64Array | null;
  /** n×n rows of Vᵀ, or null. */
  vt: Float64Array | null;
}

/** Reduces the m×n (m ≥ n) row-major `w` to upper bidiagonal form, B = U₁ᵀ·A·V₁. */
function bidiagonalise(w: Float64Array, m: number, n: number, wantVectors: boolean): Bidiagonal {
  const s = new Float64Array(n);
  const e = new Float64Array(n);
  const tauL = new Float64Array(n);
  const tauR = new Float64Array(n);
  const row = new Float64Array(Math.max(m, n));
  for (let k = 0; k < n; k++) {
    // Left reflector from column k, rows k..m−1; stored below the diagonal.
    const alpha = w[k * n + k];
    let xn = 0;
    for (let i = k + 1; i < m; i++) xn += w[i * n + k] ** 2;
    let t = 0;
    let beta = alpha;
    if (xn > 0) {
      beta = -(alpha >= 0 ? 1 : -1) * Math.sqrt(alpha * alpha + xn);
      t = (beta - alpha) / beta;
      const sc = 1 / (alpha - beta);
      for (let i = k + 1; i < m; i++) w[i * n + k] *= sc;
    }
    s[k] = beta;
    tauL[k] = t;
    if (t !== 0 && k + 1 < n) {
      for (let j = k + 1; j < n; j++) row[j] = w[k * n + j];
      for (let i = k + 1; i < m; i++) {
        const vi = w[i * n + k];
        if (vi === 0) continue;
        const ri = i * n;
        for (let j = k + 1; j < n; j++) row[j] += vi * w[ri + j];
      }
      for (let j = k + 1; j < n; j++) w[k * n + j] -= t * row[j];
      for (let i = k + 1; i < m; i++) {
        const f = t * w[i * n + k];
        if (f === 0) continue;
        const ri = i * n;
        for (let j = k + 1; j < n; j++) w[ri + j] -= f * row[j];
      }
    }
    // Right reflector from row k, columns k+1..n−1; stored to the right of the superdiagonal.
    if (k + 2 <= n - 1) {
      const rk = k * n;
      const a1 = w[rk + k + 1];
      let yn = 0;
      for (let j = k + 2; j < n; j++) yn += w[rk + j] ** 2;
      let tr = 0;
      let b1 = a1;
      if (yn > 0) {
        b1 = -(a1 >= 0 ? 1 : -1) * Math.sqrt(a1 * a1 + yn);
        tr = (b1 - a1) / b1;
        const sc = 1 / (a1 - b1);
        for (let j = k + 2; j < n; j++) w[rk + j] *= sc;
      }
      e[k] = b1;
      tauR[k] = tr;
      if (tr !== 0) {
        for (let i = k + 1; i < m; i++) {
          const ri = i * n;
          let d = w[ri + k + 1];
          for (let j = k + 2; j < n; j++) d += w[ri + j] * w[rk + j];
          const f = tr * d;
          w[ri + k + 1] -= f;
          for (let j = k + 2; j < n; j++) w[ri + j] -= f * w[rk + j];
        }
      }
    } else if (k + 1 < n) {
      e[k] = w[k * n + k + 1];
    }
  }
  if (!wantVectors) return { s, e, ut: null, vt: null };

  // Uᵀ (n×m): rows are the columns of U₁ = H₀·…·H_{n−1}·[I; 0]; built as Uᵀ = [I 0]·H_{n−1}·…·H₀,
  // i.e. apply each reflector to the columns k.. of Uᵀ from the right, last reflector first.
  const ut = new Float64Array(n * m);
  for (let i = 0; i < n; i++) ut[i * m + i] = 1;
  for (let k = n - 1; k >= 0; k--) {
    const t = tauL[k];
    if (t === 0) continue;
    for (let r = k; r < n; r++) {
      const rr = r * m;
      let d = ut[rr + k];
      for (let i = k + 1; i < m; i++) d += ut[rr + i] * w[i * n + k];
      if (d === 0) continue;
      const f = t * d;
      ut[rr + k] -= f;
      for (let i = k + 1; i < m; i++) ut[rr + i] -= f * w[i * n + k];
    }
  }
  // Vᵀ (n×n) likewise from the right reflectors (reflector k acts on coordinates k+1..n−1).
  const vt = new Float64Array(n * n);
  for (let i = 0; i < n; i++) vt[i * n + i] = 1;
  for (let k = n - 3; k >= 0; k--) {
    const t = tauR[k];
    if (t === 0) continue;
    const rk = k * n;
    for (let r = k + 1; r < n; r++) {
      const rr = r * n;
      let d = vt[rr + k + 1];
      for (let j = k + 2; j < n; j++) d += vt[rr + j] * w[rk + j];
      if (d === 0) continue;
      const f = t * d;
      vt[rr + k + 1] -= f;
      for (let j = k + 2; j < n; j++) vt[rr + j] -= f * w[rk + j];
    }
  }
  return { s, e, ut, vt };
}

/** Rows i and j of a row-major array with row length `len`: (x, y) ← (c·x + s·y, c·y − s·x). */
function rotateRows(x: Float64Array, len: number, i: number, j: number, c: number, s: number): void {
  const ri = i * len, rj = j * len;
  for (let k = 0; k < len; k++) {
    const a = x[ri + k], b = x[rj + k];
    x[ri + k] = c * a + s * b;
    x[rj + k] = c * b - s * a;
  }
}

function swapRows(x: Float64Array, len: number, i: number, j: number): void {
  const ri = i * len, rj = j * len;
  for (let k = 0; k < len; k++) {
    const t = x[ri + k];
    x[ri + k] = x[rj + k];
    x[rj + k] = t;
  }
}

/** Implicit-shift QR on the bidiagonal (s, e) until e vanishes; sorts s descending and non-negative. */
function bidiagonalQR(b: Bidiagonal, m: number, n: number): void {
  const { s, e, ut, vt } = b;
  let p = n;
  let iter = 0;
  const maxIter = 75 * n;
  while (p > 0) {
    if (iter > maxIter) throw new Error(`svd: the bidiagonal QR iteration did not converge (${n} singular values)`);
    let k: number;
    let kase: number;
    // Negligible superdiagonal e[k]: the problem splits at k.
    for (k = p - 2; k >= 0; k--) {
      if (Math.abs(e[k]) <= TINY + EPS * (Math.abs(s[k]) + Math.abs(s[k + 1]))) {
        e[k] = 0;
        break;
      }
    }
    if (k === p - 2) {
      kase = 4;
    } else {
      let ks: number;
      for (ks = p - 1; ks > k; ks--) {
        const t = (ks !== p ? Math.abs(e[ks]) : 0) + (ks !== k + 1 ? Math.abs(e[ks - 1]) : 0);
        if (Math.abs(s[ks]) <= TINY + EPS * t) {
          s[ks] = 0;
          break;
        }
      }
      if (ks === k) kase = 3;
      else if (ks === p - 1) kase = 1;
      else {
        kase = 2;
        k = ks;
      }
    }
    k++;
    switch (kase) {
      case 1: {
        // s[p−1] negligible: chase e[p−2] out with rotations from the right.
        let f = e[p - 2];
        e[p - 2] = 0;
        for (let j = p - 2; j >= k; j--) {
          const t = Math.hypot(s[j], f);
          const cs = s[j] / t, sn = f / t;
          s[j] = t;
          if (j !== k) {
            f = -sn * e[j - 1];
            e[j - 1] = cs * e[j - 1];
          }
          if (vt) rotateRows(vt, n, j, p - 1, cs, sn);
        }
        break;
      }
      case 2: {
        // s[k−1] negligible: chase e[k−1] out with rotations from the left.
        let f = e[k - 1];
        e[k - 1] = 0;
        for (let j = k; j < p; j++) {
          const t = Math.hypot(s[j], f);
          const cs = s[j] / t, sn = f / t;
          s[j] = t;
          f = -sn * e[j];
          e[j] = cs * e[j];
          if (ut) rotateRows(ut, m, j, k - 1, cs, sn);
        }
        break;
      }
      case 3: {
        // One QR step with the Wilkinson-type shift from the trailing 2×2 of BᵀB.
        const scale = Math.max(Math.abs(s[p - 1]), Math.abs(s[p - 2]), Math.abs(e[p - 2]), Math.abs(s[k]), Math.abs(e[k]));
        const sp = s[p - 1] / scale, spm1 = s[p - 2] / scale, epm1 = e[p - 2] / scale;
        const sk = s[k] / scale, ek = e[k] / scale;
        const bb = ((spm1 + sp) * (spm1 - sp) + epm1 * epm1) / 2;
        const c = sp * epm1 * (sp * epm1);
        let shift = 0;
        if (bb !== 0 || c !== 0) {
          shift = Math.sqrt(bb * bb + c);
          if (bb < 0) shift = -shift;
          shift = c / (bb + shift);
        }
        let f = (sk + sp) * (sk - sp) + shift;
        let g = sk * ek;
        for (let j = k; j < p - 1; j++) {
          let t = Math.hypot(f, g);
          let cs = f / t, sn = g / t;
          if (j !== k) e[j - 1] = t;
          f = cs * s[j] + sn * e[j];
          e[j] = cs * e[j] - sn * s[j];
          g = sn * s[j + 1];
          s[j + 1] = cs * s[j + 1];
          if (vt) rotateRows(vt, n, j, j + 1, cs, sn);
          t = Math.hypot(f, g);
          cs = f / t;
          sn = g / t;
          s[j] = t;
          f = cs * e[j] + sn * s[j + 1];
          s[j + 1] = -sn * e[j] + cs * s[j + 1];
          g = sn * e[j + 1];
          e[j + 1] = cs * e[j + 1];
          if (ut && j < m - 1) rotateRows(ut, m, j, j + 1, cs, sn);
        }
        e[p - 2] = f;
        iter++;
        break;
      }
      default: {
        // Converged s[k]: make it non-negative and move it into descending order.
        if (s[k] <= 0) {
          s[k] = s[k] < 0 ? -s[k] : 0;
          if (vt) for (let i = 0; i < n; i++) vt[k * n + i] = -vt[k * n + i];
        }
        while (k < n - 1 && s[k] < s[k + 1]) {
          const t = s[k];
          s[k] = s[k + 1];
          s[k + 1] = t;
          if (vt) swapRows(vt, n, k, k + 1);
          if (ut) swapRows(ut, m, k, k + 1);
          k++;
        }
        iter = 0;
        p--;
      }
    }
  }
}

function transposeInto(src: Float64Array, rows: number, cols: number): Float64Array {
  const out = new Float64Array(rows * cols);
  for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) out[j * rows + i] = src[i * cols + j];
  return out;
}

/**
 * Thin SVD A = U·diag(s)·Vᵀ of an m×n matrix: U m×k and V n×k with orthonormal columns, s descending
 * and non-negative, k = min(m, n).
 */
export function svd(a: Matrix): { U: Matrix; s: Float64Array; V: Matrix } {
  checkFinite('svd', a);
  const tall = a.rows >= a.cols;
  const m = tall ? a.rows : a.cols;
  const n = tall ? a.cols : a.rows;
  if (n === 0) return { U: zeros(a.rows, 0), s: new Float64Array(0), V: zeros(a.cols, 0) };
  const w = tall ? new Float64Array(a.data) : transposeInto(a.data, a.rows, a.cols);
  const b = bidiagonalise(w, m, n, true);
  bidiagonalQR(b, m, n);
  // Rows of Uᵀ/Vᵀ are the singular vectors; transpose into column form.
  const u = { rows: m, cols: n, data: transposeInto(b.ut!, n, m) };
  const v = { rows: n, cols: n, data: transposeInto(b.vt!, n, n) };
  return tall ? { U: u, s: b.s, V: v } : { U: v, s: b.s, V: u };
}

/** Singular values only, descending (no vectors accumulated: several times cheaper than `svd`). */
export function singularValues(a: Matrix): Float64Array {
  checkFinite('singularValues', a);
  const tall = a.rows >= a.cols;
  const m = tall ? a.rows : a.cols;
  const n = tall ? a.cols : a.rows;
  if (n === 0) return new Float64Array(0);
  const w = tall ? new Float64Array(a.data) : transposeInto(a.data, a.rows, a.cols);
  const b = bidiagonalise(w, m, n, false);
  bidiagonalQR(b, m, n);
  return b.s;
}
