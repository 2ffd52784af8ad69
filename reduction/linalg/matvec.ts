/**
 * The scalar matrix–vector loop shared by the dense kernels (Hessenberg reduction, the exponential's norm
 * estimates) and the solvers' product chains (reduction/simulate): its summation order matches the
 * WebAssembly SIMD kernel's (wasm/matvec-kernel.wat), so either gives the same bits.
 */
/**
 * out[i] = (M·x)[i] for rows r0 ≤ i < r1 of a row-major matrix with `cols` columns, four rows at a time.
 * With `ld` (the row stride, default `cols`) and `colOff`, M is the block of columns colOff … colOff+cols−1
 * of a wider matrix, and x is read at the same column indices.
 * Each row's sum is formed as (Σ even columns + Σ odd columns) + the last term when `cols` is odd: the
 * order of the WebAssembly SIMD kernel (reduction/linalg/wasm/matvec-kernel.wat), whose two lanes hold
 * the even and odd sums, so that the scalar loop, the SIMD kernel and any split of the rows between
 * threads all give identical bits. Self-contained: the worker thread of parallel-matvec.ts runs its source.
 */
export function matVecRows(
  data: Float64Array,
  cols: number,
  x: Float64Array,
  out: Float64Array,
  r0: number,
  r1: number,
  ld: number = cols,
  colOff = 0,
): void {
  const last = cols - (cols & 1);
  let i = r0;
  for (; i + 3 < r1; i += 4) {
    const o0 = i * ld + colOff, o1 = o0 + ld, o2 = o1 + ld, o3 = o2 + ld;
    let e0 = 0, e1 = 0, e2 = 0, e3 = 0, d0 = 0, d1 = 0, d2 = 0, d3 = 0;
    for (let j = 0; j < last; j += 2) {
      const xe = x[colOff + j], xo = x[colOff + j + 1];
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
      const xl = x[colOff + last];
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
    const o = i * ld + colOff;
    let e = 0, d = 0;
    for (let j = 0; j < last; j += 2) {
      e += data[o + j] * x[colOff + j];
      d += data[o + j + 1] * x[colOff + j + 1];
    }
    let s = e + d;
    if (last < cols) s += data[o + last] * x[colOff + last];
    out[i] = s;
  }
}
