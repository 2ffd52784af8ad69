/**
 * LU factorisation of σI − H for an upper Hessenberg H and a complex shift σ, with solves by the matrix and
 * by its (plain, not conjugate) transpose: Gaussian elimination with adjacent-row partial pivoting, which is
 * all the pivoting a Hessenberg matrix needs (Golub & Van Loan, "Matrix Computations", 4th ed. 2013,
 * ch. 4, Hessenberg LU; the per-frequency solve of Laub, "Efficient multivariable frequency response
 * computations", IEEE Trans. AC 26(2), 1981, for a general complex shift). O(n²) per shift and per solve
 * once A = Q·H·Qᵀ is known, where a dense LU of σI − A would cost O(n³) per shift.
 *
 * Elimination step k (k = 0 … n−2) swaps rows k and k+1 when |m_{k+1,k}| > |m_{k,k}| and then subtracts
 * l_k times row k from row k+1, i.e. U = G_{n−2} ⋯ G_0 (σI − H) with G_k = (I − l_k e_{k+1} e_kᵀ) P_k. Hence
 *
 *   (σI − H) x = f:   x = U⁻¹ G_{n−2} ⋯ G_0 f
 *   (σI − H)ᵀ y = g:  y = G_0ᵀ ⋯ G_{n−2}ᵀ U⁻ᵀ g,   G_kᵀ = P_k (I − l_k e_k e_{k+1}ᵀ).
 *
 * Real shifts use real arithmetic throughout. Portable TypeScript, written once above the kernel interface.
 */
import type { Matrix } from './matrix';

export class ShiftedHessenbergLu {
  readonly n: number;
  readonly complex: boolean;
  private readonly ur: Float64Array;
  private readonly ui: Float64Array | null;
  private readonly lr: Float64Array;
  private readonly li: Float64Array | null;
  private readonly swapped: Uint8Array;
  /** Smallest |u_kk| / largest |u_kk| (0 when σI − H is singular to working precision). */
  readonly pivotRatio: number;

  /** Factorises σI − H, σ = sigmaRe + i·sigmaIm. */
  constructor(H: Matrix, sigmaRe: number, sigmaIm = 0) {
    const n = H.rows;
    this.n = n;
    const complex = sigmaIm !== 0;
    this.complex = complex;
    const h = H.data;
    const ur = new Float64Array(n * n);
    const ui = complex ? new Float64Array(n * n) : null;
    for (let i = 0; i < n; i++) {
      const row = i * n;
      for (let j = i === 0 ? 0 : i - 1; j < n; j++) ur[row + j] = -h[row + j];
      ur[row + i] += sigmaRe;
      if (ui) ui[row + i] = sigmaIm;
    }
    const lr = new Float64Array(Math.max(n - 1, 0));
    const li = complex ? new Float64Array(Math.max(n - 1, 0)) : null;
    const swapped = new Uint8Array(Math.max(n - 1, 0));
    for (let k = 0; k < n - 1; k++) {
      const rk = k * n, rs = rk + n;
      const mag = (off: number) => Math.abs(ur[off]) + (ui ? Math.abs(ui[off]) : 0);
      if (mag(rs + k) > mag(rk + k)) {
        swapped[k] = 1;
        for (let j = k; j < n; j++) {
          let t = ur[rk + j];
          ur[rk + j] = ur[rs + j];
          ur[rs + j] = t;
          if (ui) {
            t = ui[rk + j];
            ui[rk + j] = ui[rs + j];
            ui[rs + j] = t;
          }
        }
      }
      const pr = ur[rk + k], pi = ui ? ui[rk + k] : 0;
      const d = pr * pr + pi * pi;
      if (d === 0) continue; // both candidates zero: column k is already eliminated (singular U, caught below)
      // l = m_{k+1,k} / m_{k,k}
      const ar = ur[rs + k], ai = ui ? ui[rs + k] : 0;
      const l1 = (ar * pr + ai * pi) / d;
      const l2 = (ai * pr - ar * pi) / d;
      lr[k] = l1;
      if (li) li[k] = l2;
      ur[rs + k] = 0;
      if (ui) ui[rs + k] = 0;
      if (l1 === 0 && l2 === 0) continue;
      for (let j = k + 1; j < n; j++) {
        const br = ur[rk + j], bi = ui ? ui[rk + j] : 0;
        ur[rs + j] -= l1 * br - l2 * bi;
        if (ui) ui[rs + j] -= l1 * bi + l2 * br;
      }
    }
    let smallest = Infinity, largest = 0;
    for (let k = 0; k < n; k++) {
      const m = Math.hypot(ur[k * n + k], ui ? ui[k * n + k] : 0);
      smallest = Math.min(smallest, m);
      largest = Math.max(largest, m);
    }
    this.pivotRatio = n === 0 ? 1 : largest > 0 ? smallest / largest : 0;
    this.ur = ur;
    this.ui = ui;
    this.lr = lr;
    this.li = li;
    this.swapped = swapped;
  }

  private requireNonsingular(what: string): void {
    if (!(this.pivotRatio > 0)) throw new Error(`${what}: σI − H is singular (a zero pivot in its Hessenberg LU)`);
  }

  /** x with (σI − H)·x = f; f as (re, im) with im null for a real right-hand side. */
  solve(fRe: ArrayLike<number>, fIm: ArrayLike<number> | null = null): { re: Float64Array; im: Float64Array } {
    this.requireNonsingular('shifted Hessenberg solve');
    const { n, ur, ui, lr, li, swapped } = this;
    const xr = Float64Array.from(fRe);
    const xi = fIm ? Float64Array.from(fIm) : new Float64Array(n);
    for (let k = 0; k < n - 1; k++) {
      if (swapped[k]) {
        let t = xr[k];
        xr[k] = xr[k + 1];
        xr[k + 1] = t;
        t = xi[k];
        xi[k] = xi[k + 1];
        xi[k + 1] = t;
      }
      const l1 = lr[k], l2 = li ? li[k] : 0;
      xr[k + 1] -= l1 * xr[k] - l2 * xi[k];
      xi[k + 1] -= l1 * xi[k] + l2 * xr[k];
    }
    backSubstitute(n, ur, ui, xr, xi);
    return { re: xr, im: xi };
  }

  /** y with (σI − H)ᵀ·y = g (the plain transpose); g as (re, im) with im null for a real right-hand side. */
  solveTranspose(gRe: ArrayLike<number>, gIm: ArrayLike<number> | null = null): { re: Float64Array; im: Float64Array } {
    this.requireNonsingular('shifted Hessenberg transposed solve');
    const { n, ur, ui, lr, li, swapped } = this;
    const yr = Float64Array.from(gRe);
    const yi = gIm ? Float64Array.from(gIm) : new Float64Array(n);
    // Uᵀ z = g: forward substitution, row j of U (contiguous) updating the entries after j.
    for (let j = 0; j < n; j++) {
      const row = j * n;
      const dr = ur[row + j], di = ui ? ui[row + j] : 0;
      const d = dr * dr + di * di;
      const zr = (yr[j] * dr + yi[j] * di) / d;
      const zi = (yi[j] * dr - yr[j] * di) / d;
      yr[j] = zr;
      yi[j] = zi;
      for (let i = j + 1; i < n; i++) {
        const a = ur[row + i], b = ui ? ui[row + i] : 0;
        yr[i] -= a * zr - b * zi;
        yi[i] -= a * zi + b * zr;
      }
    }
    // y = G_0ᵀ ⋯ G_{n−2}ᵀ z, the last factor applied first.
    for (let k = n - 2; k >= 0; k--) {
      const l1 = lr[k], l2 = li ? li[k] : 0;
      yr[k] -= l1 * yr[k + 1] - l2 * yi[k + 1];
      yi[k] -= l1 * yi[k + 1] + l2 * yr[k + 1];
      if (swapped[k]) {
        let t = yr[k];
        yr[k] = yr[k + 1];
        yr[k + 1] = t;
        t = yi[k];
        yi[k] = yi[k + 1];
        yi[k + 1] = t;
      }
    }
    return { re: yr, im: yi };
  }
}

function backSubstitute(n: number, ur: Float64Array, ui: Float64Array | null, xr: Float64Array, xi: Float64Array): void {
  for (let i = n - 1; i >= 0; i--) {
    let sr = xr[i], si = xi[i];
    const row = i * n;
    for (let j = i + 1; j < n; j++) {
      const a = ur[row + j], b = ui ? ui[row + j] : 0;
      sr -= a * xr[j] - b * xi[j];
      si -= a * xi[j] + b * xr[j];
    }
    const dr = ur[row + i], di = ui ? ui[row + i] : 0;
    const d = dr * dr + di * di;
    xr[i] = (sr * dr + si * di) / d;
    xi[i] = (si * dr - sr * di) / d;
  }
}
