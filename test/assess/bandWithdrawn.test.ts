/**
 * A band pass whose worker never begins its job (still starting, or unable to start at all):
 * the calling thread takes every band and does not wait for it (assess/bandThreads.ts, the
 * job withdrawn from the worker). Before, it waited for the worker's flag for up to 10 minutes.
 */
import { describe, expect, it } from "vitest";
import { Worker } from "node:worker_threads";
import { runBands, startBands, type BandPool } from "../../src/assess/bandThreads.js";

/** A pool whose one worker never takes a job (a thread that ignores its messages). */
function deafPool(): BandPool {
  const w = new Worker("setTimeout(() => {}, 60_000);", { eval: true });
  w.unref();
  return { workers: [w], start: () => {}, close: () => void w.terminate() };
}

describe("a band pass whose worker never begins", () => {
  it("is done by this thread alone, every band once, without waiting for the worker", () => {
    const pool = deafPool();
    try {
      const bands = 37;
      const taken = new Int32Array(bands);
      const t0 = Date.now();
      runBands("stats", { taken }, bands, 2, (input, next, n) => {
        for (let b = Atomics.add(next, 0, 1); b < n; b = Atomics.add(next, 0, 1)) input.taken[b]++;
      }, pool);
      expect(Array.from(taken)).toEqual(new Array(bands).fill(1));
      // Well under the one-second steps of the wait for a worker at work.
      expect(Date.now() - t0).toBeLessThan(900);
    } finally {
      pool.close();
    }
  });

  it("is cancelled without waiting for the worker either", () => {
    const pool = deafPool();
    try {
      const t0 = Date.now();
      startBands("sweep", {}, 10, 2, pool).cancel();
      expect(Date.now() - t0).toBeLessThan(900);
    } finally {
      pool.close();
    }
  });
});
