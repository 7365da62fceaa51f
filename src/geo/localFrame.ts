import proj4 from "proj4";
import { InputError } from "../errors.js";
import type { CrsInfo } from "../dem/grid.js";
import type { LocalFrame, NativeAffine } from "./frame.js";
import { degreeScalesM, localEquirectangularDef, registerLocalEquirectangular } from "./localEquirectangular.js";
import { normaliseLonDeg } from "./longitude.js";
import { pointScaleFactors } from "./scaleFactor.js";
import { UTM_NORTH_LIMIT_DEG, UTM_SOUTH_LIMIT_DEG, utmZoneOf } from "./utmZone.js";

export { utmZoneOf } from "./utmZone.js";

/**
 * A LocalFrame with the reason it was chosen (for the summary and report).
 * `scaleFactor` is the frame's point scale at the site centre (worst of the
 * east and north directions): frame metres per true metre on the ellipsoid.
 */
export interface SiteFrame extends LocalFrame {
  /**
   * dem: the DEM's own metric CRS; dem-metres: the DEM's own CRS with its
   * unit (feet) taken as metres; dem-scaled: the DEM's own conformal CRS divided by
   * its point scale at the site; local-eqc: a local equirectangular frame on
   * a geographic DEM's degrees (see localEquirectangular.ts). These four use
   * the DEM's cells as they are; utm and ups resample the DEM.
   */
  source: "dem" | "dem-metres" | "dem-scaled" | "local-eqc" | "utm" | "ups";
  reason: string;
  scaleFactor: number;
}

/**
 * Largest departure of the frame's point scale from 1 that we accept when
 * adopting the DEM's own CRS (0.5 %). Our engineering choice: a typical GSD
 * tolerance is 5-10 %, and a frame that mis-states distances by more than
 * half a percent would quietly eat part of it. UTM stays within about
 * 0.1 % inside its zone, national grids usually less.
 */
export const MAX_FRAME_SCALE_ERROR = 0.005;

/** UPS North / South (EPSG 32661 / 32761), as the EPSG registry defines them. */
const UPS_NORTH = "+proj=stere +lat_0=90 +lon_0=0 +k=0.994 +x_0=2000000 +y_0=2000000 +datum=WGS84 +units=m +no_defs";
const UPS_SOUTH = "+proj=stere +lat_0=-90 +lon_0=0 +k=0.994 +x_0=2000000 +y_0=2000000 +datum=WGS84 +units=m +no_defs";

type Converter = proj4.Converter;
const converters = new Map<string, Converter>();

/** One proj4 converter per definition string: building one parses the string. */
function converterFor(def: string): Converter {
  let c = converters.get(def);
  if (!c) {
    c = proj4("WGS84", def);
    converters.set(def, c);
  }
  return c;
}

/**
 * A LocalFrame from a proj4 definition (projected, metric). Longitudes
 * going out are normalised to [-180, 180].
 *
 * @example frameFromProj4("+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs", 32633, "WGS 84 / UTM zone 33N")
 */
export function frameFromProj4(def: string, epsg: number | null, name: string): LocalFrame {
  let conv: Converter;
  try {
    conv = converterFor(def);
  } catch (e) {
    throw new InputError("crs", def, "a proj4 definition the proj4 library understands", (e as Error).message);
  }
  return {
    proj4: def,
    epsg,
    name,
    fromWgs84(lon: number, lat: number): [number, number] {
      const p = conv.forward({ x: normaliseLonDeg(lon), y: lat });
      return [p.x, p.y];
    },
    toWgs84(x: number, y: number): [number, number] {
      const p = conv.inverse({ x, y });
      return [normaliseLonDeg(p.x), p.y];
    },
  };
}

/**
 * The metric working frame for a site centred at (lon, lat) in WGS84.
 * Prefers frames on which the DEM's cells stay as they are (no resampling, so
 * the ground is the DEM's own bilinear surface): the DEM's own projected CRS
 * (its unit taken as metres when it is feet), or for a geographic DEM a local
 * equirectangular frame on its degrees; each only when usable by proj4 and
 * true to scale within MAX_FRAME_SCALE_ERROR over `extent` (default: the
 * centre). Otherwise the WGS84 UTM zone of the centre, or UPS beyond UTM's
 * 84 N / 80 S, onto which the DEM is resampled.
 *
 * @example localFrameFor(15.2, 52.1).epsg              // 32633
 * @example localFrameFor(-2, 54, dem.crs).source       // "dem" for a British National Grid DEM
 */
export function localFrameFor(lonDeg: number, latDeg: number, demCrs?: CrsInfo, extent?: LonLatBox): SiteFrame {
  if (!Number.isFinite(lonDeg)) throw new InputError("site centre longitude", lonDeg, "a finite number of degrees");
  if (!Number.isFinite(latDeg) || latDeg < -90 || latDeg > 90) {
    throw new InputError("site centre latitude", latDeg, "a number of degrees in [-90, 90]");
  }
  const lon = normaliseLonDeg(lonDeg);
  const box = extent ?? { west: lon, east: lon, south: latDeg, north: latDeg };
  let whyNotDem = "";
  if (demCrs) {
    const tried = demCrs.geographic ? tryGeographicFrame(demCrs, lon, latDeg, box) : tryDemFrame(demCrs, lon, latDeg, box);
    if (typeof tried === "string") whyNotDem = tried;
    else return tried;
  }
  const polar = latDeg > UTM_NORTH_LIMIT_DEG || latDeg < UTM_SOUTH_LIMIT_DEG;
  if (polar) {
    const north = latDeg > 0;
    const frame = frameFromProj4(north ? UPS_NORTH : UPS_SOUTH, north ? 32661 : 32761, north ? "WGS 84 / UPS North (N,E)" : "WGS 84 / UPS South (N,E)");
    return withReason(frame, "ups", `site centre at latitude ${latDeg.toFixed(3)} is beyond UTM's ${north ? "84 N" : "80 S"}: Universal Polar Stereographic`, whyNotDem, lon, latDeg);
  }
  const z = utmZoneOf(lon, latDeg);
  const frame = frameFromProj4(z.proj4, z.epsg, z.name);
  return withReason(frame, "utm", `UTM zone of the site centre (${lon.toFixed(4)}, ${latDeg.toFixed(4)})`, whyNotDem, lon, latDeg);
}

/** A WGS84 longitude/latitude box, degrees (the site with its margin). */
export interface LonLatBox {
  west: number;
  south: number;
  east: number;
  north: number;
}

function withReason(frame: LocalFrame, source: SiteFrame["source"], reason: string, whyNotDem: string, lon: number, lat: number): SiteFrame {
  return {
    ...frame,
    source,
    reason: whyNotDem ? `${reason}; not the DEM's CRS because ${whyNotDem}` : reason,
    scaleFactor: worstScale(frame, lon, lat),
  };
}

/** The frame's point scale furthest from 1 (east or north) at a point; NaN if the transform fails there. */
function worstScale(frame: LocalFrame, lon: number, lat: number): number {
  // East-west scale is undefined at a pole itself; measure just off it.
  const latM = Math.max(-89.99, Math.min(89.99, lat));
  const [kE, kN] = pointScaleFactors(frame.fromWgs84, lon, latM);
  return Math.abs(kE - 1) >= Math.abs(kN - 1) ? kE : kN;
}

function tryDemFrame(crs: CrsInfo, lon: number, lat: number, box: LonLatBox): SiteFrame | string {
  const metres = crs.linearUnitM === 1;
  if (!(crs.linearUnitM > 0)) return "its linear unit is unknown";
  // PROJ and proj4 apply +x_0/+y_0 in metres and divide by the unit last, so the same
  // definition in metres gives exactly unit-metres times the DEM's coordinates.
  const def = metres ? crs.proj4 : `${crs.proj4.replace(/\s*\+(units|to_meter)=\S+/g, "")} +units=m`.replace(/\s+/g, " ").trim();
  let frame: LocalFrame;
  try {
    frame = frameFromProj4(def, metres ? crs.epsg : null, metres ? crs.name : `${crs.name}, in metres`);
  } catch {
    return "proj4 cannot use its definition";
  }
  const k = checkedScale(frame, lon, lat, box);
  if (typeof k === "string") return scaledDemFrame(crs, frame, lon, lat, box) ?? k;
  const fromNative: NativeAffine = { sx: crs.linearUnitM, sy: crs.linearUnitM, ox: 0, oy: 0 };
  const reason = metres
    ? `the DEM's own metric CRS (${crs.name}), scale ${k.toFixed(6)} at the site`
    : `the DEM's own CRS (${crs.name}) with its unit (${crs.linearUnitM} m) taken as metres, scale ${k.toFixed(6)} at the site`;
  return { ...frame, fromNative, source: metres ? "dem" : "dem-metres", reason, scaleFactor: k };
}

/**
 * A conformal projection far from true scale at the site (Web Mercator away from the
 * equator: sec(lat)) is still true to scale up to one factor k over a small site: the
 * DEM's own CRS divided by its point scale at the centre (`+to_meter=k`, since PROJ and
 * proj4 divide by the unit last) keeps the DEM's cells, rescaled, and is checked like any
 * frame over the window. Null when the scale differs by direction (not conformal) or
 * drifts too much across the window.
 */
function scaledDemFrame(crs: CrsInfo, metresFrame: LocalFrame, lon: number, lat: number, box: LonLatBox): SiteFrame | null {
  let kE: number, kN: number;
  try {
    [kE, kN] = pointScaleFactors(metresFrame.fromWgs84, lon, Math.max(-89.99, Math.min(89.99, lat)));
  } catch {
    return null;
  }
  if (!(kE > 0 && kN > 0) || Math.abs(kE / kN - 1) > MAX_FRAME_SCALE_ERROR) return null;
  const k0 = Math.sqrt(kE * kN);
  const def = `${crs.proj4.replace(/\s*\+(units|to_meter)=\S+/g, "")} +to_meter=${k0}`.replace(/\s+/g, " ").trim();
  let frame: LocalFrame;
  try {
    frame = frameFromProj4(def, null, `${crs.name}, divided by its scale ${k0.toFixed(6)} at the site`);
  } catch {
    return null;
  }
  const k = checkedScale(frame, lon, lat, box);
  if (typeof k === "string") return null;
  const sx = crs.linearUnitM / k0;
  return {
    ...frame,
    fromNative: { sx, sy: sx, ox: 0, oy: 0 },
    source: "dem-scaled",
    reason: `the DEM's own CRS (${crs.name}) divided by its point scale ${k0.toFixed(6)} at the site (no resampling), scale ${k.toFixed(6)} over the window`,
    scaleFactor: k,
  };
}

/**
 * A geographic DEM: the local equirectangular frame on its own datum, centred at the
 * site (lon/lat here are WGS84; the frame's origin is taken in the DEM's datum so that
 * the affine map to the DEM's degrees is exact).
 */
function tryGeographicFrame(crs: CrsInfo, lon: number, lat: number, box: LonLatBox): SiteFrame | string {
  if (/\+pm=/.test(crs.proj4)) return "its prime meridian is not Greenwich";
  registerLocalEquirectangular();
  const datum = crs.proj4
    .split(/\s+/)
    .filter((t) => /^\+(datum|ellps|towgs84|a|b|rf|f|R|nadgrids)=/.test(t))
    .join(" ");
  let lon0 = lon, lat0 = lat;
  try {
    const [nLon, nLat] = proj4("WGS84", crs.proj4).forward([lon, lat]);
    if (Number.isFinite(nLon) && Number.isFinite(nLat)) { lon0 = normaliseLonDeg(nLon); lat0 = nLat; }
  } catch {
    return "proj4 cannot use its definition";
  }
  // Round the origin so the definition reads cleanly; any origin gives an exact frame.
  lon0 = Math.round(lon0 * 1e6) / 1e6;
  lat0 = Math.round(lat0 * 1e6) / 1e6;
  const def = localEquirectangularDef(lon0, lat0, datum || "+datum=WGS84");
  let frame: LocalFrame;
  try {
    frame = frameFromProj4(def, null, `local equirectangular frame at ${lat0.toFixed(4)}, ${lon0.toFixed(4)} on ${crs.name}`);
  } catch {
    return "proj4 cannot use its definition";
  }
  const k = checkedScale(frame, lon, lat, box);
  if (typeof k === "string") return k;
  const [sx, sy] = degreeScalesM(def);
  const fromNative: NativeAffine = { sx, sy, ox: -sx * lon0, oy: -sy * lat0, lon0Deg: lon0 };
  return {
    ...frame,
    fromNative,
    source: "local-eqc",
    reason: `a local equirectangular frame on the geographic DEM's own degrees (no resampling), scale within ${Math.abs(k - 1) < 1e-6 ? "1e-6" : Math.abs(k - 1).toExponential(1)} of true over the window`,
    scaleFactor: k,
  };
}

/** The point scale furthest from 1 over the box's corners and centre, or why the frame is refused. */
function checkedScale(frame: LocalFrame, lon: number, lat: number, box: LonLatBox): number | string {
  let worst = 1;
  try {
    const [x, y] = frame.fromWgs84(lon, lat);
    const [lonBack, latBack] = frame.toWgs84(x, y);
    if (![x, y, lonBack, latBack].every(Number.isFinite) || Math.abs(latBack - lat) > 1e-7 || Math.abs(normaliseLonDeg(lonBack - lon)) > 1e-7) {
      return "its transform does not round-trip at the site";
    }
    const pts: [number, number][] = [[lon, lat], [box.west, box.south], [box.west, box.north], [box.east, box.south], [box.east, box.north]];
    for (const [pl, pa] of pts) {
      const k = worstScale(frame, pl, pa);
      if (!(Math.abs(k - 1) <= Math.abs(worst - 1))) worst = k;
    }
  } catch {
    return "its transform fails at the site";
  }
  if (!(Math.abs(worst - 1) <= MAX_FRAME_SCALE_ERROR)) {
    return `its scale at the site is ${worst.toFixed(4)}, more than ${MAX_FRAME_SCALE_ERROR * 100} % from true`;
  }
  return worst;
}

/**
 * Frame x/y (metres) of many points to WGS84 lon/lat (degrees, lon in
 * [-180, 180]). Our loop allocates nothing per point; proj4 itself makes a
 * small object per call (its API is per point), which is the price of using
 * the well-kept library rather than our own projection code.
 *
 * @example const { lon, lat } = toWgs84Many(frame, xs, ys)
 */
export function toWgs84Many(
  frame: LocalFrame,
  xs: ArrayLike<number>,
  ys: ArrayLike<number>,
  out?: { lon: Float64Array; lat: Float64Array },
): { lon: Float64Array; lat: Float64Array } {
  const n = checkLengths(xs, ys, out && [out.lon, out.lat]);
  const lon = out?.lon ?? new Float64Array(n);
  const lat = out?.lat ?? new Float64Array(n);
  const conv = converterFor(frame.proj4);
  const p = { x: 0, y: 0 };
  for (let i = 0; i < n; i++) {
    p.x = xs[i];
    p.y = ys[i];
    const q = conv.inverse(p);
    lon[i] = normaliseLonDeg(q.x);
    lat[i] = q.y;
  }
  return { lon, lat };
}

/**
 * WGS84 lon/lat (degrees) of many points to frame x/y (metres). Longitudes
 * may be given in any wrap (190 and -170 are the same place).
 *
 * @example const { x, y } = fromWgs84Many(frame, lons, lats)
 */
export function fromWgs84Many(
  frame: LocalFrame,
  lons: ArrayLike<number>,
  lats: ArrayLike<number>,
  out?: { x: Float64Array; y: Float64Array },
): { x: Float64Array; y: Float64Array } {
  const n = checkLengths(lons, lats, out && [out.x, out.y]);
  const x = out?.x ?? new Float64Array(n);
  const y = out?.y ?? new Float64Array(n);
  const conv = converterFor(frame.proj4);
  const p = { x: 0, y: 0 };
  for (let i = 0; i < n; i++) {
    p.x = normaliseLonDeg(lons[i]);
    p.y = lats[i];
    const q = conv.forward(p);
    x[i] = q.x;
    y[i] = q.y;
  }
  return { x, y };
}

function checkLengths(a: ArrayLike<number>, b: ArrayLike<number>, outs?: Float64Array[]): number {
  if (a.length !== b.length) throw new RangeError(`coordinate arrays differ in length (${a.length} vs ${b.length})`);
  for (const o of outs ?? []) {
    if (o.length < a.length) throw new RangeError(`output array too short (${o.length} < ${a.length})`);
  }
  return a.length;
}
