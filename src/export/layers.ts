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
