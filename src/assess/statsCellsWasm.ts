import { ensureMemory, kernelInstance, memoryPlan, type WasmMemory } from "../wasmKernel.js";
import { FLAG_COARSE, FLAG_FINE, FLAG_VALUES } from "./flags.js";
import { RADIX_BINS, RADIX_SHIFT } from "./quantiles.js";
import { tallyEdges } from "./gsdTally.js";
import type { StatsPassJob } from "./stats.js";

/**
 * The statistics' pass over the cells in WebAssembly (statsCells.as.ts, built into
 * dist/assess/statsCells.wasm by `npm run build`): one instance per thread and pass, its
 * memory holding a chunk of cells at a time and this thread's counts, added to the job's
 * tallies at this thread's slot when its bands are done (`flush`). The counts equal
 * stats.ts statsPassCells's.
 */
export interface StatsCells {
  /** Counts cells i0 .. i1 - 1 (at most `chunkCells` of them). */
  cells(i0: number, i1: number): void;
  /** Adds the counts so far to the job's tallies at `slot` and starts them again from zero; gives the seen cells of at least job.atLeastCm so far (for job.atLeast). */
  flush(slot: number): number;
}

interface Exports {
  memory: WasmMemory;
  heapBase: () => number;
  chunk: (gsd: number, ground: number, images: number, strip: number, flags: number, inSite: number) => void;
  counts: (images: number, flags: number, inBand: number, radix: number, strips: number, below: number, above: number, tally: number, edges: number, tallyOfStripBin: number) => void;
  figures: (values: number, inBandBits: number, radix: number, stripBins: number, lo: number, n: number, atLeast: number) => void;
  tallyFigures: (lo: number, hi: number, inv: number, last: number, over: number) => void;
  takeAtLeast: () => number;
  cells: (n: number) => void;
}

/** Where the kernel is, under dist/ (scripts/build-wasm.mjs). */
export const STATS_CELLS_WASM = "assess/statsCells.wasm";

/**
 * A new kernel instance for the pass `job` (its own memory, room for `chunkCells` cells), or
 * undefined without the compiled kernel (see wasmKernel): the pass then counts in JavaScript.
 * `stripShift`: the strips' bins' shift (stats.ts STRIP_BIN_SHIFT).
 * @example const k = statsCells(job, 8192, 13); if (k) { k.cells(0, 8192); job.atLeast[0] += k.flush(0); }
 */
export function statsCells(job: StatsPassJob, chunkCells: number, stripShift: number): StatsCells | undefined {
  const k = kernelInstance<Exports>(STATS_CELLS_WASM);
  if (!k) return undefined;
  const { exports: x, base } = k;
  const S = job.strips;
  const span = job.stripHist ? job.span ?? 0 : 0;
  const edges = job.tallyGrid && job.tally ? job.tallyEdges ?? tallyEdges(job.tallyGrid) : undefined;
  const bins = edges ? edges.length - 1 : -1;
  // Layout: the cells' 4-byte arrays, 2-byte arrays and mask, then the counts.
  const { place, end } = memoryPlan(base);
  const gs = place(4 * chunkCells), gr = place(4 * chunkCells);
  const im = place(2 * chunkCells), st = place(2 * chunkCells), fl = place(2 * chunkCells);
  const si = place(chunkCells);
  const ih = place(4 * 65536), fh = place(4 * S * FLAG_VALUES), bs = place(4 * S), rh = place(4 * RADIX_BINS);
  const sh = place(4 * S * span, span > 0);
  const sb = place(4 * S, span > 0);
  const sa = place(4 * S, span > 0);
  const ts = place(4 * (bins + 2), bins >= 0);
  const te = place(8 * (bins + 1), bins >= 0);
  const tm = place(4 * span, span > 0 && bins >= 0 && job.tallyOfStripBin);
  ensureMemory(x.memory, end());
  // A new instance's memory is zeros: the counts start from zero.
  x.chunk(gs, gr, im, st, fl, si);
  x.counts(ih, fh, bs, rh, sh, sb, sa, ts, te, tm);
  x.figures(FLAG_VALUES, FLAG_COARSE | FLAG_FINE, RADIX_SHIFT, stripShift, job.spanLo ?? 0, span, job.atLeastCm);
  const buf = x.memory.buffer;
  const u32 = (p: number, n: number) => new Uint32Array(buf, p, n);
  if (edges) {
    new Float64Array(buf, te, bins + 1).set(edges);
    // BinCounter's own figures (gsdTally.ts), at entry 0 of the thread's counts.
    const lo = edges[0], hi = edges[bins];
    x.tallyFigures(lo, hi, bins / (hi - lo), bins - 1, 1 + Math.max(bins, 0));
  }
  if (tm) new Int32Array(buf, tm, span).set(job.tallyOfStripBin!);
  const cells = {
    gsd: new Float32Array(buf, gs, chunkCells), ground: new Float32Array(buf, gr, chunkCells),
    images: new Uint16Array(buf, im, chunkCells), strip: new Uint16Array(buf, st, chunkCells), flags: new Uint16Array(buf, fl, chunkCells),
    inSite: new Uint8Array(buf, si, chunkCells),
  };
  const counted = {
    images: u32(ih, 65536), flags: u32(fh, S * FLAG_VALUES), inBand: u32(bs, S), radix: u32(rh, RADIX_BINS),
    strips: u32(sh, span > 0 ? S * span : 0), below: u32(sb, span > 0 ? S : 0), above: u32(sa, span > 0 ? S : 0),
    tally: u32(ts, bins >= 0 ? bins + 2 : 0),
  };
  return {
    cells(i0, i1) {
      const n = i1 - i0;
      cells.gsd.set(job.gsdCm.subarray(i0, i1));
      cells.ground.set(job.ground.subarray(i0, i1));
      cells.images.set(job.images.subarray(i0, i1));
      cells.strip.set(job.nadirStrip.subarray(i0, i1));
      cells.flags.set(job.flags.subarray(i0, i1));
      cells.inSite.set(job.inSite.subarray(i0, i1));
      x.cells(n);
    },
    flush(slot) {
      addInto(job.imageHist, slot * 65536, counted.images);
      addInto(job.flagHist, slot * S * FLAG_VALUES, counted.flags);
      addInto(job.inBandSeen, slot * S, counted.inBand);
      addInto(job.radixHist, slot * RADIX_BINS, counted.radix);
      if (span > 0) {
        addInto(job.stripHist!, slot * S * span, counted.strips);
        addInto(job.stripBelow!, slot * S, counted.below);
        addInto(job.stripAbove!, slot * S, counted.above);
      }
      if (bins >= 0) addInto(job.tally!, slot * (bins + 2), counted.tally);
      return x.takeAtLeast();
    },
  };
}

/** to[at + k] += from[k] for every k, and from[k] set back to 0. */
function addInto(to: Float64Array | Uint32Array, at: number, from: Uint32Array): void {
  for (let k = 0; k < from.length; k++) {
    const c = from[k];
    if (c !== 0) {
      to[at + k] += c;
      from[k] = 0;
    }
  }
}
