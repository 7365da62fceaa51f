import { InputError } from "../errors.js";
import { normaliseLonDeg } from "./longitude.js";

/** A UTM zone on WGS84 (EPSG 326zz north, 327zz south). */
export interface UtmZone {
  /** 1..60 */
  zone: number;
  south: boolean;
  /** 32600 + zone (north) or 32700 + zone (south). */
  epsg: number;
  /** proj4 definition, as PROJ and the EPSG registry write it. */
  proj4: string;
  /** EPSG name, e.g. "WGS 84 / UTM zone 33N". */
  name: string;
}

/** UTM's latitude limits (the polar caps belong to UPS). */
export const UTM_NORTH_LIMIT_DEG = 84;
export const UTM_SOUTH_LIMIT_DEG = -80;

/**
 * The UTM zone a WGS84 point falls in, with the two standard exceptions of
 * the UTM grid (NGA / DMA TM 8358.2 "The Universal Grids", from memory):
 * southern Norway (56-64 N, 3-12 E) is zone 32, and Svalbard (72-84 N) uses
 * only zones 31, 33, 35 and 37 (boundaries 9, 21 and 33 E).
 * Longitude 180 belongs to zone 60. Beyond 84 N / 80 S there is no UTM:
 * an InputError says to use UPS (EPSG 32661 / 32761) instead.
 *
 * @example utmZoneOf(15, 52).epsg // 32633
 * @example utmZoneOf(5, 60).zone  // 32 (Norway exception)
 */
export function utmZoneOf(lonDeg: number, latDeg: number): UtmZone {
  if (!Number.isFinite(lonDeg)) throw new InputError("longitude", lonDeg, "a finite number of degrees");
  if (!Number.isFinite(latDeg) || latDeg < -90 || latDeg > 90) {
    throw new InputError("latitude", latDeg, "a number of degrees in [-90, 90]");
  }
  if (latDeg > UTM_NORTH_LIMIT_DEG || latDeg < UTM_SOUTH_LIMIT_DEG) {
    throw new InputError(
      "latitude",
      latDeg,
      `[${UTM_SOUTH_LIMIT_DEG}, ${UTM_NORTH_LIMIT_DEG}] for UTM`,
      `outside UTM's coverage; use Universal Polar Stereographic (EPSG ${latDeg > 0 ? 32661 : 32761}) there`,
    );
  }
  const lon = normaliseLonDeg(lonDeg);
  let zone = Math.min(60, Math.floor((lon + 180) / 6) + 1);
  if (latDeg >= 56 && latDeg < 64 && lon >= 3 && lon < 12) zone = 32;
  if (latDeg >= 72 && lon >= 0 && lon < 42) {
    if (lon < 9) zone = 31;
    else if (lon < 21) zone = 33;
    else if (lon < 33) zone = 35;
    else zone = 37;
  }
  return utmZone(zone, latDeg < 0);
}

/**
 * The UTM zone record for a given zone number and hemisphere.
 *
 * @example utmZone(33, true).proj4 // "+proj=utm +zone=33 +south +datum=WGS84 +units=m +no_defs"
 */
export function utmZone(zone: number, south: boolean): UtmZone {
  if (!Number.isInteger(zone) || zone < 1 || zone > 60) throw new InputError("utm zone", zone, "an integer 1..60");
  return {
    zone,
    south,
    epsg: (south ? 32700 : 32600) + zone,
    proj4: `+proj=utm +zone=${zone}${south ? " +south" : ""} +datum=WGS84 +units=m +no_defs`,
    name: `WGS 84 / UTM zone ${zone}${south ? "S" : "N"}`,
  };
}
