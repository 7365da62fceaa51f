import { closeSync, openSync, readSync } from "node:fs";
import { inflateSync } from "node:zlib";
import { parentPort, workerData } from "node:worker_threads";
import { blockCellsInWindow, placeFloatPredicted } from "./floatBlocks.js";
import { blockChunk } from "./inflateChunk.js";
import type { BlockJob } from "./blocksInBackground.js";

/**
 * Worker thread that decodes some Deflate blocks of a local Float32 DEM with the
 * floating-point predictor straight into the window's shared heights (see
 * blocksInBackground). It posts true when every block is placed; anything wrong (a read,
 * a damaged or short block) posts false and the calling thread decodes those blocks itself,
 * with its own errors.
 */
const job = workerData as BlockJob;
let ok = true;
let fd: number | undefined;
try {
  fd = openSync(job.path, "r");
  const words = new Uint32Array(job.heights.buffer, job.heights.byteOffset, job.heights.length);
  for (const b of job.blocks) {
    const compressed = Buffer.allocUnsafe(b.length);
    if (readSync(fd, compressed, 0, b.length, b.offset) !== b.length) throw new Error("short read");
    const bytes = inflateSync(compressed, blockChunk(b.need));
    if (bytes.byteLength < b.need) throw new Error("short block");
    const { tw, th } = job;
    const [colA, colB, rowA, rowB] = blockCellsInWindow(b.tx, b.ty, tw, th, job.win, job.sourceHeight);
    placeFloatPredicted(new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength), tw, b.tx * tw, b.ty * th, colA, colB, rowA, rowB, job.wc0, job.wr0, job.outW, words, job.heights, job.nd);
  }
} catch {
  ok = false;
} finally {
  if (fd !== undefined) closeSync(fd);
}
parentPort?.postMessage(ok);
