/**
 * The right-hand side f(x) = A x + b of ẋ = Ax + Bu on an interval where u (hence b = Bu) is constant,
 * and the output map y = Cx + Du, with the evaluation counter every solver reports. The matrix–vector
 * product is the solvers' inner loop (one per right-hand-side call, one per recursion step of the exact
 * solver), so it is written for speed: four rows at a time share each load of x (measured here at about
 * 1.8× a one-row loop for n = 1000).
 */
import type { Matrix } from '../linalg/matrix';
import type { StateSpaceModel } from '../model';
import { ParallelMatVec } from './parallel-matvec';

/** out = M·x for a row-major rows×cols matrix (out must not alias x). */
export function matVec(m: Matrix, x: Float64Array, out: Float64Array): void {
  matVecRows(m.data, m.cols, x, out, 0, m.rows);
}

/**
 * out[i] = (M·x)[i] for rows r0 ≤ i < r1 of a row-major matrix with `cols` columns, four rows at a time.
 * Each row's sum is formed as (Σ even columns + Σ odd columns) + the last term when `cols` is odd: the
 * order of the WebAssembly SIMD kernel (reduction/linalg/wasm/matvec-kernel.wat), whose two lanes hold
 * the even and odd sums, so that the scalar loop, the SIMD kernel and any split of the rows between
 * threads all give identical bits. Self-contained: the worker thread of parallel-matvec.ts runs its source.
 */
export function matVecRows(data: Float64Array, cols: number, x: Float64Array, out: Float64Array, r0: number, r1: number): void {
  const last = cols - (cols & 1);
  let i = r0;
  for (; i + 3 < r1; i += 4) {
    const o0 = i * cols, o1 = o0 + cols, o2 = o1 + cols, o3 = o2 + cols;
    let e0 = 0, e1 = 0, e2 = 0, e3 = 0, d0 = 0, d1 = 0, d2 = 0, d3 = 0;
    for (let j = 0; j < last; j += 2) {
      const xe = x[j], xo = x[j + 1];
      e0 += data[o0 + j] * xe;
      d0 += data[o0 + j + 1] * xo;
      e1 += data[o1 + j] * xe;
      d1 += data[o1 + j + 1] * xo;
      e2 += data[o2 + j] * xe;
      d2 += data[o2 + j + 1] * xo;
      e3 += data[o3 + j] * xe;
      d3 += data[o3 + j + 1] * xo;
    }
    let s0 = e0 + d0, s1 = e1 + d1, s2 = e2 + d2, s3 = e3 + d3;
    if (last < cols) {
      const xl = x[last];
      s0 += data[o0 + last] * xl;
      s1 += data[o1 + last] * xl;
      s2 += data[o2 + last] * xl;
      s3 += data[o3 + last] * xl;
    }
    out[i] = s0;
    out[i + 1] = s1;
    out[i + 2] = s2;
    out[i + 3] = s3;
  }
  for (; i < r1; i++) {
    const o = i * cols;
    let e = 0, d = 0;
    for (let j = 0; j < last; j += 2) {
      e += data[o + j] * x[j];
      d += data[o + j + 1] * x[j + 1];
    }
    let s = e + d;
    if (last < cols) s += data[o + last] * x[last];
    out[i] = s;
  }
}

export class LinearSystem {
  readonly n: number;
  readonly m: number;
  readonly p: number;
  /** Right-hand-side evaluations so far. */
  rhsEvaluations = 0;
  /** A·x on two threads for large models (see `parallel-matvec.ts`); created on first use. */
  private product: ParallelMatVec | null | undefined;

  constructor(readonly model: StateSpaceModel) {
    this.n = model.A.rows;
    this.m = model.B.cols;
    this.p = model.C.rows;
  }

  /** out = A x + b. */
  rhs(x: Float64Array, b: Float64Array, out: Float64Array): void {
    if (this.product === undefined) {
      const pm = new ParallelMatVec(this.model.A);
      this.product = pm.fast ? pm : null;
    }
    if (this.product) {
      this.product.x.set(x);
      this.product.apply();
      const y = this.product.y;
      for (let i = 0; i < this.n; i++) out[i] = y[i] + b[i];
    } else {
      matVec(this.model.A, x, out);
      for (let i = 0; i < this.n; i++) out[i] += b[i];
    }
    this.rhsEvaluations++;
  }

  /** Stops the product's worker thread, if any. */
  dispose(): void {
    this.product?.dispose();
    this.product = null;
  }

  /** b = B u. */
  inputTerm(u: Float64Array, out: Float64Array = new Float64Array(this.n)): Float64Array {
    matVec(this.model.B, u, out);
    return out;
  }

  /** y = C x + D u written into `out` at `offset`. */
  output(x: Float64Array, u: Float64Array, out: Float64Array, offset: number): void {
    const { C, D } = this.model;
    const n = this.n, m = this.m;
    for (let i = 0; i < this.p; i++) {
      let s = 0;
      const c = i * n;
      for (let j = 0; j < n; j++) s += C.data[c + j] * x[j];
      const d = i * m;
      for (let j = 0; j < m; j++) s += D.data[d + j] * u[j];
      out[offset + i] = s;
    }
  }

  /** y = (C x) + D u written into `out` at `offset`, C x given (p values of `cx` from `cxOffset`). */
  outputFromCx(cx: Float64Array, cxOffset: number, u: Float64Array, out: Float64Array, offset: number): void {
    const { D } = this.model;
    const m = this.m;
    for (let i = 0; i < this.p; i++) {
      let s = cx[cxOffset + i];
      const d = i * m;
      for (let j = 0; j < m; j++) s += D.data[d + j] * u[j];
      out[offset + i] = s;
    }
  }
}
