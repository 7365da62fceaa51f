/**
 * Longitude bookkeeping for sites near the antimeridian: normalise to
 * [-180, 180] and find the centre of a set of points without averaging
 * 179.9 and -179.9 into 0.
 */

/**
 * Longitude wrapped into [-180, 180]. Exactly +180 stays +180 (it is a valid
 * RFC 7946 longitude); anything beyond wraps round.
 *
 * @example normaliseLonDeg(190) // -170
 */
export function normaliseLonDeg(lonDeg: number): number {
  if (lonDeg >= -180 && lonDeg <= 180) return lonDeg;
  const wrapped = ((((lonDeg + 180) % 360) + 360) % 360) - 180;
  // -180 from a positive overshoot (540, 900...) reads better as +180.
  return wrapped === -180 && lonDeg > 0 ? 180 : wrapped;
}

/**
 * Centre of the bounding box of a set of WGS84 points, taking the narrower
 * of the two ways round the globe: a site spanning 179.9 E to 179.9 W is
 * centred on 180, not on 0. Longitudes are unwrapped relative to the
 * first point, so this holds for any site narrower than 180 degrees.
 *
 * @example lonLatCentre([179.9, -179.9], [-17, -17.2]) // [180, -17.1] (or -180)
 */
export function lonLatCentre(lons: ArrayLike<number>, lats: ArrayLike<number>): [number, number] {
  const n = lons.length;
  if (n === 0 || lats.length !== n) throw new RangeError("lonLatCentre: need equally many (>= 1) longitudes and latitudes");
  const ref = normaliseLonDeg(lons[0]);
  let west = ref;
  let east = ref;
  let south = lats[0];
  let north = lats[0];
  for (let i = 1; i < n; i++) {
    let d = normaliseLonDeg(lons[i]) - ref;
    if (d > 180) d -= 360;
    else if (d < -180) d += 360;
    const lon = ref + d;
    if (lon < west) west = lon;
    if (lon > east) east = lon;
    if (lats[i] < south) south = lats[i];
    if (lats[i] > north) north = lats[i];
  }
  return [normaliseLonDeg((west + east) / 2), (south + north) / 2];
}
