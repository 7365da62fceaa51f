import type { ReportGrid, ReportRasters } from "./model.js";
import { reduceInKernel } from "./reduceRowsWasm.js";

/** Reduce in JavaScript or WebAssembly (reduceRows.as.ts, where built: the default); the same maps. */
export type ReduceIn = "js" | "wasm";

/**
 * Block reduction of the map rasters for the report: the page needs a picture about a
 * thousand pixels across, not the full DEM. Each output cell covers k x k input cells.
 * Heights and GSD take the mean of the finite values; image count the minimum over
 * in-site cells (the weakest spot shows); flags the OR and inSite the "any" of the block,
 * so a thin flagged stretch never disappears from the map. Flags come out 16-bit whatever
 * came in (the keep-out bit is 256; old 8-bit report data widens losslessly).
 */

/**
 * The report's maps at most this many pixels across: the reduction the page, report-data.json
 * and the maps' worker (reportMapsInBackground) must all make, so the worker's maps are used.
 */
export const REPORT_MAP_PX = 1000;

/** The block factor that brings the larger side to at most `maxPx`. */
export function blockFactor(width: number, height: number, maxPx: number): number {
  return Math.max(1, Math.ceil(Math.max(width, height) / maxPx));
}

/**
 * @example const small = downsampleGrid(dem, 2); // half the cells each way
 */
export function downsampleGrid(grid: ReportGrid, k: number, reduceIn?: ReduceIn): ReportGrid {
  if (k <= 1) return grid;
  return reducedGrid(grid, k, meanBlocks(grid.heights, grid.width, grid.height, k, reduceIn));
}

/** The reduced grid's record around its block means. */
function reducedGrid(grid: ReportGrid, k: number, heights: Float32Array): ReportGrid {
  return {
    width: Math.ceil(grid.width / k),
    height: Math.ceil(grid.height / k),
    transform: { ...grid.transform, dx: grid.transform.dx * k, dy: grid.transform.dy * k },
    cellSizeM: [grid.cellSizeM[0] * k, grid.cellSizeM[1] * k],
    heights,
  };
}

/**
 * @example const small = downsampleRasters(assessment.rasters, 3);
 */
export function downsampleRasters(r: ReportRasters, k: number, reduceIn?: ReduceIn): ReportRasters {
  if (k <= 1) return r;
  return reduceRasters(r, k, null, reduceIn).rasters;
}

/**
 * The DEM and the rasters by the same factor, as downsampleGrid and downsampleRasters give
 * them; on one grid (the plan's usual case) in a single pass over both.
 *
 * @example const { dem, rasters } = downsampleGridAndRasters(run.grid, assessment.rasters, 5);
 */
export function downsampleGridAndRasters(grid: ReportGrid, r: ReportRasters, k: number, reduceIn?: ReduceIn): { dem: ReportGrid; rasters: ReportRasters } {
  if (k <= 1) return { dem: grid, rasters: r };
  if (grid.width !== r.width || grid.height !== r.height) return { dem: downsampleGrid(grid, k, reduceIn), rasters: downsampleRasters(r, k, reduceIn) };
  const { rasters, heights } = reduceRasters(r, k, grid.heights, reduceIn);
  return { dem: reducedGrid(grid, k, heights!), rasters };
}

/** The block reduction of the rasters and, when given, of heights on the same grid. */
function reduceRasters(r: ReportRasters, k: number, z: Float32Array | null, reduceIn?: ReduceIn): { rasters: ReportRasters; heights: Float32Array | null } {
  const W = r.width;
  const H = r.height;
  const w = Math.ceil(W / k);
  const h = Math.ceil(H / k);
  const images = new Uint16Array(w * h);
  const flags = new Uint16Array(w * h);
  const inSite = new Uint8Array(w * h);
  const gsdCm = new Float32Array(w * h);
  const heights = z ? new Float32Array(w * h) : null;
  // Old 8-bit flags (report data from before the keep-out bit) widened once, so the row loops take one array type.
  const src = { gsd: r.gsdCm, images: r.images, flags: r.flags instanceof Uint16Array ? r.flags : Uint16Array.from(r.flags), inSite: r.inSite, z };
  const rasters = {
    width: w,
    height: h,
    transform: { ...r.transform, dx: r.transform.dx * k, dy: r.transform.dy * k },
    gsdCm,
    images,
    flags,
    inSite,
  };
  if (reduceIn !== "js" && reduceInKernel({ ...src, ...(z ? { heights: z } : {}) }, { gsd: gsdCm, images, flags, inSite, ...(heights ? { heights } : {}) }, W, H, k)) return { rasters, heights };
  // One row of blocks at a time, read row by row (see meanBlocks): per block column the
  // flag OR, whether any cell is in the site, the least in-site image count and the GSD
  // (and height) sums.
  const acc = {
    flags: new Int32Array(w),
    any: new Uint8Array(w),
    minImages: new Int32Array(w),
    sum: new Float64Array(w),
    cnt: new Int32Array(w),
    zSum: new Float64Array(w),
    zCnt: new Int32Array(w),
  };
  for (let br = 0; br < h; br++) {
    acc.flags.fill(0);
    acc.any.fill(0);
    acc.minImages.fill(65535);
    acc.sum.fill(0);
    acc.cnt.fill(0);
    acc.zSum.fill(0);
    acc.zCnt.fill(0);
    const rEnd = Math.min(H, br * k + k);
    for (let r0 = br * k; r0 < rEnd; r0++) reduceRasterRow(src, r0 * W, W, k, w, acc);
    const o = br * w;
    for (let bc = 0; bc < w; bc++) {
      flags[o + bc] = acc.flags[bc];
      inSite[o + bc] = acc.any[bc];
      images[o + bc] = acc.any[bc] ? acc.minImages[bc] : 0;
      gsdCm[o + bc] = acc.cnt[bc] ? acc.sum[bc] / acc.cnt[bc] : NaN;
      if (heights) heights[o + bc] = acc.zCnt[bc] ? acc.zSum[bc] / acc.zCnt[bc] : NaN;
    }
  }
  return { rasters, heights };
}

/**
 * One input row of reduceRasters into its block columns' accumulators: a small loop per
 * raster (each over one array type, the GSD's and the heights' the same loop), where one loop
 * over all of them, with the heights optional and the flags of either width, ran at ~3x the
 * time (the maps' worker at 4 km2). Each block still takes its cells in the same order.
 */
function reduceRasterRow(
  src: { gsd: Float32Array; images: Uint16Array; flags: Uint16Array; inSite: Uint8Array; z: Float32Array | null },
  base: number,
  W: number,
  k: number,
  w: number,
  acc: { flags: Int32Array; any: Uint8Array; minImages: Int32Array; sum: Float64Array; cnt: Int32Array; zSum: Float64Array; zCnt: Int32Array },
): void {
  orBlocks(src.flags, base, W, k, w, acc.flags);
  siteMinBlocks(src.inSite, src.images, base, W, k, w, acc.any, acc.minImages);
  finiteSumBlocks(src.gsd, base, W, k, w, acc.sum, acc.cnt);
  if (src.z !== null) finiteSumBlocks(src.z, base, W, k, w, acc.zSum, acc.zCnt);
}

/** Each block column's OR of the row's flags. */
function orBlocks(flags: Uint16Array, base: number, W: number, k: number, w: number, out: Int32Array): void {
  let c = 0;
  for (let bc = 0; bc < w; bc++) {
    const end = Math.min(W, c + k);
    let f = out[bc];
    for (; c < end; c++) f |= flags[base + c];
    out[bc] = f;
  }
}

/** Each block column: whether any of the row's cells is in the site, and the least image count of those that are. */
function siteMinBlocks(inSite: Uint8Array, images: Uint16Array, base: number, W: number, k: number, w: number, any: Uint8Array, minImages: Int32Array): void {
  let c = 0;
  for (let bc = 0; bc < w; bc++) {
    const end = Math.min(W, c + k);
    let a = any[bc];
    let m = minImages[bc];
    for (; c < end; c++) {
      if (inSite[base + c] === 0) continue;
      a = 1;
      const im = images[base + c];
      if (im < m) m = im;
    }
    any[bc] = a;
    minImages[bc] = m;
  }
}

/** Each block column's sum and count of the row's finite values, added left to right. */
function finiteSumBlocks(v: Float32Array, base: number, W: number, k: number, w: number, sum: Float64Array, cnt: Int32Array): void {
  let c = 0;
  for (let bc = 0; bc < w; bc++) {
    const end = Math.min(W, c + k);
    let s = sum[bc];
    let m = cnt[bc];
    for (; c < end; c++) {
      const x = v[base + c];
      if (x === x) {
        s += x;
        m++;
      }
    }
    sum[bc] = s;
    cnt[bc] = m;
  }
}

/**
 * Mean of the finite values of each k x k block. The input is read row by row into one
 * row of block sums (not block by block, which strides across rows and misses the cache on
 * a large raster); each block still adds its values in the same order, row by row, so the
 * means come out the same to the last bit.
 */
function meanBlocks(src: Float32Array, W: number, H: number, k: number, reduceIn?: ReduceIn): Float32Array {
  const w = Math.ceil(W / k);
  const h = Math.ceil(H / k);
  const out = new Float32Array(w * h);
  if (reduceIn !== "js" && reduceInKernel({ heights: src }, { heights: out }, W, H, k)) return out;
  const sum = new Float64Array(w);
  const cnt = new Int32Array(w);
  for (let br = 0; br < h; br++) {
    sum.fill(0);
    cnt.fill(0);
    const rEnd = Math.min(H, br * k + k);
    for (let r0 = br * k; r0 < rEnd; r0++) finiteSumBlocks(src, r0 * W, W, k, w, sum, cnt);
    const o = br * w;
    for (let bc = 0; bc < w; bc++) out[o + bc] = cnt[bc] ? sum[bc] / cnt[bc] : NaN;
  }
  return out;
}
