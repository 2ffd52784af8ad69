/**
 * The WebAssembly SIMD kernels (reduction/linalg/wasm): for both the matrix product and the matrix–vector
 * product, the committed bytes are the assembly of the committed source. The matrix product: Node accepts
 * the module, and products through it are bit-identical to the scalar kernel's (same multiply-then-add
 * order per accumulator), for all four transpose combinations and ragged edges; the product itself is
 * checked against numpy in linalg-gemm.test.ts. The matrix–vector kernel is checked in
 * simulate-parallel.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { assembleWat, binaryModuleSource, KERNELS } from '../../../scripts/build-wasm';
import { blockedProduct, KC, MC, microKernel4x4, newPackedKernel } from '@/reduction/linalg/packed-product';
import { createPackedKernel } from '@/reduction/linalg/wasm/packed-kernel';
import { GEMM_KERNEL_WASM_HEX } from '@/reduction/linalg/wasm/gemm-kernel-binary';
import { seeded } from './simulate-reference';
import { multiply, productZeros } from '@/reduction/linalg/gemm';
import { linalgThreads, workerUsesSimd } from '@/reduction/linalg/parallel';

describe('WebAssembly kernels', () => {
  for (const k of KERNELS) {
    it(`the committed binary is the assembly of ${path.basename(k.wat)} (npm run build:wasm)`, async () => {
      const bytes = await assembleWat(readFileSync(k.wat, 'utf8'), path.basename(k.wat));
      expect(readFileSync(k.binary, 'utf8')).toBe(binaryModuleSource(bytes, k.constant, path.basename(k.wat)));
    });
  }

  it('Node accepts the module, so products use it', () => {
    expect(newPackedKernel().simd).toBe(true);
    expect(createPackedKernel(GEMM_KERNEL_WASM_HEX, microKernel4x4, MC * KC).simd).toBe(true);
  });

  it('the second thread of large products runs the same kernel', () => {
    const a = productZeros(400, 400);
    a.data.fill(0.5);
    const c = multiply(a, a);
    expect(c.data[0]).toBe(100);
    // One core: no worker thread, so nothing to ask; two: the worker reports its kernel.
    expect(workerUsesSimd()).toBe(linalgThreads() >= 2 ? true : undefined);
  });

  it('a module that fails to compile falls back to the scalar kernel', () => {
    expect(createPackedKernel('0061736d01000000ff', microKernel4x4, MC * KC).simd).toBe(false);
    expect(createPackedKernel(null, microKernel4x4, MC * KC).simd).toBe(false);
  });

  for (const [transA, transB] of [[false, false], [true, false], [false, true], [true, true]] as const) {
    it(`bit-identical to the scalar kernel (transA ${transA}, transB ${transB}, 301×263 by 263×157)`, () => {
      const m = 301, k = 263, n = 157;
      const rand = seeded(17);
      const a = Float64Array.from({ length: m * k }, () => rand() * 2 - 1);
      const b = Float64Array.from({ length: k * n }, () => rand() * 2 - 1);
      const lda = transA ? m : k;
      const ldb = transB ? k : n;
      const simd = new Float64Array(m * n);
      const scalar = new Float64Array(m * n);
      blockedProduct(transA, transB, m, k, 0.75, a, 0, lda, b, 0, ldb, simd, 0, n, 0, n, newPackedKernel());
      blockedProduct(transA, transB, m, k, 0.75, a, 0, lda, b, 0, ldb, scalar, 0, n, 0, n, createPackedKernel(null, microKernel4x4, MC * KC));
      expect(Array.from(simd)).toEqual(Array.from(scalar));
      // And against the plain sum for a few entries (the order differs, so to rounding).
      for (const [i, j] of [[0, 0], [150, 77], [300, 156]]) {
        let s = 0;
        for (let p = 0; p < k; p++) s += (transA ? a[p * m + i] : a[i * k + p]) * (transB ? b[j * k + p] : b[p * n + j]);
        expect(simd[i * n + j]).toBeCloseTo(0.75 * s, 12);
      }
    });
  }
});
