/**
 * Diagonal balancing of a general real matrix before an eigenvalue computation: A ← D⁻¹·A·D with D a
 * diagonal of powers of two chosen so that each row and the matching column have comparable norms.
 *
 * Method: B. N. Parlett & C. Reinsch, "Balancing a matrix for calculation of eigenvalues and
 * eigenvectors", Numer. Math. 13, 1969, in the form of LAPACK's dgebal (scaling step, 2-norms as since
 * LAPACK 3.5). Powers of two make the similarity exact in floating point, so eigenvalues are unchanged
 * while the norm that the QR algorithm's errors scale with can drop by orders of magnitude — which
 * matters for the badly scaled matrices of stiff models (entries from 1 to 10⁶ and beyond).
 * Not used for the Schur form, whose Z must stay orthogonal.
 */

const RADIX = 2;
const SFMIN = 2.2250738585072014e-308 / Number.EPSILON;
const SFMAX = 1 / SFMIN;

/**
 * Balances the n×n row-major `a` in place and returns the scaling D (a ← D⁻¹·a·D): an eigenvector y
 * of the balanced matrix is the eigenvector D·y of the original.
 */
export function balance(a: Float64Array, n: number): Float64Array {
  const scale = new Float64Array(n).fill(1);
  let noconv = true;
  let sweeps = 0;
  while (noconv && sweeps++ < 100) {
    noconv = false;
    for (let i = 0; i < n; i++) {
      let c = 0, r = 0, ca = 0, ra = 0;
      for (let k = 0; k < n; k++) {
        const col = a[k * n + i], row = a[i * n + k];
        c += col * col;
        r += row * row;
        ca = Math.max(ca, Math.abs(col));
        ra = Math.max(ra, Math.abs(row));
      }
      c = Math.sqrt(c);
      r = Math.sqrt(r);
      if (c === 0 || r === 0) continue;
      let g = r / RADIX;
      let f = 1;
      const s = c + r;
      while (c < g && Math.max(f, c, ca) < SFMAX / RADIX && Math.min(r, g, ra) > SFMIN * RADIX) {
        f *= RADIX;
        c *= RADIX;
        ca *= RADIX;
        r /= RADIX;
        g /= RADIX;
        ra /= RADIX;
      }
      g = c / RADIX;
      while (g >= r && Math.max(r, ra) < SFMAX / RADIX && Math.min(f, c, g, ca) > SFMIN * RADIX) {
        f /= RADIX;
        c /= RADIX;
        g /= RADIX;
        ca /= RADIX;
        r *= RADIX;
        ra *= RADIX;
      }
      // Only a clear gain (5 % in c + r) is worth a change (dgebal's factor 0.95).
      if (c + r >= 0.95 * s) continue;
      if (f < 1 && scale[i] < 1 && f * scale[i] <= SFMIN) continue;
      if (f > 1 && scale[i] > 1 && scale[i] >= SFMAX / f) continue;
      scale[i] *= f;
      noconv = true;
      const inv = 1 / f;
      for (let k = 0; k < n; k++) a[i * n + k] *= inv;
      for (let k = 0; k < n; k++) a[k * n + i] *= f;
    }
  }
  return scale;
}
