import { orientedRectColSpan, orientedRectRowRange } from "./orientedRect.js";

/**
 * The hot loop of the coverage pass, on plain typed arrays only, so the same
 * code runs on the main thread and in worker threads over shared memory
 * (each thread owns a band of rows, so no two threads write the same cell).
 */

export interface SweepInput {
  width: number;
  height: number;
  x0: number;
  y0: number;
  dx: number;
  dy: number;
  /** Ground height per cell, NaN outside the site and where the DEM has no data. */
  siteGround: Float32Array;
  images: Uint16Array;
  /** Normalised offset of the most nadir photo so far (Infinity: none yet). */
  best: Float32Array;
  /** Index of the most nadir photo so far (-1: none yet). */
  bestIdx: Int32Array;
  /** Photos as columns: position, altitude AMSL, along-track unit vector. */
  ex: Float64Array;
  ey: Float64Array;
  ez: Float64Array;
  eux: Float64Array;
  euy: Float64Array;
  /** Half footprint per metre of height, along and across: ifov * px / 2. */
  kAlong: number;
  kAcross: number;
  blocks: BlockMinima;
  /** Most nadir by offset relative to the footprint (`image`, the view angle) or by plain ground distance (`distance`). */
  nadirBy: NadirBy;
  /** Rows this call may write, inclusive. */
  rowLo: number;
  rowHi: number;
}

/**
 * How "most nadir" is measured. `image`: the smallest offset relative to the
 * footprint, (along / halfAlong)^2 + (across / halfAcross)^2, i.e. nearest the
 * image centre (smallest view angle): a higher photo wins over a lower one at
 * the same distance. `distance`: the nearest nadir point on the ground, which
 * splits the ground between neighbouring strips at the midline, as the
 * solver's zones (half the spacing each side) do.
 */
export type NadirBy = "image" | "distance";

/** Side of the square blocks whose lowest site ground bounds the footprints, in cells. */
export const BLOCK = 32;

export interface BlockMinima {
  mins: Float64Array;
  bw: number;
  bh: number;
  globalMin: number;
}

/**
 * Lowest site ground per BLOCK x BLOCK cells, to bound each footprint by the
 * ground it can actually fall on rather than the lowest point of the whole
 * site: with 60 m of relief under a 100 m flight the site minimum alone would
 * more than double the cells visited per photo. Fills `siteGround`, when given
 * (heights inside the site, NaN elsewhere), in the same pass.
 * @example const blocks = siteGroundAndBlocks(grid.heights, inSite, grid.width, grid.height, siteGround);
 */
export function siteGroundAndBlocks(heights: Float32Array, inSite: Uint8Array, width: number, height: number, siteGround?: Float32Array): BlockMinima {
  const bw = Math.ceil(width / BLOCK);
  const bh = Math.ceil(height / BLOCK);
  const mins = new Float64Array(bw * bh).fill(Infinity);
  let globalMin = Infinity;
  for (let r = 0; r < height; r++) {
    const brow = ((r / BLOCK) | 0) * bw;
    const base = r * width;
    for (let c = 0; c < width; c++) {
      const i = base + c;
      if (inSite[i] === 0) {
        if (siteGround) siteGround[i] = NaN;
        continue;
      }
      const g = heights[i];
      if (siteGround) siteGround[i] = g;
      if (!(g === g)) continue;
      const b = brow + ((c / BLOCK) | 0);
      if (g < mins[b]) mins[b] = g;
      if (g < globalMin) globalMin = g;
    }
  }
  return { mins, bw, bh, globalMin };
}

/** Grid origin and cell steps (the transform's figures). */
export interface GridSteps {
  x0: number;
  y0: number;
  dx: number;
  dy: number;
}

/**
 * Lowest ground of the blocks under the axis-aligned box of a rectangle centred on (px, py),
 * turned to (ux, uy): an outer bound for the ground any footprint there can fall on.
 */
export function minUnder(bl: BlockMinima, inp: GridSteps, px: number, py: number, ux: number, uy: number, halfAlongM: number, halfAcrossM: number): number {
  const { x0, y0, dx, dy } = inp;
  const ex = Math.abs(ux) * halfAlongM + Math.abs(uy) * halfAcrossM;
  const ey = Math.abs(uy) * halfAlongM + Math.abs(ux) * halfAcrossM;
  const c0 = Math.max(0, Math.floor((px - ex - x0) / dx / BLOCK));
  const c1 = Math.min(bl.bw - 1, Math.floor((px + ex - x0) / dx / BLOCK));
  const r0 = Math.max(0, Math.floor((py + ey - y0) / dy / BLOCK));
  const r1 = Math.min(bl.bh - 1, Math.floor((py - ey - y0) / dy / BLOCK));
  let m = Infinity;
  for (let br = r0; br <= r1; br++) for (let bc = c0; bc <= c1; bc++) if (bl.mins[br * bl.bw + bc] < m) m = bl.mins[br * bl.bw + bc];
  return m;
}

/**
 * Every photo over the rows [rowLo, rowHi]: count the cells each footprint
 * covers at the cell's own ground and keep the most nadir photo per cell.
 * @example sweepExposures({ ...arrays, rowLo: 0, rowHi: grid.height - 1 });
 */
export function sweepExposures(inp: SweepInput): void {
  const { width, x0, y0, dx, dy, siteGround, images, best, bestIdx, kAlong, kAcross, blocks } = inp;
  const byDistance = inp.nadirBy === "distance";
  // In distance mode the weights are 1 and the division by d^2 is dropped (d2 = 1 below).
  const invKA2 = byDistance ? 1 : 1 / (kAlong * kAlong);
  const invKC2 = byDistance ? 1 : 1 / (kAcross * kAcross);
  const rows = new Int32Array(2);
  const span = new Int32Array(2);
  const m = inp.ex.length;
  for (let e = 0; e < m; e++) {
    const ex = inp.ex[e];
    const ey = inp.ey[e];
    const ez = inp.ez[e];
    const ux = inp.eux[e];
    const uy = inp.euy[e];
    // Footprint reach over the lowest ground it can fall on: start from the site minimum and
    // tighten with the block minima under that footprint's box (each round stays an outer bound).
    let dMax = ez - blocks.globalMin;
    for (let round = 0; round < 3 && dMax > 0; round++) {
      const g = minUnder(blocks, inp, ex, ey, ux, uy, dMax * kAlong, dMax * kAcross);
      dMax = g < Infinity ? ez - g : 0;
    }
    if (!(dMax > 0)) continue;
    // Across-track unit (vx, vy) = (uy, -ux); the footprint is symmetric, so its sign does not matter.
    const vx = uy;
    const vy = -ux;
    const hAlongMax = dMax * kAlong;
    const hAcrossMax = dMax * kAcross;
    orientedRectRowRange(ey, ux, uy, hAlongMax, hAcrossMax, y0, dy, inp.height, rows);
    const rLo = Math.max(rows[0], inp.rowLo);
    const rHi = Math.min(rows[1], inp.rowHi);
    if (rLo > rHi) continue;
    // Each band of BLOCK rows gets its own, tighter reach: the lowest ground of its blocks under the box.
    const ext = Math.abs(ux) * hAlongMax + Math.abs(uy) * hAcrossMax;
    const bc0 = Math.max(0, Math.floor((ex - ext - x0) / dx / BLOCK));
    const bc1 = Math.min(blocks.bw - 1, Math.floor((ex + ext - x0) / dx / BLOCK));
    let bandRow = -1;
    let hA = 0;
    let hC = 0;
    for (let r = rLo; r <= rHi; r++) {
      const br = (r / BLOCK) | 0;
      if (br !== bandRow) {
        bandRow = br;
        let g = Infinity;
        for (let bc = bc0; bc <= bc1; bc++) if (blocks.mins[br * blocks.bw + bc] < g) g = blocks.mins[br * blocks.bw + bc];
        const dRow = g < Infinity ? Math.min(ez - g, dMax) : 0;
        hA = dRow > 0 ? dRow * kAlong : -1;
        hC = dRow > 0 ? dRow * kAcross : -1;
      }
      if (hA < 0) continue;
      const cy = y0 + (r + 0.5) * dy;
      orientedRectColSpan(cy, ex, ey, ux, uy, hA, hC, x0, dx, width, span);
      if (span[0] > span[1]) continue;
      const ddy = cy - ey;
      const ddx0 = x0 + (span[0] + 0.5) * dx - ex;
      sweepRow(
        siteGround, images, best, bestIdx,
        r * width + span[0], r * width + span[1],
        ez, ddx0 * ux + ddy * uy, ddx0 * vx + ddy * vy, dx * ux, dx * vx,
        kAlong, kAcross, invKA2, invKC2, byDistance, e,
      );
    }
  }
}

/**
 * One row of one footprint: cells i0..i1, along/across offsets of the first
 * cell a0/q0 stepping by da/dq per cell. Kept apart, with flat arguments, so
 * the engine compiles the hot loop once for fixed array types. The best photo
 * is remembered by index only (one store instead of three), and compared
 * without a division: num / d^2 < best  <=>  num < best * d^2 (d^2 = 1 when
 * measuring plain distance).
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
  byDistance: boolean,
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
    const d2 = byDistance ? 1 : d * d;
    if (num < best[i] * d2) {
      best[i] = num / d2;
      bestIdx[i] = e;
    }
  }
}
