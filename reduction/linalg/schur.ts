/**
 * Real Schur form A = Z·T·Zᵀ (T quasi-upper-triangular, Z orthogonal), eigenvalues, and right
 * eigenvectors of a general real matrix.
 *
 * Method: Hessenberg reduction (`hessenberg.ts`), then the Francis implicit double-shift QR algorithm
 * (J. G. F. Francis, "The QR transformation, parts I and II", Computer J. 4, 1961–62; Golub & Van Loan,
 * Matrix Computations, 4th ed., 2013, §7.5) in the form of LAPACK's dlahqr: deflation by the
 * conservative small-subdiagonal test of Ahues & Tisseur (LAPACK Working Note 122, 1997), a search for two
 * consecutive small subdiagonals to start the bulge, exceptional shifts after 10 and 20 stalled
 * iterations, and each converged 2×2 block standardised (dlanv2: equal diagonal for a complex pair,
 * upper triangular for real eigenvalues). Eigenvectors come from back substitution on T followed by
 * one product with Z (as in LAPACK's dtrevc).
 *
 * When only eigenvalues are wanted the sweeps touch only the active diagonal block, which roughly halves
 * the work of the full Schur form.
 */
import { type Matrix, type ComplexVector, zeros } from './matrix';
import { reduceToHessenberg, formHessenbergQ } from './hessenberg';
import { gemm } from './gemm';
import { balance } from './balance';

const ULP = Number.EPSILON;
const SAFE_MIN = 2.2250738585072014e-308;

function sign(a: number, b: number): number {
  const x = Math.abs(a);
  return b >= 0 ? x : -x;
}

interface Standardised2x2 {
  a: number;
  b: number;
  c: number;
  d: number;
  rt1r: number;
  rt1i: number;
  rt2r: number;
  rt2i: number;
  cs: number;
  sn: number;
}

/**
 * Schur factorisation of a real 2×2 block [a b; c d] = [cs −sn; sn cs]·[aa bb; cc dd]·[cs sn; −sn cs]
 * in standard form: cc = 0 (real eigenvalues), or aa = dd with bb·cc < 0 (a complex pair).
 * After LAPACK's dlanv2 (Anderson et al., LAPACK Users' Guide, 1999).
 */
export function standardise2x2(a: number, b: number, c: number, d: number): Standardised2x2 {
  let cs = 1;
  let sn = 0;
  if (c === 0) {
    // already upper triangular
  } else if (b === 0) {
    cs = 0;
    sn = 1;
    const t = d;
    d = a;
    a = t;
    b = -c;
    c = 0;
  } else if (a - d === 0 && Math.sign(b) !== Math.sign(c)) {
    // already standard complex form
  } else {
    const temp = a - d;
    let p = 0.5 * temp;
    const bcmax = Math.max(Math.abs(b), Math.abs(c));
    const bcmis = Math.min(Math.abs(b), Math.abs(c)) * sign(1, b) * sign(1, c);
    const scale = Math.max(Math.abs(p), bcmax);
    let z = (p / scale) * p + (bcmax / scale) * bcmis;
    if (z >= 4 * ULP) {
      // Real eigenvalues: compute a and d accurately.
      z = p + sign(Math.sqrt(scale) * Math.sqrt(z), p);
      a = d + z;
      d = d - (bcmax / z) * bcmis;
      const tau = Math.hypot(c, z);
      cs = z / tau;
      sn = c / tau;
      b = b - c;
      c = 0;
    } else {
      // Complex or nearly equal real eigenvalues: make the diagonal equal.
      const sigma = b + c;
      const tau = Math.hypot(sigma, temp);
      cs = Math.sqrt(0.5 * (1 + Math.abs(sigma) / tau));
      sn = -(p / (tau * cs)) * sign(1, sigma);
      const aa = a * cs + b * sn;
      const bb = -a * sn + b * cs;
      const cc = c * cs + d * sn;
      const dd = -c * sn + d * cs;
      a = aa * cs + cc * sn;
      b = bb * cs + dd * sn;
      c = -aa * sn + cc * cs;
      d = -bb * sn + dd * cs;
      const mid = 0.5 * (a + d);
      a = mid;
      d = mid;
      if (c !== 0) {
        if (b !== 0) {
          if (Math.sign(b) === Math.sign(c)) {
            // Real eigenvalues after all: reduce to upper triangular.
            const sab = Math.sqrt(Math.abs(b));
            const sac = Math.sqrt(Math.abs(c));
            p = sign(sab * sac, c);
            const t = 1 / Math.sqrt(Math.abs(b + c));
            a = mid + p;
            d = mid - p;
            b = b - c;
            c = 0;
            const cs1 = sab * t;
            const sn1 = sac * t;
            const ncs = cs * cs1 - sn * sn1;
            sn = cs * sn1 + sn * cs1;
            cs = ncs;
          }
        } else {
          b = -c;
          c = 0;
          const t = cs;
          cs = -sn;
          sn = t;
        }
      }
    }
  }
  let rt1i = 0;
  let rt2i = 0;
  if (c !== 0) {
    rt1i = Math.sqrt(Math.abs(b)) * Math.sqrt(Math.abs(c));
    rt2i = -rt1i;
  }
  return { a, b, c, d, rt1r: a, rt1i, rt2r: d, rt2i, cs, sn };
}

/**
 * Francis double-shift QR on an upper Hessenberg n×n row-major array `h`, in place.
 * With `wantT`, `h` ends as the real Schur form T (the whole matrix is updated); otherwise only the
 * active blocks are updated and `h` ends as garbage outside their diagonal blocks. With `z` (n×n,
 * row-major), the transformations are accumulated into it from the right (Z ← Z·Qₖ).
 * Eigenvalues go to wr/wi; a complex pair is stored consecutively with the positive imaginary part first.
 * Throws when an eigenvalue fails to converge in 30·n iterations (dlahqr's limit).
 */
export function hessenbergQR(
  h: Float64Array,
  n: number,
  wantT: boolean,
  z: Float64Array | null,
  wr: Float64Array,
  wi: Float64Array,
): void {
  if (n === 0) return;
  for (let j = 0; j < n - 3; j++) {
    h[(j + 2) * n + j] = 0;
    h[(j + 3) * n + j] = 0;
  }
  if (n >= 3) h[(n - 1) * n + n - 3] = 0;
  const smlnum = SAFE_MIN * (n / ULP);
  const itmax = 30 * Math.max(10, n);
  let kdefl = 0;
  let i1 = 0;
  let i2 = n - 1;
  const v = new Float64Array(3);
  let i = n - 1;
  const H = (r: number, c: number) => h[r * n + c];

  while (i >= 0) {
    let l = 0;
    let converged = false;
    for (let its = 0; its <= itmax; its++) {
      // Look for a single small subdiagonal element (Ahues & Tisseur criterion).
      let k: number;
      for (k = i; k > l; k--) {
        const hkk1 = Math.abs(H(k, k - 1));
        if (hkk1 <= smlnum) break;
        let tst = Math.abs(H(k - 1, k - 1)) + Math.abs(H(k, k));
        if (tst === 0) {
          if (k - 2 >= 0) tst += Math.abs(H(k - 1, k - 2));
          if (k + 1 <= n - 1) tst += Math.abs(H(k + 1, k));
        }
        if (hkk1 <= ULP * tst) {
          const ab = Math.max(hkk1, Math.abs(H(k - 1, k)));
          const ba = Math.min(hkk1, Math.abs(H(k - 1, k)));
          const aa = Math.max(Math.abs(H(k, k)), Math.abs(H(k - 1, k - 1) - H(k, k)));
          const bb = Math.min(Math.abs(H(k, k)), Math.abs(H(k - 1, k - 1) - H(k, k)));
          const s = aa + ab;
          if (ba * (ab / s) <= Math.max(smlnum, ULP * (bb * (aa / s)))) break;
        }
      }
      l = k;
      if (l > 0) h[l * n + l - 1] = 0;
      if (l >= i - 1) {
        converged = true;
        break;
      }
      kdefl++;
      if (!wantT) {
        i1 = l;
        i2 = i;
      }

      // Shifts: the eigenvalues of the trailing 2×2, or an exceptional (ad hoc) shift when stalled.
      let h11: number, h12: number, h21: number, h22: number;
      if (kdefl % 20 === 0) {
        const s = Math.abs(H(i, i - 1)) + Math.abs(H(i - 1, i - 2));
        h11 = 0.75 * s + H(i, i);
        h12 = -0.4375 * s;
        h21 = s;
        h22 = h11;
      } else if (kdefl % 10 === 0) {
        const s = Math.abs(H(l + 1, l)) + Math.abs(H(l + 2, l + 1));
        h11 = 0.75 * s + H(l, l);
        h12 = -0.4375 * s;
        h21 = s;
        h22 = h11;
      } else {
        h11 = H(i - 1, i - 1);
        h21 = H(i, i - 1);
        h12 = H(i - 1, i);
        h22 = H(i, i);
      }
      let rt1r = 0, rt1i = 0, rt2r = 0, rt2i = 0;
      const s0 = Math.abs(h11) + Math.abs(h12) + Math.abs(h21) + Math.abs(h22);
      if (s0 !== 0) {
        h11 /= s0;
        h21 /= s0;
        h12 /= s0;
        h22 /= s0;
        const tr = (h11 + h22) / 2;
        const det = (h11 - tr) * (h22 - tr) - h12 * h21;
        const rtdisc = Math.sqrt(Math.abs(det));
        if (det >= 0) {
          rt1r = tr * s0;
          rt2r = rt1r;
          rt1i = rtdisc * s0;
          rt2i = -rt1i;
        } else {
          // Real shifts: use the one closer to h22 twice.
          rt1r = tr + rtdisc;
          rt2r = tr - rtdisc;
          if (Math.abs(rt1r - h22) <= Math.abs(rt2r - h22)) {
            rt1r *= s0;
            rt2r = rt1r;
          } else {
            rt2r *= s0;
            rt1r = rt2r;
          }
          rt1i = 0;
          rt2i = 0;
        }
      }

      // Look for two consecutive small subdiagonal elements to start the bulge higher up.
      let m: number;
      for (m = i - 2; m >= l; m--) {
        let h21s = H(m + 1, m);
        let s = Math.abs(H(m, m) - rt2r) + Math.abs(rt2i) + Math.abs(h21s);
        h21s = H(m + 1, m) / s;
        v[0] = h21s * H(m, m + 1) + (H(m, m) - rt1r) * ((H(m, m) - rt2r) / s) - rt1i * (rt2i / s);
        v[1] = h21s * (H(m, m) + H(m + 1, m + 1) - rt1r - rt2r);
        v[2] = h21s * H(m + 2, m + 1);
        s = Math.abs(v[0]) + Math.abs(v[1]) + Math.abs(v[2]);
        v[0] /= s;
        v[1] /= s;
        v[2] /= s;
        if (m === l) break;
        const h00 = Math.abs(H(m, m - 1)) * (Math.abs(v[1]) + Math.abs(v[2]));
        const h11b = Math.abs(v[0]) * (Math.abs(H(m - 1, m - 1)) + Math.abs(H(m, m)) + Math.abs(H(m + 1, m + 1)));
        if (h00 <= ULP * h11b) break;
      }

      // The double-shift QR sweep: chase the 3×3 bulge from row m down to i.
      for (let kk = m; kk <= i - 1; kk++) {
        const nr = Math.min(3, i - kk + 1);
        if (kk > m) {
          v[0] = H(kk, kk - 1);
          v[1] = H(kk + 1, kk - 1);
          if (nr === 3) v[2] = H(kk + 2, kk - 1);
        }
        // dlarfg on v[0..nr−1]
        const alpha = v[0];
        let xnorm = nr === 3 ? Math.hypot(v[1], v[2]) : Math.abs(v[1]);
        let t1 = 0;
        let beta = alpha;
        if (xnorm !== 0) {
          beta = -sign(Math.hypot(alpha, xnorm), alpha);
          t1 = (beta - alpha) / beta;
          const sc = 1 / (alpha - beta);
          v[1] *= sc;
          if (nr === 3) v[2] *= sc;
        } else {
          xnorm = 0;
        }
        v[0] = beta;
        if (kk > m) {
          h[kk * n + kk - 1] = beta;
          h[(kk + 1) * n + kk - 1] = 0;
          if (kk < i - 1) h[(kk + 2) * n + kk - 1] = 0;
        } else if (m > l) {
          // dlahqr: scale rather than negate, to stay safe when v[1], v[2] underflow.
          h[kk * n + kk - 1] *= 1 - t1;
        }
        const v2 = v[1];
        const t2 = t1 * v2;
        if (nr === 3) {
          const v3 = v[2];
          const t3 = t1 * v3;
          const r0 = kk * n, r1 = r0 + n, r2 = r1 + n;
          for (let j = kk; j <= i2; j++) {
            const sum = h[r0 + j] + v2 * h[r1 + j] + v3 * h[r2 + j];
            h[r0 + j] -= sum * t1;
            h[r1 + j] -= sum * t2;
            h[r2 + j] -= sum * t3;
          }
          const jEnd = Math.min(kk + 3, i);
          for (let j = i1; j <= jEnd; j++) {
            const o = j * n + kk;
            const sum = h[o] + v2 * h[o + 1] + v3 * h[o + 2];
            h[o] -= sum * t1;
            h[o + 1] -= sum * t2;
            h[o + 2] -= sum * t3;
          }
          if (z) {
            for (let j = 0; j < n; j++) {
              const o = j * n + kk;
              const sum = z[o] + v2 * z[o + 1] + v3 * z[o + 2];
              z[o] -= sum * t1;
              z[o + 1] -= sum * t2;
              z[o + 2] -= sum * t3;
            }
          }
        } else if (nr === 2) {
          const r0 = kk * n, r1 = r0 + n;
          for (let j = kk; j <= i2; j++) {
            const sum = h[r0 + j] + v2 * h[r1 + j];
            h[r0 + j] -= sum * t1;
            h[r1 + j] -= sum * t2;
          }
          for (let j = i1; j <= i; j++) {
            const o = j * n + kk;
            const sum = h[o] + v2 * h[o + 1];
            h[o] -= sum * t1;
            h[o + 1] -= sum * t2;
          }
          if (z) {
            for (let j = 0; j < n; j++) {
              const o = j * n + kk;
              const sum = z[o] + v2 * z[o + 1];
              z[o] -= sum * t1;
              z[o + 1] -= sum * t2;
            }
          }
        }
      }
    }
    if (!converged) throw new Error(`schur: the QR algorithm did not converge for eigenvalue ${i + 1} of ${n}`);

    if (l === i) {
      wr[i] = H(i, i);
      wi[i] = 0;
    } else if (l === i - 1) {
      const r = standardise2x2(H(i - 1, i - 1), H(i - 1, i), H(i, i - 1), H(i, i));
      h[(i - 1) * n + i - 1] = r.a;
      h[(i - 1) * n + i] = r.b;
      h[i * n + i - 1] = r.c;
      h[i * n + i] = r.d;
      wr[i - 1] = r.rt1r;
      wi[i - 1] = r.rt1i;
      wr[i] = r.rt2r;
      wi[i] = r.rt2i;
      const { cs, sn } = r;
      if (wantT) {
        // Apply the block's rotation to the rest of T: rows i−1, i to the right, columns i−1, i above.
        const ra = (i - 1) * n, rb = i * n;
        for (let j = i + 1; j <= i2; j++) {
          const x = h[ra + j], y = h[rb + j];
          h[ra + j] = cs * x + sn * y;
          h[rb + j] = cs * y - sn * x;
        }
        for (let j = i1; j <= i - 2; j++) {
          const o = j * n + i - 1;
          const x = h[o], y = h[o + 1];
          h[o] = cs * x + sn * y;
          h[o + 1] = cs * y - sn * x;
        }
      }
      if (z) {
        for (let j = 0; j < n; j++) {
          const o = j * n + i - 1;
          const x = z[o], y = z[o + 1];
          z[o] = cs * x + sn * y;
          z[o + 1] = cs * y - sn * x;
        }
      }
    }
    kdefl = 0;
    i = l - 1;
  }
}

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

/** x/y for complex numbers, by Smith's algorithm (Smith, CACM 5(8), 1962) to avoid overflow. */
function cdiv(xr: number, xi: number, yr: number, yi: number): [number, number] {
  if (Math.abs(yr) >= Math.abs(yi)) {
    const r = yi / yr;
    const d = yr + r * yi;
    return [(xr + r * xi) / d, (xi - r * xr) / d];
  }
  const r = yr / yi;
  const d = yi + r * yr;
  return [(r * xr + xi) / d, (r * xi - xr) / d];
}

/**
 * Solves [a11 a12; a21 a22]·[y1; y2] = [b1; b2] where a11 = a11r + i·a11i, a22 = a22r + i·a22i and the
 * off-diagonal entries are real, by Gaussian elimination with complete pivoting; a pivot smaller than
 * smin is replaced by smin (the perturbation of LAPACK's dlaln2, Anderson et al., LAPACK Users' Guide,
 * 1999). Unlike Cramer's rule this stays accurate on a singular but consistent system, which is what a
 * repeated eigenvalue gives. Returns [y1r, y1i, y2r, y2i].
 */
function solve2x2(
  a11r: number, a11i: number, a12: number,
  a21: number, a22r: number, a22i: number,
  b1r: number, b1i: number, b2r: number, b2i: number,
  smin: number,
): [number, number, number, number] {
  // Entries as [re, im], indexed (row, col).
  const m: [number, number][][] = [
    [[a11r, a11i], [a12, 0]],
    [[a21, 0], [a22r, a22i]],
  ];
  const b: [number, number][] = [[b1r, b1i], [b2r, b2i]];
  let pr = 0, pc = 0, best = -1;
  for (let r = 0; r < 2; r++) {
    for (let c = 0; c < 2; c++) {
      const v = Math.abs(m[r][c][0]) + Math.abs(m[r][c][1]);
      if (v > best) { best = v; pr = r; pc = c; }
    }
  }
  const qr = 1 - pr, qc = 1 - pc;
  let u11 = m[pr][pc];
  if (Math.abs(u11[0]) + Math.abs(u11[1]) < smin) u11 = [smin, 0];
  const l = cdiv(m[qr][pc][0], m[qr][pc][1], u11[0], u11[1]);
  const u12 = m[pr][qc];
  let u22: [number, number] = [
    m[qr][qc][0] - (l[0] * u12[0] - l[1] * u12[1]),
    m[qr][qc][1] - (l[0] * u12[1] + l[1] * u12[0]),
  ];
  if (Math.abs(u22[0]) + Math.abs(u22[1]) < smin) u22 = [smin, 0];
  const c1 = b[pr];
  const c2: [number, number] = [b[qr][0] - (l[0] * c1[0] - l[1] * c1[1]), b[qr][1] - (l[0] * c1[1] + l[1] * c1[0])];
  const z2 = cdiv(c2[0], c2[1], u22[0], u22[1]);
  const z1 = cdiv(c1[0] - (u12[0] * z2[0] - u12[1] * z2[1]), c1[1] - (u12[0] * z2[1] + u12[1] * z2[0]), u11[0], u11[1]);
  // z1 belongs to column pc, z2 to column qc.
  const y: [number, number][] = [[0, 0], [0, 0]];
  y[pc] = z1;
  y[qc] = z2;
  return [y[0][0], y[0][1], y[1][0], y[1][1]];
}

/**
 * Right eigenvectors of a quasi-upper-triangular T by back substitution (the method of LAPACK's
 * dtrevc), in the real packed form: column k is the vector of a real eigenvalue; for a complex pair at
 * (k, k+1) with wi[k] > 0, columns k and k+1 are the real and imaginary parts of the vector of
 * wr[k] + i·wi[k]. Near-singular diagonal solves use ε·‖T‖ as the pivot, as dtrevc does.
 */
export function triangularEigenvectors(T: Matrix, wr: Float64Array, wi: Float64Array): Matrix {
  const n = T.rows;
  const t = T.data;
  const X = zeros(n, n);
  const x = X.data;
  let norm = 0;
  for (let r = 0; r < n; r++) for (let c = Math.max(0, r - 1); c < n; c++) norm += Math.abs(t[r * n + c]);
  const smin = Math.max(ULP * norm, SAFE_MIN);
  const xr = new Float64Array(n);
  const xi = new Float64Array(n);
  const BIG = 1e150;

  for (let k = n - 1; k >= 0; k--) {
    if (wi[k] === 0) {
      // Real eigenvalue λ = T(k,k): x_k = 1, x_j = 0 for j > k.
      const lam = wr[k];
      xr.fill(0, 0, k + 1);
      xr[k] = 1;
      let i = k - 1;
      while (i >= 0) {
        const twoByTwo = i > 0 && t[i * n + i - 1] !== 0;
        if (!twoByTwo) {
          let r = 0;
          for (let m = i + 1; m <= k; m++) r += t[i * n + m] * xr[m];
          let d = t[i * n + i] - lam;
          if (Math.abs(d) < smin) d = smin;
          xr[i] = -r / d;
          i -= 1;
        } else {
          // 2×2 real block rows i−1, i: [a11−λ a12; a21 a22−λ]·[x_{i−1}; x_i] = −[r1; r2].
          let r1 = 0, r2 = 0;
          for (let m = i + 1; m <= k; m++) {
            r1 += t[(i - 1) * n + m] * xr[m];
            r2 += t[i * n + m] * xr[m];
          }
          const a11 = t[(i - 1) * n + i - 1] - lam, a12 = t[(i - 1) * n + i];
          const a21 = t[i * n + i - 1], a22 = t[i * n + i] - lam;
          const y = solve2x2(a11, 0, a12, a21, a22, 0, -r1, 0, -r2, 0, smin);
          xr[i - 1] = y[0];
          xr[i] = y[2];
          i -= 2;
        }
        rescale(xr, null, i + 1, k, BIG);
      }
      for (let r = 0; r <= k; r++) x[r * n + k] = xr[r];
    } else if (wi[k] < 0) {
      // Second of a complex pair; handled with its partner k−1 (wi > 0).
      const kk = k - 1;
      const lr = wr[kk], li = wi[kk];
      xr.fill(0, 0, k + 1);
      xi.fill(0, 0, k + 1);
      const p = t[kk * n + kk], q = t[kk * n + k], rr = t[k * n + kk], s = t[k * n + k];
      // Eigenvector of the 2×2 block for λ = lr + i·li, normalised on its larger off-diagonal.
      if (Math.abs(q) >= Math.abs(rr)) {
        xr[kk] = 1;
        [xr[k], xi[k]] = cdiv(lr - p, li, q, 0);
      } else {
        xr[k] = 1;
        [xr[kk], xi[kk]] = cdiv(lr - s, li, rr, 0);
      }
      let i = kk - 1;
      while (i >= 0) {
        const twoByTwo = i > 0 && t[i * n + i - 1] !== 0;
        if (!twoByTwo) {
          let sr = 0, si = 0;
          for (let m = i + 1; m <= k; m++) {
            sr += t[i * n + m] * xr[m];
            si += t[i * n + m] * xi[m];
          }
          let dr = t[i * n + i] - lr;
          const di = -li;
          if (Math.abs(dr) + Math.abs(di) < smin) dr = smin;
          [xr[i], xi[i]] = cdiv(-sr, -si, dr, di);
          i -= 1;
        } else {
          let s1r = 0, s1i = 0, s2r = 0, s2i = 0;
          for (let m = i + 1; m <= k; m++) {
            const t1 = t[(i - 1) * n + m], t2 = t[i * n + m];
            s1r += t1 * xr[m];
            s1i += t1 * xi[m];
            s2r += t2 * xr[m];
            s2i += t2 * xi[m];
          }
          // [a11−λ a12; a21 a22−λ]·[y1; y2] = −[s1; s2] with complex λ. When the block holds the same pair
          // again (a repeated eigenvalue) the system is singular but consistent, so it is solved by
          // elimination with complete pivoting, which satisfies the well-determined row exactly.
          const ai = -li;
          const y = solve2x2(
            t[(i - 1) * n + i - 1] - lr, ai, t[(i - 1) * n + i],
            t[i * n + i - 1], t[i * n + i] - lr, ai,
            -s1r, -s1i, -s2r, -s2i, smin,
          );
          xr[i - 1] = y[0];
          xi[i - 1] = y[1];
          xr[i] = y[2];
          xi[i] = y[3];
          i -= 2;
        }
        rescale(xr, xi, i + 1, k, BIG);
      }
      for (let r = 0; r <= k; r++) {
        x[r * n + kk] = xr[r];
        x[r * n + k] = xi[r];
      }
      k--; // skip the partner
    } else {
      throw new Error('eig: complex pair out of order in the Schur form');
    }
  }
  return X;
}

/** Keeps a partial eigenvector bounded (its direction is all that matters) during back substitution. */
function rescale(xr: Float64Array, xi: Float64Array | null, from: number, to: number, big: number): void {
  let mx = 0;
  for (let r = from; r <= to; r++) mx = Math.max(mx, Math.abs(xr[r]) + (xi ? Math.abs(xi[r]) : 0));
  if (mx > big) {
    const s = 1 / mx;
    for (let r = 0; r <= to; r++) {
      xr[r] *= s;
      if (xi) xi[r] *= s;
    }
  }
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
