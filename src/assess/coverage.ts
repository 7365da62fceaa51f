import type { DemGrid } from "../dem/grid.js";
import type { Camera } from "../camera/types.js";
import type { Exposure, StripRaster } from "./types.js";
import { BLOCK, reachOfPhotos, siteGroundBlocks, sweepBands, type NadirBy, type SeenByBand, type SweepInput } from "./coverageKernel.js";
import { bandThreads, shareable, startBands, type BandPool } from "./bandThreads.js";

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
 * The work goes band by band of rows, and within a band photo by photo over
 * the footprint each one could have over the lowest ground beneath it, row by
 * row over the exact span of that rectangle, with every per-cell result in
 * typed arrays (coverageKernel.ts); the bands are shared between worker
 * threads when the grid is large. Only one band's scratch (the best offset so
 * far) exists per thread.
 */

export interface Coverage {
  /** Nadir GSD in cm/px from the most nadir photo; NaN where no photo sees the cell (or outside the site). */
  gsdCm: Float32Array;
  /** Number of photos whose footprint covers the cell centre. */
  images: Uint16Array;
  /** Strip number of the most nadir photo, 0 where none (one byte a cell when every strip number is below 256). */
  nadirStrip: StripRaster;
  /** Effect flags (coarse, fine, too few images, no data; 0 outside the site), when `effects` was given. */
  flags?: Uint16Array;
  /** Seen site cells per band of rows and nadir strip, counted with the effects (see SeenByBand). */
  seenByBand?: SeenByBand;
}

/** Pixels of the image along and across the track: width goes across unless the camera is portrait. */
export function footprintPixels(camera: Camera): { alongPx: number; acrossPx: number } {
  return camera.portrait
    ? { alongPx: camera.imageWidthPx, acrossPx: camera.imageHeightPx }
    : { alongPx: camera.imageHeightPx, acrossPx: camera.imageWidthPx };
}

export interface CoverageOptions {
  /** How "most nadir" is measured (see NadirBy); default `image`. */
  nadirBy?: NadirBy;
  /**
   * Threads to share the bands of rows between (the main thread counts as one). Default:
   * the machine's available parallelism, at most 4; grids under a million cells
   * always run on the main thread. Worker threads are used only from the built
   * library (dist), where the compiled worker module sits next to this one.
   */
  threads?: number;
  /** Workers to use, kept for later passes (bandThreads.ts BandPool); default: started for this pass and ended. */
  bandPool?: BandPool;
  /** Also set the effect flags (coarse, fine, too few images, no data) in the same pass. */
  effects?: { lowGsdCm: number; highGsdCm: number; minImages: number };
  /** The footprint rows in WebAssembly where built (the default) or in JavaScript: the same results (coverageKernel.ts). */
  rowsIn?: "wasm" | "js";
}

/** Rows per unit of work: a multiple of BLOCK; small enough to balance two to four threads on a site, large enough that the photos' row ranges are checked few times. */
const BAND_ROWS = 8 * BLOCK;

/**
 * Threads the footprint sweep of a grid `width` x `height` cells uses (bandThreads over its
 * bands), for computeCoverage and for starting its workers ahead (BandPool.start).
 * @example sweepThreads(grid.width, grid.height, opts.threads)
 */
export function sweepThreads(width: number, height: number, requested?: number): number {
  return bandThreads(width * height, Math.ceil(height / BAND_ROWS), requested);
}

/**
 * GSD and image count per cell of `grid` where `inSite` is 1.
 * @example
 * const { gsdCm, images, nadirStrip } = computeCoverage(grid, inSite, exposures, camera);
 */
export function computeCoverage(
  grid: DemGrid,
  inSite: Uint8Array,
  exposures: readonly Exposure[],
  camera: Camera,
  opts: CoverageOptions = {},
): Coverage {
  return startCoverage(grid, inSite, exposures, camera, opts).finish();
}

/** A footprint sweep whose workers have started (startCoverage). */
export interface StartedCoverage {
  grid: DemGrid;
  inSite: Uint8Array;
  /** True when `exposures` are the sweep's own photos, to the bit (same order, places, altitudes, headings, strips). */
  sameExposures: (exposures: readonly Exposure[]) => boolean;
  /** Sweeps the bands left on this thread, waits for the workers, and gives the coverage. */
  finish: () => Coverage;
  /** Stops handing out bands and waits for the workers' current ones (the sweep is dropped). */
  cancel: () => void;
}

/**
 * computeCoverage in two steps: the band workers start sweeping now and this thread joins
 * them at `finish` (with one thread, all of the sweep is done there). Lets the sweep start
 * before its caller has done other work, e.g. while the route is made (assess.ts
 * startAssessmentSweep).
 * @example const started = startCoverage(grid, inSite, exposures, camera, o); ...; const cov = started.finish();
 */
export function startCoverage(
  grid: DemGrid,
  inSite: Uint8Array,
  exposures: readonly Exposure[],
  camera: Camera,
  opts: CoverageOptions = {},
): StartedCoverage {
  const { width, height, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const n = width * height;
  const bands = Math.ceil(height / BAND_ROWS);
  const threads = sweepThreads(width, height, opts.threads);
  // Shared memory only when other threads read or write it.
  const buffer = (bytes: number): ArrayBufferLike => (threads > 1 ? new SharedArrayBuffer(bytes) : new ArrayBuffer(bytes));

  // Worker threads read the heights in place when they are already in shared memory (the
  // DEM window is read into it); otherwise from a shared copy.
  const ground = shareable(heights, threads);
  const blocks = siteGroundBlocks(heights, inSite, width, height);
  const m = exposures.length;
  const strips = exposures.reduce((k, e) => Math.max(k, e.strip), 0) + 1;
  const input: SweepInput = {
    width, height, x0, y0, dx, dy,
    ground,
    inSite: shareable(inSite, threads),
    images: new Uint16Array(buffer(2 * n)),
    gsdCm: new Float32Array(buffer(4 * n)),
    nadirStrip: strips <= 256 ? new Uint8Array(buffer(n)) : new Uint16Array(buffer(2 * n)),
    ...(opts.effects
      ? {
          flags: new Uint16Array(buffer(2 * n)),
          effects: {
            lowCm: opts.effects.lowGsdCm, highCm: opts.effects.highGsdCm, minImages: opts.effects.minImages,
            seen: { counts: new Int32Array(buffer(4 * bands * strips)), strips, bandRows: BAND_ROWS, bandCells: BAND_ROWS * width },
          },
        }
      : {}),
    ex: Float64Array.from(exposures, (e) => e.x),
    ey: Float64Array.from(exposures, (e) => e.y),
    ez: Float64Array.from(exposures, (e) => e.altitudeAmslM),
    eux: Float64Array.from(exposures, (e) => e.ux),
    euy: Float64Array.from(exposures, (e) => e.uy),
    strip: Uint16Array.from(exposures, (e) => e.strip),
    dMax: new Float64Array(m),
    rowLo: new Int32Array(m),
    rowHi: new Int32Array(m),
    kAlong: 0,
    kAcross: 0,
    gsdPerM: camera.ifov * 100,
    blocks,
    nadirBy: opts.nadirBy ?? "image",
    bandRows: BAND_ROWS,
    ...(opts.rowsIn ? { rowsIn: opts.rowsIn } : {}),
  };
  const { alongPx, acrossPx } = footprintPixels(camera);
  input.kAlong = (camera.ifov * alongPx) / 2;
  input.kAcross = (camera.ifov * acrossPx) / 2;
  if (blocks.globalMin === Infinity) {
    // No site ground at all: no photo can see anything (every row range left empty).
    input.rowLo.fill(1);
  } else reachOfPhotos(input);
  const started = startBands("sweep", input, bands, threads, opts.bandPool);
  // Let go on cancel: a dropped sweep's rasters (~180 MB at 4 km2) are not kept while another is made.
  let job: SweepInput | undefined = input;
  const live = (): SweepInput => {
    if (!job) throw new Error("computeCoverage: the sweep was cancelled");
    return job;
  };
  return {
    grid,
    inSite,
    sameExposures: (e) => sameExposures(live(), e),
    finish: () => {
      const inp = live();
      started.join(sweepBands);
      return {
        gsdCm: inp.gsdCm, images: inp.images, nadirStrip: inp.nadirStrip,
        ...(inp.flags ? { flags: inp.flags } : {}),
        ...(inp.effects ? { seenByBand: inp.effects.seen } : {}),
      };
    },
    cancel: () => {
      started.cancel();
      job = undefined;
    },
  };
}

/** True when `e` are the photos of `input`, to the bit (Object.is: NaN equals NaN, 0 is not -0). */
function sameExposures(input: SweepInput, e: readonly Exposure[]): boolean {
  if (e.length !== input.ex.length) return false;
  const same = Object.is;
  for (let i = 0; i < e.length; i++) {
    const p = e[i];
    if (!(same(p.x, input.ex[i]) && same(p.y, input.ey[i]) && same(p.altitudeAmslM, input.ez[i]) && same(p.ux, input.eux[i]) && same(p.uy, input.euy[i]) && p.strip === input.strip[i])) return false;
  }
  return true;
}
