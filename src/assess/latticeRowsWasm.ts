import { align16, ensureMemory, kernelInstance, type WasmMemory } from "../wasmKernel.js";

/**
 * The comparison's lattice rows in WebAssembly (latticeRows.as.ts, built into
 * dist/assess/latticeRows.wasm by `npm run build`): an instance per job, its memory holding
 * the strips' prefix counts and one band of cells at a time. Counts equal
 * latticeCoverage.ts's countRow exactly.
 */
export interface LatticeRows {
  /** The band's arrays, for up to the `cells` given at the start: copy ground and mask in, read counts out. */
  ground: Float32Array;
  inSite: Uint8Array;
  images: Uint16Array;
  /** countRow over band cells i0..i1 (inclusive, indices in the band); preAt: the strip's first prefix count. */
  row(i0: number, i1: number, preAt: number, A: number, a0: number, q0: number, da: number, dq: number, s0: number, t: number, n: number, kAlong: number, kAcross: number): void;
}

interface Exports {
  memory: WasmMemory;
  heapBase: () => number;
  arrays: (g: number, s: number, i: number, p: number) => void;
  row: LatticeRows["row"];
}

/** Where the kernel is, under dist/ (scripts/build-wasm.mjs). */
export const LATTICE_ROWS_WASM = "assess/latticeRows.wasm";

/**
 * A new kernel instance holding `pre` (every strip's prefix counts) and room for a band of
 * `cells` cells, or undefined without the compiled kernel (see wasmKernel): the comparison
 * then counts with its JavaScript rows.
 * @example const k = latticeRows(pre, bandCells); if (k) { k.ground.set(heights.subarray(i, i + n)); ...; k.row(...) }
 */
export function latticeRows(pre: Int32Array, cells: number): LatticeRows | undefined {
  const k = kernelInstance<Exports>(LATTICE_ROWS_WASM);
  if (!k) return undefined;
  const { exports: x, base } = k;
  // Layout: the prefix counts, then the band's 4-byte, 2-byte and 1-byte arrays, each 16-byte aligned.
  const p = base;
  const g = align16(p + 4 * pre.length);
  const i = align16(g + 4 * cells);
  const s = align16(i + 2 * cells);
  ensureMemory(x.memory, s + cells);
  x.arrays(g, s, i, p);
  const buf = x.memory.buffer;
  new Int32Array(buf, p, pre.length).set(pre);
  return {
    ground: new Float32Array(buf, g, cells),
    inSite: new Uint8Array(buf, s, cells),
    images: new Uint16Array(buf, i, cells),
    row: x.row,
  };
}
