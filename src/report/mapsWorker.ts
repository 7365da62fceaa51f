import { parentPort, workerData } from "node:worker_threads";
import type { ReportMapsAndLayers } from "./serialize.js";
import type { ReportGrid, ReportRasters } from "./model.js";
import { REPORT_MAP_PX, blockFactor, downsampleGrid, downsampleRasters } from "./downsample.js";
import { demLayers } from "./demLayers.js";
import { lowerThisThreadPriority } from "../threadPriority.js";
import { codeCacheCheckpoint } from "../codeCache.js";

/**
 * Worker thread of reportMapsInBackground: reduces the DEM for the report and draws the
 * reduced DEM's hill shade and contours at once, then waits for the plan's rasters, reduces
 * them and hands everything over (the reduced arrays are transferred, not copied). The
 * factors are reportMaps's (serialize.ts), at REPORT_MAP_PX.
 */
const { dem, nice } = workerData as { dem: ReportGrid; nice?: number };
if (nice !== undefined) lowerThisThreadPriority(nice);
const small = downsampleGrid(dem, blockFactor(dem.width, dem.height, REPORT_MAP_PX));
const layers = demLayers(small);
parentPort?.once("message", ({ rasters }: { rasters: ReportRasters }) => {
  const reduced = downsampleRasters(rasters, blockFactor(rasters.width, rasters.height, REPORT_MAP_PX));
  const made: ReportMapsAndLayers = { dem: small, rasters: reduced, layers };
  const own = [small.heights, reduced.gsdCm, reduced.images, reduced.flags, reduced.inSite]
    .map((a) => a.buffer)
    .filter((b): b is ArrayBuffer => b instanceof ArrayBuffer);
  codeCacheCheckpoint();
  parentPort?.postMessage(made, [...new Set(own)]);
});
