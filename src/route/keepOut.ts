import { intersect } from "@turf/intersect";
import type { MultiPolygon, Polygon } from "geojson";
import { InputError } from "../errors.js";
import type { XY } from "../layout/types.js";
import { indexObstacles, insideIntervals, pointInsideAny, type ObstacleIndex } from "./inside.js";
import { bufferZone } from "./obstacles.js";
import { signedArea } from "./rings.js";
import type { BufferedZone, KeepOutZoneReport, LocalKeepOut } from "./types.js";

/** A zone as the file gave it, in WGS84 (see zoneFile.ts). */
export interface LonLatKeepOut {
  name: string;
  source: string;
  polygons: number[][][][];
  bufferM?: number;
}

/**
 * Zones onto the local frame, each with its own buffer or the plan's default.
 * Vertices are projected one by one: sides stay straight in the local frame,
 * which departs from the file's straight sides (geodesics or rhumb lines, as a
 * viewer draws them) by well under a centimetre over the few hundred metres a
 * zone spans (the frame is true to scale within 0.5 % over the window).
 * @example localKeepOuts(parsed, frame.fromWgs84, 10)[0].bufferM // 10 unless the file set one
 */
export function localKeepOuts(zones: readonly LonLatKeepOut[], fromWgs84: (lon: number, lat: number) => XY, defaultBufferM: number): LocalKeepOut[] {
  return zones.map((z) => ({
    name: z.name,
    source: z.source,
    bufferM: z.bufferM ?? defaultBufferM,
    polygons: z.polygons.map((poly) => poly.map((ring) => ring.map(([lon, lat]) => fromWgs84(lon, lat)))),
  }));
}

/** Zones grown by their buffers, one BufferedZone per zone (its polygons' buffers together). */
export function bufferKeepOuts(zones: readonly LocalKeepOut[]): BufferedZone[] {
  return zones.map((z) => {
    const parts = z.polygons.map((rings) => bufferZone({ name: z.name, rings, bufferM: z.bufferM }));
    return { name: z.name, bufferM: z.bufferM, deviationM: Math.max(0, ...parts.map((p) => p.deviationM)), polygons: parts.flatMap((p) => p.polygons) };
  });
}

/** The user's keep-out zones, buffered and indexed for the layout and the checks below. */
export interface KeepOutSet {
  zones: LocalKeepOut[];
  buffered: BufferedZone[];
  index: ObstacleIndex;
  /** Per zone, its own index (to name the zone a point lies in). */
  each: ObstacleIndex[];
}

/**
 * @example const set = keepOutSet(localKeepOuts(parsed, frame.fromWgs84, 0)); set.buffered.length
 */
export function keepOutSet(zones: LocalKeepOut[]): KeepOutSet {
  const buffered = bufferKeepOuts(zones);
  return { zones, buffered, index: indexObstacles(buffered), each: buffered.map((b) => indexObstacles([b])) };
}

/**
 * The stretches of the segment from-to inside a zone or its buffer, in metres
 * from `from` (the layout cuts strips there).
 * @example keepOutStretches(set, [0, 0], [100, 0]) // [[40, 60]] for a zone over x 40..60
 */
export function keepOutStretches(set: KeepOutSet, from: XY, to: XY): [number, number][] {
  const len = Math.hypot(to[0] - from[0], to[1] - from[1]);
  return insideIntervals(set.index, from, to).map(([t0, t1]) => [t0 * len, t1 * len]);
}

/** Names of the zones whose buffered outline holds p (empty: none). */
export function zonesHolding(set: KeepOutSet, p: XY): string[] {
  return set.each.flatMap((ix, i) => (pointInsideAny(ix, p) ? [set.buffered[i].name] : []));
}

/**
 * Refuses a take-off point inside a zone or its buffer (one line, exit 2).
 * @example assertTakeoffOutside(set, [10, 10], [12.5, 47.1])
 */
export function assertTakeoffOutside(set: KeepOutSet, takeoff: XY, given: unknown): void {
  const names = zonesHolding(set, takeoff);
  if (names.length) {
    throw new InputError("takeoff", given, "a point outside every keep-out zone and its buffer", `inside keep-out zone ${names.map((n) => JSON.stringify(n)).join(", ")}`);
  }
}

/**
 * Each zone's report: its outlines and the site area it takes (site ∩ buffered zone).
 * The intersection is planar on the local frame (turf's intersect is polyclip-ts,
 * a planar Martinez-Rueda clipper); the area is the shoelace sum of its rings.
 * @example zoneReports(set, site.local, site.areaM2)[0].siteRemovedPct
 */
export function zoneReports(set: KeepOutSet, site: Polygon | MultiPolygon, siteAreaM2: number): KeepOutZoneReport[] {
  return set.zones.map((z, i) => {
    const b = set.buffered[i];
    const removed = b.polygons.length ? intersectionAreaM2(site, b.polygons) : 0;
    return {
      name: z.name,
      source: z.source,
      bufferM: z.bufferM,
      polygons: z.polygons,
      buffered: b.polygons,
      siteRemovedM2: removed,
      siteRemovedPct: siteAreaM2 > 0 ? (100 * removed) / siteAreaM2 : 0,
    };
  });
}

function intersectionAreaM2(site: Polygon | MultiPolygon, polygons: XY[][][]): number {
  const zone: MultiPolygon = { type: "MultiPolygon", coordinates: polygons.map((rings) => rings.map(closed)) };
  const hit = intersect({ type: "FeatureCollection", features: [{ type: "Feature", properties: {}, geometry: site }, { type: "Feature", properties: {}, geometry: zone }] });
  if (!hit) return 0;
  const polys = hit.geometry.type === "Polygon" ? [hit.geometry.coordinates] : hit.geometry.coordinates;
  let area = 0;
  for (const rings of polys) rings.forEach((r, k) => (area += (k === 0 ? 1 : -1) * Math.abs(signedArea(r.slice(0, -1) as XY[]))));
  return area;
}

function closed(ring: XY[]): XY[] {
  const a = ring[0], b = ring[ring.length - 1];
  return a[0] === b[0] && a[1] === b[1] ? ring : [...ring, a];
}
