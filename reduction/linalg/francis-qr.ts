/**
 * The Francis implicit double-shift QR algorithm on an upper Hessenberg matrix (J. G. F. Francis, "The QR
 * transformation, parts I and II", Computer J. 4, 1961–62; Golub & Van Loan, Matrix Computations, 4th ed.,
 * 2013, §7.5) in the form of LAPACK's dlahqr: deflation by the conservative small-subdiagonal test of Ahues &
 * Tisseur (LAPACK Working Note 122, 1997), a search for two consecutive small subdiagonals to start the
 * bulge, exceptional shifts after 10 and 20 stalled iterations, and each converged 2×2 block standardised
 * (`schur-2x2.ts`). When only eigenvalues are wanted the sweeps touch only the active diagonal block, which
 * roughly halves the work of the full Schur form.
 *
 * The portable backend's kernel (`schur.ts`); the native backend calls LAPACK's dgees and dgeev instead.
 */
import { sign, standardise2x2 } from './schur-2x2';

const ULP = Number.EPSILON;
/** The smallest normal double (LAPACK's dlamch('S')). */
const SAFE_MIN = 2.2250738585072014e-308;

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
        const xnorm = nr === 3 ? Math.hypot(v[1], v[2]) : Math.abs(v[1]);
        let t1 = 0;
        let beta = alpha;
        if (xnorm !== 0) {
          beta = -sign(Math.hypot(alpha, xnorm), alpha);
          t1 = (beta - alpha) / beta;
          const sc = 1 / (alpha - beta);
          v[1] *= sc;
          if (nr === 3) v[2] *= sc;
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
