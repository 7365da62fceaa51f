import { readSync } from "node:fs";
import { inflateSync } from "node:zlib";
import { blockCellsInWindow, placeFloatPredicted } from "./floatBlocks.js";
import { blockChunk } from "./inflateChunk.js";
import type { BlockJob } from "./blocksInBackground.js";

/** BlockJob.taken: a block no thread has taken yet, or taken by the calling thread or the worker. */
export const NOT_TAKEN = 0;
export const TAKEN_HERE = 1;
export const TAKEN_BY_WORKER = 2;

/**
 * Takes blocks of `job` from its shared counter until none is left, marking each in
 * `job.taken` with `who` before decoding it: read from `fd`, inflated and un-predicted straight
 * into the window's shared heights. The calling thread and the block worker take them alike,
 * so both stay busy to the end whichever is slower (a fixed half each left one waiting for the
 * other). A block that cannot be read or decoded (short read, damaged or short block) goes to
 * `failed` when given, and the thread goes on; without it, the first failure is thrown.
 * Synchronous: nothing else needs this thread while the window is read.
 * @example takeBlocks(job, openSync(job.path, "r"), TAKEN_HERE, (k) => retry.push(k));
 */
export function takeBlocks(job: BlockJob, fd: number, who: number, failed?: (k: number) => void): void {
  const words = new Uint32Array(job.heights.buffer, job.heights.byteOffset, job.heights.length);
  const { tw, th } = job;
  for (let k = Atomics.add(job.next, 0, 1); k < job.blocks.length; k = Atomics.add(job.next, 0, 1)) {
    Atomics.store(job.taken, k, who);
    const b = job.blocks[k];
    try {
      const compressed = Buffer.allocUnsafe(b.length);
      if (readSync(fd, compressed, 0, b.length, b.offset) !== b.length) throw new Error("short read");
      const bytes = inflateSync(compressed, blockChunk(b.need));
      if (bytes.byteLength < b.need) throw new Error("short block");
      const [colA, colB, rowA, rowB] = blockCellsInWindow(b.tx, b.ty, tw, th, job.win, job.sourceHeight);
      placeFloatPredicted(new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength), tw, b.tx * tw, b.ty * th, colA, colB, rowA, rowB, job.wc0, job.wr0, job.outW, words, job.heights, job.nd);
    } catch (e) {
      if (!failed) throw e;
      failed(k);
    }
  }
}
