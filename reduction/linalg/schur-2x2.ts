/**
 * The standard form of a real 2×2 block of a real Schur form (LAPACK's dlanv2): upper triangular for two real
 * eigenvalues, equal diagonal for a complex pair. Used by every backend's callers: the portable Francis QR
 * (`francis-qr.ts`) standardises each converged block with it, and the Schur reordering above the kernels
 * (`schur-reorder.ts`, which the sparse path's Krylov–Schur runs on the native backend too) restandardises
 * swapped blocks with it.
 */
const ULP = Number.EPSILON;

/** |a| with the sign of b (Fortran's SIGN). */
export function sign(a: number, b: number): number {
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
