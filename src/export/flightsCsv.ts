/**
 * flights.csv: one row per flight (one battery each), in flight order. RFC 4180
 * layout as waypoints.csv: a header record, comma separators, CRLF line breaks.
 */

/** The header, exactly; a contract with users' scripts. */
export const FLIGHT_CSV_COLUMNS = [
  "flight",
  "block",
  "takeoff_longitude",
  "takeoff_latitude",
  "takeoff_ground_amsl_m",
  "waypoints",
  "photos",
  "length_m",
  "duration_s",
  "max_range_m",
  "resumes_strip",
] as const;

/** One flight as the table holds it. */
export interface FlightRow {
  flight: number;
  block: number;
  takeoffLongitude: number;
  takeoffLatitude: number;
  takeoffGroundAmslM: number;
  waypoints: number;
  photos: number;
  lengthM: number;
  durationS: number;
  /** Farthest horizontal distance of the flight's path from its take-off point, metres. */
  maxRangeM: number;
  /** The strip this flight resumes, or null. */
  resumesStrip: number | null;
}

/**
 * @example flightsCsv([{ flight: 1, block: 1, ... }]).split("\r\n")[0] // "flight,block,takeoff_longitude,..."
 */
export function flightsCsv(rows: readonly FlightRow[]): string {
  const lines: string[] = [FLIGHT_CSV_COLUMNS.join(",")];
  for (const r of rows) {
    lines.push(
      [
        r.flight,
        r.block,
        r.takeoffLongitude.toFixed(8),
        r.takeoffLatitude.toFixed(8),
        r.takeoffGroundAmslM.toFixed(2),
        r.waypoints,
        r.photos,
        r.lengthM.toFixed(1),
        r.durationS.toFixed(1),
        r.maxRangeM.toFixed(1),
        r.resumesStrip ?? "",
      ].join(","),
    );
  }
  return lines.join("\r\n") + "\r\n";
}
