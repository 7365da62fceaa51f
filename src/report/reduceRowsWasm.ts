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
  const rows = {
    gsd: src.gsd && new Float32Array(buf, ig, cells), heights: src.heights && new Float32Array(buf, iz, cells),
    images: src.images && new Uint16Array(buf, ii, cells), flags: src.flags && new Uint16Array(buf, iF, cells), inSite: src.inSite && new Uint8Array(buf, is, cells),
  };
  const row = {
    gsd: new Float32Array(buf, og, src.gsd ? w : 0), heights: new Float32Array(buf, oz, src.heights ? w : 0),
    images: new Uint16Array(buf, oi, src.inSite ? w : 0), flags: new Uint16Array(buf, oF, src.flags ? w : 0), inSite: new Uint8Array(buf, os, src.inSite ? w : 0),
  };
  for (let br = 0; br < h; br++) {
    const i0 = br * k * W, i1 = Math.min(H, br * k + k) * W;
    for (const key of ["gsd", "heights", "images", "flags", "inSite"] as const) {
      const from = src[key];
      if (from) (rows[key] as Float32Array).set(from.subarray(i0, i1) as Float32Array);
    }
    x.blockRow((i1 - i0) / W, W, k, w);
    for (const key of ["gsd", "heights", "images", "flags", "inSite"] as const) {
      const into = out[key];
      if (into && src[key === "images" ? "inSite" : key]) (into as Float32Array).set(row[key] as Float32Array, br * w);
    }
  }
  return true;
}
