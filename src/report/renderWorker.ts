import { parentPort, workerData } from "node:worker_threads";
import type { ReportInput } from "./model.js";
import type { DemLayers } from "./demLayers.js";
import { renderReport } from "./render.js";
import { serializeReportInputInPool } from "./serialize.js";
import { DATA_BY_WORKER, DATA_UNCLAIMED } from "./background.js";
import { codeCacheCheckpoint } from "../codeCache.js";

/**
 * Worker thread that renders report.html from a (compacted) report input, so the page is
 * made on another core while the plan's rasters are written, and then report-data.json's
 * text from the same input, unless the calling thread has claimed that first (see
 * reportFilesInBackground). It sends them as UTF-8 bytes, their memory handed over rather
 * than copied: the page as a string is two bytes a character (a few of its characters lie
 * beyond Latin-1), which a message copies whole and the writer encodes again.
 */
const { input, layers, claim } = workerData as { input: ReportInput; layers?: DemLayers; claim: Int32Array };
const encoder = new TextEncoder();
const page = encoder.encode(renderReport(input, layers));
const claimed = Atomics.compareExchange(claim, 0, DATA_UNCLAIMED, DATA_BY_WORKER) === DATA_UNCLAIMED;
// A failure here fails the worker: the calling thread then makes both files itself.
void (claimed ? serializeReportInputInPool(input).then((text) => encoder.encode(text)) : Promise.resolve(undefined)).then((data) => {
  codeCacheCheckpoint();
  parentPort?.postMessage({ page, data }, data ? [page.buffer, data.buffer] : [page.buffer]);
});
