import type { DemGrid } from "../dem/grid.js";
import type { Camera } from "../camera/types.js";
import type { Exposure } from "./types.js";
import { orientedRectColSpan, orientedRectRowRange } from "./orientedRect.js";

/**
 * Which photos see each ground cell, and at what detail.
 *
 * A nadir photo at height d above a ground point covers, at that point's own
 * height, a rectangle of half-widths d * ifov * px / 2 along and across the
 * track (similar triangles of the pinhole camera). A cell is seen by the
 * photo when its centre lies in the footprint projected to the cell's ground
 * height, so high ground sits in smaller footprints: this is where overlap is
 * lost on ridges. Its GSD is taken from the most nadir photo that sees it:
 * the one with the smallest offset from the nadir point relative to the
 * footprint, (along / halfAlong)^2 + (across / halfAcross)^2.
 *
 * The work goes photo by photo over the footprint each one could have over
 * the lowest ground of the site, row by row over the exact span of that
 * rectangle, with every per-cell result in typed arrays.
 */

export interface Coverage {
  /** Nadir GSD in cm/px from the most nadir photo; NaN where no photo sees the cell (or outside the site). */
  gsdCm: Float32Array;
  /** Number of photos whose footprint covers the cell centre. */
  images: Uint16Array;
  /** Strip number of the most nadir photo, 0 where none. */
  nadirStrip: Uint16Array;
}

/** Pixels of the image along and across the track: width goes across unless the camera is portrait. */
export function footprintPixels(camera: Camera): { alongPx: number; acrossPx: number } {
  return camera.portrait
    ? { alongPx: camera.imageWidthPx, acrossPx: camera.imageHeightPx }
    : { alongPx: camera.imageHeightPx, acrossPx: camera.imageWidthPx };
}

/**
 * GSD and image count per cell of `grid` where `inSite` is 1.
 * @example
 * const { gsdCm, images, nadirStrip } = computeCoverage(grid, inSite, exposures, camera);
 */
export function computeCoverage(grid: DemGrid, inSite: Uint8Array, exposures: readonly Exposure[], camera: Camera): Coverage {
  const { width, height, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const n = width * height;
  const gsdCm = new Float32Array(n).fill(NaN);
  const images = new Uint16Array(n);
  const nadirStrip = new Uint16Array(n);
  // Offset of the best photo so far; starts above any covered value (<= 2).
  const best = new Float32Array(n).fill(Infinity);
  const bestIdx = new Int32Array(n).fill(-1);

  // Site ground: NaN outside the site and where the DEM has no data, so one test skips both.
  const siteGround = new Float32Array(n).fill(NaN);
  for (let i = 0; i < n; i++) if (inSite[i] === 1) siteGround[i] = heights[i];
  const blocks = blockMinima(grid, inSite);
  if (blocks.globalMin === Infinity) return { gsdCm, images, nadirStrip };

  const ifov = camera.ifov;
  const { alongPx, acrossPx } = footprintPixels(camera);
  const kAlong = (ifov * alongPx) / 2;
  const kAcross = (ifov * acrossPx) / 2;
  const gsdPerM = ifov * 100;
  const invKA2 = 1 / (kAlong * kAlong);
  const invKC2 = 1 / (kAcross * kAcross);
  const rows = new Int32Array(2);
  const span = new Int32Array(2);

  for (let e = 0; e < exposures.length; e++) {
    const { x: ex, y: ey, ux, uy, altitudeAmslM: ez } = exposures[e];
    // Footprint reach over the lowest ground it can fall on: start from the site minimum and
    // tighten with the block minima under that footprint's box (each round stays an outer bound).
    let dMax = ez - blocks.globalMin;
    for (let round = 0; round < 3 && dMax > 0; round++) {
      const g = blocks.minUnder(ex, ey, ux, uy, dMax * kAlong, dMax * kAcross);
      if (!(g < Infinity)) {
        dMax = 0;
        break;
      }
      dMax = ez - g;
    }
    if (!(dMax > 0)) continue;
    // Across-track unit (vx, vy) = (uy, -ux); the footprint is symmetric, so its sign does not matter.
    const vx = uy;
    const vy = -ux;
    const hAlongMax = dMax * kAlong;
    const hAcrossMax = dMax * kAcross;
    orientedRectRowRange(ey, ux, uy, hAlongMax, hAcrossMax, y0, dy, height, rows);
    for (let r = rows[0]; r <= rows[1]; r++) {
      const cy = y0 + (r + 0.5) * dy;
      orientedRectColSpan(cy, ex, ey, ux, uy, hAlongMax, hAcrossMax, x0, dx, width, span);
      if (span[0] > span[1]) continue;
      const ddy = cy - ey;
      const ddx0 = x0 + (span[0] + 0.5) * dx - ex;
      sweepRow(
        siteGround, images, best, bestIdx,
        r * width + span[0], r * width + span[1],
        ez, ddx0 * ux + ddy * uy, ddx0 * vx + ddy * vy, dx * ux, dx * vx,
        kAlong, kAcross, invKA2, invKC2, e,
      );
    }
  }
  // GSD and strip from each cell's most nadir photo.
  for (let i = 0; i < n; i++) {
    const k = bestIdx[i];
    if (k < 0) continue;
    gsdCm[i] = (exposures[k].altitudeAmslM - siteGround[i]) * gsdPerM;
    nadirStrip[i] = exposures[k].strip;
  }
  return { gsdCm, images, nadirStrip };
}

/** Side of the square blocks whose lowest site ground bounds the footprints, in cells. */
const BLOCK = 32;

/**
 * Lowest site ground per BLOCK x BLOCK cells, to bound each footprint by the
 * ground it can actually fall on rather than the lowest point of the whole
 * site: with 60 m of relief under a 100 m flight the site minimum alone would
 * more than double the cells visited per photo.
 */
function blockMinima(grid: DemGrid, inSite: Uint8Array) {
  const { width, height, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const bw = Math.ceil(width / BLOCK);
  const bh = Math.ceil(height / BLOCK);
  const mins = new Float64Array(bw * bh).fill(Infinity);
  let globalMin = Infinity;
  for (let r = 0; r < height; r++) {
    const brow = ((r / BLOCK) | 0) * bw;
    const base = r * width;
    for (let c = 0; c < width; c++) {
      if (inSite[base + c] === 0) continue;
      const g = heights[base + c];
      if (!(g === g)) continue;
      const b = brow + ((c / BLOCK) | 0);
      if (g < mins[b]) mins[b] = g;
      if (g < globalMin) globalMin = g;
    }
  }
  /** Lowest site ground in the blocks touching the box of an oriented rectangle; Infinity when none. */
  const minUnder = (px: number, py: number, ux: number, uy: number, halfAlongM: number, halfAcrossM: number): number => {
    const ex = Math.abs(ux) * halfAlongM + Math.abs(uy) * halfAcrossM;
    const ey = Math.abs(uy) * halfAlongM + Math.abs(ux) * halfAcrossM;
    const c0 = Math.max(0, Math.floor((px - ex - x0) / dx / BLOCK));
    const c1 = Math.min(bw - 1, Math.floor((px + ex - x0) / dx / BLOCK));
    const r0 = Math.max(0, Math.floor((py + ey - y0) / dy / BLOCK));
    const r1 = Math.min(bh - 1, Math.floor((py - ey - y0) / dy / BLOCK));
    let m = Infinity;
    for (let br = r0; br <= r1; br++) for (let bc = c0; bc <= c1; bc++) if (mins[br * bw + bc] < m) m = mins[br * bw + bc];
    return m;
  };
  return { globalMin, minUnder };
}

/**
 * One row of one footprint: cells i0..i1, along/across offsets of the first
 * cell a0/q0 stepping by da/dq per cell. Kept apart, with flat arguments, so
 * the engine compiles the hot loop once for fixed array types. The best photo
 * is remembered by index only (one store instead of three), and compared
 * without a division: num / d^2 < best  <=>  num < best * d^2.
 */
function sweepRow(
  siteGround: Float32Array,
  images: Uint16Array,
  best: Float32Array,
  bestIdx: Int32Array,
  i0: number,
  i1: number,
  ez: number,
  a0: number,
  q0: number,
  da: number,
  dq: number,
  kAlong: number,
  kAcross: number,
  invKA2: number,
  invKC2: number,
  e: number,
): void {
  let a = a0;
  let q = q0;
  for (let i = i0; i <= i1; i++, a += da, q += dq) {
    const d = ez - siteGround[i];
    // Written so that NaN ground (outside the site, nodata) fails too.
    if (!(Math.abs(a) <= d * kAlong && Math.abs(q) <= d * kAcross && d > 0)) continue;
    if (images[i] < 65535) images[i]++;
    // (a / hA)^2 + (q / hC)^2 = num / d^2.
    const num = a * a * invKA2 + q * q * invKC2;
    const d2 = d * d;
    if (num < best[i] * d2) {
      best[i] = num / d2;
      bestIdx[i] = e;
    }
  }
}
