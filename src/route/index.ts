/**
 * The route stage: keep-out zones grown by their buffers, unknown ground (DEM
 * nodata) as obstacles, point and segment tests against them, and shortest
 * transits around them. Pure geometry in the local frame (metres, x east, y north).
 */
export type { ArcOptions, BufferedZone, KeepOutZone } from "./types.js";
export { bufferZone, bufferZones } from "./obstacles.js";
export { indexObstacles, insideIntervals, pointInsideAny, segmentEntersAny, segmentTouchesAny, type ObstacleIndex, type ObstacleOptions } from "./inside.js";
export { makeRouter, type Router } from "./shortestPath.js";
export { unknownGround, type UnknownGround, type UnknownGroundOptions } from "./fromMask.js";
