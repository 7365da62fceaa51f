/**
 * The site to image: read, validated and put into the local metric frame.
 * Validation follows RFC 7946 (WGS84 longitude/latitude, outer rings
 * counter-clockwise, holes clockwise) and refuses rings a strip layout
 * cannot trust: self-intersecting ones and ones with fewer than three corners.
 */
import type { MultiPolygon, Polygon, Position } from "geojson";
import { featureCollection, intersect, kinks, lineString, polygon as turfPolygon } from "@turf/turf";
import { InputError } from "../errors.js";
import type { LocalFrame } from "../geo/frame.js";
import { normaliseLonDeg } from "../geo/longitude.js";
import type { Site } from "./types.js";
import { parseSiteText, bboxPolygon, type LonLatPolygon } from "./site-parse.js";

export { siteCoverage, type SiteCoverage } from "./coverage.js";
export { siteRings } from "./rings.js";

/** What `readSite` needs of the local frame. */
export type SiteFrame = Pick<LocalFrame, "fromWgs84">;

export interface ReadSiteOptions {
  /** Name of the file, used in messages and as the site name when the file has none. */
  fileName?: string;
  /** Name to give the site (wins over the file's own). */
  name?: string;
}

/**
 * Reads a site from file text (GeoJSON, KML 2.2 or a bbox "west,south,east,north")
 * and returns it in the local frame.
 * @example
 * const site = readSite(fs.readFileSync("field.geojson", "utf8"), frame, { fileName: "field.geojson" });
 * site.areaM2 // 12500.3
 */
export function readSite(text: string, frame: SiteFrame, opts: ReadSiteOptions = {}): Site {
  const source = opts.fileName ?? "site";
  const parsed = parseSiteText(text, source);
  return siteFromLonLat(parsed.polygons, frame, { name: opts.name ?? parsed.name ?? baseName(opts.fileName) ?? "site", source });
}

/**
 * A site from a bbox [west, south, east, north] in WGS84 degrees.
 * @example siteFromBbox([15, 47, 15.01, 47.005], frame).areaM2
 */
export function siteFromBbox(bbox: readonly number[], frame: SiteFrame, name = "bbox"): Site {
  return siteFromLonLat([bboxPolygon(bbox)], frame, { name, source: "site.bbox" });
}

/**
 * Validates WGS84 polygons and projects them. Longitudes are unwrapped so a
 * polygon crossing the antimeridian stays one piece in the frame; the WGS84
 * copy is split at 180 degrees as RFC 7946 section 3.1.9 asks.
 * @example siteFromLonLat([[[[15,47],[15.01,47],[15.01,47.01],[15,47]]]], frame, { name: "a" })
 */
export function siteFromLonLat(polygons: readonly LonLatPolygon[], frame: SiteFrame, opts: { name: string; source?: string }): Site {
  const source = opts.source ?? "site";
  const notes: string[] = [];
  const cleaned: number[][][][] = [];
  let refLon: number | undefined;
  polygons.forEach((poly, pi) => {
    if (poly.length === 0) throw new InputError(`${source} polygon ${pi + 1}`, poly, "a polygon with an outer ring", "empty polygon");
    const rings = poly.map((ring, ri) => {
      const label = ringLabel(source, pi, ri, polygons.length);
      checkWgs84(ring, label);
      const open = openRing(ring);
      const corners = distinctCorners(open);
      if (corners < 3) {
        throw new InputError(label, ring, "a ring with at least 3 distinct corners", `only ${corners} distinct corner${corners === 1 ? "" : "s"}`);
      }
      refLon ??= open[0][0];
      return unwrapRing(open, refLon);
    });
    checkSimple(rings, pi, polygons.length, source);
    rings.forEach((ring, ri) => {
      const a = signedArea(ring);
      const ccw = a > 0;
      if (a === 0) {
        throw new InputError(ringLabel(source, pi, ri, polygons.length), poly[ri], "a ring enclosing some area", "all corners lie on one line");
      }
      const wantCcw = ri === 0;
      if (ccw !== wantCcw) {
        ring.reverse();
        notes.push(`${ringLabel(source, pi, ri, polygons.length)} was rewound to RFC 7946 winding (${wantCcw ? "outer rings counter-clockwise" : "holes clockwise"})`);
      }
    });
    cleaned.push(rings);
  });

  checkNoOverlap(cleaned, source);

  const localPolys: Position[][][] = cleaned.map((rings) =>
    rings.map((ring) => closeRing(ring.map(([lon, lat]) => frame.fromWgs84(lon, lat)))),
  );
  let areaM2 = 0;
  for (const rings of localPolys) rings.forEach((r, i) => (areaM2 += (i === 0 ? 1 : -1) * Math.abs(signedArea(r))));

  const local: Polygon | MultiPolygon =
    localPolys.length === 1 ? { type: "Polygon", coordinates: localPolys[0] } : { type: "MultiPolygon", coordinates: localPolys };
  const site: Site = { local, wgs84: wgs84Geometry(cleaned), areaM2, name: opts.name };
  if (notes.length) site.notes = notes;
  return site;
}

function ringLabel(source: string, pi: number, ri: number, nPolys: number): string {
  const poly = nPolys > 1 ? ` polygon ${pi + 1}` : "";
  return `${source}${poly} ${ri === 0 ? "outer ring" : `hole ${ri}`}`;
}

function checkWgs84(ring: readonly number[][], label: string): void {
  for (const p of ring) {
    const [lon, lat] = p;
    if (!Array.isArray(p) || !Number.isFinite(lon) || !Number.isFinite(lat)) {
      throw new InputError(label, p, "[longitude, latitude] number pairs", "malformed position");
    }
    if (Math.abs(lon) > 180 || Math.abs(lat) > 90) {
      throw new InputError(
        label,
        [lon, lat],
        "WGS84 longitude/latitude in degrees (|lon| <= 180, |lat| <= 90)",
        "coordinates are not WGS84 longitude/latitude; the site must be WGS84 (RFC 7946), reproject it first",
      );
    }
  }
}

/** Ring without the closing repeat and without consecutive duplicate corners. */
function openRing(ring: readonly number[][]): number[][] {
  const out: number[][] = [];
  for (const p of ring) {
    const last = out[out.length - 1];
    if (!last || last[0] !== p[0] || last[1] !== p[1]) out.push([p[0], p[1]]);
  }
  while (out.length > 1 && out[0][0] === out[out.length - 1][0] && out[0][1] === out[out.length - 1][1]) out.pop();
  return out;
}

function distinctCorners(ring: readonly number[][]): number {
  return new Set(ring.map((p) => `${p[0]},${p[1]}`)).size;
}

/** Longitudes made continuous along the ring and near `refLon` (antimeridian). */
function unwrapRing(ring: number[][], refLon: number): number[][] {
  let prev = refLon;
  return ring.map(([lon, lat]) => {
    let d = lon - prev;
    d -= 360 * Math.round(d / 360);
    prev += d;
    return [prev, lat];
  });
}

function checkSimple(rings: number[][][], pi: number, nPolys: number, source: string): void {
  rings.forEach((ring, ri) => {
    const k = kinks(lineString(closeRing(ring))).features[0];
    if (k) {
      const [lon, lat] = k.geometry.coordinates;
      throw new InputError(ringLabel(source, pi, ri, nPolys), `kink at ${fmtLonLat(lon, lat)}`, "a simple ring that does not cross itself", "the ring self-intersects");
    }
  });
  if (rings.length > 1) {
    const k = kinks(turfPolygon(rings.map(closeRing))).features[0];
    if (k) {
      const [lon, lat] = k.geometry.coordinates;
      const label = nPolys > 1 ? `${source} polygon ${pi + 1}` : source;
      throw new InputError(label, `rings cross at ${fmtLonLat(lon, lat)}`, "holes that lie inside the outer ring without touching it", "a hole crosses another ring");
    }
  }
}

/**
 * Polygons of one site must not overlap: strips read the site by the even-odd
 * rule, under which an overlap would count as outside. Touching is fine.
 */
function checkNoOverlap(polys: number[][][][], source: string): void {
  if (polys.length < 2 || polys.length > 200) return;
  const features = polys.map((rings) => turfPolygon(rings.map(closeRing)));
  for (let i = 0; i < features.length; i++) {
    for (let j = i + 1; j < features.length; j++) {
      if (intersect(featureCollection([features[i], features[j]]))) {
        throw new InputError(source, `polygons ${i + 1} and ${j + 1}`, "polygons that do not overlap (merge overlapping ones into one)", "two polygons of the site overlap");
      }
    }
  }
}

function fmtLonLat(lon: number, lat: number): string {
  return `lon ${normaliseLonDeg(lon).toFixed(6)}, lat ${lat.toFixed(6)}`;
}

function closeRing(ring: number[][]): number[][] {
  const a = ring[0];
  const b = ring[ring.length - 1];
  return a[0] === b[0] && a[1] === b[1] ? ring.map((p) => [p[0], p[1]]) : [...ring.map((p) => [p[0], p[1]]), [a[0], a[1]]];
}

/** Shoelace area, positive for counter-clockwise rings (x east, y north). */
function signedArea(ring: readonly number[][]): number {
  let s = 0;
  const n = ring.length;
  for (let i = 0; i < n; i++) {
    const p = ring[i];
    const q = ring[(i + 1) % n];
    s += p[0] * q[1] - q[0] * p[1];
  }
  return s / 2;
}

/** The WGS84 copy, split at the antimeridian where a polygon crosses it. */
function wgs84Geometry(polys: number[][][][]): Polygon | MultiPolygon {
  const out: Position[][][] = [];
  for (const rings of polys) {
    const lons = rings[0].map((p) => p[0]);
    const west = Math.min(...lons);
    const east = Math.max(...lons);
    if (west >= -180 && east <= 180) {
      out.push(rings.map(closeRing));
      continue;
    }
    // Cut into the part on each side of +-180 and shift each into range.
    const cut = west < -180 ? -180 : 180;
    const shiftLow = cut === -180 ? 360 : 0;
    const shiftHigh = cut === 180 ? -360 : 0;
    for (const [lo, hi, shift] of [[-Infinity, cut, shiftLow], [cut, Infinity, shiftHigh]] as const) {
      const outer = clipRingLon(rings[0], lo, hi);
      if (outer.length < 3) continue;
      const holes = rings.slice(1).map((r) => clipRingLon(r, lo, hi)).filter((r) => r.length >= 3);
      out.push([outer, ...holes].map((r) => closeRing(r.map(([lon, lat]) => [lon + shift, lat]))));
    }
  }
  return out.length === 1 ? { type: "Polygon", coordinates: out[0] } : { type: "MultiPolygon", coordinates: out };
}

/**
 * Ring clipped to lo <= lon <= hi (Sutherland–Hodgman against two vertical
 * lines; Sutherland and Hodgman, CACM 17(1), 1974). Concave rings can come
 * out with a zero-width seam along the cut, harmless for display.
 */
function clipRingLon(ring: number[][], lo: number, hi: number): number[][] {
  let pts = ring;
  for (const [edge, keepAbove] of [[lo, true], [hi, false]] as const) {
    if (!Number.isFinite(edge)) continue;
    const inside = (p: number[]): boolean => (keepAbove ? p[0] >= edge : p[0] <= edge);
    const next: number[][] = [];
    for (let i = 0; i < pts.length; i++) {
      const p = pts[i];
      const q = pts[(i + 1) % pts.length];
      if (inside(p)) next.push(p);
      if (inside(p) !== inside(q)) {
        const t = (edge - p[0]) / (q[0] - p[0]);
        next.push([edge, p[1] + t * (q[1] - p[1])]);
      }
    }
    pts = next;
  }
  return pts;
}

function baseName(file: string | undefined): string | undefined {
  if (!file) return undefined;
  const b = file.split(/[\\/]/).pop() ?? file;
  return b.replace(/\.(geo)?json$|\.kml$/i, "") || undefined;
}
