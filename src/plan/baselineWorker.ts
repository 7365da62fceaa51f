import { parentPort, workerData } from "node:worker_threads";
import { baselineFigures, type BaselineJob } from "./baseline.js";
import { lowerThisThreadPriority } from "../threadPriority.js";
import { codeCacheCheckpoint } from "../codeCache.js";

/**
 * Worker thread that makes the constant-altitude comparison's figures from its job (one
 * thread: the cores are shared with the plan's own assessment meanwhile; see
 * constantAltitudeBaselineInBackground). The seen-cell bits are handed over, not copied.
 * `nice`: started before the solve, its figures are wanted only after the assessment, so
 * the solve and the assessment come first (baselineBeforeSolve).
 */
const { job, nice } = workerData as { job: BaselineJob; nice?: number };
if (nice !== undefined) lowerThisThreadPriority(nice);
const figures = baselineFigures(job);
codeCacheCheckpoint();
parentPort?.postMessage(figures, [figures.seenBits.buffer as ArrayBuffer]);
