import { parentPort } from "node:worker_threads";
import type { BandJob } from "./bandThreads.js";
import { sweepBands, type SweepInput } from "./coverageKernel.js";
import { statsPassBands, type StatsPassJob } from "./stats.js";
import { gatherBands, type GatherJob } from "./quantiles.js";
import { headingTerrainBands, type HeadingTerrainJob } from "../layout/headingTerrain.js";
import { codeCacheCheckpoint } from "../codeCache.js";

/**
 * Worker thread of banded passes (bandThreads.ts): for each job it is sent, runs the band
 * loop of its kind over shared memory while bands are left, then raises its flag in `done`
 * (1 finished, 2 failed) and wakes the waiting main thread. Kept for the next job until ended.
 */
parentPort?.on("message", ({ kind, input, next, bands, done, slot }: BandJob) => {
  try {
    if (kind === "sweep") sweepBands(input as SweepInput, next, bands);
    else if (kind === "stats") statsPassBands(input as StatsPassJob, next, bands, slot);
    else if (kind === "gather") gatherBands(input as GatherJob, next, bands, slot);
    else headingTerrainBands(input as HeadingTerrainJob, next, bands);
    codeCacheCheckpoint();
    Atomics.store(done, slot, 1);
  } catch {
    Atomics.store(done, slot, 2);
  }
  Atomics.notify(done, slot);
});
