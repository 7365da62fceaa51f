import type { GeoTransform } from "../dem/grid.js";
import type { XY } from "../layout/types.js";
import { makeDetour, type Detour } from "./detour.js";
import { unknownGround } from "./fromMask.js";
import { bufferZones } from "./obstacles.js";
import type { BufferedZone } from "./types.js";

/**
 * Unknown ground (DEM nodata) as obstacles, keeping a clearance disc off it.
 *
 * The unknown polygons (nodata pockets, and the frame with the known ground cut
 * out) are buffered by `clearM` as keep-out zones, and the known ground is the
 * router's bounds. Buffering the unknown rather than shrinking the bounds: one
 * operation (bufferZone) shrinks every edge of the known ground, outer rings and
 * pockets alike, and errs outwards only; the bounds then only stop a route from
 * leaving the DEM window round the outside of the buffered frame.
 */
export interface UnknownObstacles {
  zones: BufferedZone[];
  /** The known ground (local frame): a flight stays inside it. */
  bounds: XY[][][];
  /** Unknown ground polygons before buffering (local frame). */
  unknown: XY[][][];
}

/**
 * The unknown ground of a nodata mask (1 = data) as buffered obstacles, or null
 * when the mask has no unknown ground at all.
 * @example unknownObstacles(dataMask(grid.heights), grid.width, grid.height, grid.transform, 18.8)?.zones.length
 */
export function unknownObstacles(mask: Uint8Array, width: number, height: number, transform: GeoTransform, clearM: number): UnknownObstacles | null {
  const g = unknownGround(mask, width, height, transform);
  if (g.unknown.length === 0) return null;
  const zones = bufferZones(g.unknown.map((rings, i) => ({ name: `unknown ground ${i + 1}`, rings, bufferM: clearM })));
  return { zones, bounds: g.known, unknown: g.unknown };
}

/** A detour planner around the unknown ground alone (see makeDetour). */
export interface AroundUnknown extends Detour {
  /** Unknown ground polygons before buffering (local frame). */
  unknown: XY[][][];
}

/**
 * A router around the unknown ground of a nodata mask (1 = data), or null when
 * the mask has no unknown ground at all.
 * @example
 * const around = aroundUnknownGround(dataMask(grid.heights), grid.width, grid.height, grid.transform, 18.8);
 * around?.route([0, 0], [200, 0]) // null, or [[0, 0], ..., [200, 0]]
 */
export function aroundUnknownGround(mask: Uint8Array, width: number, height: number, transform: GeoTransform, clearM: number): AroundUnknown | null {
  const u = unknownObstacles(mask, width, height, transform, clearM);
  return u ? { ...makeDetour(u.zones, u.bounds), unknown: u.unknown } : null;
}
