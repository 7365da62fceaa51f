/**
 * Checks of single waypoints and of whole flights: the list's own ground and
 * height-above-ground figures against the DEM, the take-off point, and the
 * climb and descent rates of each leg.
 */
import { metresPerDegree } from "../dem/cellsize.js";
import type { FlightPath } from "./path.js";
import { knownGroundAtIndex, type Surface } from "./surface.js";

/** The list's ground and height above ground may differ from the DEM by this much (metres). */
export const GROUND_TOLERANCE_M = 0.05;
/**
 * Rates may exceed the aircraft's by this share (0.1 %), room for the arithmetic of lengths
 * and rates; not for rounding: the list's rounded speeds and altitudes are what is flown.
 */
export const RATE_TOLERANCE = 1e-3;

/** A leg's height change as waypoints.csv knows it: both ends rounded to centimetres. */
export const ALTITUDE_PRECISION_M = 0.01;
/** The take-off point must be met within this horizontal distance (metres). */
export const TAKEOFF_TOLERANCE_M = 1;

export interface GroundMismatch {
  row: number;
  demGroundM: number;
  /** The list's ground in the DEM's datum (NaN when empty). */
  listGroundM: number;
  demAglM: number;
  listAglM: number;
  sizeM: number;
}

/**
 * Ground and height above ground of each row against the DEM's bilinear
 * ground at the row. For an ellipsoidal DEM the list's ground_amsl_m is taken
 * back to the ellipsoid with the row's own undulation (altitude_ellipsoid_m -
 * altitude_amsl_m), as the exporter wrote it.
 * @example groundMismatches(path, surface, path.grid.verticalDatum === "ellipsoid")
 */
export function groundMismatches(path: FlightPath, s: Surface, ellipsoidal: boolean): GroundMismatch[] {
  const out: GroundMismatch[] = [];
  for (let i = 0; i < path.n; i++) {
    const row = path.rows[i];
    const g = knownGroundAtIndex(s, path.c[i], path.r[i]);
    if (g !== g) continue; // unknown ground: the nodata check reports it
    const undulation = row.altitudeEllipsoidM - row.altitudeAmslM;
    const listGround = ellipsoidal ? row.groundAmslM + undulation : row.groundAmslM;
    const agl = path.z[i] - g;
    const dG = Math.abs(listGround - g);
    const dA = Math.abs(row.heightAboveGroundM - agl);
    const size = Math.max(dG === dG ? dG : 0, dA === dA ? dA : 0);
    if (size > GROUND_TOLERANCE_M) out.push({ row: i, demGroundM: g, listGroundM: listGround, demAglM: agl, listAglM: row.heightAboveGroundM, sizeM: size });
  }
  return out;
}

export interface RateBreach {
  leg: number;
  rateMps: number;
  limitMps: number;
  climb: boolean;
}

/**
 * Vertical rate of each leg with a horizontal length and a speed: dz / (length /
 * speed), the speed being the row that ends the leg (rows.ts: a row carries the
 * leg that ends there). Vertical-only moves (speed 0) have no rate to check. The
 * rate is the one the list makes the aircraft fly (its rounded figures are what
 * an autopilot is given); a breach needs it above the limit by RATE_TOLERANCE.
 * @example rateBreaches(path, 3, 2)
 */
export function rateBreaches(path: FlightPath, maxClimbMps: number, maxDescentMps: number): RateBreach[] {
  const out: RateBreach[] = [];
  for (let i = 0; i + 1 < path.n; i++) {
    if (!path.isLeg[i]) continue;
    const speed = path.rows[i + 1].speedMps;
    const len = path.lengthM[i];
    if (!(len > 0 && speed > 0)) continue;
    const rate = (path.z[i + 1] - path.z[i]) / (len / speed);
    // The list carries altitudes to centimetres, so a leg's height change is known to
    // +-1 cm: that much of rate (1 cm over the leg's flying time) is the list's precision.
    const precision = ALTITUDE_PRECISION_M / (len / speed);
    if (rate > maxClimbMps * (1 + RATE_TOLERANCE) + precision) out.push({ leg: i, rateMps: rate, limitMps: maxClimbMps, climb: true });
    else if (-rate > maxDescentMps * (1 + RATE_TOLERANCE) + precision) out.push({ leg: i, rateMps: -rate, limitMps: maxDescentMps, climb: false });
  }
  return out;
}

export interface FlightSpan {
  flight: number;
  first: number;
  last: number;
}

/**
 * The first and last row of each flight.
 * @example flightSpans(path)[0] // { flight: 1, first: 0, last: 13 }
 */
export function flightSpans(path: FlightPath): FlightSpan[] {
  const spans: FlightSpan[] = [];
  for (let a = 0; a < path.n; ) {
    let b = a;
    while (b + 1 < path.n && path.rows[b + 1].flight === path.rows[a].flight) b++;
    spans.push({ flight: path.rows[a].flight, first: a, last: b });
    a = b + 1;
  }
  return spans;
}

/**
 * Horizontal distance in metres between two WGS84 points a few metres apart
 * (local equirectangular on the ellipsoid: exact enough at the 1 m tolerance).
 * @example shortDistanceM(7.96, 46.5, 7.96001, 46.5) // about 0.77
 */
export function shortDistanceM(lon1: number, lat1: number, lon2: number, lat2: number): number {
  const [lonM, latM] = metresPerDegree(0.5 * (lat1 + lat2));
  let dLon = lon2 - lon1;
  if (dLon > 180) dLon -= 360;
  if (dLon < -180) dLon += 360;
  return Math.hypot(dLon * lonM, (lat2 - lat1) * latM);
}
