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

  // The lowest site ground bounds every footprint from outside.
  let groundMin = Infinity;
  for (let i = 0; i < n; i++) {
    if (inSite[i] === 1) {
      const g = heights[i];
      if (g < groundMin) groundMin = g;
    }
  }
  if (groundMin === Infinity) return { gsdCm, images, nadirStrip };

  const ifov = camera.ifov;
  const { alongPx, acrossPx } = footprintPixels(camera);
  const kAlong = (ifov * alongPx) / 2;
  const kAcross = (ifov * acrossPx) / 2;
  const gsdPerM = ifov * 100;
  const rows = new Int32Array(2);
  const span = new Int32Array(2);

  for (const e of exposures) {
    const ez = e.altitudeAmslM;
    const dMax = ez - groundMin;
    if (!(dMax > 0)) continue;
    const { x: ex, y: ey, ux, uy } = e;
    // Across-track unit (vx, vy) = (uy, -ux); the footprint is symmetric, so its sign does not matter.
    const vx = uy;
    const vy = -ux;
    const hAlongMax = dMax * kAlong;
    const hAcrossMax = dMax * kAcross;
    const strip = e.strip;
    orientedRectRowRange(ey, ux, uy, hAlongMax, hAcrossMax, y0, dy, height, rows);
    for (let r = rows[0]; r <= rows[1]; r++) {
      const cy = y0 + (r + 0.5) * dy;
      orientedRectColSpan(cy, ex, ey, ux, uy, hAlongMax, hAcrossMax, x0, dx, width, span);
      const ddy = cy - ey;
      const aY = ddy * uy;
      const cY = ddy * vy;
      const base = r * width;
      for (let c = span[0]; c <= span[1]; c++) {
        const i = base + c;
        if (inSite[i] === 0) continue;
        const d = ez - heights[i];
        // Also skips nodata: NaN > 0 is false.
        if (!(d > 0)) continue;
        const ddx = x0 + (c + 0.5) * dx - ex;
        const hA = d * kAlong;
        const hC = d * kAcross;
        const a = ddx * ux + aY;
        const q = ddx * vx + cY;
        if (a > hA || a < -hA || q > hC || q < -hC) continue;
        if (images[i] < 65535) images[i]++;
        const ra = a / hA;
        const rc = q / hC;
        const off = ra * ra + rc * rc;
        if (off < best[i]) {
          best[i] = off;
          gsdCm[i] = d * gsdPerM;
          nadirStrip[i] = strip;
        }
      }
    }
  }
  return { gsdCm, images, nadirStrip };
}
