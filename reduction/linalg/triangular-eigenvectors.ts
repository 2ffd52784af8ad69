/**
 * Right eigenvectors of a quasi-upper-triangular matrix by back substitution (the method of LAPACK's dtrevc),
 * for the portable backend's `eig` (`schur.ts`); the native backend calls LAPACK's dgeev instead.
 */
import { type Matrix, zeros } from './matrix';

const ULP = Number.EPSILON;
/** The smallest normal double (LAPACK's dlamch('S')). */
const SAFE_MIN = 2.2250738585072014e-308;

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
