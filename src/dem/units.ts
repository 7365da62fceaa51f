/**
 * EPSG units of measure that GeoTIFF files use for lengths and angles.
 *
 * Written by hand because epsg-index covers coordinate reference systems,
 * not units; the factors are the EPSG dataset's (unit of measure table).
 */
export interface LengthUnit {
  name: string;
  metres: number;
  /** proj4 `+units=` name where proj4 has one. */
  proj4Units?: string;
}

const LENGTH_UNITS: Record<number, LengthUnit> = {
  9001: { name: "metre", metres: 1, proj4Units: "m" },
  9002: { name: "foot", metres: 0.3048, proj4Units: "ft" },
  // US survey foot = 1200/3937 m exactly (EPSG 9003; US National Geodetic Survey definition).
  9003: { name: "US survey foot", metres: 1200 / 3937, proj4Units: "us-ft" },
  9005: { name: "Clarke's foot", metres: 0.3047972654 },
  9036: { name: "kilometre", metres: 1000, proj4Units: "km" },
};

/**
 * Metres per unit for an EPSG length-unit code, or null when unknown.
 * @example lengthUnit(9003)?.metres // 0.3048006096012192
 */
export function lengthUnit(code: number): LengthUnit | null {
  return LENGTH_UNITS[code] ?? null;
}

/**
 * Length unit from its name as GDAL or EPSG spell it ("metre", "US survey foot", "ftUS", "ft").
 * @example lengthUnitByName("US survey foot")?.metres // 1200/3937
 */
export function lengthUnitByName(name: string): LengthUnit | null {
  const n = name.trim().toLowerCase().replace(/[_-]/g, " ");
  if (["m", "metre", "meter", "metres", "meters"].includes(n)) return LENGTH_UNITS[9001];
  if (["ft", "foot", "feet", "international foot"].includes(n)) return LENGTH_UNITS[9002];
  if (["us survey foot", "us ft", "ftus", "survey foot", "us survey feet", "foot us"].includes(n)) return LENGTH_UNITS[9003];
  if (["km", "kilometre", "kilometer"].includes(n)) return LENGTH_UNITS[9036];
  return null;
}

/** Degrees per unit for EPSG angular-unit codes (9102 degree, 9101 radian, 9105 grad, 9122 degree). */
export function angularUnitDegrees(code: number | undefined): number | null {
  if (code === undefined || code === 9102 || code === 9122) return 1;
  if (code === 9101) return 180 / Math.PI;
  if (code === 9105) return 0.9;
  return null;
}
