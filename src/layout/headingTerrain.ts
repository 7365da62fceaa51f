import type { DemGrid } from "../dem/grid.js";
import { sampleBilinear } from "../dem/sample.js";
import type { LayoutLeg } from "./types.js";

/**
 * The terrain term of the heading choice (heading.ts) for many candidate headings at once,
 * on plain typed arrays, so worker threads can share the candidates (bandThreads.ts: each
 * candidate is one "band"; the DEM's heights are read in place from shared memory). Every
 * candidate's figure is made by the same code whichever thread makes it, so the choice does
 * not depend on the threads.
 */

/** The strip legs of several candidates, each candidate's legs in flight order. */
export interface HeadingTerrainJob {
  grid: Pick<DemGrid, "width" | "height" | "heights" | "transform">;
  /** Sampling step along the strips, metres. */
  stepM: number;
  /** Candidate b's legs are legs legAt[b] .. legAt[b + 1] - 1. */
  legAt: Int32Array;
  fromX: Float64Array;
  fromY: Float64Array;
  toX: Float64Array;
  toY: Float64Array;
  lengthM: Float64Array;
  /** Most samples any leg takes (the scratch buffers' length). */
  most: number;
  /** Out: each candidate's total |change of ground height|, metres. */
  altitudeChangeM: Float64Array;
}

/**
 * The job for candidates' leg lists (the strip legs only are kept); `shared` puts the
 * results where worker threads can write them.
 * @example const job = headingTerrainJob(grid, [legsAt0, legsAt5], 0.5, false); altitudeChangeOf(job, 0)
 */
export function headingTerrainJob(grid: HeadingTerrainJob["grid"], candidates: readonly (readonly LayoutLeg[])[], stepM: number, shared: boolean): HeadingTerrainJob {
  let count = 0;
  for (const legs of candidates) for (const leg of legs) if (leg.kind === "strip") count++;
  const col = () => new Float64Array(count);
  const job: HeadingTerrainJob = {
    // The grid object itself, not a copy of its fields: sampleBilinear's other callers pass
    // DemGrid objects, and an object of another shape sent its compiled code back to the
    // interpreter ("wrong map", node --trace-deopt). A worker gets a structured clone (the
    // heights, in shared memory, are not copied).
    grid,
    stepM,
    legAt: new Int32Array(candidates.length + 1),
    fromX: col(), fromY: col(), toX: col(), toY: col(), lengthM: col(),
    most: 0,
    altitudeChangeM: new Float64Array(shared ? new SharedArrayBuffer(8 * candidates.length) : new ArrayBuffer(8 * candidates.length)),
  };
  let k = 0;
  candidates.forEach((legs, b) => {
    job.legAt[b] = k;
    for (const leg of legs) {
      if (leg.kind !== "strip") continue;
      job.fromX[k] = leg.from[0];
      job.fromY[k] = leg.from[1];
      job.toX[k] = leg.to[0];
      job.toY[k] = leg.to[1];
      job.lengthM[k] = leg.lengthM;
      job.most = Math.max(job.most, sampleCount(leg.lengthM, stepM));
      k++;
    }
  });
  job.legAt[candidates.length] = k;
  return job;
}

/**
 * Candidate b's total |change of ground height| along its strip legs, sampled every stepM
 * metres (bilinear, both ends included); samples without data are skipped.
 * @example altitudeChangeOf(headingTerrainJob(grid, [legs], 5, false), 0)
 */
export function altitudeChangeOf(job: HeadingTerrainJob, b: number, scratch = headingScratch(job)): number {
  const { xs, ys, hs } = scratch;
  let total = 0;
  for (let k = job.legAt[b]; k < job.legAt[b + 1]; k++) {
    const n = sampleCount(job.lengthM[k], job.stepM);
    const fx = job.fromX[k];
    const fy = job.fromY[k];
    const ddx = job.toX[k] - fx;
    const ddy = job.toY[k] - fy;
    for (let i = 0; i < n; i++) {
      const t = i / (n - 1);
      xs[i] = fx + t * ddx;
      ys[i] = fy + t * ddy;
    }
    sampleBilinear(job.grid, xs.subarray(0, n), ys.subarray(0, n), hs);
    total = changeAlong(hs, n, total);
  }
  return total;
}

/** Buffers for the job's longest leg, made once per thread: grown inside the loop, the growth (rarely taken) sent the loop's optimised code back to the interpreter (node --trace-deopt). */
function headingScratch(job: HeadingTerrainJob): { xs: Float64Array; ys: Float64Array; hs: Float64Array } {
  return { xs: new Float64Array(job.most), ys: new Float64Array(job.most), hs: new Float64Array(job.most) };
}

/** `total` plus each |z[i] - z[previous with data]| over the first n samples, in order (NaN samples skipped). */
function changeAlong(hs: Float64Array, n: number, total: number): number {
  let prev = NaN;
  for (let i = 0; i < n; i++) {
    const z = hs[i];
    if (Number.isNaN(z)) continue;
    if (!Number.isNaN(prev)) total += Math.abs(z - prev);
    prev = z;
  }
  return total;
}

/** Samples a leg of `lengthM` takes: every `stepM`, both ends included. */
function sampleCount(lengthM: number, stepM: number): number {
  return Math.max(2, Math.ceil(lengthM / stepM) + 1);
}

/**
 * Candidates taken from the shared counter until none is left (this thread's share).
 * @example headingTerrainBands(job, new Int32Array(new SharedArrayBuffer(4)), candidates);
 */
export function headingTerrainBands(job: HeadingTerrainJob, next: Int32Array, bands: number): void {
  const scratch = headingScratch(job);
  for (let b = Atomics.add(next, 0, 1); b < bands; b = Atomics.add(next, 0, 1)) job.altitudeChangeM[b] = altitudeChangeOf(job, b, scratch);
}
