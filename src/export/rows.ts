/**
 * The waypoint table every exporter shares: one row per distinct waypoint in
 * flight order, with all three altitude references.
 *
 * Joined legs: when a leg's last waypoint and the next leg's first are the
 * same point (within 1 cm horizontally and vertically), one row stands for
 * both, and it carries the leg that ENDS there (its segment, strip and speed).
 * When they differ in altitude only, both rows appear: the second is a
 * vertical move without photos and is labelled `transit` with speed 0, like a
 * flight's first row (the take-off point). So `segment` always names the leg
 * that ends at the row, and photos are taken on the `strip` rows' legs.
 */
import type { VerticalDatum } from "../dem/grid.js";
import type { SolvedLeg, Waypoint } from "../solve/types.js";
import { legsJoin } from "../route/waypointCount.js";

export { countRows, legsJoin } from "../route/waypointCount.js";

export interface WaypointRow {
  /** 1-based flight (battery) number. */
  flight: number;
  /** 1-based strip number; transit rows carry the strip they lead into, a flight's return leg the strip it leaves. */
  strip: number;
  /** 1-based within the strip number in this flight. */
  index: number;
  segment: "strip" | "transit";
  /** Local frame metres. */
  x: number;
  y: number;
  longitude: number;
  latitude: number;
  altitudeAmslM: number;
  altitudeEllipsoidM: number;
  /** Above the take-off point's ground. */
  altitudeTakeoffM: number;
  groundAmslM: number;
  heightAboveGroundM: number;
  /**
   * Altitude above the terrain model straight below, when a terrain model (`dtm`) is given
   * beside a surface model; NaN where the terrain is unknown or no terrain model was given
   * (then `heightAboveGroundM` is the one figure above the DEM).
   */
  heightAboveTerrainM: number;
  /** Ground speed on the leg ending here; 0 on a flight's first row and on vertical-only moves. */
  speedMps: number;
}

/** How the legs' heights relate to sea level and the ellipsoid. */
export interface HeightReference {
  /**
   * Datum of every height in the legs and of `takeoffGroundM` (the DEM's).
   * `ellipsoid`: heights are ellipsoidal and AMSL = h - N; anything else is
   * taken as orthometric (AMSL) and ellipsoidal = H + N.
   */
  datum: VerticalDatum;
  /** Geoid undulation N (metres) of the DEM's geoid at a WGS84 point, e.g. EGM96. */
  undulationM: (lon: number, lat: number) => number;
  /** Ground height at the take-off point, in `datum`; per flight (0-based index) when flights take off from different points. */
  takeoffGroundM: number | readonly number[];
  /**
   * Terrain height (in `datum`) at a local-frame point, for waypoints the solver did not
   * place (take-off points, resume points); without it those rows leave the terrain figure
   * unknown. Waypoints carrying `terrainAmslM` use that.
   */
  terrainAt?: (x: number, y: number) => number;
}

/**
 * A height in the legs' datum as [AMSL, ellipsoidal] at a WGS84 point.
 *
 * @example heightReferences(500, 12.5, 47.1, { datum: "egm96", undulationM: () => 48.9, takeoffGroundM: 0 }) // [500, 548.9]
 */
export function heightReferences(h: number, lon: number, lat: number, heights: HeightReference): [number, number] {
  const n = heights.undulationM(lon, lat);
  return heights.datum === "ellipsoid" ? [h - n, h] : [h, h + n];
}

/**
 * Flattens flights of legs into waypoint rows, in flight order.
 *
 * @example
 *   const rows = waypointRows(flights.map((f) => f.legs), frame.toWgs84,
 *     { datum: "egm96", undulationM: (lon, lat) => meanSeaLevel(lat, lon), takeoffGroundM: 412.3 });
 */
export function waypointRows(
  flights: readonly (readonly SolvedLeg[])[],
  toWgs84: (x: number, y: number) => [number, number],
  heights: HeightReference,
): WaypointRow[] {
  const rows: WaypointRow[] = [];
  flights.forEach((legs, fi) => {
    const takeoffGround = typeof heights.takeoffGroundM === "number" ? heights.takeoffGroundM : heights.takeoffGroundM[fi];
    let strip = -1;
    let index = 0;
    const push = (leg: SolvedLeg, w: Waypoint, segment: "strip" | "transit", speedMps: number) => {
      if (leg.strip !== strip) {
        strip = leg.strip;
        index = 0;
      }
      index += 1;
      const [lon, lat] = toWgs84(w.x, w.y);
      const [altitudeAmslM, altitudeEllipsoidM] = heightReferences(w.altitudeAmslM, lon, lat, heights);
      rows.push({
        flight: fi + 1,
        strip: leg.strip,
        index,
        segment,
        x: w.x,
        y: w.y,
        longitude: lon,
        latitude: lat,
        altitudeAmslM,
        altitudeEllipsoidM,
        altitudeTakeoffM: w.altitudeAmslM - takeoffGround,
        groundAmslM: heightReferences(w.groundAmslM, lon, lat, heights)[0],
        heightAboveGroundM: w.heightAboveGroundM,
        heightAboveTerrainM: w.altitudeAmslM - (w.terrainAmslM ?? heights.terrainAt?.(w.x, w.y) ?? NaN),
        // To cm/s, rounded down: the speed caps the climb and descent rates (gradient x speed),
        // and every exporter and the check then read the same figure.
        speedMps: Math.floor(speedMps * 100 + 1e-9) / 100,
      });
    };
    legs.forEach((leg, li) => {
      const joined = li > 0 && legsJoin(legs[li - 1], leg);
      leg.waypoints.forEach((w, wi) => {
        if (wi === 0) {
          if (!joined) push(leg, w, "transit", 0);
        } else push(leg, w, leg.kind, w.speedMps);
      });
    });
  });
  return rows;
}
