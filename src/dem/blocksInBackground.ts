import { inBackground, NOT_IN_BACKGROUND, type Background } from "../background.js";

/**
 * A window's blocks decoded on a worker thread and the calling thread at once, each taking
 * the next block from a shared counter (blockTake.ts): a window read is most of the load stage.
 */

/** One block: where its bytes lie in the file, its tile column and row, the bytes it must decode to. */
export interface BlockRef {
  offset: number;
  length: number;
  tx: number;
  ty: number;
  need: number;
}

/** What the worker needs: the file, its blocks, the window's placing, and the window's shared heights. */
export interface BlockJob {
  path: string;
  blocks: BlockRef[];
  tw: number;
  th: number;
  win: { col0: number; col1: number; row0: number; row1: number };
  sourceHeight: number;
  wc0: number;
  wr0: number;
  outW: number;
  heights: Float32Array;
  nd: number;
  /** The next block to take (one entry, shared). */
  next: Int32Array;
  /** Per block: who took it (blockTake.ts NOT_TAKEN, TAKEN_HERE, TAKEN_BY_WORKER; shared). */
  taken: Uint8Array;
}

const workerUrl = new URL("./blockWorker.js", import.meta.url);

/**
 * Starts the worker on `job` (heights, counter and marks in shared memory): result() is true
 * when it placed every block it took, false or undefined when the caller must decode those
 * (marked TAKEN_BY_WORKER) itself.
 * @example const bg = blocksInBackground(job); takeBlocks(job, fd, TAKEN_HERE); if (!(await bg.result())) ...
 */
export function blocksInBackground(job: BlockJob): Background<boolean> {
  if (!(job.heights.buffer instanceof SharedArrayBuffer)) return NOT_IN_BACKGROUND;
  return inBackground<boolean>(workerUrl, job);
}
