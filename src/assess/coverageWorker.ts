import { parentPort } from "node:worker_threads";
import { JOB_BEGUN, JOB_FAILED, JOB_FINISHED, JOB_WAITING, type BandJob } from "./bandThreads.js";
import { sweepBands, type SweepInput } from "./coverageKernel.js";
import { statsPassBands, type StatsPassJob } from "./stats.js";
import { gatherBands, type GatherJob } from "./quantiles.js";
import { headingTerrainBands, type HeadingTerrainJob } from "../layout/headingTerrain.js";
import { codeCacheCheckpoint } from "../codeCache.js";

/**
 * Worker thread of banded passes (bandThreads.ts): for each job it is sent, runs the band
 * loop of its kind over shared memory while bands are left, then raises its flag in `done`
 * (JOB_FINISHED or JOB_FAILED) and wakes the waiting main thread; a job the main thread has
 * withdrawn is skipped. Kept for the next job until ended.
 */
parentPort?.on("message", ({ kind, input, next, bands, done, slot }: BandJob) => {
  // The job is this thread's unless the calling thread withdrew it (every band taken before
  // this thread came to it): then there is nothing to do and no flag to raise (the build's
  // cache run still writes this thread's cache, with whatever it has compiled).
  if (Atomics.compareExchange(done, slot, JOB_WAITING, JOB_BEGUN) !== JOB_WAITING) {
    codeCacheCheckpoint();
    return;
  }
  try {
    if (kind === "sweep") sweepBands(input as SweepInput, next, bands);
    else if (kind === "stats") statsPassBands(input as StatsPassJob, next, bands, slot);
    else if (kind === "gather") gatherBands(input as GatherJob, next, bands, slot);
    else headingTerrainBands(input as HeadingTerrainJob, next, bands);
    codeCacheCheckpoint();
    Atomics.store(done, slot, JOB_FINISHED);
  } catch {
    Atomics.store(done, slot, JOB_FAILED);
  }
  Atomics.notify(done, slot);
});
