import type { DemSource } from "./source.js";
import { readCells, type CellWindow } from "./window.js";

/** Height statistics of a DEM band, in metres. */
export interface DemStatistics {
  /** NaN when no sampled cell has data. */
  minM: number;
  maxM: number;
  meanM: number;
  /** Share of sampled cells that are nodata, 0..1. */
  nodataFraction: number;
  /** Cells looked at. */
  sampledCells: number;
  /** True when every cell was read (the figures are exact, not estimates). */
  exact: boolean;
}

/** Options of demStatistics. */
export interface DemStatisticsOptions {
  /** Rasters of at most this many cells are read whole, if that is quick (default 50 000 000). */
  maxExactCells?: number;
  /** Time a whole read may take, milliseconds (default 1000); past it the figures are estimated. */
  budgetMs?: number;
  /** Cells decoded for an estimate (default 1 000 000). */
  maxSamples?: number;
  /** Clock in milliseconds (default performance.now), injected for tests. */
  now?: () => number;
  /** Cells per read while going through a whole raster (default 4 000 000): bounds its memory. */
  chunkCells?: number;
}

/**
 * Min/max/mean height and nodata share. Exact (every cell read, chunk by chunk) when the
 * raster has at most `maxExactCells` cells and the read keeps to `budgetMs` (judged from
 * the pace of the chunks read so far); otherwise an estimate from whole strips/tiles spread
 * evenly over the raster (each decoded block read once: the cost is bounded by maxSamples
 * plus one block), with `exact: false`.
 * @example
 * const s = await demStatistics(dem);
 * s.exact; // true for files of up to ~50 M cells that read within about a second
 */
export async function demStatistics(source: DemSource, opts: DemStatisticsOptions = {}): Promise<DemStatistics> {
  const maxExact = opts.maxExactCells ?? 50_000_000;
  const budgetMs = opts.budgetMs ?? 1000;
  const now = opts.now ?? (() => performance.now());
  const total = source.width * source.height;
  if (total <= maxExact) {
    const acc = { min: Infinity, max: -Infinity, sum: 0, valid: 0, cells: 0 };
    // Whole rows of blocks per chunk, so no block is decoded twice.
    const bh = Math.max(1, source.blockHeight);
    const rows = Math.max(bh, Math.floor((opts.chunkCells ?? 4_000_000) / source.width / bh) * bh);
    const t0 = now();
    let done = true;
    for (let r = 0; r < source.height; r += rows) {
      await accumulate(source, { col0: 0, row0: r, col1: source.width, row1: Math.min(source.height, r + rows) }, acc);
      const elapsed = now() - t0;
      // The pace so far says whether the rest fits the budget.
      if (acc.cells < total && (elapsed * total) / acc.cells > budgetMs) {
        done = false;
        break;
      }
    }
    if (done) return finish(acc, true);
  }
  return estimate(source, Math.max(1, Math.floor(opts.maxSamples ?? 1_000_000)));
}

async function estimate(source: DemSource, maxSamples: number): Promise<DemStatistics> {
  const acc = { min: Infinity, max: -Infinity, sum: 0, valid: 0, cells: 0 };
  const bw = source.blockWidth;
  const bh = source.blockHeight;
  const bx = Math.ceil(source.width / bw);
  const by = Math.ceil(source.height / bh);
  const nBlocks = bx * by;
  const take = Math.min(nBlocks, Math.max(1, Math.floor(maxSamples / (bw * bh))));
  // A fractional stride over the row-major block order spreads the picks over rows and columns.
  const stride = nBlocks / take;
  const picks: CellWindow[] = [];
  for (let i = 0; i < take; i++) {
    const b = Math.min(nBlocks - 1, Math.floor((i + 0.5) * stride));
    const c = b % bx, r = Math.floor(b / bx);
    picks.push({ col0: c * bw, row0: r * bh, col1: Math.min(source.width, (c + 1) * bw), row1: Math.min(source.height, (r + 1) * bh) });
  }
  for (let i = 0; i < picks.length; i += 4) await Promise.all(picks.slice(i, i + 4).map((w) => accumulate(source, w, acc)));
  return finish(acc, take === nBlocks);
}

async function accumulate(source: DemSource, win: CellWindow, acc: { min: number; max: number; sum: number; valid: number; cells: number }): Promise<void> {
  const g = await readCells(source, win);
  const h = g.heights;
  let min = acc.min, max = acc.max, sum = 0, valid = 0;
  for (let i = 0; i < h.length; i++) {
    const x = h[i];
    if (x !== x) continue;
    if (x < min) min = x;
    if (x > max) max = x;
    sum += x;
    valid++;
  }
  acc.min = min;
  acc.max = max;
  acc.sum += sum;
  acc.valid += valid;
  acc.cells += h.length;
}

function finish(acc: { min: number; max: number; sum: number; valid: number; cells: number }, exact: boolean): DemStatistics {
  const any = acc.valid > 0;
  return {
    minM: any ? acc.min : NaN,
    maxM: any ? acc.max : NaN,
    meanM: any ? acc.sum / acc.valid : NaN,
    nodataFraction: acc.cells > 0 ? 1 - acc.valid / acc.cells : 1,
    sampledCells: acc.cells,
    exact,
  };
}
