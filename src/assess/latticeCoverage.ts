import type { DemGrid } from "../dem/grid.js";
import { minUnder, siteGroundBlocks, BLOCK } from "./coverageKernel.js";
import { orientedRectColSpan, orientedRectRowRange } from "./orientedRect.js";
import type { PhotoLattice } from "./exposures.js";

/**
 * Image counts of photos that are all taken at one altitude, strip by strip
 * instead of photo by photo.
 *
 * When every photo of a straight strip has the same altitude A, the photos
 * seeing a ground cell at height g are those at along-track distance within
 * (A - g) * kAlong of the cell (and the cell within (A - g) * kAcross of the
 * strip's line): a run of consecutive lattice positions s0 + k * trigger,
 * found by two roundings instead of a test per photo. The footprint sweep
 * (coverageKernel.ts) visits each cell once per photo (about twenty times on
 * a mapping plan); this visits it once per strip that can reach it (two to
 * four). The constant-altitude comparison uses it; the plan's own assessment,
 * whose photos all differ in altitude, keeps the sweep.
 */

export interface LatticeStrip {
  from: readonly [number, number];
  lattice: PhotoLattice;
}

/**
 * Number of photos whose footprint (projected to the cell's own ground) covers
 * each site cell's centre, for photos at `altitudeAmslM` on the lattices of
 * `strips`, every `triggerM`. Half footprints per metre of height: kAlong and
 * kAcross (ifov * pixels / 2). Cells outside the site or without ground get 0.
 * @example const images = latticeImageCounts(grid, inSite, strips, 412.5, 8.8, 0.36, 0.54);
 */
export function latticeImageCounts(
  grid: Pick<DemGrid, "width" | "height" | "heights" | "transform">,
  inSite: Uint8Array,
  strips: readonly LatticeStrip[],
  altitudeAmslM: number,
  triggerM: number,
  kAlong: number,
  kAcross: number,
): Uint16Array {
  const { width, height, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const steps = { x0, y0, dx, dy };
  const images = new Uint16Array(width * height);
  const blocks = siteGroundBlocks(heights, inSite, width, height);
  if (!(blocks.globalMin < Infinity)) return images;
  const rows = new Int32Array(2);
  const span = new Int32Array(2);
  const A = altitudeAmslM;
  for (const { from, lattice: lat } of strips) {
    // Photos taken, as a prefix count over the lattice: count(k0..k1) = pre[k1 + 1] - pre[k0].
    const pre = new Int32Array(lat.n + 2);
    let first = -1;
    let last = -1;
    for (let k = 0; k <= lat.n; k++) {
      pre[k + 1] = pre[k] + lat.present[k];
      if (lat.present[k]) {
        if (first < 0) first = k;
        last = k;
      }
    }
    if (first < 0) continue;
    const { ux, uy, s0 } = lat;
    const sFirst = s0 + first * triggerM;
    const sLast = s0 + last * triggerM;
    // The strip's photos as one rectangle: centre of the photo run, half its length plus the reach.
    const sMid = (sFirst + sLast) / 2;
    const px = from[0] + sMid * ux;
    const py = from[1] + sMid * uy;
    const halfRun = (sLast - sFirst) / 2;
    let dMax = A - blocks.globalMin;
    for (let round = 0; round < 3 && dMax > 0; round++) {
      const g = minUnder(blocks, steps, px, py, ux, uy, halfRun + dMax * kAlong, dMax * kAcross);
      dMax = g < Infinity ? A - g : 0;
    }
    if (!(dMax > 0)) continue;
    orientedRectRowRange(py, ux, uy, halfRun + dMax * kAlong, dMax * kAcross, y0, dy, height, rows);
    const ext = Math.abs(ux) * (halfRun + dMax * kAlong) + Math.abs(uy) * dMax * kAcross;
    const bc0 = Math.max(0, Math.floor((px - ext - x0) / dx / BLOCK));
    const bc1 = Math.min(blocks.bw - 1, Math.floor((px + ext - x0) / dx / BLOCK));
    let bandRow = -1;
    let hA = -1;
    let hC = -1;
    for (let r = rows[0]; r <= rows[1]; r++) {
      const br = (r / BLOCK) | 0;
      if (br !== bandRow) {
        // Each band of BLOCK rows: the reach over the lowest ground of its blocks under the box.
        bandRow = br;
        let g = Infinity;
        for (let bc = bc0; bc <= bc1; bc++) if (blocks.mins[br * blocks.bw + bc] < g) g = blocks.mins[br * blocks.bw + bc];
        const dRow = g < Infinity ? Math.min(A - g, dMax) : 0;
        hA = dRow > 0 ? halfRun + dRow * kAlong : -1;
        hC = dRow > 0 ? dRow * kAcross : -1;
      }
      if (hA < 0) continue;
      const cy = y0 + (r + 0.5) * dy;
      orientedRectColSpan(cy, px, py, ux, uy, hA, hC, x0, dx, width, span);
      if (span[0] > span[1]) continue;
      // Along from the strip's start and across from its line, of the first cell; steps per column.
      const ddx = x0 + (span[0] + 0.5) * dx - from[0];
      const ddy = cy - from[1];
      countRow(
        heights, inSite, images, pre,
        r * width + span[0], r * width + span[1],
        A, ddx * ux + ddy * uy, ddx * uy - ddy * ux, dx * ux, dx * uy,
        s0, triggerM, lat.n, kAlong, kAcross,
      );
    }
  }
  return images;
}

/**
 * One row of one strip: cells i0..i1 at along a0 / across q0 stepping by da / dq. For each
 * cell, the run of lattice indices k with |a - (s0 + k t)| <= reach (the footprint's own
 * test). Neighbouring cells have nearly the same run, so both ends are moved from the
 * previous cell's by that test alone: no division or rounding per cell.
 */
function countRow(
  heights: Float32Array,
  inSite: Uint8Array,
  images: Uint16Array,
  pre: Int32Array,
  i0: number,
  i1: number,
  A: number,
  a0: number,
  q0: number,
  da: number,
  dq: number,
  s0: number,
  t: number,
  n: number,
  kAlong: number,
  kAcross: number,
): void {
  let a = a0;
  let q = q0;
  // Current run [kLo, kHi], started at the lattice point nearest the first cell.
  let kLo = Math.min(n, Math.max(0, Math.round((a0 - s0) / t)));
  let kHi = kLo - 1;
  for (let i = i0; i <= i1; i++, a += da, q += dq) {
    if (inSite[i] === 0) continue;
    const d = A - heights[i];
    // NaN ground (no data) fails here too.
    if (!(d > 0 && Math.abs(q) <= d * kAcross)) continue;
    const h = d * kAlong;
    const lo = a - h;
    const hi = a + h;
    // Lowest k with s_k >= lo, highest with s_k <= hi (s_k = s0 + k t increases with k).
    while (kLo > 0 && s0 + (kLo - 1) * t >= lo) kLo--;
    while (kLo <= n && s0 + kLo * t < lo) kLo++;
    if (kHi < kLo - 1) kHi = kLo - 1;
    while (kHi < n && s0 + (kHi + 1) * t <= hi) kHi++;
    while (kHi >= 0 && s0 + kHi * t > hi) kHi--;
    if (kHi < kLo) continue;
    const c = images[i] + pre[kHi + 1] - pre[kLo];
    images[i] = c > 65535 ? 65535 : c;
  }
}
