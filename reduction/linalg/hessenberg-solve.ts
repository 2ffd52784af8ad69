/**
 * Shifted Hessenberg solves for frequency responses (Laub, "Efficient multivariable frequency response
 * computations", IEEE Trans. Automatic Control 26(2), 1981): (jωI − H)·X = F for upper Hessenberg H by
 * Gaussian elimination with adjacent-row partial pivoting, which is all the pivoting a Hessenberg matrix
 * needs (Golub & Van Loan, "Matrix Computations", 4th ed. 2013, ch. 4, Hessenberg LU): O(n²) for the
 * elimination and O(n²·m) for back substitution per frequency. The portable backend's kernel; the native
 * backend runs the same elimination in C.
 */
import type { Matrix } from './matrix';

/** Work arrays for `solveShiftedHessenberg`, reusable across frequencies of one evaluator. */
export interface HessenbergWorkspace {
  readonly mr: Float64Array;
  readonly mi: Float64Array;
  readonly xr: Float64Array;
  readonly xi: Float64Array;
}

export function hessenbergWorkspace(n: number, m: number): HessenbergWorkspace {
  return {
    mr: new Float64Array(n * n),
    mi: new Float64Array(n * n),
    xr: new Float64Array(n * m),
    xi: new Float64Array(n * m),
  };
}

/**
 * Solve (jωI − H) X = F for upper Hessenberg H and real right-hand sides F (n×m), by Gaussian elimination
 * with adjacent-row partial pivoting (Golub & Van Loan 2013, ch. 4); O(n²) for the elimination and
 * O(n²·m) for back substitution. Returns X as (re, im), each n×m row-major, in the workspace's arrays
 * (overwritten by the next call with the same workspace).
 */
export function solveShiftedHessenberg(
  H: Matrix,
  w: number,
  F: Matrix,
  work: HessenbergWorkspace = hessenbergWorkspace(H.rows, F.cols),
): { re: Float64Array; im: Float64Array } {
  const n = H.rows;
  const m = F.cols;
  const { mr, mi, xr, xi } = work;
  const h = H.data;
  // M = jωI − H on and above the subdiagonal; entries below it are never read.
  for (let i = 0; i < n; i++) {
    const row = i * n;
    for (let j = i === 0 ? 0 : i - 1; j < n; j++) {
      mr[row + j] = -h[row + j];
      mi[row + j] = 0;
    }
    mi[row + i] = w;
  }
  xr.set(F.data);
  xi.fill(0);
  for (let k = 0; k < n - 1; k++) {
    const rk = k * n;
    const rs = rk + n;
    if (Math.abs(mr[rs + k]) + Math.abs(mi[rs + k]) > Math.abs(mr[rk + k]) + Math.abs(mi[rk + k])) {
      for (let j = k; j < n; j++) {
        let t = mr[rk + j];
        mr[rk + j] = mr[rs + j];
        mr[rs + j] = t;
        t = mi[rk + j];
        mi[rk + j] = mi[rs + j];
        mi[rs + j] = t;
      }
      for (let j = 0; j < m; j++) {
        const a = k * m + j;
        const b = a + m;
        let t = xr[a];
        xr[a] = xr[b];
        xr[b] = t;
        t = xi[a];
        xi[a] = xi[b];
        xi[b] = t;
      }
    }
    const sr = mr[rs + k];
    const si = mi[rs + k];
    if (sr === 0 && si === 0) continue;
    // l = M[k+1][k] / M[k][k]
    const pr = mr[rk + k];
    const pi = mi[rk + k];
    const den = pr * pr + pi * pi;
    const lr = (sr * pr + si * pi) / den;
    const li = (si * pr - sr * pi) / den;
    mr[rs + k] = 0;
    mi[rs + k] = 0;
    for (let j = k + 1; j < n; j++) {
      const ar = mr[rk + j];
      const ai = mi[rk + j];
      mr[rs + j] -= lr * ar - li * ai;
      mi[rs + j] -= lr * ai + li * ar;
    }
    for (let j = 0; j < m; j++) {
      const a = k * m + j;
      const ar = xr[a];
      const ai = xi[a];
      xr[a + m] -= lr * ar - li * ai;
      xi[a + m] -= lr * ai + li * ar;
    }
  }
  // Back substitution row by row: x_i = (f_i − Σ_{k>i} M_ik x_k) / M_ii, all m columns at once.
  for (let i = n - 1; i >= 0; i--) {
    const row = i * n;
    const xo = i * m;
    for (let k = i + 1; k < n; k++) {
      const ar = mr[row + k];
      const ai = mi[row + k];
      const ko = k * m;
      for (let j = 0; j < m; j++) {
        const yr = xr[ko + j];
        const yi = xi[ko + j];
        xr[xo + j] -= ar * yr - ai * yi;
        xi[xo + j] -= ar * yi + ai * yr;
      }
    }
    const dr = mr[row + i];
    const di = mi[row + i];
    const den = dr * dr + di * di;
    for (let j = 0; j < m; j++) {
      const sr = xr[xo + j];
      const si = xi[xo + j];
      xr[xo + j] = (sr * dr + si * di) / den;
      xi[xo + j] = (si * dr - sr * di) / den;
    }
  }
  return { re: xr, im: xi };
}

/** G(jω) = CQ·X + D with X = (jωI − H)⁻¹·QtB for every ω; results as [frequency][p][m]. */
export function hessenbergResponse(
  H: Matrix,
  QtB: Matrix,
  CQ: Matrix,
  D: Matrix,
  w: Float64Array,
): { re: Float64Array; im: Float64Array } {
  const n = H.rows, m = QtB.cols, p = CQ.rows;
  const re = new Float64Array(w.length * p * m);
  const im = new Float64Array(w.length * p * m);
  const work = hessenbergWorkspace(n, m);
  for (let f = 0; f < w.length; f++) {
    const x = solveShiftedHessenberg(H, w[f], QtB, work);
    const o = f * p * m;
    for (let i = 0; i < p; i++) {
      for (let j = 0; j < m; j++) {
        let sr = D.data[i * m + j], si = 0;
        for (let k = 0; k < n; k++) {
          const c = CQ.data[i * n + k];
          sr += c * x.re[k * m + j];
          si += c * x.im[k * m + j];
        }
        re[o + i * m + j] = sr;
        im[o + i * m + j] = si;
      }
    }
  }
  return { re, im };
}
