import { closeSync, openSync } from "node:fs";
import { parentPort, workerData } from "node:worker_threads";
import { TAKEN_BY_WORKER, takeBlocks } from "./blockTake.js";
import type { BlockJob } from "./blocksInBackground.js";
import { codeCacheCheckpoint } from "../codeCache.js";

/**
 * Worker thread that decodes Deflate blocks of a local Float32 DEM with the floating-point
 * predictor straight into the window's shared heights, taking them from the counter it
 * shares with the calling thread (see blocksInBackground, blockTake.ts). It posts true when
 * every block it took is placed; anything wrong (a read, a damaged or short block) stops it
 * and posts false: the calling thread then decodes the blocks it took, with its own errors.
 */
const job = workerData as BlockJob;
let ok = true;
let fd: number | undefined;
try {
  fd = openSync(job.path, "r");
  takeBlocks(job, fd, TAKEN_BY_WORKER);
} catch {
  ok = false;
} finally {
  if (fd !== undefined) closeSync(fd);
}
codeCacheCheckpoint();
parentPort?.postMessage(ok);
