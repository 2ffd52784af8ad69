/**
 * The packed, register-blocked product core of `gemm.ts` (Goto & van de Geijn, "Anatomy of
 * high-performance matrix multiplication", ACM Trans. Math. Softw. 34(3), 2008): the MR×NR micro-kernel,
 * the blocked product over packed panels, and each thread's packed kernel. Both the calling thread
 * (`gemm.ts`) and the worker thread of `parallel.ts` run these, so they live apart from both.
 */
import { createPackedKernel, type PackedKernel } from './wasm/packed-kernel';
import { GEMM_KERNEL_WASM_HEX } from './wasm/gemm-kernel-binary';

// Register tile MR×NR = 4×4 accumulators (16 doubles) — the best of 2×4, 3×4, 4×2, 4×4 measured here.
/** Cache blocks: kc·NR doubles of B and mc·kc of A; chosen by measurement (flat between 256 and 512). */
export const KC = 256;
export const MC = 96;

/**
 * The MR×NR micro-kernel: tile[0..15] = Σ_p Ap[p,0..3] ⊗ Bp[p,0..3] over kc packed steps.
 * Self-contained (no outside references) because its source is also shipped to the worker thread.
 */
export function microKernel4x4(
  kc: number,
  ap: Float64Array,
  aOff: number,
  bp: Float64Array,
  bOff: number,
  tile: Float64Array,
): void {
  let c00 = 0, c01 = 0, c02 = 0, c03 = 0, c10 = 0, c11 = 0, c12 = 0, c13 = 0;
  let c20 = 0, c21 = 0, c22 = 0, c23 = 0, c30 = 0, c31 = 0, c32 = 0, c33 = 0;
  let ia = aOff;
  let ib = bOff;
  for (let p = 0; p < kc; p++) {
    const a0 = ap[ia], a1 = ap[ia + 1], a2 = ap[ia + 2], a3 = ap[ia + 3];
    const b0 = bp[ib], b1 = bp[ib + 1], b2 = bp[ib + 2], b3 = bp[ib + 3];
    c00 += a0 * b0; c01 += a0 * b1; c02 += a0 * b2; c03 += a0 * b3;
    c10 += a1 * b0; c11 += a1 * b1; c12 += a1 * b2; c13 += a1 * b3;
    c20 += a2 * b0; c21 += a2 * b1; c22 += a2 * b2; c23 += a2 * b3;
    c30 += a3 * b0; c31 += a3 * b1; c32 += a3 * b2; c33 += a3 * b3;
    ia += 4;
    ib += 4;
  }
  tile[0] = c00; tile[1] = c01; tile[2] = c02; tile[3] = c03;
  tile[4] = c10; tile[5] = c11; tile[6] = c12; tile[7] = c13;
  tile[8] = c20; tile[9] = c21; tile[10] = c22; tile[11] = c23;
  tile[12] = c30; tile[13] = c31; tile[14] = c32; tile[15] = c33;
}

/**
 * C[:, j0:j1] += α·op(A)·op(B)[:, j0:j1], blocked and packed into the panels of `kernel`, whose
 * micro-kernel runs over them (WebAssembly SIMD or scalar; see wasm/packed-kernel.ts). Self-contained
 * apart from its arguments, because the worker thread runs the same source.
 */
export function blockedProduct(
  transA: boolean,
  transB: boolean,
  m: number,
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
  j0: number,
  j1: number,
  kernel: PackedKernel,
): void {
  const kcMax = 256;
  const mcMax = 96;
  const width = j1 - j0;
  const nw = Math.ceil(width / 4) * 4;
  kernel.reserve(nw * kcMax, mcMax * nw);
  const packA = kernel.packA;
  const packB = kernel.packB;
  const panel = kernel.cPanel;
  for (let pc = 0; pc < k; pc += kcMax) {
    const kc = Math.min(kcMax, k - pc);
    // Pack op(B)[pc:pc+kc, j0:j1] into NR-wide panels, zero-padding the last one.
    for (let jp = 0; jp < width; jp += 4) {
      const base = (jp >> 2) * kc * 4;
      const nr = Math.min(4, width - jp);
      if (nr === 4) {
        // Full panel: straight copies (row-wise from B, or four column runs from Bᵀ's storage).
        if (transB) {
          for (let q = 0; q < 4; q++) {
            const src = bOff + (j0 + jp + q) * ldb + pc;
            for (let p = 0; p < kc; p++) packB[base + p * 4 + q] = b[src + p];
          }
        } else {
          let src = bOff + pc * ldb + j0 + jp;
          for (let p = 0, dst = base; p < kc; p++, dst += 4, src += ldb) {
            packB[dst] = b[src];
            packB[dst + 1] = b[src + 1];
            packB[dst + 2] = b[src + 2];
            packB[dst + 3] = b[src + 3];
          }
        }
        continue;
      }
      for (let p = 0; p < kc; p++) {
        const dst = base + p * 4;
        for (let q = 0; q < 4; q++) {
          let v = 0;
          if (q < nr) {
            const col = j0 + jp + q;
            const row = pc + p;
            v = transB ? b[bOff + col * ldb + row] : b[bOff + row * ldb + col];
          }
          packB[dst + q] = v;
        }
      }
    }
    for (let ic = 0; ic < m; ic += mcMax) {
      const mc = Math.min(mcMax, m - ic);
      // Pack op(A)[ic:ic+mc, pc:pc+kc] into MR-tall panels, zero-padding the last one.
      for (let ip = 0; ip < mc; ip += 4) {
        const base = ip * kc;
        const mr = Math.min(4, mc - ip);
        for (let r = 0; r < 4; r++) {
          if (r >= mr) {
            for (let p = 0; p < kc; p++) packA[base + p * 4 + r] = 0;
          } else if (transA) {
            const col = ic + ip + r;
            for (let p = 0; p < kc; p++) packA[base + p * 4 + r] = a[aOff + (pc + p) * lda + col];
          } else {
            const src = aOff + (ic + ip + r) * lda + pc;
            for (let p = 0; p < kc; p++) packA[base + p * 4 + r] = a[src + p];
          }
        }
      }
      // All tiles of the block at once, then C += α·block.
      const mcPad = Math.ceil(mc / 4) * 4;
      kernel.block(kc, mcPad, nw);
      for (let r = 0; r < mc; r++) {
        const dst = cOff + (ic + r) * ldc + j0;
        const src = r * nw;
        if (alpha === 1) for (let q = 0; q < width; q++) c[dst + q] += panel[src + q];
        else for (let q = 0; q < width; q++) c[dst + q] += alpha * panel[src + q];
      }
    }
  }
}

let kernelScratch: PackedKernel | undefined;

/** Whether products may use the WebAssembly kernel (`MODESHELF_LINALG_WASM=0` turns it off). */
export function wasmKernelAllowed(): boolean {
  const env = typeof process !== 'undefined' ? process.env?.MODESHELF_LINALG_WASM : undefined;
  return env !== '0';
}

/** Fresh packed panels and micro-kernel for one thread (WebAssembly unless turned off or refused). */
export function newPackedKernel(): PackedKernel {
  return createPackedKernel(wasmKernelAllowed() ? GEMM_KERNEL_WASM_HEX : null, microKernel4x4, MC * KC);
}

/** The calling thread's kernel, made on first use. */
export function threadKernel(): PackedKernel {
  if (!kernelScratch) kernelScratch = newPackedKernel();
  return kernelScratch;
}
