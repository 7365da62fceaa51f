import { parentPort, workerData } from "node:worker_threads";
import { baselineFigures, type BaselineJob } from "./baseline.js";
import { lowerThisThreadPriority } from "../threadPriority.js";

/**
 * Worker thread that makes the constant-altitude comparison's figures from its job (one
 * thread: the cores are shared with the plan's own assessment meanwhile; see
 * constantAltitudeBaselineInBackground). The seen-cell bits are handed over, not copied.
 */
// Its figures are wanted after the assessment: the solve and the assessment come first.
lowerThisThreadPriority(10);
const figures = baselineFigures(workerData as BaselineJob, 1);
parentPort?.postMessage(figures, [figures.seenBits.buffer as ArrayBuffer]);
