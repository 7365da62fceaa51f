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
  /** Most cells to decode (default 1 000 000); smaller files are read whole. */
  maxSamples?: number;
}

/**
 * Min/max/mean height and nodata share from a bounded sample: the whole raster when it
 * has at most `maxSamples` cells, else whole strips/tiles spread evenly over the file
 * (each decoded block is read once, so the cost is bounded by maxSamples plus one block).
 * @example
 * const s = await demStatistics(dem, { maxSamples: 250_000 });
 * s.exact; // true for small files
 */
export async function demStatistics(source: DemSource, opts: DemStatisticsOptions = {}): Promise<DemStatistics> {
  const maxSamples = Math.max(1, Math.floor(opts.maxSamples ?? 1_000_000));
  const total = source.width * source.height;
  const acc = { min: Infinity, max: -Infinity, sum: 0, valid: 0, cells: 0 };
  if (total <= maxSamples) {
    await accumulate(source, { col0: 0, row0: 0, col1: source.width, row1: source.height }, acc);
    return finish(acc, true);
  }
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
  const h = g.heights, v = g.valid;
  let min = acc.min, max = acc.max, sum = 0, valid = 0;
  for (let i = 0; i < h.length; i++) {
    if (!v[i]) continue;
    const x = h[i];
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
