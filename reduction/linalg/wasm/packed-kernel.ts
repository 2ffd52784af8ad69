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
  /** Packed MR-row panels of A (at least MC·KC doubles). */
  packA: Float64Array;
  /** Packed NR-column panels of B (see `reserve`). */
  packB: Float64Array;
  /** The 4×4 result of the last `run`, row-major. */
  tile: Float64Array;
  /** Makes `packB` at least `length` doubles; may replace all three views. */
  reserve(length: number): void;
  /** tile ← Σ_p packA[aOff + 4p + r]·packB[bOff + 4p + q] over p < kc. */
  run(kc: number, aOff: number, bOff: number): void;
}

type ScalarKernel = (kc: number, ap: Float64Array, aOff: number, bp: Float64Array, bOff: number, tile: Float64Array) => void;

/**
 * A kernel over fresh panels: WebAssembly when `wasmHex` is given and the runtime accepts the module,
 * otherwise `scalar`. `packALength` is MC·KC.
 */
export function createPackedKernel(wasmHex: string | null, scalar: ScalarKernel, packALength: number): PackedKernel {
  const scalarKernel = (): PackedKernel => {
    const k: PackedKernel = {
      simd: false,
      packA: new Float64Array(packALength),
      packB: new Float64Array(0),
      tile: new Float64Array(16),
      reserve(length: number) {
        if (k.packB.length < length) k.packB = new Float64Array(length);
      },
      run(kc: number, aOff: number, bOff: number) {
        scalar(kc, k.packA, aOff, k.packB, bOff, k.tile);
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
    const kernel4x4 = instance.exports.kernel4x4 as (kc: number, ap: number, bp: number, tile: number) => void;
    const TILE = 0;
    const PACK_A = 128;
    const PACK_B = PACK_A + packALength * 8;
    let packBLength = 0;
    const k: PackedKernel = {
      simd: true,
      packA: new Float64Array(0),
      packB: new Float64Array(0),
      tile: new Float64Array(0),
      reserve(length: number) {
        if (length <= packBLength && k.tile.buffer === memory.buffer) return;
        packBLength = Math.max(length, packBLength);
        const bytesNeeded = PACK_B + packBLength * 8;
        const have = memory.buffer.byteLength;
        if (bytesNeeded > have) memory.grow(Math.ceil((bytesNeeded - have) / 65536));
        k.tile = new Float64Array(memory.buffer, TILE, 16);
        k.packA = new Float64Array(memory.buffer, PACK_A, packALength);
        k.packB = new Float64Array(memory.buffer, PACK_B, packBLength);
      },
      run(kc: number, aOff: number, bOff: number) {
        kernel4x4(kc, PACK_A + aOff * 8, PACK_B + bOff * 8, TILE);
      },
    };
    k.reserve(0);
    // Self-check on a small product against the scalar kernel; any difference means the fallback.
    const kc = 5;
    const ap = new Float64Array(4 * kc), bp = new Float64Array(4 * kc), tile = new Float64Array(16);
    for (let i = 0; i < 4 * kc; i++) {
      ap[i] = ((i * 7) % 11) - 5.5;
      bp[i] = ((i * 5) % 13) / 3 - 2;
    }
    k.reserve(4 * kc);
    k.packA.set(ap);
    k.packB.set(bp);
    k.run(kc, 0, 0);
    scalar(kc, ap, 0, bp, 0, tile);
    for (let i = 0; i < 16; i++) if (k.tile[i] !== tile[i]) return scalarKernel();
    return k;
  } catch {
    return scalarKernel();
  }
}
