import { parentPort, workerData } from "node:worker_threads";
import type { ReportGrid } from "./model.js";
import { demLayersOfGrid } from "./demLayers.js";

/** Worker thread that draws the report's DEM layers while the plan is laid out and solved (see demLayersInBackground). */
parentPort?.postMessage(demLayersOfGrid(workerData as ReportGrid));
