import { parentPort, workerData } from "node:worker_threads";
import type { ReportInput } from "./model.js";
import { renderReport } from "./render.js";

/**
 * Worker thread that renders report.html from a (compacted) report input, so the page is
 * made on another core while the plan's rasters and report-data.json are written (see
 * reportHtmlInBackground).
 */
parentPort?.postMessage(renderReport(workerData as ReportInput));
