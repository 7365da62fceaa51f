/**
 * waypoints.csv: one row per waypoint in flight order (see rows.ts for which
 * row carries a point shared by two legs). RFC 4180 layout: a header record,
 * comma separators, CRLF line breaks; no field needs quoting.
 */
import type { WaypointRow } from "./rows.js";

/** The header, exactly; a contract with users' scripts. */
export const WAYPOINT_CSV_COLUMNS = [
  "flight",
  "strip",
  "index",
  "segment",
  "longitude",
  "latitude",
  "altitude_amsl_m",
  "altitude_ellipsoid_m",
  "altitude_takeoff_m",
  "ground_amsl_m",
  "height_above_ground_m",
  "speed_m_s",
  // Added after the original twelve (the order is the contract): empty without a terrain model.
  "height_above_terrain_m",
] as const;

/** Degrees to 8 decimals (about 1 mm); heights and speeds to centimetres. */
const DEG = 8;
const M = 2;

/**
 * A height to centimetres, or an empty field where it is unknown (a transit over
 * nodata or past the DEM has no ground below): "NaN" is not a number to most CSV
 * readers, and an empty field is the usual mark of a missing value.
 */
function orEmpty(v: number): string {
  return Number.isFinite(v) ? v.toFixed(M) : "";
}

/**
 * Formats the rows as CSV text.
 *
 * @example waypointsCsv(waypointRows(flights, frame.toWgs84, heights)).split("\r\n")[0]
 *   // "flight,strip,index,segment,longitude,latitude,altitude_amsl_m,..."
 */
export function waypointsCsv(rows: readonly WaypointRow[]): string {
  const lines: string[] = [WAYPOINT_CSV_COLUMNS.join(",")];
  for (const r of rows) {
    lines.push(
      [
        r.flight,
        r.strip,
        r.index,
        r.segment,
        r.longitude.toFixed(DEG),
        r.latitude.toFixed(DEG),
        r.altitudeAmslM.toFixed(M),
        r.altitudeEllipsoidM.toFixed(M),
        r.altitudeTakeoffM.toFixed(M),
        orEmpty(r.groundAmslM),
        orEmpty(r.heightAboveGroundM),
        r.speedMps.toFixed(M),
        orEmpty(r.heightAboveTerrainM),
      ].join(","),
    );
  }
  return lines.join("\r\n") + "\r\n";
}
