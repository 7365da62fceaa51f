import { ensureMemory, kernelInstance, memoryPlan, type WasmMemory } from "../wasmKernel.js";

/**
 * The comparison's lattice rows in WebAssembly (latticeRows.as.ts, built into
 * dist/assess/latticeRows.wasm by `npm run build`): an instance per job, its memory holding
 * the strips' prefix counts and one band of cells at a time, and, when asked for, the tallies
 * of the comparison's pass over the cells (plan/baseline.ts). Counts equal
 * latticeCoverage.ts's countRow exactly, the pass's figures tallyRow's.
 */
export interface LatticeRows {
  /** The band's arrays, for up to the `cells` given at the start: copy ground and mask in, read counts out. */
  ground: Float32Array;
  inSite: Uint8Array;
  images: Uint16Array;
  /** A strip's rows for `rows`, room for the rows asked for at the start: first and last cells (pairs), first offsets along and across (pairs). */
  rowCells: Int32Array;
  rowOffsets: Float64Array;
  /**
   * latticeCoverage.ts countRow for the first `count` rows set in rowCells and rowOffsets, in
   * order, all of one strip (its prefix counts from `preAt`, lattice s0 + k t for k in 0..n):
   * row k over band cells rowCells[2k]..rowCells[2k + 1] (inclusive) from offsets rowOffsets[2k], rowOffsets[2k + 1].
   */
  rows(count: number, preAt: number, A: number, da: number, dq: number, s0: number, t: number, n: number, kAlong: number, kAcross: number): void;
  /** The pass's tallies, when asked for at the start. */
  tallies?: KernelTallies;
}

/** The comparison's pass in the kernel: its tallies' views, set up once, then run band by band. */
export interface KernelTallies {
  /** Radix bins of the seen ground, image counts, flag values, the GSD tally's slots (under, bins, over) and edges, the seen cells' bits. */
  seenGround: Uint32Array;
  imageHist: Float64Array;
  flagHist: Float64Array;
  slots: Float64Array;
  edges: Float64Array;
  seenBits: Uint8Array;
  /** The pass's figures (see latticeRows.as.ts tallies); byThreshold false: the take-off rule, against takeoffLimitM. */
  setup(A: number, gsdPerM: number, lo: number, hi: number, clearanceM: number, minImages: number, byThreshold: boolean, breachGsd: number, ifov: number, takeoffLimitM: number): void;
  /** tallyRow over the band's cells from .. end - 1, the band's cell 0 being the grid's cell `cellAt`. */
  band(from: number, end: number, cellAt: number): void;
  /** Count k: 0 site cells, 1 seen, 2 seen with ground, 3 in band, 4 above the ceiling, 5 short of clearance, 6 the highest ground. */
  count(k: number): number;
}

interface Exports {
  memory: WasmMemory;
  heapBase: () => number;
  arrays: (g: number, s: number, i: number, p: number) => void;
  rowArrays: (ints: number, floats: number) => void;
  rows: LatticeRows["rows"];
  tallies: (A: number, gsdPerM: number, lo: number, hi: number, clearanceM: number, minImages: number, byThreshold: number, breachGsd: number, ifov: number, takeoffLimitM: number,
    bins: number, radix: number, imageHist: number, flagHist: number, slots: number, edges: number, seenBits: number) => void;
  tallyBand: (from: number, end: number, cellAt: number) => void;
  tallyCount: (k: number) => number;
}

/** Where the kernel is, under dist/ (scripts/build-wasm.mjs). */
export const LATTICE_ROWS_WASM = "assess/latticeRows.wasm";

/** Entries of the radix and image-count tallies; flag values. */
const RADIX_BINS = 65536;
const IMAGE_COUNTS = 65536;
const FLAG_VALUES = 512;

/**
 * A new kernel instance holding `pre` (every strip's prefix counts) and room for a band of
 * `cells` cells, `rows` rows of a strip (`rows`) (and, with `tally`, the pass's tallies for a grid of `gridCells` cells and a
 * GSD tally of `bins` bins, 0: none), or undefined without the compiled kernel (see
 * wasmKernel): the comparison then counts with its JavaScript rows.
 * @example const k = latticeRows(pre, bandCells, undefined, rows); if (k) { k.ground.set(heights.subarray(i, i + n)); ...; k.rows(...) }
 */
export function latticeRows(pre: Int32Array, cells: number, tally?: { gridCells: number; bins: number }, rows = 0): LatticeRows | undefined {
  const k = kernelInstance<Exports>(LATTICE_ROWS_WASM);
  if (!k) return undefined;
  const { exports: x, base } = k;
  // Layout: the prefix counts, the band's 4-byte, 2-byte and 1-byte arrays, then the tallies, each 16-byte aligned.
  const { place, end } = memoryPlan(base);
  const p = place(4 * pre.length), g = place(4 * cells), i = place(2 * cells), s = place(cells);
  const bins = tally ? tally.bins : 0;
  const rg = place(4 * RADIX_BINS, tally), ih = place(8 * IMAGE_COUNTS, tally), fh = place(8 * FLAG_VALUES, tally);
  const ts = place(8 * (bins + 2), tally), te = place(8 * (bins + 1), tally);
  const sb = place(tally ? (tally.gridCells + 7) >> 3 : 0, tally);
  const ri = place(8 * rows), rf = place(16 * rows);
  ensureMemory(x.memory, end());
  x.arrays(g, s, i, p);
  x.rowArrays(ri, rf);
  const buf = x.memory.buffer;
  new Int32Array(buf, p, pre.length).set(pre);
  return {
    ground: new Float32Array(buf, g, cells),
    inSite: new Uint8Array(buf, s, cells),
    images: new Uint16Array(buf, i, cells),
    rowCells: new Int32Array(buf, ri, 2 * rows),
    rowOffsets: new Float64Array(buf, rf, 2 * rows),
    rows: x.rows,
    ...(tally ? {
      tallies: {
        seenGround: new Uint32Array(buf, rg, RADIX_BINS),
        imageHist: new Float64Array(buf, ih, IMAGE_COUNTS),
        flagHist: new Float64Array(buf, fh, FLAG_VALUES),
        slots: new Float64Array(buf, ts, bins + 2),
        edges: new Float64Array(buf, te, bins + 1),
        seenBits: new Uint8Array(buf, sb, (tally.gridCells + 7) >> 3),
        setup: (A, gsdPerM, lo, hi, clearanceM, minImages, byThreshold, breachGsd, ifov, takeoffLimitM) =>
          x.tallies(A, gsdPerM, lo, hi, clearanceM, minImages, byThreshold ? 1 : 0, breachGsd, ifov, takeoffLimitM, bins > 0 ? bins : -1, rg, ih, fh, ts, te, sb),
        band: x.tallyBand,
        count: x.tallyCount,
      },
    } : {}),
  };
}
