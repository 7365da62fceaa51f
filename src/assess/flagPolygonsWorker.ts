import { parentPort, workerData } from "node:worker_threads";
import { frameFromProj4 } from "../geo/localFrame.js";
import { registerLocalEquirectangular } from "../geo/localEquirectangular.js";
import { flagPolygons, type FlagPolygonsJob } from "./flagPolygons.js";
import { codeCacheCheckpoint } from "../codeCache.js";

/**
 * Worker thread that traces the flag polygons (see flagPolygonsInBackground), with the
 * plan's frame rebuilt from its proj4 definition (the same conversion as the frame's own).
 */
const { flags, width, height, transform, frame, cellAreaM2 } = workerData as FlagPolygonsJob;
// A geographic DEM's frame is our own local equirectangular projection: known to proj4 once registered.
registerLocalEquirectangular();
const f = frameFromProj4(frame.proj4, frame.epsg, frame.name);
const polygons = flagPolygons(flags, width, height, transform, (x, y) => f.toWgs84(x, y), cellAreaM2);
codeCacheCheckpoint();
parentPort?.postMessage(polygons);
