/**
 * General matrix product C ← α·op(A)·op(B) + β·C on row-major `Float64Array`s.
 *
 * Method: the layered blocking of Goto & van de Geijn, "Anatomy of high-performance matrix
 * multiplication", ACM Trans. Math. Softw. 34(3), 2008: a kc-deep slice of op(B) is packed into
 * contiguous NR-column panels (kept in L2/L3), an mc×kc block of op(A) into MR-row panels (kept in L2),
 * and a register-blocked MR×NR micro-kernel runs over the packed panels with unit stride. Packing also
 * absorbs the transposes, so AᵀB and ABᵀ cost the same as AB and need no explicit transpose.
 *
 * The micro-kernel runs in WebAssembly SIMD where the runtime accepts it (wasm/packed-kernel.ts), over a
 * whole mc×nw block per call; the scalar `microKernel4x4` is the fallback, with bit-identical results.
 * Measured on the development machine (Node 20, n = 1000): about 15 GFLOP/s on one core with the SIMD
 * kernel and about 4.5 with the scalar one, against about 1 GFLOP/s for a naive triple loop. Large products
 * may be split by columns of C across a worker thread (see `parallel.ts`); the arithmetic per entry of C is
 * identical either way.
 */
import { type Matrix, zeros } from './matrix';
import { blockedProduct, threadKernel } from './packed-product';
import { parallelProduct } from './parallel';

/** Below this many multiply-adds the packing overhead outweighs blocking. */
const SMALL_PRODUCT = 32 * 32 * 32;

/**
 * C ← α·op(A)·op(B) + β·C on raw row-major storage with offsets and leading dimensions (BLAS dgemm
 * semantics, row-major). op(A) is m×k, op(B) is k×n, C is m×n. With `transA`, A is stored k×m and
 * op(A)[i,p] = a[aOff + p·lda + i]; likewise for B. When β = 0, C need not be initialised (NaN in C is
 * overwritten, as in BLAS). C must not overlap A or B.
 */
export function gemm(
  transA: boolean,
  transB: boolean,
  m: number,
  n: number,
  k: number,
  alpha: number,
  a: Float64Array,
  aOff: number,
  lda: number,
  b: Float64Array,
  bOff: number,
  ldb: number,
  beta: number,
  c: Float64Array,
  cOff: number,
  ldc: number,
): void {
  if (m <= 0 || n <= 0) return;
  if (beta !== 1) {
    for (let i = 0; i < m; i++) {
      const row = cOff + i * ldc;
      if (beta === 0) c.fill(0, row, row + n);
      else for (let j = 0; j < n; j++) c[row + j] *= beta;
    }
  }
  if (k <= 0 || alpha === 0) return;
  if (m * n * k <= SMALL_PRODUCT) {
    smallProduct(transA, transB, m, n, k, alpha, a, aOff, lda, b, bOff, ldb, c, cOff, ldc);
    return;
  }
  if (parallelProduct(transA, transB, m, n, k, alpha, a, aOff, lda, b, bOff, ldb, c, cOff, ldc)) return;
  blockedProduct(transA, transB, m, k, alpha, a, aOff, lda, b, bOff, ldb, c, cOff, ldc, 0, n, threadKernel());
}

/** Direct loops for tiny products (row-oriented so the inner loop has unit stride when it can). */
function smallProduct(
  transA: boolean,
  transB: boolean,
  m: number,
  n: number,
  k: number,
  alpha: number,
  a: Float64Array,
  aOff: number,
  lda: number,
  b: Float64Array,
  bOff: number,
  ldb: number,
  c: Float64Array,
  cOff: number,
  ldc: number,
): void {
  for (let i = 0; i < m; i++) {
    const ci = cOff + i * ldc;
    for (let p = 0; p < k; p++) {
      const aip = alpha * (transA ? a[aOff + p * lda + i] : a[aOff + i * lda + p]);
      if (aip === 0) continue;
      if (transB) for (let j = 0; j < n; j++) c[ci + j] += aip * b[bOff + j * ldb + p];
      else {
        const bp = bOff + p * ldb;
        for (let j = 0; j < n; j++) c[ci + j] += aip * b[bp + j];
      }
    }
  }
}

function checkInner(what: string, ar: number, ac: number, br: number, bc: number, inner1: number, inner2: number): void {
  if (inner1 !== inner2) throw new Error(`${what}: inner dimensions differ (${ar}×${ac} and ${br}×${bc})`);
}

/**
 * A zero result matrix. Plain memory, not shared: V8 reclaims dropped SharedArrayBuffers far too late
 * (measured: 400 dropped 8 MB ones kept 3.1 GB resident), and a product's result is usually a temporary;
 * the worker thread gets a staging copy of its inputs instead (parallel.ts).
 */
export function productZeros(rows: number, cols: number): Matrix {
  return zeros(rows, cols);
}

/** A·B. */
export function multiply(a: Matrix, b: Matrix): Matrix {
  checkInner('multiply', a.rows, a.cols, b.rows, b.cols, a.cols, b.rows);
  const c = productZeros(a.rows, b.cols);
  gemm(false, false, a.rows, b.cols, a.cols, 1, a.data, 0, a.cols, b.data, 0, b.cols, 0, c.data, 0, c.cols);
  return c;
}

/** Aᵀ·B without forming Aᵀ. */
export function multiplyTransposeA(a: Matrix, b: Matrix): Matrix {
  checkInner('multiplyTransposeA', a.rows, a.cols, b.rows, b.cols, a.rows, b.rows);
  const c = productZeros(a.cols, b.cols);
  gemm(true, false, a.cols, b.cols, a.rows, 1, a.data, 0, a.cols, b.data, 0, b.cols, 0, c.data, 0, c.cols);
  return c;
}

/** A·Bᵀ without forming Bᵀ. */
export function multiplyTransposeB(a: Matrix, b: Matrix): Matrix {
  checkInner('multiplyTransposeB', a.rows, a.cols, b.rows, b.cols, a.cols, b.cols);
  const c = productZeros(a.rows, b.rows);
  gemm(false, true, a.rows, b.rows, a.cols, 1, a.data, 0, a.cols, b.data, 0, b.cols, 0, c.data, 0, c.cols);
  return c;
}
