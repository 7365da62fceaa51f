/**
 * Point scale of a projected frame: frame metres per true metre on the
 * WGS84 ellipsoid, measured east and north from one point. A working frame
 * is only "metric" for our purpose if this stays close to 1 over the site;
 * Web Mercator, for one, is metric in name but 2x at 60 degrees latitude.
 */

const WGS84_A = 6378137;
const WGS84_F = 1 / 298.257223563;
const WGS84_E2 = WGS84_F * (2 - WGS84_F);
const DEG = Math.PI / 180;

/**
 * Meridional radius M and prime-vertical radius N of the WGS84 ellipsoid at a
 * latitude (any geodesy text, e.g. Torge & Mueller, Geodesy, from memory):
 * M = a(1-e^2)/(1-e^2 sin^2 phi)^1.5, N = a/(1-e^2 sin^2 phi)^0.5.
 *
 * @example ellipsoidRadiiM(0) // [6335439.327..., 6378137]
 */
export function ellipsoidRadiiM(latDeg: number): [number, number] {
  const s = Math.sin(latDeg * DEG);
  const w = 1 - WGS84_E2 * s * s;
  return [(WGS84_A * (1 - WGS84_E2)) / (w * Math.sqrt(w)), WGS84_A / Math.sqrt(w)];
}

/**
 * Scale of a WGS84 -> frame transform at (lon, lat), east-west and
 * north-south: frame distance over ellipsoidal distance for a small step
 * (1e-5 degrees, about a metre, small enough that the ellipsoid arc equals
 * M dphi or N cos(phi) dlambda to better than 1e-9). Conformal projections
 * give equal values; UTM gives 0.9996 on its central meridian.
 *
 * @example pointScaleFactors(utmFromWgs84, 15, 52) // [0.9996..., 0.9996...]
 */
export function pointScaleFactors(
  fromWgs84: (lon: number, lat: number) => [number, number],
  lonDeg: number,
  latDeg: number,
): [number, number] {
  const step = 1e-5;
  const [m, n] = ellipsoidRadiiM(latDeg);
  const [x0, y0] = fromWgs84(lonDeg - step / 2, latDeg);
  const [x1, y1] = fromWgs84(lonDeg + step / 2, latDeg);
  const [x2, y2] = fromWgs84(lonDeg, latDeg - step / 2);
  const [x3, y3] = fromWgs84(lonDeg, latDeg + step / 2);
  const kEast = Math.hypot(x1 - x0, y1 - y0) / (n * Math.cos(latDeg * DEG) * step * DEG);
  const kNorth = Math.hypot(x3 - x2, y3 - y2) / (m * step * DEG);
  return [kEast, kNorth];
}
