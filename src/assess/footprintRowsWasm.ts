import { ensureMemory, kernelInstance, memoryPlan, type WasmMemory } from "../wasmKernel.js";
import { BAND_SLACK, FLAG_COARSE, FLAG_FEW_IMAGES, FLAG_FINE, FLAG_NODATA } from "./flags.js";

/**
 * The coverage sweep's footprint rows in WebAssembly (footprintRows.as.ts, built into
 * dist/assess/footprintRows.wasm by `npm run build`): one instance per thread, with its own
 * memory holding one band of cells at a time. Results equal coverageKernel.ts's sweepRow
 * bit for bit.
 */
export interface FootprintRows {
  /** Views of the band's arrays for `cells` cells, `rows` rows of a photo (`rows`) and, for `effects`, `strips` nadir strips (made again when the memory had to grow). */
  band(cells: number, strips?: number, rows?: number): BandArrays;
  camera(kAlong: number, kAcross: number, invKA2: number, invKC2: number, byDistance: boolean, gsdPerM: number): void;
  /** sweepRow over band cells i0..i1 (inclusive; indices in the band). */
  row(i0: number, i1: number, ez: number, a0: number, q0: number, da: number, dq: number, strip: number): void;
  /**
   * `row` for the first n rows set in the band's rowCells and rowOffsets (BandArrays), in
   * order: row k over cells rowCells[2k]..rowCells[2k + 1] from offsets rowOffsets[2k], rowOffsets[2k + 1].
   */
  rows(n: number, ez: number, da: number, dq: number, strip: number): void;
  /**
   * coverageKernel.ts bandEffects over the band's first n cells (the band's views made for
   * `strips`): their flags into `flags`, their seen cells by nadir strip added to `seen`.
   */
  effects(n: number, lowCm: number, highCm: number, minImages: number): void;
}

/** One band's arrays in the kernel's memory. */
export interface BandArrays {
  ground: Float32Array;
  inSite: Uint8Array;
  images: Uint16Array;
  best: Float32Array;
  gsdCm: Float32Array;
  nadirStrip: Uint16Array;
  /** The effect flags (`effects`). */
  flags: Uint16Array;
  /** Seen cells by nadir strip (`effects`): zero them before the band's cells are counted. */
  seen: Int32Array;
  /** A photo's rows for `rows`, room for as many as the band was made for: first and last cells (pairs), first offsets along and across (pairs). */
  rowCells: Int32Array;
  rowOffsets: Float64Array;
}

interface Exports {
  memory: WasmMemory;
  heapBase: () => number;
  arrays: (g: number, s: number, i: number, b: number, d: number, t: number) => void;
  camera: (ka: number, kc: number, ika2: number, ikc2: number, distance: number, gsdPerM: number) => void;
  row: (i0: number, i1: number, ez: number, a0: number, q0: number, da: number, dq: number, strip: number) => void;
  rowArrays: (ints: number, floats: number) => void;
  rows: (n: number, ez: number, da: number, dq: number, strip: number) => void;
  effectArrays: (flags: number, seen: number) => void;
  effects: (n: number, lo: number, hi: number, minImages: number, nodata: number, coarse: number, fine: number, few: number) => void;
}

/** Where the kernel is, under dist/ (scripts/build-wasm.mjs). */
export const FOOTPRINT_ROWS_WASM = "assess/footprintRows.wasm";

/**
 * A new kernel instance (its own memory), or undefined without the compiled kernel (see
 * wasmKernel): the sweep then runs its JavaScript rows.
 * @example const k = footprintRows(); if (k) { const a = k.band(n); a.ground.set(heights.subarray(i, i + n)); ... }
 */
export function footprintRows(): FootprintRows | undefined {
  const k = kernelInstance<Exports>(FOOTPRINT_ROWS_WASM);
  if (!k) return undefined;
  const { exports: x, base } = k;
  let views: BandArrays | undefined;
  let viewsCells = -1;
  let viewsStrips = -1;
  let viewsRows = -1;
  return {
    band(cells, strips = 0, rows = 0) {
      if (views && viewsCells === cells && viewsStrips >= strips && viewsRows >= rows && views.ground.buffer === x.memory.buffer) return views;
      // Layout: the 4-byte arrays first, then the 2-byte, then the mask, each 16-byte aligned;
      // then the effects' flags and seen cells.
      const { place, end } = memoryPlan(base);
      const g = place(4 * cells), b = place(4 * cells), d = place(4 * cells);
      const i = place(2 * cells), t = place(2 * cells);
      const s = place(cells);
      const f = place(2 * cells), c = place(4 * strips);
      const ri = place(8 * rows), rf = place(16 * rows);
      ensureMemory(x.memory, end());
      x.arrays(g, s, i, b, d, t);
      x.effectArrays(f, c);
      x.rowArrays(ri, rf);
      const buf = x.memory.buffer;
      views = {
        ground: new Float32Array(buf, g, cells),
        inSite: new Uint8Array(buf, s, cells),
        images: new Uint16Array(buf, i, cells),
        best: new Float32Array(buf, b, cells),
        gsdCm: new Float32Array(buf, d, cells),
        nadirStrip: new Uint16Array(buf, t, cells),
        flags: new Uint16Array(buf, f, cells),
        seen: new Int32Array(buf, c, strips),
        rowCells: new Int32Array(buf, ri, 2 * rows),
        rowOffsets: new Float64Array(buf, rf, 2 * rows),
      };
      viewsCells = cells;
      viewsStrips = strips;
      viewsRows = rows;
      return views;
    },
    camera(kAlong, kAcross, invKA2, invKC2, byDistance, gsdPerM) {
      x.camera(kAlong, kAcross, invKA2, invKC2, byDistance ? 1 : 0, gsdPerM);
    },
    row: x.row,
    rows: x.rows,
    effects(n, lowCm, highCm, minImages) {
      x.effects(n, lowCm * (1 - BAND_SLACK), highCm * (1 + BAND_SLACK), minImages, FLAG_NODATA, FLAG_COARSE, FLAG_FINE, FLAG_FEW_IMAGES);
    },
  };
}
