import { align16, ensureMemory, kernelInstance, type WasmMemory } from "../wasmKernel.js";

/**
 * The coverage sweep's footprint rows in WebAssembly (footprintRows.as.ts, built into
 * dist/assess/footprintRows.wasm by `npm run build`): one instance per thread, with its own
 * memory holding one band of cells at a time. Results equal coverageKernel.ts's sweepRow
 * bit for bit.
 */
export interface FootprintRows {
  /** Views of the band's arrays for `cells` cells (made again when the memory had to grow). */
  band(cells: number): BandArrays;
  camera(kAlong: number, kAcross: number, invKA2: number, invKC2: number, byDistance: boolean, gsdPerM: number): void;
  /** sweepRow over band cells i0..i1 (inclusive; indices in the band). */
  row(i0: number, i1: number, ez: number, a0: number, q0: number, da: number, dq: number, strip: number): void;
}

/** One band's arrays in the kernel's memory. */
export interface BandArrays {
  ground: Float32Array;
  inSite: Uint8Array;
  images: Uint16Array;
  best: Float32Array;
  gsdCm: Float32Array;
  nadirStrip: Uint16Array;
}

interface Exports {
  memory: WasmMemory;
  heapBase: () => number;
  arrays: (g: number, s: number, i: number, b: number, d: number, t: number) => void;
  camera: (ka: number, kc: number, ika2: number, ikc2: number, distance: number, gsdPerM: number) => void;
  row: (i0: number, i1: number, ez: number, a0: number, q0: number, da: number, dq: number, strip: number) => void;
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
  return {
    band(cells) {
      if (views && viewsCells === cells && views.ground.buffer === x.memory.buffer) return views;
      // Layout: the 4-byte arrays first, then the 2-byte, then the mask, each 16-byte aligned.
      const g = base;
      const b = align16(g + 4 * cells);
      const d = align16(b + 4 * cells);
      const i = align16(d + 4 * cells);
      const t = align16(i + 2 * cells);
      const s = align16(t + 2 * cells);
      ensureMemory(x.memory, s + cells);
      x.arrays(g, s, i, b, d, t);
      const buf = x.memory.buffer;
      views = {
        ground: new Float32Array(buf, g, cells),
        inSite: new Uint8Array(buf, s, cells),
        images: new Uint16Array(buf, i, cells),
        best: new Float32Array(buf, b, cells),
        gsdCm: new Float32Array(buf, d, cells),
        nadirStrip: new Uint16Array(buf, t, cells),
      };
      viewsCells = cells;
      return views;
    },
    camera(kAlong, kAcross, invKA2, invKC2, byDistance, gsdPerM) {
      x.camera(kAlong, kAcross, invKA2, invKC2, byDistance ? 1 : 0, gsdPerM);
    },
    row: x.row,
  };
}
