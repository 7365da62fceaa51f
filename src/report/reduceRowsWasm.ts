import { ensureMemory, kernelInstance, memoryPlan, type WasmMemory } from "../wasmKernel.js";

/**
 * The report maps' block reduction in WebAssembly (reduceRows.as.ts, built into
 * dist/report/reduceRows.wasm by `npm run build`): a block row's input rows copied in, one
 * output row per raster read out. The results equal downsample.ts's own loops bit for bit.
 */

/** The rasters of a reduction (any may be absent), full size, and where their reductions go. */
export interface ReduceRasters {
  gsd?: Float32Array;
  images?: Uint16Array;
  flags?: Uint16Array;
  inSite?: Uint8Array;
  heights?: Float32Array;
}

interface Exports {
  memory: WasmMemory;
  heapBase: () => number;
  inputs: (gsd: number, images: number, flags: number, inSite: number, heights: number) => void;
  outputs: (flags: number, inSite: number, images: number, gsd: number, heights: number) => void;
  scratch: (at: number, w: number) => void;
  blockRow: (rows: number, W: number, k: number, w: number) => void;
}

/** Where the kernel is, under dist/ (scripts/build-wasm.mjs). */
export const REDUCE_ROWS_WASM = "report/reduceRows.wasm";

/**
 * Reduces the W x H rasters `src` (images with inSite) in k x k blocks into `out` (w x h =
 * ceil(W / k) x ceil(H / k) each, the same arrays given), or returns false without the
 * compiled kernel (see wasmKernel): the caller then reduces them in JavaScript.
 * @example reduceInKernel({ heights }, { heights: out }, W, H, k)
 */
export function reduceInKernel(src: ReduceRasters, out: ReduceRasters, W: number, H: number, k: number): boolean {
  const kern = kernelInstance<Exports>(REDUCE_ROWS_WASM);
  if (!kern) return false;
  const { exports: x, base } = kern;
  const w = Math.ceil(W / k), h = Math.ceil(H / k);
  const cells = k * W;
  const { place, end } = memoryPlan(base);
  const ig = place(4 * cells, src.gsd), iz = place(4 * cells, src.heights), ii = place(2 * cells, src.images), iF = place(2 * cells, src.flags), is = place(cells, src.inSite);
  const og = place(4 * w, src.gsd), oz = place(4 * w, src.heights), oi = place(2 * w, src.inSite), oF = place(2 * w, src.flags), os = place(w, src.inSite);
  const acc = place(36 * w);
  ensureMemory(x.memory, end());
  x.inputs(ig, ii, iF, is, iz);
  x.outputs(oF, os, oi, og, oz);
  x.scratch(acc, w);
  const buf = x.memory.buffer;
  // Each given raster's input rows and output row in the kernel's memory, beside the caller's
  // arrays (the output where one is asked for; an image count's row is made with the site
  // mask's, so only with it).
  const view = <T extends Float32Array | Uint16Array | Uint8Array>(C: new (b: ArrayBufferLike, at: number, n: number) => T, from: T | undefined, to: T | undefined, inAt: number, outAt: number) =>
    from ? [{ from, rows: new C(buf, inAt, cells), to, row: new C(buf, outAt, w) }] : [];
  const rasters = [
    ...view(Float32Array, src.gsd, out.gsd, ig, og),
    ...view(Float32Array, src.heights, out.heights, iz, oz),
    ...view(Uint16Array, src.flags, out.flags, iF, oF),
    ...view(Uint8Array, src.inSite, out.inSite, is, os),
    ...view(Uint16Array, src.images, src.inSite && out.images, ii, oi),
  ] as { from: Float32Array; rows: Float32Array; to?: Float32Array; row: Float32Array }[];
  for (let br = 0; br < h; br++) {
    const i0 = br * k * W, i1 = Math.min(H, br * k + k) * W;
    for (const r of rasters) r.rows.set(r.from.subarray(i0, i1));
    x.blockRow((i1 - i0) / W, W, k, w);
    for (const r of rasters) r.to?.set(r.row, br * w);
  }
  return true;
}
