import { parentPort, workerData } from "node:worker_threads";
import { reportMaps, type ReportMaps, type ReportMapsAndLayers } from "./serialize.js";
import { demLayers } from "./demLayers.js";

/**
 * Worker thread that reduces the DEM and the plan's rasters for the report, and draws the
 * reduced DEM's hill shade and contours, while the plan's statistics are made (see
 * reportMapsInBackground); the reduced arrays are handed over.
 */
const { dem, rasters } = workerData as ReportMaps;
const maps = reportMaps(dem, rasters);
const made: ReportMapsAndLayers = { ...maps, layers: demLayers(maps.dem) };
const own = [maps.dem.heights, maps.rasters.gsdCm, maps.rasters.images, maps.rasters.flags, maps.rasters.inSite]
  .map((a) => a.buffer)
  .filter((b): b is ArrayBuffer => b instanceof ArrayBuffer);
parentPort?.postMessage(made, [...new Set(own)]);
