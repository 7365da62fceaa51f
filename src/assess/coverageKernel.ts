import type { StripRaster } from "./types.js";
import { orientedRectColSpans, orientedRectRowRange } from "./orientedRect.js";
import { BAND_SLACK, FLAG_COARSE, FLAG_FEW_IMAGES, FLAG_FINE, FLAG_NODATA } from "./flags.js";
import { footprintRows, type BandArrays, type FootprintRows } from "./footprintRowsWasm.js";

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
  /** Ground height per cell, NaN where the DEM has no data (the DEM's own heights, or a shared copy). */
  ground: Float32Array;
  /** 1 inside the site. */
  inSite: Uint8Array;
  /** Outputs, per cell: photos covering it, GSD (cm/px) and strip of its most nadir photo (0 and NaN and 0 where none). */
  images: Uint16Array;
  gsdCm: Float32Array;
  nadirStrip: StripRaster;
  /** Effect flags (coarse, fine, too few images, no data), written band by band when given. */
  flags?: Uint16Array;
  /**
   * The effects' GSD band and image minimum, and the table where the same pass counts the
   * seen site cells (a GSD exists) per band and nadir strip as each band's cells become final.
   */
  effects?: BandEffects;
  /** Photos as columns: position, altitude AMSL, along-track unit vector, strip. */
  ex: Float64Array;
  ey: Float64Array;
  ez: Float64Array;
  eux: Float64Array;
  euy: Float64Array;
  strip: Uint16Array;
  /** Per photo: height above the lowest ground its footprint can fall on, and the rows it can reach. */
  dMax: Float64Array;
  rowLo: Int32Array;
  rowHi: Int32Array;
  /** Half footprint per metre of height, along and across: ifov * px / 2. */
  kAlong: number;
  kAcross: number;
  /** GSD in cm/px per metre of height: ifov * 100. */
  gsdPerM: number;
  blocks: BlockMinima;
  /** Most nadir by offset relative to the footprint (`image`, the view angle) or by plain ground distance (`distance`). */
  nadirBy: NadirBy;
  /** Rows per band (a multiple of BLOCK): the unit of work, and the size of the scratch. */
  bandRows: number;
  /**
   * The footprint rows in WebAssembly (footprintRowsWasm.ts) where it is built, the default,
   * or in JavaScript (sweepRow): the same results bit for bit.
   */
  rowsIn?: "wasm" | "js";
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

/**
 * Site cells some photo sees, counted per band of `bandRows` rows and per nadir strip
 * (strip numbers 0 .. strips - 1): band b's count of strip s at counts[b * strips + s].
 * Each band is counted by the one thread that sweeps it, so no two threads write the
 * same count; the statistics take the strips' totals from it instead of a pass of their own.
 */
export interface SeenByBand {
  counts: Int32Array;
  strips: number;
  bandRows: number;
  /** Cells per band (bandRows whole rows; the last band may hold fewer). */
  bandCells: number;
}

/** What bandEffects sets and counts: see SweepInput.effects. */
export interface BandEffects {
  lowCm: number;
  highCm: number;
  minImages: number;
  seen: SeenByBand;
}

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
 * more than double the cells visited per photo.
 * @example const blocks = siteGroundBlocks(grid.heights, inSite, grid.width, grid.height);
 */
export function siteGroundBlocks(heights: Float32Array, inSite: Uint8Array, width: number, height: number): BlockMinima {
  const bw = Math.ceil(width / BLOCK);
  const bh = Math.ceil(height / BLOCK);
  const mins = new Float64Array(bw * bh).fill(Infinity);
  // Block by block along each row, the running minimum in a local (no division per cell).
  for (let r = 0; r < height; r++) {
    const brow = ((r / BLOCK) | 0) * bw;
    const base = r * width;
    for (let b = 0; b < bw; b++) {
      let m = mins[brow + b];
      const end = base + Math.min(width, (b + 1) * BLOCK);
      // NaN ground (no data) fails g < m.
      for (let i = base + b * BLOCK; i < end; i++) {
        const g = heights[i];
        if (g < m && inSite[i] !== 0) m = g;
      }
      mins[brow + b] = m;
    }
  }
  let globalMin = Infinity;
  for (let b = 0; b < mins.length; b++) if (mins[b] < globalMin) globalMin = mins[b];
  return { mins, bw, bh, globalMin };
}

/** Lowest ground of block row `br` over block columns bc0..bc1 (Infinity: no site ground there). */
export function blockRowMin(bl: BlockMinima, br: number, bc0: number, bc1: number): number {
  let g = Infinity;
  for (let bc = bc0; bc <= bc1; bc++) if (bl.mins[br * bl.bw + bc] < g) g = bl.mins[br * bl.bw + bc];
  return g;
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
 * Per photo, before any band is swept: the height above the lowest ground its
 * footprint can fall on (start from the site minimum and tighten with the
 * block minima under that footprint's box; each round stays an outer bound)
 * and the rows that footprint can reach. Fills dMax, rowLo and rowHi.
 * @example reachOfPhotos(input); // then sweepBand(input, b, scratch) for every band
 */
export function reachOfPhotos(inp: SweepInput): void {
  const { blocks, kAlong, kAcross } = inp;
  const rows = new Int32Array(2);
  for (let e = 0; e < inp.ex.length; e++) {
    const ex = inp.ex[e];
    const ey = inp.ey[e];
    const ez = inp.ez[e];
    const ux = inp.eux[e];
    const uy = inp.euy[e];
    let dMax = ez - blocks.globalMin;
    for (let round = 0; round < 3 && dMax > 0; round++) {
      const g = minUnder(blocks, inp, ex, ey, ux, uy, dMax * kAlong, dMax * kAcross);
      dMax = g < Infinity ? ez - g : 0;
    }
    inp.dMax[e] = dMax;
    if (!(dMax > 0)) {
      inp.rowLo[e] = 1;
      inp.rowHi[e] = 0;
      continue;
    }
    orientedRectRowRange(ey, ux, uy, dMax * kAlong, dMax * kAcross, inp.y0, inp.dy, inp.height, rows);
    inp.rowLo[e] = rows[0];
    inp.rowHi[e] = rows[1];
  }
}

/**
 * Every photo over the rows of band `band` (rows band * bandRows up to the next
 * band): count the cells each footprint covers at the cell's own ground and
 * keep the most nadir photo per cell; then, the band's cells being final, its
 * effect flags. `best` is scratch of bandRows * width cells. Photos are taken
 * in index order, so ties go to the earlier photo whatever the banding.
 * @example const best = new Float32Array(inp.bandRows * inp.width); sweepBand(inp, 0, best);
 */
export function sweepBand(inp: SweepInput, band: number, best: Float32Array): void {
  const r0 = band * inp.bandRows;
  const r1 = Math.min(inp.height - 1, r0 + inp.bandRows - 1);
  if (r0 > r1) return;
  sweepPhotos(inp, r0, r1, best, band);
}

/** Rows of a band the WebAssembly rows take at a time (their memory holds these cells). */
const WASM_ROWS = 64;

/** This thread's WebAssembly rows: made when first needed; null where they cannot be had. */
let threadRows: FootprintRows | null | undefined;

/**
 * sweepBand's photo loop over rows r0..r1, then the effects (bandEffects): in WebAssembly a few
 * rows at a time, their cells copied into its memory and the results back (the copies take
 * under a tenth of the sweep's time at 4 km2, perf; the rows themselves ~2.2-2.6 ns a
 * cell-photo visit against ~6.8 in JavaScript), each few rows' effects made there too from
 * the cells still in its memory (footprintRows.as.ts effects; in JavaScript they took ~0.13 s
 * of CPU at 4 km2), only the flags copied out.
 */
function sweepPhotos(inp: SweepInput, r0: number, r1: number, best: Float32Array, bandIndex: number): void {
  const { width, ground, inSite, images, gsdCm, nadirStrip } = inp;
  if (inp.rowsIn !== "js") threadRows ??= footprintRows() ?? null;
  const rows = inp.rowsIn !== "js" ? threadRows : null;
  if (!rows) {
    const i0 = r0 * width;
    const i1 = (r1 + 1) * width;
    gsdCm.fill(NaN, i0, i1);
    // Zeros written before the first count is read: a fresh page that is first read maps the
    // kernel's shared zero page, and the write after it copies the page and flushes the TLB of
    // every core running one of the plan's threads (an interrupt to each, costly in a virtual
    // machine); a page first written is only allocated.
    images.fill(0, i0, i1);
    nadirStrip.fill(0, i0, i1);
    best.fill(Infinity, 0, i1 - i0);
    photoRows(inp, r0, r1, best, undefined);
    effectsOf(inp, i0, i1, bandIndex);
    return;
  }
  setCamera(inp, rows);
  const strips = inp.effects ? inp.effects.seen.strips : 0;
  for (let s0 = r0; s0 <= r1; s0 += WASM_ROWS) {
    const s1 = Math.min(r1, s0 + WASM_ROWS - 1);
    const i0 = s0 * width;
    const i1 = (s1 + 1) * width;
    const band = rows.band(i1 - i0, strips, WASM_ROWS);
    band.ground.set(ground.subarray(i0, i1));
    band.inSite.set(inSite.subarray(i0, i1));
    // The outputs are only written (see above: nadirStrip, fresh, is not read to be copied in).
    band.images.fill(0);
    band.nadirStrip.fill(0);
    band.best.fill(Infinity);
    band.gsdCm.fill(NaN);
    photoRows(inp, s0, s1, band.best, { rows, band });
    images.set(band.images, i0);
    gsdCm.set(band.gsdCm, i0);
    nadirStrip.set(band.nadirStrip, i0);
    if (inp.flags && inp.effects) {
      // The effects from the cells still in the rows' memory (bandEffects' own rule).
      band.seen.fill(0);
      rows.effects(i1 - i0, inp.effects.lowCm, inp.effects.highCm, inp.effects.minImages);
      inp.flags.set(band.flags, i0);
      const counts = inp.effects.seen.counts;
      const at = bandIndex * strips;
      for (let s = 0; s < strips; s++) counts[at + s] += band.seen[s];
    }
  }
}

/** The effect bits of cells i0..i1-1 of band `band`, when the sweep makes them (bandEffects). */
function effectsOf(inp: SweepInput, i0: number, i1: number, band: number): void {
  if (inp.flags && inp.effects) bandEffects(inp, inp.flags, inp.effects, i0, i1, band);
}

/** The figures sweepRow takes for every row, given to the WebAssembly rows once per band. */
function setCamera(inp: SweepInput, rows: FootprintRows): void {
  const { kAlong, kAcross } = inp;
  const byDistance = inp.nadirBy === "distance";
  rows.camera(kAlong, kAcross, byDistance ? 1 : 1 / (kAlong * kAlong), byDistance ? 1 : 1 / (kAcross * kAcross), byDistance, inp.gsdPerM);
}

/**
 * The photos over rows r0..r1, each footprint row by sweepRow, or by the WebAssembly rows
 * (`wasm`: the kernel, whose memory holds rows r0..r1 from its start, and its band's views;
 * a photo's rows gathered into the band's row arrays and swept in one call). A function of its own so that the
 * engine's on-the-fly compilation of this loop (entered during the first band, before any
 * band's effects were made) does not hold the effects pass too: compiled together, the
 * effects call had no type feedback yet and sent every later band back to the interpreter
 * (seen with node --trace-deopt: one deoptimisation per band and thread).
 */
function photoRows(inp: SweepInput, r0: number, r1: number, best: Float32Array, wasm: { rows: FootprintRows; band: BandArrays } | undefined): void {
  const { width, x0, y0, dx, dy, ground, inSite, images, gsdCm, nadirStrip, kAlong, kAcross, blocks } = inp;
  const base0 = r0 * width;
  const byDistance = inp.nadirBy === "distance";
  // In distance mode the weights are 1 and the division by d^2 is dropped (d2 = 1 below).
  const invKA2 = byDistance ? 1 : 1 / (kAlong * kAlong);
  const invKC2 = byDistance ? 1 : 1 / (kAcross * kAcross);
  const spans = new Int32Array(2 * BLOCK);
  const m = inp.ex.length;
  for (let e = 0; e < m; e++) {
    const rLo = Math.max(inp.rowLo[e], r0);
    const rHi = Math.min(inp.rowHi[e], r1);
    if (rLo > rHi) continue;
    const ex = inp.ex[e];
    const ey = inp.ey[e];
    const ez = inp.ez[e];
    const ux = inp.eux[e];
    const uy = inp.euy[e];
    const dMax = inp.dMax[e];
    const st = inp.strip[e];
    // Across-track unit (vx, vy) = (uy, -ux); the footprint is symmetric, so its sign does not matter.
    const vx = uy;
    const vy = -ux;
    const hAlongMax = dMax * kAlong;
    const hAcrossMax = dMax * kAcross;
    // Each band of BLOCK rows gets its own, tighter reach: the lowest ground of its blocks under the box.
    const ext = Math.abs(ux) * hAlongMax + Math.abs(uy) * hAcrossMax;
    const bc0 = Math.max(0, Math.floor((ex - ext - x0) / dx / BLOCK));
    const bc1 = Math.min(blocks.bw - 1, Math.floor((ex + ext - x0) / dx / BLOCK));
    // With the WebAssembly rows, the photo's rows are gathered into the band's row arrays and
    // swept in one call (rows.rows, in the same order as row by row).
    let nRows = 0;
    // A run of rows within one band of BLOCK rows at a time: its own, tighter reach (the lowest
    // ground of its blocks under the box), and its rows' spans in one call.
    for (let ra = rLo; ra <= rHi; ) {
      const br = (ra / BLOCK) | 0;
      const rb = Math.min(rHi, br * BLOCK + BLOCK - 1);
      const g = blockRowMin(blocks, br, bc0, bc1);
      const dRow = g < Infinity ? Math.min(ez - g, dMax) : 0;
      if (dRow > 0) {
        orientedRectColSpans(y0, dy, ra, rb, ex, ey, ux, uy, dRow * kAlong, dRow * kAcross, x0, dx, width, spans);
        for (let r = ra; r <= rb; r++) {
          const c0 = spans[2 * (r - ra)], c1 = spans[2 * (r - ra) + 1];
          if (c0 > c1) continue;
          const cy = y0 + (r + 0.5) * dy;
          const ddy = cy - ey;
          const ddx0 = x0 + (c0 + 0.5) * dx - ex;
          const a0 = ddx0 * ux + ddy * uy;
          const q0 = ddx0 * vx + ddy * vy;
          if (wasm) {
            const { rowCells, rowOffsets } = wasm.band;
            rowCells[2 * nRows] = r * width + c0 - base0;
            rowCells[2 * nRows + 1] = r * width + c1 - base0;
            rowOffsets[2 * nRows] = a0;
            rowOffsets[2 * nRows + 1] = q0;
            nRows++;
          } else {
            sweepRow(
              ground, inSite, images, best, gsdCm, nadirStrip,
              r * width + c0, r * width + c1, base0,
              ez, a0, q0, dx * ux, dx * vx,
              kAlong, kAcross, invKA2, invKC2, byDistance, inp.gsdPerM, st,
            );
          }
        }
      }
      ra = rb + 1;
    }
    if (wasm && nRows > 0) wasm.rows.rows(nRows, ez, dx * ux, dx * vx, st);
  }
}

/**
 * One row of one footprint: cells i0..i1 (best[] indexed from `off`), along/across
 * offsets of the first cell a0/q0 stepping by da/dq per cell. Kept apart, with flat
 * arguments, so the engine compiles the hot loop once for fixed array types. A better
 * photo writes the cell's GSD and strip at once (no index to resolve afterwards), and
 * is compared without a division: num / d^2 < best  <=>  num < best * d^2 (d^2 = 1
 * when measuring plain distance).
 */
function sweepRow(
  ground: Float32Array,
  inSite: Uint8Array,
  images: Uint16Array,
  best: Float32Array,
  gsdCm: Float32Array,
  nadirStrip: StripRaster,
  i0: number,
  i1: number,
  off: number,
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
  gsdPerM: number,
  strip: number,
): void {
  let a = a0;
  let q = q0;
  for (let i = i0; i <= i1; i++, a += da, q += dq) {
    const d = ez - ground[i];
    // Written so that NaN ground (no data) fails too.
    if (!(Math.abs(a) <= d * kAlong && Math.abs(q) <= d * kAcross && d > 0) || inSite[i] === 0) continue;
    if (images[i] < 65535) images[i]++;
    // (a / hA)^2 + (q / hC)^2 = num / d^2.
    const num = a * a * invKA2 + q * q * invKC2;
    const d2 = byDistance ? 1 : d * d;
    const j = i - off;
    if (num < best[j] * d2) {
      best[j] = num / d2;
      gsdCm[i] = d * gsdPerM;
      nadirStrip[i] = strip;
    }
  }
}

/**
 * Effect bits and the no-data bit of the cells i0..i1-1, whose photos are all
 * counted: coarse or fine outside the GSD band, too few images under
 * minImages; no data where the site's ground is unknown; 0 outside the site.
 * The same pass counts the band's seen site cells per nadir strip (fx.seen).
 */
function bandEffects(inp: SweepInput, flags: Uint16Array, fx: BandEffects, i0: number, i1: number, band: number): void {
  const { inSite, ground, gsdCm, images, nadirStrip } = inp;
  const lo = fx.lowCm * (1 - BAND_SLACK);
  const hi = fx.highCm * (1 + BAND_SLACK);
  const minImages = fx.minImages;
  // Neighbouring cells mostly share their strip: the count of a run of them is added at once.
  const counts = fx.seen.counts;
  const at = band * fx.seen.strips;
  let runStrip = 0;
  let run = 0;
  for (let i = i0; i < i1; i++) {
    if (inSite[i] === 0) {
      flags[i] = 0;
      continue;
    }
    const g = gsdCm[i];
    if (g === g) {
      const s = nadirStrip[i];
      if (s !== runStrip) {
        counts[at + runStrip] += run;
        runStrip = s;
        run = 0;
      }
      run++;
    }
    const z = ground[i];
    if (z !== z) {
      flags[i] = FLAG_NODATA;
      continue;
    }
    let f = 0;
    if (g > hi) f |= FLAG_COARSE;
    else if (g < lo) f |= FLAG_FINE;
    if (images[i] < minImages) f |= FLAG_FEW_IMAGES;
    flags[i] = f;
  }
  counts[at + runStrip] += run;
}

/**
 * Sweeps bands until none is left, taking the next one from the shared counter.
 * @example sweepBands(input, new Int32Array(new SharedArrayBuffer(4)), bands);
 */
export function sweepBands(inp: SweepInput, next: Int32Array, bands: number): void {
  const best = new Float32Array(inp.bandRows * inp.width);
  for (let b = Atomics.add(next, 0, 1); b < bands; b = Atomics.add(next, 0, 1)) sweepBand(inp, b, best);
}
