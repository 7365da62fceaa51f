/**
 * Float32 DEM blocks with the floating-point predictor (TIFF predictor 3: each row's bytes
 * split into planes, most significant first, then differenced; Adobe Photoshop TIFF Technical
 * Note 3) un-predicted and placed into a window of heights. Plain typed-array code, shared by
 * the decoder, the window reader and the block worker (no geotiff here).
 */

import { floatRows, type FloatRows } from "./floatRowsWasm.js";

/**
 * One row of a predictor-3 block of 32-bit samples (`wc` samples; `stride` samples per
 * pixel), starting at byte `o` of `bytes`: the byte differences summed in place, then
 * samples c0..c1-1 put together and written as 32-bit words (host order, little-endian
 * only) to out[at..]. The byte sums run in a local (reading back each byte just stored
 * would make every byte wait for the one before), and each sample's four byte planes
 * (most significant first) make one word, stored once.
 * @example floatPredictorRow32(bytes, 0, 4 * 256, 1, 256, 0, 256, words, 0)
 */
export function floatPredictorRow32(bytes: Uint8Array, o: number, rowBytes: number, stride: number, wc: number, c0: number, c1: number, out: Uint32Array, at: number): void {
  const end = o + rowBytes;
  if (stride === 1) {
    let acc = bytes[o];
    for (let i = o + 1; i < end; i++) {
      acc = (acc + bytes[i]) & 255;
      bytes[i] = acc;
    }
  } else {
    for (let i = o + stride; i < end; i++) bytes[i] = (bytes[i] + bytes[i - stride]) & 255;
  }
  const o1 = o + wc;
  const o2 = o1 + wc;
  const o3 = o2 + wc;
  for (let i = c0; i < c1; i++) out[at + i - c0] = (bytes[o + i] << 24) | (bytes[o1 + i] << 16) | (bytes[o2 + i] << 8) | bytes[o3 + i];
}

/**
 * The cells of block (tx, ty), `tw` x `th` cells, that lie in the window: columns colA..colB-1,
 * rows rowA..rowB-1 of the source (the last strip stops at the source's height).
 * @example const [colA, colB, rowA, rowB] = blockCellsInWindow(2, 1, 256, 256, win, source.height)
 */
export function blockCellsInWindow(tx: number, ty: number, tw: number, th: number, win: { col0: number; col1: number; row0: number; row1: number }, sourceHeight: number): [number, number, number, number] {
  return [Math.max(win.col0, tx * tw), Math.min(win.col1, (tx + 1) * tw), Math.max(win.row0, ty * th), Math.min(win.row1, (ty + 1) * th, sourceHeight)];
}

/** Bytes of a block's rows the WebAssembly rows take at a time (at least one row). */
const KERNEL_BYTES = 4 << 20;

/** This thread's WebAssembly rows (floatRowsWasm.ts): made when first needed; null where they cannot be had. */
let threadRows: FloatRows | null | undefined;

/**
 * A block of Float32 samples still carrying the floating-point predictor (one sample per
 * pixel, heights as stored), placed as copyBlock places the un-predicted block: each row's
 * byte sums undone and its samples in the window written straight into the heights (`words`
 * views their bytes), then nodata and non-finite cells made NaN. The same heights.
 * The rows are un-predicted in WebAssembly where it is built (`rowsIn` "wasm", the default;
 * `bytes` is left as it was; `kernelBytes` of rows at a time) or here (`rowsIn` "js"; the
 * rows' bytes are summed in place): the same results bit for bit.
 */
export function placeFloatPredicted(
  bytes: Uint8Array, tw: number, bx0: number, by0: number,
  colA: number, colB: number, rowA: number, rowB: number, wc0: number, wr0: number, outW: number,
  words: Uint32Array, heights: Float32Array, nd: number, rowsIn: "wasm" | "js" = "wasm", kernelBytes = KERNEL_BYTES,
): void {
  const rowBytes = 4 * tw;
  const n = colB - colA;
  if (rowsIn === "wasm") threadRows ??= floatRows() ?? null;
  const kernel = rowsIn === "wasm" ? threadRows : null;
  if (kernel) {
    // A few megabytes of rows at a time: a block may be a whole strip of a large file, and the
    // kernel's memory, once grown, stays for the thread's life.
    const step = Math.max(1, Math.floor(kernelBytes / rowBytes));
    for (let r0 = rowA; r0 < rowB; r0 += step) {
      const r1 = Math.min(rowB, r0 + step);
      // Nodata and non-finite samples made NaN in the kernel too (markNodata's rule): in a
      // DEM block worker, which lives ~0.2 s, markNodata here ran unoptimised for ~80 ms of
      // the 3.2 km2 oblique site's load (perf), its compile waiting for a core.
      const got = kernel.rows(bytes, (r0 - by0) * rowBytes, r1 - r0, tw, colA - bx0, colB - bx0, nd);
      for (let row = r0; row < r1; row++) {
        const k = (row - r0) * n;
        words.set(got.subarray(k, k + n), (row - wr0) * outW + (colA - wc0));
      }
    }
    return;
  }
  for (let row = rowA; row < rowB; row++) {
    const dst = (row - wr0) * outW + (colA - wc0);
    floatPredictorRow32(bytes, (row - by0) * rowBytes, rowBytes, 1, tw, colA - bx0, colB - bx0, words, dst);
    markNodata(heights, dst, dst + n, nd);
  }
}

/** Cells d0..d1-1 of the window: NaN where the height is nodata or not finite. */
export function markNodata(heights: Float32Array, d0: number, d1: number, nd: number): void {
  for (let d = d0; d < d1; d++) {
    const h = heights[d];
    if (h === nd || h - h !== 0) heights[d] = NaN;
  }
}
