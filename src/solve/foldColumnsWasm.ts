import { ensureMemory, kernelInstance, memoryPlan, type WasmMemory } from "../wasmKernel.js";

/**
 * zoneExtremaAxis.ts foldCoreCells for a leg along the grid's rows in WebAssembly
 * (foldColumns.as.ts, built into dist/solve/foldColumns.wasm by `npm run build`): each
 * column's highest and lowest height over a band of rows and its nodata count, the rows
 * copied in a few at a time. One instance per thread, its memory kept for the next leg.
 */

interface Exports {
  memory: WasmMemory;
  heapBase: () => number;
  arrays: (rows: number, max: number, min: number, nan: number) => void;
  start: (cols4: number) => void;
  fold: (n: number, cols4: number) => void;
}

/** Where the kernel is, under dist/ (scripts/build-wasm.mjs). */
export const FOLD_COLUMNS_WASM = "solve/foldColumns.wasm";

/** Rows copied in at a time (~150 KB at 4 500 columns: held in the cache while folded). */
const ROWS_AT_A_TIME = 8;

/** This thread's kernel: made when first needed; null where it cannot be had. */
let kernel: { x: Exports; base: number } | null | undefined;

/** The columns' folds of the last call (views into the kernel's memory, valid until the next call). */
export interface FoldedColumns {
  max: Float32Array;
  min: Float32Array;
  nan: Int32Array;
}

/**
 * Columns c0 .. c1 of rows r0 .. r1 of the `w`-wide heights, each column's maximum and minimum
 * (of the heights with a value, in row order) and nodata count; undefined without the
 * compiled kernel (see wasmKernel): the caller then folds in JavaScript.
 * @example const f = foldColumns(grid.heights, grid.width, 10, 105, 0, grid.width - 1); if (f) f.max[0];
 */
export function foldColumns(heights: Float32Array, w: number, r0: number, r1: number, c0: number, c1: number): FoldedColumns | undefined {
  if (kernel === undefined) {
    const k = kernelInstance<Exports>(FOLD_COLUMNS_WASM);
    kernel = k ? { x: k.exports, base: k.base } : null;
  }
  if (!kernel) return undefined;
  const { x, base } = kernel;
  const cols = c1 - c0 + 1;
  const cols4 = (cols + 3) & ~3;
  const { place, end } = memoryPlan(base);
  const rows = place(4 * cols4 * ROWS_AT_A_TIME), mx = place(4 * cols4), mn = place(4 * cols4), nc = place(4 * cols4);
  ensureMemory(x.memory, end());
  x.arrays(rows, mx, mn, nc);
  x.start(cols4);
  const buf = x.memory.buffer;
  const into = new Float32Array(buf, rows, cols4 * ROWS_AT_A_TIME);
  for (let r = r0; r <= r1; r += ROWS_AT_A_TIME) {
    const n = Math.min(ROWS_AT_A_TIME, r1 - r + 1);
    for (let k = 0; k < n; k++) into.set(heights.subarray((r + k) * w + c0, (r + k) * w + c1 + 1), k * cols4);
    x.fold(n, cols4);
  }
  return { max: new Float32Array(buf, mx, cols), min: new Float32Array(buf, mn, cols), nan: new Int32Array(buf, nc, cols) };
}
