import { align16, ensureMemory, kernelInstance, type WasmMemory } from "../wasmKernel.js";

/**
 * The rows of a Float32 block with the floating-point predictor in WebAssembly
 * (floatRows.as.ts, built into dist/dem/floatRows.wasm by `npm run build`): one instance per
 * thread, with its own memory holding one block's rows at a time. Results equal
 * floatBlocks.ts's floatPredictorRow32 (one sample per pixel) bit for bit.
 */
export interface FloatRows {
  /**
   * Rows `rows` of a block `tw` samples wide, from byte `from` of `bytes` (4 * tw bytes a
   * row), un-predicted: samples c0..c1-1 of each row as 32-bit words (host order), row after
   * row. With `nodata`, a sample equal to it or not finite comes as NaN (floatBlocks.ts
   * markNodata's rule and bits). The view is the kernel's memory: read it before the next call.
   */
  rows(bytes: Uint8Array, from: number, rows: number, tw: number, c0: number, c1: number, nodata?: number): Uint32Array;
}

interface Exports {
  memory: WasmMemory;
  heapBase: () => number;
  floatRows: (src: number, tw: number, rows: number, c0: number, c1: number, dst: number, mark: number, nodata: number) => void;
}

/** Where the kernel is, under dist/ (scripts/build-wasm.mjs). */
export const FLOAT_ROWS_WASM = "dem/floatRows.wasm";

/**
 * A new kernel instance (its own memory), or undefined without the compiled kernel (see
 * wasmKernel): the reader then runs floatPredictorRow32.
 * @example const w = floatRows()?.rows(bytes, 0, 256, 256, 0, 256);
 */
export function floatRows(): FloatRows | undefined {
  const k = kernelInstance<Exports>(FLOAT_ROWS_WASM);
  if (!k) return undefined;
  const { exports: x, base } = k;
  return {
    rows(bytes, from, rows, tw, c0, c1, nodata) {
      const len = rows * 4 * tw;
      const dst = align16(base + len);
      const n = c1 - c0;
      ensureMemory(x.memory, dst + 4 * rows * n);
      new Uint8Array(x.memory.buffer, base, len).set(bytes.subarray(from, from + len));
      x.floatRows(base, tw, rows, c0, c1, dst, nodata === undefined ? 0 : 1, nodata ?? NaN);
      return new Uint32Array(x.memory.buffer, dst, rows * n);
    },
  };
}
