import { closeSync, openSync, writeSync } from "node:fs";
import { parentPort, workerData } from "node:worker_threads";
import type { AssessmentRasters } from "../assess/types.js";
import { assessmentGeoTiffChunks, type CogFileJob } from "./geotiffRasters.js";

/**
 * Worker thread that writes one assessment raster's file at a path, chunk by chunk as
 * assessmentGeoTiffChunks makes them (see assessmentGeoTiffFileInBackground); posts true
 * when the file is whole. A failure ends the worker without the message.
 */
const { rasters, crs, name, path } = workerData as CogFileJob;
const fd = openSync(path, "w");
try {
  for (const chunk of assessmentGeoTiffChunks(rasters as AssessmentRasters, crs, name)) {
    for (let at = 0; at < chunk.length; ) at += writeSync(fd, chunk, at);
  }
} finally {
  closeSync(fd);
}
parentPort?.postMessage(true);
