import type { ResourceLimits } from "node:worker_threads";

/**
 * The young generation of every worker thread a plan starts (band workers, background jobs),
 * in MB. By default V8 lets a busy thread's semi-spaces grow to 16 MB each (Node 20, 64-bit;
 * from memory), committed until the thread ends, and a plan runs up to five such threads at
 * once beside the main one. The report page's worker (its strings short-lived) added ~100 MB
 * to the process at 4 km2 (2 runs), 55-76 MB with this limit (4 runs), in the same time
 * (0.38-0.49 s either way); the whole 4 km2 benchmark peaked 10-30 MB lower. The main
 * thread keeps the engine's default (not ours to set: the library leaves it to the program).
 */
export const WORKER_YOUNG_GENERATION_MB = 4;

/** Resource limits for new Worker(url, { resourceLimits }). */
export const workerResourceLimits: ResourceLimits = { maxYoungGenerationSizeMb: WORKER_YOUNG_GENERATION_MB };
