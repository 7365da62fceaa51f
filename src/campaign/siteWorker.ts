/**
 * Worker thread of `gsdplan campaign`: plans the sites the runner sends, one at a
 * time, and posts each stage as it starts (the progress display), then "done" with
 * the site's figures or "failed" with its one-line error.
 */
import { parentPort } from "node:worker_threads";
import { errorLine, planSite } from "./siteJob.js";
import type { SiteJob, WorkerMessage } from "./types.js";

const port = parentPort;
if (!port) throw new Error("siteWorker.js runs as a worker thread of gsdplan campaign");
const post = (m: WorkerMessage) => port.postMessage(m);
port.on("message", async (job: SiteJob) => {
  try {
    const figures = await planSite(job, (stage) => post({ type: "stage", index: job.index, stage }));
    post({ type: "done", index: job.index, figures });
  } catch (e) {
    post({ type: "failed", index: job.index, error: errorLine(e) });
  }
});
