import { inBackground, NOT_IN_BACKGROUND, type Background } from "../background.js";

/**
 * Some blocks of a window decoded on a worker thread while the calling thread decodes the
 * others: a window read is most of the load stage, and the floating-point predictor and
 * placing run on the thread that reads (zlib's inflate alone goes to libuv's pool).
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
}

const workerUrl = new URL("./blockWorker.js", import.meta.url);

/**
 * Starts the worker on `job` (heights in shared memory): result() is true when it
 * placed every block, false or undefined when the caller must decode them itself.
 * @example const bg = blocksInBackground(job); ...; if (!(await bg.result())) for (const b of job.blocks) ...
 */
export function blocksInBackground(job: BlockJob): Background<boolean> {
  if (!(job.heights.buffer instanceof SharedArrayBuffer)) return NOT_IN_BACKGROUND;
  return inBackground<boolean>(workerUrl, job);
}
