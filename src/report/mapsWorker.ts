import { parentPort, workerData } from "node:worker_threads";
import { reportMaps, type ReportMaps } from "./serialize.js";

/**
 * Worker thread that reduces the DEM and the plan's rasters for the report while the plan's
 * statistics are made (see reportMapsInBackground); the reduced arrays are handed over.
 */
const { dem, rasters } = workerData as ReportMaps;
const maps = reportMaps(dem, rasters);
const own = [maps.dem.heights, maps.rasters.gsdCm, maps.rasters.images, maps.rasters.flags, maps.rasters.inSite]
  .map((a) => a.buffer)
  .filter((b): b is ArrayBuffer => b instanceof ArrayBuffer);
parentPort?.postMessage(maps, [...new Set(own)]);
