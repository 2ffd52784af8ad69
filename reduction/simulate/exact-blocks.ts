/**
 * Block recursion for the exact solver. On a run of R output intervals of one length with the input
 * held constant, x[k+1] = Φx[k] + g (g = Γu) is advanced m steps at a time:
 *
 *   x[k+m] = Φ^m x[k] + g_m,        g_1 = g,  g_{i+1} = Φ g_i + g        (so g_i = Σ_{l<i} Φ^l g),
 *   y[k+i] = (CΦ^i) x[k] + C g_i + D u,   i = 1 … m−1,
 *
 * which is the same recursion regrouped (Φ^m by repeated squaring; the intermediate outputs from the
 * p-row blocks CΦ^i). It replaces m products with the n×n matrix by one, at the price of log₂ m matrix
 * products up front and (m−1)·p·n multiply-adds per block for the intermediate outputs; so it pays on
 * long runs of a large model with few outputs, and `blockFactor` picks m from that cost model. Nothing is
 * approximated: the only difference from the step-by-step recursion is the rounding of the regrouped
 * sums.
 */
import { multiply } from '../linalg/index';
import { type Matrix, zeros } from '../linalg/matrix';
import type { LinearSystem } from './linear-system';
import { matVec } from './linear-system';
import { ParallelMatVec } from './parallel-matvec';

/**
 * Cost of one n×n matrix product in units of one n×n matrix–vector product. Measured on the development
 * machine at n = 1000, both on two threads: about n/1.5 when the matrix–vector product runs through the
 * SIMD kernel (0.08 s against 0.12 ms), about n/6 with the scalar loop (0.13 s against 0.75 ms). Only the
 * choice of m depends on it.
 */
export function productCost(n: number, simdMatVec: boolean): number {
  return simdMatVec ? n / 1.5 : n / 6;
}

const MAX_BLOCK = 64;

/**
 * The block length m (a power of two, 1 = step by step) that minimises the cost of R steps:
 * log₂m products for Φ^m and CΦ^i, m−1 products with Φ for g_i, R/m products with Φ^m and the
 * intermediate outputs (m−1)·p/n of a product per block.
 */
export function blockFactor(n: number, p: number, runLength: number, simdMatVec: boolean): number {
  if (runLength < 4 || p * 4 > n) return 1;
  let best = 1;
  let bestCost = runLength;
  for (let m = 2, k = 1; m <= MAX_BLOCK && m <= runLength; m *= 2, k++) {
    const cost = k * productCost(n, simdMatVec) + (m - 1) * (1 + p / n) + (runLength / m) * (1 + ((m - 1) * p) / n);
    if (cost < bestCost) {
      bestCost = cost;
      best = m;
    }
  }
  return best;
}

/** Φ^m (by squaring) with a two-thread product for it when the model is large enough. */
export class PowerOfPhi {
  readonly power: Matrix;
  private readonly product: ParallelMatVec | null;

  constructor(
    readonly phi: Matrix,
    readonly m: number,
  ) {
    let p = phi;
    for (let s = 1; s < m; s *= 2) p = multiply(p, p);
    this.power = p;
    const pm = new ParallelMatVec(p);
    this.product = pm.fast ? pm : null;
  }

  /** out = Φ^m x. */
  apply(x: Float64Array, out: Float64Array): void {
    if (this.product) this.product.applyTo(x, out);
    else matVec(this.power, x, out);
  }

  dispose(): void {
    this.product?.dispose();
  }
}

/** The per-input part of a block: the rows CΦ^i, the constants C g_i and g_m. */
export interface BlockTerms {
  readonly m: number;
  /** Rows CΦ^i for i = 1 … m−1, stacked ((m−1)·p × n). */
  readonly W: Matrix;
  /** C g_i for i = 1 … m−1, stacked ((m−1)·p). */
  readonly offsets: Float64Array;
  /** g_m = Σ_{l<m} Φ^l g. */
  readonly gm: Float64Array;
}

/**
 * CΦ^i (i < m) and C g_i, g_m for the held input term g (length n; zeros for a zero input).
 * `phiTimes(x, out)` is out = Φx.
 */
export function blockTerms(system: LinearSystem, phi: Matrix, g: Float64Array, m: number, phiTimes: (x: Float64Array, out: Float64Array) => void): BlockTerms {
  const { n, p } = system;
  const C = system.model.C;
  const W = zeros((m - 1) * p, n);
  let row = multiply(C, phi);
  for (let i = 1; i < m; i++) {
    W.data.set(row.data, (i - 1) * p * n);
    if (i + 1 < m) row = multiply(row, phi);
  }
  const offsets = new Float64Array((m - 1) * p);
  let gi = Float64Array.from(g);
  const next = new Float64Array(n);
  const cg = new Float64Array(p);
  for (let i = 1; i < m; i++) {
    matVec(C, gi, cg);
    offsets.set(cg, (i - 1) * p);
    phiTimes(gi, next);
    for (let j = 0; j < n; j++) next[j] += g[j];
    gi = Float64Array.from(next);
  }
  return { m, W, offsets, gm: gi };
}
