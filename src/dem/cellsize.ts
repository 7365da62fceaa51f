/** WGS84 ellipsoid (NIMA TR8350.2): semi-major axis and flattening. */
export const WGS84_A_M = 6378137;
export const WGS84_F = 1 / 298.257223563;
const E2 = WGS84_F * (2 - WGS84_F);

/**
 * Radii of curvature of the WGS84 ellipsoid at a latitude: meridian M and prime
 * vertical N (Snyder, "Map Projections: A Working Manual", USGS PP 1395, 1987,
 * eqs. 4-18 and 4-20, from memory): M = a(1-e^2)/(1-e^2 sin^2 phi)^1.5,
 * N = a/sqrt(1-e^2 sin^2 phi).
 * @example radiiOfCurvatureM(0) // [6335439.327, 6378137]
 */
export function radiiOfCurvatureM(latDeg: number): [meridianM: number, primeVerticalM: number] {
  const s = Math.sin((latDeg * Math.PI) / 180);
  const w = 1 - E2 * s * s;
  return [(WGS84_A_M * (1 - E2)) / (w * Math.sqrt(w)), WGS84_A_M / Math.sqrt(w)];
}

/**
 * Metres per degree of longitude and of latitude at a latitude (WGS84).
 * @example metresPerDegree(45)[1] // about 111132
 */
export function metresPerDegree(latDeg: number): [lonM: number, latM: number] {
  const [m, n] = radiiOfCurvatureM(latDeg);
  const rad = Math.PI / 180;
  return [n * Math.cos(latDeg * rad) * rad, m * rad];
}

/**
 * Cell size in metres [x, y] of a grid with cell size dx, |dy| in CRS units:
 * projected CRSs scale by metres per unit; geographic ones use the ground
 * distance of a degree at `centreLatDeg`.
 * @example cellSizeMetres(1 / 3600, -1 / 3600, true, NaN, 46.5) // about [21.3, 30.9]
 */
export function cellSizeMetres(dx: number, dy: number, geographic: boolean, linearUnitM: number, centreLatDeg: number): [number, number] {
  if (!geographic) return [Math.abs(dx) * linearUnitM, Math.abs(dy) * linearUnitM];
  const [lonM, latM] = metresPerDegree(centreLatDeg);
  return [Math.abs(dx) * lonM, Math.abs(dy) * latM];
}
