import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import { workerResourceLimits } from "./workerHeap.js";

/**
 * Work started on a worker thread now and awaited later, so one core does it while this
 * thread goes on with the plan. The worker module posts one message, its result, and is
 * ended. Used for the parts of a plan that need only what is known early (the DEM, the
 * final strips, the final rasters): a share of the blocks of a large DEM window, the
 * constant-altitude comparison, the flag polygons, the report's DEM layers and reduced maps,
 * the small compressed rasters.
 */
export interface Background<T> {
  /**
   * The worker's result, or undefined when no worker ran (its compiled module is missing:
   * worker threads run from the built library, dist/) or it failed: the caller then does
   * the work on its own thread.
   */
  result: () => Promise<T | undefined>;
  /** Stops the worker (its result is not wanted); result() then gives undefined. */
  cancel: () => void;
}

/** Below this many DEM cells such work takes a few tens of milliseconds: no thread is started for it. */
export const BACKGROUND_MIN_CELLS = 250_000;

/**
 * Below this many cells a light pass (a few nanoseconds a cell: the statistics' pass, half a
 * DEM window's blocks, the flag polygons) moves less work to a second thread than the thread
 * costs to start (~40-80 ms of CPU: its own engine and modules), so it stays on one; measured
 * on the demo (2.7 M cells), whose assessment took ~0.15 s longer with them split.
 */
export const SPLIT_MIN_CELLS = 8_000_000;

/**
 * Whether such a light pass over `cells` is split onto another thread: when more than one
 * thread was asked for, whatever the size; by default from `minCells` (SPLIT_MIN_CELLS) cells.
 * @example const threads = splitAllowed(n, opts.threads) ? bandThreads(n, bands, opts.threads) : 1;
 */
export function splitAllowed(cells: number, threads?: number, minCells = SPLIT_MIN_CELLS): boolean {
  return threads === undefined ? cells >= minCells : threads > 1;
}

/**
 * Whether work over a grid of `cells` goes to a worker thread: not when one thread was
 * requested (a campaign planning sites side by side), nor on grids where it is too small to pay.
 * @example const b = backgroundAllowed(grid.width * grid.height, threads) ? inBackground(url, job) : NOT_IN_BACKGROUND;
 */
export function backgroundAllowed(cells: number, threads?: number): boolean {
  return threads !== 1 && cells >= BACKGROUND_MIN_CELLS;
}

/** No worker: result() gives undefined. */
export const NOT_IN_BACKGROUND: Background<never> = { result: async () => undefined, cancel: () => {} };

/**
 * Starts `workerUrl` with `data` (typed arrays over shared memory are read in place, the
 * rest is copied). The worker does not keep the process alive until result() is called,
 * so a plan that fails meanwhile exits without waiting for it.
 * @example const b = inBackground<Figures>(new URL("./figuresWorker.js", import.meta.url), job); ...; (await b.result()) ?? figures(job)
 */
export function inBackground<T>(workerUrl: URL, data: unknown): Background<T> {
  return started<T>(workerUrl, data) ?? NOT_IN_BACKGROUND;
}

/** Work whose worker starts on what is known now and waits for the rest: `send` posts it. */
export interface BackgroundWithInput<T> extends Background<T> {
  /** Posts the rest of the input (typed arrays over shared memory are read in place, the rest is copied). */
  send: (message: unknown) => void;
}

/** No worker: send() does nothing, result() gives undefined. */
export const NOT_IN_BACKGROUND_WITH_INPUT: BackgroundWithInput<never> = { ...NOT_IN_BACKGROUND, send: () => {} };

/**
 * inBackground for a worker that begins with `data` and then waits for one more message
 * (send). The caller sends it or cancels: a worker left waiting stays until the process ends.
 * @example const b = inBackgroundWithInput<Maps>(url, { dem }); ...; b.send({ rasters }); (await b.result()) ?? maps(dem, rasters)
 */
export function inBackgroundWithInput<T>(workerUrl: URL, data: unknown): BackgroundWithInput<T> {
  return started<T>(workerUrl, data) ?? NOT_IN_BACKGROUND_WITH_INPUT;
}

/**
 * `data` with its typed arrays moved into one SharedArrayBuffer (their values copied there
 * once), so that a message carrying it to a worker shares them instead of copying them. A
 * message copies each typed array outside shared memory into its serialised form, a buffer
 * grown by doubling that at its end holds about twice their bytes, and the worker then
 * copies them out again: for the report's input at 4 km2 (26 MB, mostly the strips'
 * profiles) some 120 MB of fresh memory, at the start of the outputs, where the run's memory
 * peaks. Plain objects and arrays on the way are copied (shallow), anything else is kept as
 * it is; arrays already in shared memory stay where they are, and an array met twice is
 * moved once. `data` itself is not modified.
 * @example inBackground(url, inSharedMemory({ input }))
 */
export function inSharedMemory<T>(data: T): T {
  const moved = new Map<ArrayBufferView, ArrayBufferView>();
  let bytes = 0;
  const plain = (v: unknown): v is Record<string, unknown> => {
    if (v === null || typeof v !== "object") return false;
    const proto = Object.getPrototypeOf(v);
    return proto === Object.prototype || proto === null;
  };
  const isTyped = (v: unknown): v is TypedArray => ArrayBuffer.isView(v) && !(v instanceof DataView) && !(v.buffer instanceof SharedArrayBuffer);
  // First the room: each array 8-byte aligned (its element size divides 8).
  const measure = (v: unknown): void => {
    if (isTyped(v)) {
      if (!moved.has(v)) {
        moved.set(v, v);
        bytes = align8(bytes) + v.byteLength;
      }
    } else if (Array.isArray(v)) v.forEach(measure);
    else if (plain(v)) for (const k in v) measure(v[k]);
  };
  measure(data);
  if (moved.size === 0) return data;
  const shared = new SharedArrayBuffer(align8(bytes));
  let at = 0;
  for (const v of moved.keys()) {
    at = align8(at);
    new Uint8Array(shared, at, v.byteLength).set(new Uint8Array(v.buffer, v.byteOffset, v.byteLength));
    const Ctor = v.constructor as new (buffer: ArrayBufferLike, byteOffset: number, length: number) => ArrayBufferView;
    moved.set(v, new Ctor(shared, at, v.byteLength / (v as TypedArray).BYTES_PER_ELEMENT));
    at += v.byteLength;
  }
  const rebuild = (v: unknown): unknown => {
    if (isTyped(v)) return moved.get(v);
    if (Array.isArray(v)) return v.map(rebuild);
    if (plain(v)) {
      const out: Record<string, unknown> = {};
      for (const k in v) out[k] = rebuild(v[k]);
      return out;
    }
    return v;
  };
  return rebuild(data) as T;
}

/** A typed array (any element type): a view that is not a DataView. */
type TypedArray = ArrayBufferView & { BYTES_PER_ELEMENT: number };

function align8(n: number): number {
  return (n + 7) & ~7;
}

/** The worker and its handle; undefined when the compiled worker module is missing. */
function started<T>(workerUrl: URL, data: unknown): BackgroundWithInput<T> | undefined {
  if (!existsSync(fileURLToPath(workerUrl))) return undefined;
  const w = new Worker(workerUrl, { workerData: data, resourceLimits: workerResourceLimits });
  w.unref();
  const made = new Promise<T | undefined>((resolve) => {
    w.once("message", (m: T) => {
      resolve(m);
      void w.terminate();
    });
    // A failed worker leaves the work to the caller's thread.
    w.once("error", () => resolve(undefined));
    w.once("exit", () => resolve(undefined));
  });
  return {
    result: () => {
      w.ref();
      return made;
    },
    cancel: () => void w.terminate(),
    send: (message: unknown) => w.postMessage(message),
  };
}
