/**
 * The packed-panel micro-kernel behind `blockedProduct` (gemm.ts), in one of two implementations with
 * the same layout and the same arithmetic order:
 *
 * - WebAssembly 128-bit SIMD (`gemm-kernel.wat`, two doubles per instruction), used wherever the runtime
 *   validates the module; measured on the development machine at about 19 GFLOP/s per core for the
 *   in-cache kernel against about 3.7 GFLOP/s for the scalar one;
 * - the scalar TypeScript kernel (`microKernel4x4`), the fallback, and the choice when
 *   `MODESHELF_LINALG_WASM=0`.
 *
 * Both multiply then add in the same order per accumulator (WebAssembly SIMD has no fused multiply-add),
 * so products are bit-identical whichever runs; the unit tests check that.
 *
 * The packed panels live in the module's linear memory (layout: the 16-double tile, then the MC×KC panel
 * of A, then the panel of B, which grows on demand). `createPackedKernel` is self-contained apart from
 * its arguments because the linear-algebra worker thread (parallel.ts) runs its source too.
 */

export interface PackedKernel {
  /** Whether the WebAssembly kernel is in use (false: scalar fallback). */
  readonly simd: boolean;
  /** Packed MR-row panels of A (MC·KC doubles). */
  packA: Float64Array;
  /** Packed NR-column panels of B (see `reserve`). */
  packB: Float64Array;
  /** The result of the last `block`, row-major with nw doubles per row (see `reserve`). */
  cPanel: Float64Array;
  /** Makes `packB` and `cPanel` at least the given lengths; may replace all views. */
  reserve(packBLength: number, cPanelLength: number): void;
  /**
   * cPanel[i·nw + j] ← Σ_p packA[(i − i mod 4)·kc + 4p + i mod 4] · packB[(j − j mod 4)·kc + 4p + j mod 4]
   * over p < kc, for i < mc and j < nw (both multiples of 4): every 4×4 tile of the block.
   */
  block(kc: number, mc: number, nw: number): void;
}

type ScalarKernel = (kc: number, ap: Float64Array, aOff: number, bp: Float64Array, bOff: number, tile: Float64Array) => void;

/**
 * A kernel over fresh panels: WebAssembly when `wasmHex` is given and the runtime accepts the module,
 * otherwise `scalar` (the 4×4 tile kernel). `packALength` is MC·KC.
 */
export function createPackedKernel(wasmHex: string | null, scalar: ScalarKernel, packALength: number): PackedKernel {
  const scalarKernel = (): PackedKernel => {
    const tile = new Float64Array(16);
    const k: PackedKernel = {
      simd: false,
      packA: new Float64Array(packALength),
      packB: new Float64Array(0),
      cPanel: new Float64Array(0),
      reserve(packBLength: number, cPanelLength: number) {
        if (k.packB.length < packBLength) k.packB = new Float64Array(packBLength);
        if (k.cPanel.length < cPanelLength) k.cPanel = new Float64Array(cPanelLength);
      },
      block(kc: number, mc: number, nw: number) {
        const out = k.cPanel;
        for (let jp = 0; jp < nw; jp += 4) {
          for (let ip = 0; ip < mc; ip += 4) {
            scalar(kc, k.packA, ip * kc, k.packB, jp * kc, tile);
            for (let r = 0; r < 4; r++) {
              const o = (ip + r) * nw + jp;
              out[o] = tile[4 * r];
              out[o + 1] = tile[4 * r + 1];
              out[o + 2] = tile[4 * r + 2];
              out[o + 3] = tile[4 * r + 3];
            }
          }
        }
      },
    };
    return k;
  };
  if (!wasmHex || typeof WebAssembly === 'undefined') return scalarKernel();
  try {
    const bytes = new Uint8Array(wasmHex.length / 2);
    for (let i = 0; i < bytes.length; i++) bytes[i] = parseInt(wasmHex.substr(2 * i, 2), 16);
    const instance = new WebAssembly.Instance(new WebAssembly.Module(bytes), {});
    const memory = instance.exports.memory as WebAssembly.Memory;
    const blockFn = instance.exports.block as (kc: number, mc: number, nw: number, ap: number, bp: number, cp: number) => void;
    const PACK_A = 0;
    let cPanelAt = 0;
    let packBAt = 0;
    let packBLen = -1;
    let cPanelLen = -1;
    const k: PackedKernel = {
      simd: true,
      packA: new Float64Array(0),
      packB: new Float64Array(0),
      cPanel: new Float64Array(0),
      reserve(packBLength: number, cPanelLength: number) {
        if (packBLength <= packBLen && cPanelLength <= cPanelLen && k.packA.buffer === memory.buffer) return;
        packBLen = Math.max(packBLength, packBLen, 0);
        cPanelLen = Math.max(cPanelLength, cPanelLen, 0);
        cPanelAt = PACK_A + packALength * 8;
        packBAt = cPanelAt + Math.ceil(cPanelLen / 2) * 16;
        const bytesNeeded = packBAt + packBLen * 8;
        const have = memory.buffer.byteLength;
        if (bytesNeeded > have) memory.grow(Math.ceil((bytesNeeded - have) / 65536));
        k.packA = new Float64Array(memory.buffer, PACK_A, packALength);
        k.cPanel = new Float64Array(memory.buffer, cPanelAt, cPanelLen);
        k.packB = new Float64Array(memory.buffer, packBAt, packBLen);
      },
      block(kc: number, mc: number, nw: number) {
        blockFn(kc, mc, nw, PACK_A, packBAt, cPanelAt);
      },
    };
    k.reserve(0, 0);
    // Self-check on one 8×8 block of depth 5 against the scalar kernel; any difference means the fallback.
    const kc = 5;
    const ref = scalarKernel();
    k.reserve(8 * kc, 64);
    ref.reserve(8 * kc, 64);
    for (let i = 0; i < 8 * kc; i++) {
      k.packA[i] = ref.packA[i] = ((i * 7) % 11) - 5.5;
      k.packB[i] = ref.packB[i] = ((i * 5) % 13) / 3 - 2;
    }
    k.block(kc, 8, 8);
    ref.block(kc, 8, 8);
    for (let i = 0; i < 64; i++) if (k.cPanel[i] !== ref.cPanel[i]) return scalarKernel();
    return k;
  } catch {
    return scalarKernel();
  }
}
