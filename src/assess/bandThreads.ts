import { existsSync } from "node:fs";
import { availableParallelism } from "node:os";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import { workerResourceLimits } from "../workerHeap.js";

/**
 * Bands of grid rows shared between threads: the per-cell passes of the
 * assessment (the footprint sweep, coverageKernel.ts, and its statistics'
 * pass) write each cell from one band only, so threads taking whole bands
 * never write the same cell. The `auto` heading choice's candidates are taken
 * the same way, one candidate a band (layout/headingTerrain.ts). The bands go
 * to whichever thread asks next (a shared counter);
 * the main thread works too, then waits on the workers' flags (Atomics.wait
 * is allowed on Node's main thread), which keeps the callers plain
 * synchronous functions.
 */

/** Which band loop a worker runs (coverageWorker.ts maps each to its function). */
export type BandKind = "sweep" | "stats" | "gather" | "heading";

const MIN_CELLS_FOR_THREADS = 1_000_000;
const workerUrl = new URL("./coverageWorker.js", import.meta.url);

/**
 * Threads to use for a grid of `cells` in `bands` bands: the request (default the
 * machine's available parallelism, at most 4), one for grids under a million cells
 * and when the compiled worker module is not there (worker threads run only from the
 * built library, dist/, where it sits next to this one).
 * @example bandThreads(grid.width * grid.height, bands, opts.threads)
 */
export function bandThreads(cells: number, bands: number, requested?: number): number {
  let t = Math.max(1, Math.floor(requested ?? Math.min(4, availableParallelism())));
  if (cells < MIN_CELLS_FOR_THREADS || !existsSync(fileURLToPath(workerUrl))) t = 1;
  return Math.max(1, Math.min(t, bands));
}

/**
 * `a` itself when one thread reads it or it is already in shared memory, else a shared copy.
 * @example const heights = shareable(grid.heights, threads);
 */
export function shareable<T extends Float32Array | Uint8Array | Uint16Array | Int32Array>(a: T, threads: number): T {
  if (threads === 1 || a.buffer instanceof SharedArrayBuffer) return a;
  const c = new (a.constructor as new (b: SharedArrayBuffer) => T)(new SharedArrayBuffer(a.byteLength));
  c.set(a);
  return c;
}

/**
 * Band workers kept for several passes (the assessment's footprint sweep, then its
 * statistics' pass): a worker thread costs ~50 ms of CPU to start and about as much to end
 * (its engine's pages unmapped one by one, each interrupting every core that runs one of the
 * plan's threads), so one set serves both. close() ends them: a worker kept idle would hold
 * on to the last job's arrays until its own heap is collected, which an idle thread never does.
 * @example const pool = bandPool(); try { ...; runBands("sweep", input, bands, threads, sweepBands, pool); ... } finally { pool.close(); }
 */
export interface BandPool {
  readonly workers: Worker[];
  /**
   * Starts workers now, up to `count`, ahead of the first pass: a worker takes 50-200 ms to
   * start (more while other threads hold the cores), and a pass that begins before its workers
   * are up runs on this thread alone meanwhile (the demo's sweep was over before its worker was).
   */
  start: (count: number) => void;
  close: () => void;
}

/** An empty pool: runBands (or start) starts its workers when first needed. */
export function bandPool(): BandPool {
  const workers: Worker[] = [];
  return {
    workers,
    start: (count) => { while (workers.length < count) workers.push(bandWorker()); },
    close: () => { for (const w of workers.splice(0)) void w.terminate(); },
  };
}

/** A band worker (coverageWorker.ts), waiting for jobs. */
function bandWorker(): Worker {
  const w = new Worker(workerUrl, { resourceLimits: workerResourceLimits });
  // runBands waits on the flags, not on the event loop: a worker never keeps the process alive.
  w.unref();
  return w;
}

/**
 * Runs `loop` (which takes bands from the counter until none is left) on this thread and,
 * with more than one thread, the same loop (`kind`) in workers over `input`, whose arrays
 * the workers write must be in shared memory. Each thread has its slot (this one 0, the
 * workers 1 .. threads - 1), for loops that keep per-thread tallies. The workers are those of
 * `pool` (started there when missing, kept for its next pass), else started for this pass and
 * ended afterwards (see BandPool).
 * @example runBands("sweep", input, bands, threads, sweepBands);
 */
export function runBands<I>(kind: BandKind, input: I, bands: number, threads: number, loop: (input: I, next: Int32Array, bands: number, slot: number) => void, pool?: BandPool): void {
  startBands(kind, input, bands, threads, pool).join(loop);
}

/** A pass whose workers have started on its bands (startBands). */
export interface StartedBands<I> {
  /** Takes the bands left on this thread (slot 0) with `loop`, then waits for the workers; throws if one failed. */
  join: (loop: (input: I, next: Int32Array, bands: number, slot: number) => void) => void;
  /** Hands out no more bands and waits for the workers to finish the ones they took (a failure is not raised). */
  cancel: () => void;
}

/**
 * runBands without this thread's part: the workers start taking bands now, while this thread
 * does other work; `join` then takes the bands left here and waits (a pass started ahead, such
 * as the assessment's sweep while the route is made: assess.ts startAssessmentSweep).
 * @example const started = startBands("sweep", input, bands, threads, pool); ...; started.join(sweepBands);
 */
export function startBands<I>(kind: BandKind, input: I, bands: number, threads: number, pool?: BandPool): StartedBands<I> {
  const next = new Int32Array(new SharedArrayBuffer(4));
  const done = new Int32Array(new SharedArrayBuffer(4 * threads));
  const workers = pool ?? bandPool();
  workers.start(threads - 1);
  for (let t = 1; t < threads; t++) workers.workers[t - 1].postMessage({ kind, input, next, bands, done, slot: t } satisfies BandJob);
  // Dropped once joined or cancelled (undefined: settled): a cancelled pass's arrays are not kept by its handle.
  let job: I | undefined = input;
  // Called once no band is left to take (this thread took the rest, or the pass was cancelled).
  const wait = (): boolean => {
    let failed = false;
    for (let t = 1; t < threads; t++) {
      // A worker that has not begun the job took none of its bands: the job is withdrawn from
      // it (it skips the job when it comes to it) and not waited for. So a worker still
      // starting, or one that could not start at all, never holds this thread up.
      if (Atomics.compareExchange(done, t, JOB_WAITING, JOB_WITHDRAWN) === JOB_WAITING) continue;
      // A worker that dies while at work would leave us waiting: give up after 10 minutes.
      const deadline = Date.now() + 600_000;
      while (Atomics.load(done, t) === JOB_BEGUN && Date.now() < deadline) Atomics.wait(done, t, JOB_BEGUN, 1000);
      if (Atomics.load(done, t) !== JOB_FINISHED) failed = true;
    }
    if (!pool) workers.close();
    return failed;
  };
  return {
    join: (loop) => {
      if (job === undefined) throw new Error(`${kind}: pass already joined or cancelled`);
      loop(job, next, bands, 0);
      job = undefined;
      if (wait()) throw new Error(`${kind}: a worker thread failed`);
    },
    cancel: () => {
      if (job === undefined) return;
      Atomics.store(next, 0, bands);
      wait();
      job = undefined;
    },
  };
}

/**
 * A job's state in its `done` flag, one per worker slot: waiting (sent, not yet begun), begun
 * (the worker claimed it: compare-and-exchange from waiting), finished or failed (the worker's
 * flag), withdrawn (the calling thread claimed it first, once no band was left: the worker
 * skips it).
 */
export const JOB_WAITING = 0;
export const JOB_FINISHED = 1;
export const JOB_FAILED = 2;
export const JOB_BEGUN = 3;
export const JOB_WITHDRAWN = 4;

/** One pass's job for a band worker (coverageWorker.ts). */
export interface BandJob {
  kind: BandKind;
  input: unknown;
  next: Int32Array;
  bands: number;
  done: Int32Array;
  slot: number;
}
