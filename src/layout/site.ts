/**
 * The site to image: read, validated and put into the local metric frame.
 * Validation follows RFC 7946 (WGS84 longitude/latitude, outer rings
 * counter-clockwise, holes clockwise) and refuses rings a strip layout
 * cannot trust: rings that cross or touch themselves or each other, holes
 * outside their outer ring or inside another hole, rings with fewer than
 * three corners. Outlines of many vertices (cadastre exports) are simplified
 * in the local frame, the area kept to 0.1 %.
 */
import type { MultiPolygon, Polygon, Position } from "geojson";
import { featureCollection, polygon as turfPolygon } from "@turf/helpers";
import { intersect } from "@turf/intersect";
import { ringBox } from "../geo/ringBox.js";
import { InputError } from "../errors.js";
import type { LocalFrame } from "../geo/frame.js";
import { normaliseLonDeg } from "../geo/longitude.js";
import type { Site, SiteSimplification } from "./types.js";
import { parseSiteText, bboxPolygon, type LonLatPolygon } from "./site-parse.js";
import { ringProblem } from "./ring-check.js";
import { simplifyRingIndices } from "./simplify.js";

export { siteCoverage, type SiteCoverage } from "./coverage.js";
export { siteRings } from "./rings.js";

/** What `readSite` needs of the local frame. */
export type SiteFrame = Pick<LocalFrame, "fromWgs84">;

export interface ReadSiteOptions {
  /** Name of the file, used in messages and as the site name when the file has none. */
  fileName?: string;
  /** Name to give the site (wins over the file's own). */
  name?: string;
  /** See `SiteFromLonLatOptions.simplifyToleranceM`. */
  simplifyToleranceM?: number;
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
  if (!parsed.polygons.length) {
    throw new InputError(source, "a line", "a polygon here; a line is a site only with a width (lineSiteFromLonLat, plan key lineWidthM)", "the file holds lines, no polygon");
  }
  return siteFromLonLat(parsed.polygons, frame, {
    name: opts.name ?? parsed.name ?? baseName(opts.fileName) ?? "site",
    source,
    ...(opts.simplifyToleranceM !== undefined ? { simplifyToleranceM: opts.simplifyToleranceM } : {}),
  });
}

/**
 * A site from a bbox [west, south, east, north] in WGS84 degrees.
 * @example siteFromBbox([15, 47, 15.01, 47.005], frame).areaM2
 */
export function siteFromBbox(bbox: readonly number[], frame: SiteFrame, name = "bbox"): Site {
  return siteFromLonLat([bboxPolygon(bbox)], frame, { name, source: "site.bbox" });
}

/**
 * Outlines with more vertices than this are simplified even when no tolerance
 * is given: the strip layout scans every edge per band slab (band.ts), about
 * n² per heading, so 10 000 vertices take some 35 s over the 36 auto headings
 * and 2 000 about 1.5 s.
 */
export const AUTO_SIMPLIFY_ABOVE_VERTICES = 2_000;
/**
 * Tolerance used then, metres: a tenth of the finest DEM grids commonly made
 * from drone imagery (0.5 m; common practice), far below any strip spacing.
 */
export const DEFAULT_SIMPLIFY_TOLERANCE_M = 0.05;
/** Largest change of the site area simplification may make, percent. */
export const MAX_SIMPLIFY_AREA_CHANGE_PCT = 0.1;

export interface SiteFromLonLatOptions {
  name: string;
  /** File (or field) named in messages. */
  source?: string;
  /**
   * Douglas-Peucker tolerance for the outline in the local frame, metres (a
   * fraction of a DEM cell suits: the terrain is not known finer). 0 keeps
   * every vertex. Default: DEFAULT_SIMPLIFY_TOLERANCE_M for outlines of more
   * than AUTO_SIMPLIFY_ABOVE_VERTICES vertices, else none. The tolerance is
   * halved until the area changes by at most MAX_SIMPLIFY_AREA_CHANGE_PCT and
   * the simplified rings are still valid; what was done is on `site.simplification`.
   */
  simplifyToleranceM?: number;
}

/**
 * Validates WGS84 polygons and projects them. Longitudes are unwrapped so a
 * polygon crossing the antimeridian stays one piece in the frame; the WGS84
 * copy is split at 180 degrees as RFC 7946 section 3.1.9 asks. Large outlines
 * are simplified in the frame (see `SiteFromLonLatOptions.simplifyToleranceM`).
 * @example siteFromLonLat([[[[15,47],[15.01,47],[15.01,47.01],[15,47]]]], frame, { name: "a" })
 */
export function siteFromLonLat(polygons: readonly LonLatPolygon[], frame: SiteFrame, opts: SiteFromLonLatOptions): Site {
  const source = opts.source ?? "site";
  const tolIn = opts.simplifyToleranceM;
  if (tolIn !== undefined && !(Number.isFinite(tolIn) && tolIn >= 0)) {
    throw new InputError("simplifyToleranceM", tolIn, "a number of metres >= 0 (0 keeps every vertex)");
  }
  if (!Array.isArray(polygons)) throw new InputError(source, polygons, "a list of polygons");
  const notes: string[] = [];
  const cleaned: number[][][][] = [];
  let refLon: number | undefined;
  polygons.forEach((poly, pi) => {
    if (!Array.isArray(poly) || poly.length === 0) throw new InputError(`${source} polygon ${pi + 1}`, poly, "a polygon with an outer ring", "empty polygon");
    const rings = poly.map((ring, ri) => {
      const label = ringLabel(source, pi, ri, polygons.length);
      if (!Array.isArray(ring)) throw new InputError(label, ring, "a ring: a list of [longitude, latitude] positions", "malformed ring");
      checkWgs84(ring, label);
      const open = openRing(ring);
      const corners = distinctCorners(open);
      if (corners < 3) {
        throw new InputError(label, ring, "a ring with at least 3 distinct corners", `only ${corners} distinct corner${corners === 1 ? "" : "s"}`);
      }
      refLon ??= open[0][0];
      return unwrapRing(open, refLon);
    });
    checkRings(rings, pi, polygons.length, source);
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

  const projected: number[][][][] = cleaned.map((rings) => rings.map((ring) => ring.map(([lon, lat]) => frame.fromWgs84(lon, lat))));
  const vertices = cleaned.reduce((n, rings) => n + rings.reduce((k, r) => k + r.length, 0), 0);
  const tolerance = tolIn ?? (vertices > AUTO_SIMPLIFY_ABOVE_VERTICES ? DEFAULT_SIMPLIFY_TOLERANCE_M : 0);
  const fullAreaM2 = polygonsArea(projected);
  const simple = tolerance > 0 ? simplifyPolygons(projected, tolerance, fullAreaM2) : null;
  const keptLocal = simple ? simple.kept.map((rings, pi) => rings.map((idx, ri) => pick(projected[pi][ri], idx))) : projected;
  const keptLonLat = simple ? simple.kept.map((rings, pi) => rings.map((idx, ri) => pick(cleaned[pi][ri], idx))) : cleaned;
  const localPolys: Position[][][] = keptLocal.map((rings) => rings.map(closeRing));
  const areaM2 = simple ? simple.areaM2 : fullAreaM2;

  const local: Polygon | MultiPolygon =
    localPolys.length === 1 ? { type: "Polygon", coordinates: localPolys[0] } : { type: "MultiPolygon", coordinates: localPolys };
  const site: Site = { local, wgs84: wgs84Geometry(keptLonLat), areaM2, name: opts.name };
  if (simple) {
    const s: SiteSimplification = { fromVertices: vertices, toVertices: simple.vertices, toleranceM: simple.toleranceM, areaChangePct: simple.areaChangePct };
    site.simplification = s;
    notes.push(simplificationNote(s));
  }
  if (notes.length) site.notes = notes;
  return site;
}

/**
 * The simplified rings' vertex indices, at the largest tolerance from `toleranceM`
 * down (halving) whose rings stay valid and whose area is within
 * MAX_SIMPLIFY_AREA_CHANGE_PCT of `fullAreaM2`. Null when no vertex can go.
 */
function simplifyPolygons(
  polys: number[][][][],
  toleranceM: number,
  fullAreaM2: number,
): { kept: Uint32Array[][]; vertices: number; toleranceM: number; areaM2: number; areaChangePct: number } | null {
  const total = polys.reduce((n, rings) => n + rings.reduce((k, r) => k + r.length, 0), 0);
  const coords = polys.map((rings) => rings.map((r) => [Float64Array.from(r, (p) => p[0]), Float64Array.from(r, (p) => p[1])] as const));
  // Ten halvings take the tolerance to a thousandth: past that the outline is kept as it is.
  for (let tol = toleranceM, tries = 0; tries < 10; tol /= 2, tries++) {
    const kept = coords.map((rings) => rings.map(([xs, ys]) => simplifyRingIndices(xs, ys, tol)));
    const vertices = kept.reduce((n, rings) => n + rings.reduce((k, r) => k + r.length, 0), 0);
    if (vertices === total) return null;
    const rings = kept.map((rs, pi) => rs.map((idx, ri) => pick(polys[pi][ri], idx)));
    const areaM2 = polygonsArea(rings);
    const areaChangePct = (Math.abs(areaM2 - fullAreaM2) / fullAreaM2) * 100;
    if (areaChangePct > MAX_SIMPLIFY_AREA_CHANGE_PCT) continue;
    // Dropping vertices can make a ring cut a corner through a neighbour: then try finer.
    if (rings.some((rs) => ringProblem(rs) !== null)) continue;
    return { kept, vertices, toleranceM: tol, areaM2, areaChangePct };
  }
  return null;
}

function simplificationNote(s: SiteSimplification): string {
  const n = (v: number) => v.toLocaleString("en-US");
  const tol = s.toleranceM >= 0.01 ? s.toleranceM.toFixed(2) : s.toleranceM.toPrecision(2);
  const pct = s.areaChangePct >= 0.01 ? s.areaChangePct.toFixed(2) : s.areaChangePct.toPrecision(1);
  return `outline simplified from ${n(s.fromVertices)} to ${n(s.toVertices)} vertices within ${tol} m (Douglas-Peucker in the local frame; area changed by ${pct} %)`;
}

function pick(ring: readonly number[][], idx: Uint32Array): number[][] {
  return Array.from(idx, (i) => ring[i]);
}

/** Area of polygons of open rings (outer minus holes), in the rings' units squared. */
function polygonsArea(polys: readonly (readonly number[][])[][]): number {
  let a = 0;
  for (const rings of polys) rings.forEach((r, i) => (a += (i === 0 ? 1 : -1) * Math.abs(signedArea(r))));
  return a;
}

function ringLabel(source: string, pi: number, ri: number, nPolys: number): string {
  const poly = nPolys > 1 ? ` polygon ${pi + 1}` : "";
  return `${source}${poly} ${ri === 0 ? "outer ring" : `hole ${ri}`}`;
}

function checkWgs84(ring: readonly number[][], label: string): void {
  for (const p of ring) {
    // Checked before destructuring: a bare number in a ring is not iterable.
    if (!Array.isArray(p) || !Number.isFinite(p[0]) || !Number.isFinite(p[1])) {
      throw new InputError(label, p, "[longitude, latitude] number pairs", "malformed position");
    }
    const [lon, lat] = p;
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

/** Distinct corners of a ring, counted up to 3 (all that matters). */
function distinctCorners(ring: readonly number[][]): number {
  const seen: number[][] = [];
  for (const p of ring) {
    if (!seen.some((q) => q[0] === p[0] && q[1] === p[1])) seen.push(p);
    if (seen.length === 3) break;
  }
  return seen.length;
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

/**
 * Refuses rings that touch or cross themselves or each other, holes outside
 * the outer ring and holes inside holes (see ring-check.ts), naming the ring.
 */
function checkRings(rings: number[][][], pi: number, nPolys: number, source: string): void {
  const p = ringProblem(rings);
  if (!p) return;
  const at = fmtLonLat(p.x, p.y);
  const holes = "holes that lie inside the outer ring without touching it or each other";
  if (p.kind === "self") {
    throw new InputError(ringLabel(source, pi, p.ring, nPolys), `kink at ${at}`, "a simple ring that does not cross or touch itself", "the ring self-intersects");
  }
  if (p.kind === "cross") {
    const other = p.ringA === 0 ? "the outer ring" : `hole ${p.ringA}`;
    throw new InputError(ringLabel(source, pi, p.ringB, nPolys), `meets ${other} at ${at}`, holes, `the hole crosses or touches ${other}`);
  }
  const where = p.kind === "hole-outside" ? "lies outside the outer ring" : `lies inside hole ${p.inside}`;
  throw new InputError(ringLabel(source, pi, p.ring, nPolys), `first corner at ${at}`, holes, `the hole ${where}`);
}

/**
 * Polygons of one site must not overlap: strips read the site by the even-odd
 * rule, under which an overlap would count as outside. Touching is fine.
 */
function checkNoOverlap(polys: number[][][][], source: string): void {
  if (polys.length < 2 || polys.length > 200) return;
  const features = polys.map((rings) => turfPolygon(rings.map(closeRing)));
  // Outer-ring boxes first: the clipping is costly on big outlines and most pairs lie apart.
  const boxes = polys.map((rings) => ringBox(rings[0]));
  for (let i = 0; i < features.length; i++) {
    for (let j = i + 1; j < features.length; j++) {
      const [a, b] = [boxes[i], boxes[j]];
      if (a[0] > b[2] || b[0] > a[2] || a[1] > b[3] || b[1] > a[3]) continue;
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
    // A loop, not Math.min(...lons): spreading 10^5 arguments overflows the stack.
    let west = Infinity;
    let east = -Infinity;
    for (const p of rings[0]) {
      if (p[0] < west) west = p[0];
      if (p[0] > east) east = p[0];
    }
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
