/**
 * Site file text -> WGS84 polygons (longitude, latitude in degrees), before
 * any validation. Reads GeoJSON (RFC 7946), KML 2.2 polygons and bounding
 * boxes; says what it found when there is no polygon.
 */
import { DOMParser, type Element, type Node as XmlNode } from "@xmldom/xmldom";
import { InputError, InputFileError } from "../errors.js";

/** One polygon: rings of [lon, lat] pairs, the first ring the outer boundary. */
export type LonLatPolygon = number[][][];

export interface ParsedSite {
  polygons: LonLatPolygon[];
  /** From the file's `name` property / KML <name>, when present. */
  name?: string;
  format: "geojson" | "kml" | "bbox";
}

const ALLOWED = "a GeoJSON Polygon, MultiPolygon, Feature or FeatureCollection with polygons, a KML 2.2 Polygon, or a bbox [west,south,east,north]";

/** CRS names RFC 7946's predecessor (GeoJSON 2008) used for WGS84 lon/lat. */
const WGS84_CRS_NAMES = /^(urn:ogc:def:crs:OGC:1\.3:CRS84|urn:ogc:def:crs:OGC::CRS84|urn:ogc:def:crs:EPSG::4326|EPSG:4326|CRS84|WGS84)$/i;

/**
 * Reads a site from file text, guessing the format from its first character
 * (`<` KML, `{` GeoJSON, `[` or digits a bbox).
 * @example parseSiteText('[15.0, 47.0, 15.01, 47.005]').polygons.length // 1
 */
export function parseSiteText(text: string, source = "site"): ParsedSite {
  const t = text.trim();
  if (t.startsWith("<")) return parseKmlSite(t, source);
  if (t.startsWith("{")) {
    let obj: unknown;
    try {
      obj = JSON.parse(t);
    } catch (e) {
      throw new InputFileError(source, `not valid JSON (${(e as Error).message})`);
    }
    return parseGeoJsonSite(obj, source);
  }
  if (/^[[\d\s+\-.]/.test(t)) {
    const nums = t.replace(/^\[|\]$/g, "").split(/[\s,]+/).filter(Boolean).map(Number);
    return { polygons: [bboxPolygon(nums, source)], format: "bbox" };
  }
  throw new InputFileError(source, `not a site file: expected ${ALLOWED}`);
}

/**
 * A bbox [west, south, east, north] in degrees as a counter-clockwise polygon.
 * West > east is allowed and means the box crosses the antimeridian.
 * @example bboxPolygon([15, 47, 15.01, 47.005])
 */
export function bboxPolygon(bbox: readonly number[], field = "site.bbox"): LonLatPolygon {
  if (bbox.length !== 4 || !bbox.every(Number.isFinite)) {
    throw new InputError(field, bbox, "four numbers west,south,east,north in WGS84 degrees");
  }
  const [w, s, e0, n] = bbox;
  if (!(n > s)) throw new InputError(field, bbox, "south < north", "the box has no height");
  const e = e0 < w ? e0 + 360 : e0;
  if (!(e > w)) throw new InputError(field, bbox, "west != east", "the box has no width");
  return [[[w, s], [e, s], [e, n], [w, n], [w, s]]];
}

/**
 * GeoJSON object -> polygons. Every Polygon and MultiPolygon is used, from
 * bare geometries, Features, FeatureCollections and GeometryCollections.
 * @example parseGeoJsonSite({ type: "Polygon", coordinates: [ring] })
 */
export function parseGeoJsonSite(obj: unknown, source = "site"): ParsedSite {
  if (!isObject(obj) || typeof obj.type !== "string") throw new InputFileError(source, "not a GeoJSON object (no `type` member)");
  checkCrsMember(obj, source);
  const polygons: LonLatPolygon[] = [];
  const others = new Map<string, number>();
  let name: string | undefined;
  // An explicit stack, not recursion: GeometryCollections nested 10^4 deep overflow the call stack.
  const visitGeometry = (root: unknown): void => {
    const pending: unknown[] = [root];
    while (pending.length) {
      const g = pending.pop();
      if (!isObject(g) || typeof g.type !== "string") {
        others.set("null geometry", (others.get("null geometry") ?? 0) + 1);
        continue;
      }
      checkCrsMember(g, source);
      if (g.type === "Polygon") polygons.push(coordsOf(g, 3, source) as LonLatPolygon);
      else if (g.type === "MultiPolygon") for (const p of coordsOf(g, 4, source) as LonLatPolygon[]) polygons.push(p);
      else if (g.type === "GeometryCollection" && Array.isArray(g.geometries)) for (let i = g.geometries.length - 1; i >= 0; i--) pending.push(g.geometries[i]);
      else others.set(g.type, (others.get(g.type) ?? 0) + 1);
    }
  };
  const visitFeature = (f: unknown): void => {
    if (!isObject(f)) return;
    checkCrsMember(f, source);
    const before = polygons.length;
    visitGeometry(f.geometry);
    const props = f.properties;
    if (name === undefined && polygons.length > before && isObject(props) && typeof props.name === "string") name = props.name;
  };
  let container = obj.type;
  if (obj.type === "FeatureCollection") {
    if (!Array.isArray(obj.features)) throw new InputFileError(source, "FeatureCollection without a `features` array");
    for (const f of obj.features) visitFeature(f);
  } else if (obj.type === "Feature") {
    visitFeature(obj);
  } else {
    container = "";
    visitGeometry(obj);
  }
  if (polygons.length === 0) {
    throw new InputError(source, describeFound(container, others), ALLOWED, "no polygon found");
  }
  return { polygons, name, format: "geojson" };
}

/**
 * KML 2.2 text -> polygons: every <Polygon>, inside MultiGeometry or not,
 * with its outerBoundaryIs and innerBoundaryIs rings (OGC 07-147r2, KML 2.2).
 * @example parseKmlSite(kmlText).polygons[0][0] // outer ring
 */
export function parseKmlSite(text: string, source = "site"): ParsedSite {
  let root: Element | null;
  try {
    root = new DOMParser().parseFromString(text, "text/xml").documentElement;
  } catch (e) {
    throw new InputFileError(source, `not well-formed XML (${(e as Error).message.split("\n")[0]})`);
  }
  if (!root || root.localName !== "kml") throw new InputFileError(source, "not a KML document (root element is not <kml>)");
  const polygons: LonLatPolygon[] = [];
  const others = new Map<string, number>();
  for (const el of descendants(root)) {
    const tag = el.localName;
    if (tag === "Polygon") {
      const outer = childrenNamed(el, "outerBoundaryIs").flatMap((b) => childrenNamed(b, "LinearRing"));
      if (outer.length !== 1) throw new InputFileError(source, "a KML Polygon needs exactly one outerBoundaryIs/LinearRing");
      const rings = [kmlRing(outer[0], source)];
      for (const b of childrenNamed(el, "innerBoundaryIs")) for (const r of childrenNamed(b, "LinearRing")) rings.push(kmlRing(r, source));
      polygons.push(rings);
    } else if (tag === "Point" || tag === "LineString" || tag === "Model" || tag === "Track") {
      others.set(tag, (others.get(tag) ?? 0) + 1);
    }
  }
  if (polygons.length === 0) throw new InputError(source, describeFound("KML document", others), ALLOWED, "no polygon found");
  let name: string | undefined;
  for (const el of descendants(root)) {
    if (el.localName === "name" && el.textContent?.trim()) {
      name = el.textContent.trim();
      break;
    }
  }
  return { polygons, name, format: "kml" };
}

function kmlRing(ring: Element, source: string): number[][] {
  const coords = childrenNamed(ring, "coordinates")[0];
  if (!coords) throw new InputFileError(source, "a KML LinearRing without <coordinates>");
  const out: number[][] = [];
  for (const tuple of (coords.textContent ?? "").trim().split(/\s+/)) {
    if (!tuple) continue;
    const [lon, lat] = tuple.split(",").map(Number);
    if (!Number.isFinite(lon) || !Number.isFinite(lat)) throw new InputError(`${source} <coordinates>`, tuple, "lon,lat[,alt] tuples separated by spaces");
    out.push([lon, lat]);
  }
  return out;
}

function checkCrsMember(obj: Record<string, unknown>, source: string): void {
  const crs = obj.crs;
  if (crs === undefined || crs === null) return;
  const props = isObject(crs) ? crs.properties : undefined;
  const nameVal = isObject(props) ? (props.name ?? props.href) : undefined;
  const named = typeof nameVal === "string" ? nameVal : JSON.stringify(crs);
  if (!WGS84_CRS_NAMES.test(named)) {
    throw new InputError(`${source} crs`, named, "WGS84 longitude/latitude (RFC 7946 allows no other CRS)", "the site must be WGS84; reproject it first (e.g. ogr2ogr -t_srs EPSG:4326)");
  }
}

function coordsOf(g: Record<string, unknown>, depth: number, source: string): unknown[] {
  const c = g.coordinates;
  let probe: unknown = c;
  for (let d = 0; d < depth; d++) {
    if (!Array.isArray(probe) || probe.length === 0) throw new InputFileError(source, `${String(g.type)} with malformed or empty coordinates`);
    probe = probe[0];
  }
  return c as unknown[];
}

function describeFound(container: string, others: Map<string, number>): string {
  const parts = [...others.entries()].map(([type, n]) => (n === 1 ? `a ${type}` : `${n} ${type}s`));
  const what = parts.length === 0 ? "nothing" : parts.length === 1 ? parts[0] : `${parts.slice(0, -1).join(", ")} and ${parts[parts.length - 1]}`;
  if (!container) return what === "nothing" ? "an empty geometry" : what;
  if (what === "nothing") return `an empty ${container}`;
  const article = /^[AEIOU]/.test(container) ? "an" : "a";
  return `${article} ${container} with only ${what}`;
}

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === "object" && v !== null && !Array.isArray(v);
}

/**
 * Element descendants in document order. Walks with an explicit stack rather
 * than recursing: a hostile file nested some 10^4 levels deep would otherwise
 * overflow the call stack.
 */
function* descendants(el: Element): Generator<Element> {
  const pending: XmlNode[] = [];
  for (let n: XmlNode | null = el.lastChild; n; n = n.previousSibling) pending.push(n);
  while (pending.length) {
    const n = pending.pop() as XmlNode;
    if (n.nodeType !== 1) continue;
    yield n as Element;
    for (let c: XmlNode | null = n.lastChild; c; c = c.previousSibling) pending.push(c);
  }
}

function childrenNamed(el: Element, localName: string): Element[] {
  const out: Element[] = [];
  for (let n: XmlNode | null = el.firstChild; n; n = n.nextSibling) if (n.nodeType === 1 && (n as Element).localName === localName) out.push(n as Element);
  return out;
}
