import type { DemGrid } from "../dem/grid.js";
import { blockRowMin, minUnder, siteGroundBlocks, BLOCK, type BlockMinima } from "./coverageKernel.js";
import { orientedRectColSpans, orientedRectRowRange } from "./orientedRect.js";
import type { PhotoLattice } from "./exposures.js";
import { latticeRows, type KernelTallies, type LatticeRows } from "./latticeRowsWasm.js";

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

/** Everything a band of rows needs, as plain typed arrays. */
export interface LatticeInput {
  width: number;
  height: number;
  x0: number;
  y0: number;
  dx: number;
  dy: number;
  heights: Float32Array;
  inSite: Uint8Array;
  /** Counts out: one band's cells (latticeCountsByBand; see latticeBand's imagesAt). */
  images: Uint16Array;
  blocks: BlockMinima;
  A: number;
  triggerM: number;
  kAlong: number;
  kAcross: number;
  /** Per strip: origin, along-track unit vector, first lattice position, last index, photo-run centre and half length, reach, rows. */
  fx: Float64Array;
  fy: Float64Array;
  ux: Float64Array;
  uy: Float64Array;
  s0: Float64Array;
  n: Int32Array;
  px: Float64Array;
  py: Float64Array;
  halfRun: Float64Array;
  dMax: Float64Array;
  rowLo: Int32Array;
  rowHi: Int32Array;
  /** Prefix counts of photos taken per strip, strip k's from preAt[k] (n[k] + 2 entries). */
  pre: Int32Array;
  preAt: Int32Array;
  bandRows: number;
}

/** Rows per band of work (a multiple of BLOCK). */
const LATTICE_BAND_ROWS = 8 * BLOCK;

/**
 * Number of photos whose footprint (projected to the cell's own ground) covers each site
 * cell's centre, for photos at `altitudeAmslM` on the lattices of `strips`, every `triggerM`
 * (half footprints per metre of height: kAlong and kAcross, ifov * pixels / 2; cells outside
 * the site or without ground get 0), a band of rows at a time, on this thread, into one band's
 * buffer (`images`, reused from band to band): for a pass that reads each band's counts once
 * (the comparison's), so the grid's counts are never held whole (2 bytes a cell: 40 MB at
 * 4 km2) and are read back from cache. `count(b)` fills `images` with band b's counts and gives
 * its cells [i0, i1): cell i's count is images[i - i0]. Options: `blocks`, the site's lowest
 * ground per block (siteGroundBlocks'), when the caller has it already; `rowsIn`, "js" to count
 * with the JavaScript rows even where the WebAssembly ones are built (for the tests that compare
 * them); `tally`, for the kernel to make the comparison's pass over the cells too
 * (plan/baseline.ts; `bins` of its GSD tally, 0 for none), its tallies given as `tallies`
 * (absent where the JavaScript rows count).
 * @example const l = latticeCountsByBand(grid, inSite, strips, A, t, ka, kc); for (let b = 0; b < l.bands; b++) { const [i0, i1] = l.count(b); ... }
 */
export function latticeCountsByBand(
  grid: Pick<DemGrid, "width" | "height" | "heights" | "transform">,
  inSite: Uint8Array,
  strips: readonly LatticeStrip[],
  altitudeAmslM: number,
  triggerM: number,
  kAlong: number,
  kAcross: number,
  opts: { blocks?: BlockMinima; rowsIn?: "wasm" | "js"; tally?: { bins: number } } = {},
): { bands: number; images: Uint16Array; count: (band: number) => [number, number]; tallies?: KernelTallies } {
  const { width, height, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const { rowsIn, tally } = opts;
  const bandCells = Math.min(height, LATTICE_BAND_ROWS) * width;
  const blocks = opts.blocks ?? siteGroundBlocks(heights, inSite, width, height);
  const input = prepareLattice({ width, height, x0, y0, dx, dy }, heights, inSite, strips, altitudeAmslM, triggerM, kAlong, kAcross, new Uint16Array(0), blocks);
  // The rows in WebAssembly where the kernel is built (latticeRows.as.ts; the same counts), the
  // band's ground and mask copied into its memory and its counts read from there.
  const kernel = rowsIn === "js" ? undefined : latticeRows(input.pre, bandCells, tally ? { gridCells: width * height, bins: tally.bins } : undefined, LATTICE_BAND_ROWS);
  input.images = kernel ? kernel.images : new Uint16Array(bandCells);
  return {
    bands: Math.ceil(height / LATTICE_BAND_ROWS),
    images: input.images,
    count: (band) => {
      const i0 = band * LATTICE_BAND_ROWS * width;
      const i1 = Math.min(height, (band + 1) * LATTICE_BAND_ROWS) * width;
      if (kernel) {
        kernel.ground.set(heights.subarray(i0, i1));
        kernel.inSite.set(inSite.subarray(i0, i1));
      }
      latticeBand(input, band, i0, kernel);
      return [i0, i1];
    },
    ...(kernel?.tallies ? { tallies: kernel.tallies } : {}),
  };
}

function prepareLattice(
  g: Pick<LatticeInput, "width" | "height" | "x0" | "y0" | "dx" | "dy">,
  heights: Float32Array,
  inSite: Uint8Array,
  strips: readonly LatticeStrip[],
  A: number,
  triggerM: number,
  kAlong: number,
  kAcross: number,
  images: Uint16Array,
  blocks: BlockMinima,
): LatticeInput {
  const m = strips.length;
  const col = () => new Float64Array(m);
  let preCells = 0;
  for (const s of strips) preCells += s.lattice.n + 2;
  const input: LatticeInput = {
    ...g, heights, inSite, images,
    blocks,
    A, triggerM, kAlong, kAcross,
    fx: col(), fy: col(), ux: col(), uy: col(), s0: col(), n: new Int32Array(m), px: col(), py: col(), halfRun: col(), dMax: col(),
    rowLo: new Int32Array(m).fill(1), rowHi: new Int32Array(m),
    pre: new Int32Array(preCells), preAt: new Int32Array(m),
    bandRows: LATTICE_BAND_ROWS,
  };
  const rows = new Int32Array(2);
  let at = 0;
  strips.forEach(({ from, lattice: lat }, j) => {
    // Photos taken, as a prefix count over the lattice: count(k0..k1) = pre[k1 + 1] - pre[k0].
    input.preAt[j] = at;
    let first = -1;
    let last = -1;
    for (let k = 0; k <= lat.n; k++) {
      input.pre[at + k + 1] = input.pre[at + k] + lat.present[k];
      if (lat.present[k]) {
        if (first < 0) first = k;
        last = k;
      }
    }
    at += lat.n + 2;
    if (first < 0 || !(blocks.globalMin < Infinity)) return;
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
      const gMin = minUnder(blocks, g, px, py, ux, uy, halfRun + dMax * kAlong, dMax * kAcross);
      dMax = gMin < Infinity ? A - gMin : 0;
    }
    if (!(dMax > 0)) return;
    orientedRectRowRange(py, ux, uy, halfRun + dMax * kAlong, dMax * kAcross, g.y0, g.dy, g.height, rows);
    input.fx[j] = from[0];
    input.fy[j] = from[1];
    input.ux[j] = ux;
    input.uy[j] = uy;
    input.s0[j] = s0;
    input.n[j] = lat.n;
    input.px[j] = px;
    input.py[j] = py;
    input.halfRun[j] = halfRun;
    input.dMax[j] = dMax;
    input.rowLo[j] = rows[0];
    input.rowHi[j] = rows[1];
  });
  return input;
}

/**
 * Every strip over the rows of band `band`, cell i's count into images[i - imagesAt]
 * (imagesAt: the band's first cell; images holds one band).
 * @example latticeBand(input, b, b * input.bandRows * input.width)
 */
function latticeBand(inp: LatticeInput, band: number, imagesAt: number, kernel: LatticeRows | undefined): void {
  const { width, x0, y0, dx, dy, heights, inSite, images, blocks, A, triggerM, kAlong, kAcross } = inp;
  const r0 = band * inp.bandRows;
  const r1 = Math.min(inp.height - 1, r0 + inp.bandRows - 1);
  const spans = new Int32Array(2 * BLOCK);
  // Written before read, as in sweepBand (coverageKernel.ts).
  images.fill(0, r0 * width - imagesAt, (r1 + 1) * width - imagesAt);
  for (let j = 0; j < inp.fx.length; j++) {
    const rLo = Math.max(inp.rowLo[j], r0);
    const rHi = Math.min(inp.rowHi[j], r1);
    if (rLo > rHi) continue;
    const ux = inp.ux[j];
    const uy = inp.uy[j];
    const px = inp.px[j];
    const py = inp.py[j];
    const halfRun = inp.halfRun[j];
    const dMax = inp.dMax[j];
    const pre = inp.pre.subarray(inp.preAt[j], inp.preAt[j] + inp.n[j] + 2);
    const ext = Math.abs(ux) * (halfRun + dMax * kAlong) + Math.abs(uy) * dMax * kAcross;
    const bc0 = Math.max(0, Math.floor((px - ext - x0) / dx / BLOCK));
    const bc1 = Math.min(blocks.bw - 1, Math.floor((px + ext - x0) / dx / BLOCK));
    // With the WebAssembly rows, the strip's rows are gathered into the kernel's row arrays and
    // counted in one call (kernel.rows, in the same order as row by row).
    let nRows = 0;
    // A run of rows within one band of BLOCK rows at a time: the reach over the lowest ground
    // of its blocks under the box, and its rows' spans in one call.
    for (let ra = rLo; ra <= rHi; ) {
      const br = (ra / BLOCK) | 0;
      const rb = Math.min(rHi, br * BLOCK + BLOCK - 1);
      const g = blockRowMin(blocks, br, bc0, bc1);
      const dRow = g < Infinity ? Math.min(A - g, dMax) : 0;
      if (dRow > 0) {
        orientedRectColSpans(y0, dy, ra, rb, px, py, ux, uy, halfRun + dRow * kAlong, dRow * kAcross, x0, dx, width, spans);
        for (let r = ra; r <= rb; r++) {
          const c0 = spans[2 * (r - ra)], c1 = spans[2 * (r - ra) + 1];
          if (c0 > c1) continue;
          // Along from the strip's start and across from its line, of the first cell; steps per column.
          const cy = y0 + (r + 0.5) * dy;
          const ddx = x0 + (c0 + 0.5) * dx - inp.fx[j];
          const ddy = cy - inp.fy[j];
          if (kernel) {
            kernel.rowCells[2 * nRows] = r * width + c0 - imagesAt;
            kernel.rowCells[2 * nRows + 1] = r * width + c1 - imagesAt;
            kernel.rowOffsets[2 * nRows] = ddx * ux + ddy * uy;
            kernel.rowOffsets[2 * nRows + 1] = ddx * uy - ddy * ux;
            nRows++;
          } else {
            countRow(
              heights, inSite, images, imagesAt, pre,
              r * width + c0, r * width + c1,
              A, ddx * ux + ddy * uy, ddx * uy - ddy * ux, dx * ux, dx * uy,
              inp.s0[j], triggerM, inp.n[j], kAlong, kAcross,
            );
          }
        }
      }
      ra = rb + 1;
    }
    if (kernel && nRows > 0) kernel.rows(nRows, inp.preAt[j], A, dx * ux, dx * uy, inp.s0[j], triggerM, inp.n[j], kAlong, kAcross);
  }
}

/**
 * One row of one strip: cells i0..i1 (counts at images[i - imagesAt]) at along a0 / across q0 stepping by da / dq. For each
 * cell, the run of lattice indices k with |a - (s0 + k t)| <= reach (the footprint's own
 * test). Neighbouring cells have nearly the same run, so both ends are moved from the
 * previous cell's by that test alone: no division or rounding per cell.
 */
function countRow(
  heights: Float32Array,
  inSite: Uint8Array,
  images: Uint16Array,
  imagesAt: number,
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
    const at = i - imagesAt;
    const c = images[at] + pre[kHi + 1] - pre[kLo];
    images[at] = c > 65535 ? 65535 : c;
  }
}
