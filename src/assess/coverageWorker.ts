import { workerData } from "node:worker_threads";
import { sweepExposures, type SweepInput } from "./coverageKernel.js";

/**
 * Worker thread of the coverage pass: sweeps its band of rows over shared
 * memory, then raises its flag in `done` (1 finished, 2 failed) and wakes the
 * waiting main thread.
 */
const { input, done, slot } = workerData as { input: SweepInput; done: Int32Array; slot: number };
try {
  sweepExposures(input);
  Atomics.store(done, slot, 1);
} catch {
  Atomics.store(done, slot, 2);
}
Atomics.notify(done, slot);
