import { writeFile } from "node:fs/promises";
import { parentPort, workerData } from "node:worker_threads";
import type { AssessmentRasters } from "../assess/types.js";
import { assessmentGeoTiffChunks, type CogFileJob } from "./geotiffRasters.js";
import { codeCacheCheckpoint } from "../codeCache.js";

/**
 * Worker thread that writes one assessment raster's file at a path, chunk by chunk as
 * assessmentGeoTiffChunks makes them (see assessmentGeoTiffFileInBackground), as
 * writeOutputSet writes such a file on the main thread; posts true when the file is whole.
 * A failure ends the worker without the message.
 */
const { rasters, crs, name, path, window } = workerData as CogFileJob;
// A failed write is an unhandled rejection, which ends this thread with an error: its caller
// then writes the file itself.
void writeFile(path, assessmentGeoTiffChunks(rasters as AssessmentRasters, crs, name, window)).then(() => {
  codeCacheCheckpoint();
  parentPort?.postMessage(true);
});
