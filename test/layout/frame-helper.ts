/**
 * A tiny LocalFrame for layout tests, built directly on proj4 so the tests do
 * not depend on the project's own frame code. Also converts local rings to
 * WGS84 so sites can be written in metres and read back through readSite.
 */
import proj4 from "proj4";
import type { LocalFrame } from "../../src/geo/frame.js";

export function projFrame(def: string, name = def): LocalFrame {
  const tr = proj4("EPSG:4326", def);
  return {
    proj4: def,
    epsg: null,
    name,
    fromWgs84: (lon, lat) => tr.forward([lon, lat]) as [number, number],
    toWgs84: (x, y) => tr.inverse([x, y]) as [number, number],
  };
}

/** UTM zone 33 north (central meridian 15 E). */
export const UTM33 = projFrame("+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs", "UTM 33N");

/** Easting/northing of lon 15 E, lat 47 N in UTM 33: test sites sit near it, on the central meridian. */
export const [E0, N0] = UTM33.fromWgs84(15, 47);

/** A local ring (metres, offsets from E0/N0) as WGS84 positions. */
export function lonLatRing(offsets: number[][], frame: LocalFrame = UTM33, e0 = E0, n0 = N0): number[][] {
  return offsets.map(([dx, dy]) => frame.toWgs84(e0 + dx, n0 + dy));
}

/** GeoJSON Polygon text from local rings (metres offsets). */
export function polygonText(rings: number[][][]): string {
  return JSON.stringify({ type: "Polygon", coordinates: rings.map((r) => lonLatRing(r)) });
}

/** Counter-clockwise rectangle ring, metres offsets. */
export function rect(x0: number, y0: number, x1: number, y1: number): number[][] {
  return [[x0, y0], [x1, y0], [x1, y1], [x0, y1], [x0, y0]];
}
