import { workerData } from "node:worker_threads";
import type { BandKind } from "./bandThreads.js";
import { sweepBands, type SweepInput } from "./coverageKernel.js";
import { latticeBands, type LatticeInput } from "./latticeCoverage.js";
import { statsPassBands, type StatsPassJob } from "./stats.js";

/**
 * Worker thread of a banded pass (bandThreads.ts): runs the band loop of its
 * kind over shared memory while bands are left, then raises its flag in
 * `done` (1 finished, 2 failed) and wakes the waiting main thread.
 */
const { kind, input, next, bands, done, slot } = workerData as { kind: BandKind; input: unknown; next: Int32Array; bands: number; done: Int32Array; slot: number };
try {
  if (kind === "sweep") sweepBands(input as SweepInput, next, bands);
  else if (kind === "lattice") latticeBands(input as LatticeInput, next, bands);
  else statsPassBands(input as StatsPassJob, next, bands, slot);
  Atomics.store(done, slot, 1);
} catch {
  Atomics.store(done, slot, 2);
}
Atomics.notify(done, slot);
