/**
 * Runs site jobs on up to `threads` worker threads, one site per worker at a time.
 * A worker that dies (an uncaught error, running out of memory) fails its site and
 * is replaced, so the other sites go on.
 */
import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import { errorLine, planSite } from "./siteJob.js";
import type { SiteJob, WorkerMessage } from "./types.js";

/**
 * The compiled worker module beside this one (dist/campaign/siteWorker.js), found as
 * the assessment finds its coverage worker; null when running from the TypeScript
 * sources, where the sites are planned on the calling thread instead.
 * @example siteWorkerUrl()?.pathname // ".../dist/campaign/siteWorker.js"
 */
export function siteWorkerUrl(): URL | null {
  const url = new URL("./siteWorker.js", import.meta.url);
  return existsSync(fileURLToPath(url)) ? url : null;
}

/**
 * Plans every job, reporting stages and results through `onMessage`; resolves when
 * all have ended (each with exactly one "done" or "failed").
 * @example await runSiteJobs(jobs, 2, (m) => log(m));
 */
export async function runSiteJobs(
  jobs: readonly SiteJob[],
  threads: number,
  onMessage: (m: WorkerMessage) => void,
  workerUrl: URL | null = siteWorkerUrl(),
): Promise<void> {
  const queue = [...jobs];
  const n = Math.max(1, Math.min(Math.floor(threads), queue.length));
  if (!queue.length) return;
  if (!workerUrl) {
    await Promise.all(Array.from({ length: n }, () => inProcess(queue, onMessage)));
    return;
  }
  await new Promise<void>((resolve) => {
    let live = 0;
    const start = (first: SiteJob) => {
      live++;
      let current: SiteJob | null = first;
      // geotiff imports the web-worker package, which in any thread but the main one
      // destructures workerData as its own; without an object here it throws on import.
      const worker = new Worker(workerUrl, { workerData: { campaignSite: true } });
      const fail = (error: string) => {
        if (current) onMessage({ type: "failed", index: current.index, error });
        current = null;
      };
      const next = () => {
        current = queue.shift() ?? null;
        if (current) worker.postMessage(current);
        else void worker.terminate();
      };
      worker.on("message", (m: WorkerMessage) => {
        onMessage(m);
        if (m.type !== "stage") next();
      });
      worker.on("error", (e) => fail(errorLine(e)));
      worker.on("exit", (code) => {
        fail(`internal error: the worker thread stopped (exit code ${code})`);
        live--;
        const more = queue.shift();
        if (more) start(more);
        else if (live === 0) resolve();
      });
      worker.postMessage(first);
    };
    for (let i = 0; i < n; i++) start(queue.shift()!);
  });
}

async function inProcess(queue: SiteJob[], onMessage: (m: WorkerMessage) => void): Promise<void> {
  for (let job = queue.shift(); job; job = queue.shift()) {
    const index = job.index;
    try {
      const figures = await planSite(job, (stage) => onMessage({ type: "stage", index, stage }));
      onMessage({ type: "done", index, figures });
    } catch (e) {
      onMessage({ type: "failed", index, error: errorLine(e) });
    }
  }
}
