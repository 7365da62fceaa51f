import { parentPort, workerData } from "node:worker_threads";
import type { AssessmentRasters } from "../assess/types.js";
import { assessmentGeoTiff, type AssessmentTiffs, type CogJob } from "./geotiffRasters.js";

/** Worker thread that encodes some of the assessment rasters' files (see assessmentGeoTiffsInBackground); the bytes are handed over. */
const { rasters, crs, names } = workerData as CogJob;
const files: Partial<AssessmentTiffs> = {};
for (const name of names) files[name] = assessmentGeoTiff(rasters as AssessmentRasters, crs, name);
parentPort?.postMessage(files, Object.values(files));
