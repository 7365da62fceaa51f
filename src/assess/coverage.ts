import type { DemGrid } from "../dem/grid.js";
import type { Camera } from "../camera/types.js";
import type { Exposure } from "./types.js";
import { existsSync } from "node:fs";
import { availableParallelism } from "node:os";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import { siteGroundAndBlocks, sweepExposures, type NadirBy, type SweepInput } from "./coverageKernel.js";

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
 * the lowest ground beneath it, row by row over the exact span of that
 * rectangle, with every per-cell result in typed arrays (coverageKernel.ts),
 * split by rows over worker threads when the grid is large.
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

export interface CoverageOptions {
  /** How "most nadir" is measured (see NadirBy); default `image`. */
  nadirBy?: NadirBy;
  /**
   * Threads to share the rows between (the main thread counts as one). Default:
   * the machine's available parallelism, at most 4; grids under a million cells
   * always run on the main thread. Worker threads are used only from the built
   * library (dist), where the compiled worker module sits next to this one.
   */
  threads?: number;
}

const MIN_CELLS_FOR_THREADS = 1_000_000;

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
  const { width, height, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const n = width * height;
  const workerUrl = new URL("./coverageWorker.js", import.meta.url);
  let threads = Math.max(1, Math.floor(opts.threads ?? Math.min(4, availableParallelism())));
  if (n < MIN_CELLS_FOR_THREADS || !existsSync(fileURLToPath(workerUrl))) threads = 1;
  // Shared memory only when other threads write into it.
  const buffer = (bytes: number): ArrayBufferLike => (threads > 1 ? new SharedArrayBuffer(bytes) : new ArrayBuffer(bytes));

  const images = new Uint16Array(buffer(2 * n));
  // Offset of the best photo so far; starts above any covered value (<= 2).
  const best = new Float32Array(buffer(4 * n)).fill(Infinity);
  const bestIdx = new Int32Array(buffer(4 * n)).fill(-1);
  // Site ground: NaN outside the site and where the DEM has no data, so one test skips both.
  const siteGround = new Float32Array(buffer(4 * n));
  const blocks = siteGroundAndBlocks(heights, inSite, width, height, siteGround);

  const m = exposures.length;
  const cols = { ex: new Float64Array(m), ey: new Float64Array(m), ez: new Float64Array(m), eux: new Float64Array(m), euy: new Float64Array(m) };
  exposures.forEach((e, k) => {
    cols.ex[k] = e.x;
    cols.ey[k] = e.y;
    cols.ez[k] = e.altitudeAmslM;
    cols.eux[k] = e.ux;
    cols.euy[k] = e.uy;
  });
  const { alongPx, acrossPx } = footprintPixels(camera);
  const base: SweepInput = {
    width, height, x0, y0, dx, dy, siteGround, images, best, bestIdx, ...cols,
    kAlong: (camera.ifov * alongPx) / 2,
    kAcross: (camera.ifov * acrossPx) / 2,
    blocks,
    nadirBy: opts.nadirBy ?? "image",
    rowLo: 0,
    rowHi: height - 1,
  };
  if (blocks.globalMin < Infinity) {
    if (threads === 1) sweepExposures(base);
    else sweepInThreads(base, inSite, threads, workerUrl);
  }

  // GSD and strip from each cell's most nadir photo.
  const gsdCm = new Float32Array(n);
  const nadirStrip = new Uint16Array(n);
  const gsdPerM = camera.ifov * 100;
  const strips = Uint16Array.from(exposures, (e) => e.strip);
  const ez = cols.ez;
  for (let i = 0; i < n; i++) {
    const k = bestIdx[i];
    if (k < 0) {
      gsdCm[i] = NaN;
      continue;
    }
    gsdCm[i] = (ez[k] - siteGround[i]) * gsdPerM;
    nadirStrip[i] = strips[k];
  }
  return { gsdCm, images, nadirStrip };
}

/**
 * Bands of rows with equal numbers of site cells, one per thread; the main
 * thread sweeps the first band while the workers do the others, then waits
 * on their flags (Atomics.wait is allowed on Node's main thread), which keeps
 * the assessment a plain synchronous function.
 */
function sweepInThreads(base: SweepInput, inSite: Uint8Array, threads: number, workerUrl: URL): void {
  const { width, height } = base;
  let total = 0;
  for (let i = 0; i < inSite.length; i++) total += inSite[i];
  const bounds = [0];
  let acc = 0;
  for (let r = 0; r < height && bounds.length < threads; r++) {
    for (let c = 0; c < width; c++) acc += inSite[r * width + c];
    if (acc >= (total * bounds.length) / threads) bounds.push(r + 1);
  }
  bounds.push(height);
  const done = new Int32Array(new SharedArrayBuffer(4 * threads));
  const workers: Worker[] = [];
  for (let t = 1; t + 1 < bounds.length; t++) {
    const input: SweepInput = { ...base, rowLo: bounds[t], rowHi: bounds[t + 1] - 1 };
    workers.push(new Worker(workerUrl, { workerData: { input, done, slot: t } }));
  }
  sweepExposures({ ...base, rowLo: bounds[0], rowHi: bounds[1] - 1 });
  let failed = false;
  for (let t = 1; t + 1 < bounds.length; t++) {
    // A worker that dies before raising its flag would leave us waiting: give up after 10 minutes.
    const deadline = Date.now() + 600_000;
    while (Atomics.load(done, t) === 0 && Date.now() < deadline) Atomics.wait(done, t, 0, 1000);
    if (Atomics.load(done, t) !== 1) failed = true;
  }
  for (const w of workers) void w.terminate();
  if (failed) throw new Error("coverage: a worker thread failed");
}
