import { parentPort, workerData } from "node:worker_threads";
import type { ReportInput } from "./model.js";
import type { DemLayers } from "./demLayers.js";
import { renderReport } from "./render.js";

/**
 * Worker thread that renders report.html from a (compacted) report input, so the page is
 * made on another core while the plan's rasters and report-data.json are written (see
 * reportHtmlInBackground).
 */
const { input, layers } = workerData as { input: ReportInput; layers?: DemLayers };
parentPort?.postMessage(renderReport(input, layers));
