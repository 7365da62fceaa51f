/**
 * The worker pool: every job ends exactly once, a worker that dies fails only its own
 * site and is replaced. Stand-in workers (a
 * few lines each) take the place of the planner, so the pool is checked alone.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { runSiteJobs } from "../../src/campaign/pool.js";
import type { SiteJob, WorkerMessage } from "../../src/campaign/types.js";

const WORKER = `
import { parentPort, threadId } from "node:worker_threads";
import { appendFileSync } from "node:fs";
parentPort.on("message", (job) => {
  appendFileSync(process.env.POOL_LOG, threadId + " " + job.index + "\\n");
  parentPort.postMessage({ type: "stage", index: job.index, stage: "load" });
  if (job.name === "exits") process.exit(7);
  if (job.name === "throws") setTimeout(() => { throw new Error("boom in " + job.name); });
  else setTimeout(() => parentPort.postMessage({ type: "done", index: job.index, figures: { photos: job.index } }), 20);
});
`;

describe("the campaign's worker pool", () => {
  let dir = "";
  beforeAll(() => {
    dir = mkdtempSync(path.join(tmpdir(), "gsdplan-pool-"));
    writeFileSync(path.join(dir, "worker.mjs"), WORKER);
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it("ends every job once; a worker that exits or throws fails its site only, and the rest go on", async () => {
    const names = ["a", "exits", "b", "throws", "c", "d"];
    const jobs = names.map((name, index) => ({ index, name }) as unknown as SiteJob);
    const log = path.join(dir, "log.txt");
    process.env.POOL_LOG = log;
    const messages: WorkerMessage[] = [];
    await runSiteJobs(jobs, 2, (m) => messages.push(m), pathToFileURL(path.join(dir, "worker.mjs")));
    const ends = messages.filter((m) => m.type !== "stage");
    expect(ends.map((m) => m.index).sort()).toEqual([0, 1, 2, 3, 4, 5]);
    const byIndex = new Map(ends.map((m) => [m.index, m]));
    expect(byIndex.get(1)).toEqual({ type: "failed", index: 1, error: "internal error: the worker thread stopped (exit code 7)" });
    expect(byIndex.get(3)).toMatchObject({ type: "failed", index: 3 });
    expect((byIndex.get(3) as { error: string }).error).toMatch(/^internal error: boom in throws$/);
    for (const i of [0, 2, 4, 5]) expect(byIndex.get(i)).toMatchObject({ type: "done", index: i });
    // Each finished job reported its stage before its end (a thread that exits may lose its last message).
    for (const i of [0, 2, 4, 5]) {
      const stage = messages.findIndex((m) => m.type === "stage" && m.index === i);
      expect(stage).toBeGreaterThanOrEqual(0);
      expect(stage).toBeLessThan(messages.indexOf(byIndex.get(i)!));
    }
    // Two threads at first, and one new thread for each that died (by the thread ids each job
    // logged): three or four, since a thread started after the last job was taken logs nothing
    // (which happens depends on the scheduler: seen under load).
    const threads = new Set(readFileSync(log, "utf8").trim().split("\n").map((l) => l.split(" ")[0]));
    expect(threads.size).toBeGreaterThanOrEqual(3);
    expect(threads.size).toBeLessThanOrEqual(4);
  });
});
