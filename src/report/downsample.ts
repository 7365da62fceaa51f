import type { ReportGrid, ReportRasters } from "./model.js";

/**
 * Block reduction of the map rasters for the report: the page needs a picture about a
 * thousand pixels across, not the full DEM. Each output cell covers k x k input cells.
 * Heights and GSD take the mean of the finite values; image count the minimum over
 * in-site cells (the weakest spot shows); flags the OR and inSite the "any" of the block,
 * so a thin flagged stretch never disappears from the map. Flags come out 16-bit whatever
 * came in (the keep-out bit is 256; old 8-bit report data widens losslessly).
 */

/** The block factor that brings the larger side to at most `maxPx`. */
export function blockFactor(width: number, height: number, maxPx: number): number {
  return Math.max(1, Math.ceil(Math.max(width, height) / maxPx));
}

/**
 * @example const small = downsampleGrid(dem, 2); // half the cells each way
 */
export function downsampleGrid(grid: ReportGrid, k: number): ReportGrid {
  if (k <= 1) return grid;
  const w = Math.ceil(grid.width / k);
  const h = Math.ceil(grid.height / k);
  const heights = meanBlocks(grid.heights, grid.width, grid.height, k, null);
  return {
    width: w,
    height: h,
    transform: { ...grid.transform, dx: grid.transform.dx * k, dy: grid.transform.dy * k },
    cellSizeM: [grid.cellSizeM[0] * k, grid.cellSizeM[1] * k],
    heights,
  };
}

/**
 * @example const small = downsampleRasters(assessment.rasters, 3);
 */
export function downsampleRasters(r: ReportRasters, k: number): ReportRasters {
  if (k <= 1) return r;
  const W = r.width;
  const H = r.height;
  const w = Math.ceil(W / k);
  const h = Math.ceil(H / k);
  const images = new Uint16Array(w * h);
  const flags = new Uint16Array(w * h);
  const inSite = new Uint8Array(w * h);
  for (let br = 0; br < h; br++)
    for (let bc = 0; bc < w; bc++) {
      let minImg = 65535;
      let anyIn = 0;
      let f = 0;
      for (let r0 = br * k; r0 < Math.min(H, br * k + k); r0++)
        for (let c0 = bc * k; c0 < Math.min(W, bc * k + k); c0++) {
          const i = r0 * W + c0;
          f |= r.flags[i];
          if (r.inSite[i]) {
            anyIn = 1;
            if (r.images[i] < minImg) minImg = r.images[i];
          }
        }
      const o = br * w + bc;
      flags[o] = f;
      inSite[o] = anyIn;
      images[o] = anyIn ? minImg : 0;
    }
  return {
    width: w,
    height: h,
    transform: { ...r.transform, dx: r.transform.dx * k, dy: r.transform.dy * k },
    gsdCm: meanBlocks(r.gsdCm, W, H, k, null),
    images,
    flags,
    inSite,
  };
}

function meanBlocks(src: Float32Array, W: number, H: number, k: number, mask: Uint8Array | null): Float32Array {
  const w = Math.ceil(W / k);
  const h = Math.ceil(H / k);
  const out = new Float32Array(w * h);
  for (let br = 0; br < h; br++)
    for (let bc = 0; bc < w; bc++) {
      let sum = 0;
      let n = 0;
      for (let r0 = br * k; r0 < Math.min(H, br * k + k); r0++)
        for (let c0 = bc * k; c0 < Math.min(W, bc * k + k); c0++) {
          const i = r0 * W + c0;
          const v = src[i];
          if (v === v && (!mask || mask[i])) {
            sum += v;
            n++;
          }
        }
      out[br * w + bc] = n ? sum / n : NaN;
    }
  return out;
}
