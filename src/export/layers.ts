/**
 * What the map exports (GeoJSON, KML, GPX) draw, gathered once: the legs as
 * WGS84 lines with both altitude references, and the plan's other layers.
 */
import type { FlagPolygons } from "../assess/types.js";
import type { Site } from "../layout/types.js";
import type { SolvedLeg } from "../solve/types.js";
import { heightReferences, type HeightReference, type WaypointRow } from "./rows.js";

export interface PlanExportInput {
  /** Plan name, shown as the document title. */
  name: string;
  site: Site;
  /** Legs of each flight, in flight order (as given to waypointRows). */
  flights: readonly (readonly SolvedLeg[])[];
  /** waypointRows(flights, ...) of the same flights. */
  rows: readonly WaypointRow[];
  toWgs84: (x: number, y: number) => [number, number];
  heights: HeightReference;
  flags?: FlagPolygons;
  /** Take-off point and its ground height (metres AMSL). */
  takeoff: { lon: number; lat: number; groundAmslM: number };
  /** Keep-out zones on the local frame: as drawn, and grown by their buffers. */
  keepOut?: readonly KeepOutLayer[];
}

export interface KeepOutLayer {
  name: string;
  bufferM: number;
  /** Per polygon, outer ring then holes, local frame. */
  polygons: readonly (readonly (readonly [number, number])[])[][];
  buffered: readonly (readonly (readonly [number, number])[])[][];
}

/**
 * Local-frame polygons as WGS84 [lon, lat] polygons with closed rings (winding as
 * given: the GeoJSON writer rewinds to RFC 7946, KML does not mind).
 * @example wgs84Polygons([[[[0, 0], [10, 0], [10, 10]]]], frame.toWgs84)
 */
export function wgs84Polygons(polys: KeepOutLayer["polygons"], toWgs84: (x: number, y: number) => [number, number]): number[][][][] {
  return polys.map((rings) =>
    rings.map((ring) => {
      const out = ring.map(([x, y]) => toWgs84(x, y) as number[]);
      const f = out[0], l = out[out.length - 1];
      if (f[0] !== l[0] || f[1] !== l[1]) out.push([f[0], f[1]]);
      return out;
    }),
  );
}

export interface LegLine {
  flight: number;
  strip: number;
  segment: "strip" | "transit";
  /** Mean ground speed along the leg (length / time). */
  speedMps: number;
  lengthM: number;
  /** [lon, lat, AMSL, ellipsoidal] per waypoint. */
  coords: [number, number, number, number][];
}

/** The legs as WGS84 lines, in flight order. */
export function legLines(input: Pick<PlanExportInput, "flights" | "toWgs84" | "heights">): LegLine[] {
  const out: LegLine[] = [];
  input.flights.forEach((legs, fi) => {
    for (const leg of legs) {
      out.push({
        flight: fi + 1,
        strip: leg.strip,
        segment: leg.kind,
        speedMps: leg.timeS > 0 ? leg.lengthM / leg.timeS : 0,
        lengthM: leg.lengthM,
        coords: leg.waypoints.map((w) => {
          const [lon, lat] = input.toWgs84(w.x, w.y);
          const [amsl, ell] = heightReferences(w.altitudeAmslM, lon, lat, input.heights);
          return [lon, lat, amsl, ell];
        }),
      });
    }
  });
  return out;
}

/** Rounds degrees to 8 decimals (about 1 mm) and heights to 1 cm, as in waypoints.csv. */
export const roundDeg = (v: number) => Math.round(v * 1e8) / 1e8;
export const roundM = (v: number) => Math.round(v * 100) / 100;
