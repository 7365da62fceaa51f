import { workerData } from "node:worker_threads";
import { sweepBands, type SweepInput } from "./coverageKernel.js";

/**
 * Worker thread of the coverage pass: sweeps bands of rows over shared memory
 * while any are left, then raises its flag in `done` (1 finished, 2 failed)
 * and wakes the waiting main thread.
 */
const { input, next, bands, done, slot } = workerData as { input: SweepInput; next: Int32Array; bands: number; done: Int32Array; slot: number };
try {
  sweepBands(input, next, bands);
  Atomics.store(done, slot, 1);
} catch {
  Atomics.store(done, slot, 2);
}
Atomics.notify(done, slot);
