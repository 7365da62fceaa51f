/**
 * Site file text -> WGS84 polygons (longitude, latitude in degrees), before
 * any validation. Reads GeoJSON (RFC 7946), KML 2.2 polygons and bounding
 * boxes; says what it found when there is no polygon.
 */
import type { Element, Node as XmlNode } from "@xmldom/xmldom";
import { xmldom } from "../lazyModule.js";
import { InputError, InputFileError } from "../errors.js";

/** One polygon: rings of [lon, lat] pairs, the first ring the outer boundary. */
export type LonLatPolygon = number[][][];

/** One line: [lon, lat] positions in order. */
export type LonLatLine = number[][];

export interface ParsedSite {
  polygons: LonLatPolygon[];
  /**
   * The file's LineStrings (MultiLineStrings opened), used as a line site when
   * the file holds no polygon; empty when it holds one (polygons win, as before).
   */
  lines: LonLatLine[];
  /** From the file's `name` property / KML <name>, when present. */
  name?: string;
  format: "geojson" | "kml" | "bbox";
}

const ALLOWED = "a GeoJSON Polygon, MultiPolygon, LineString or MultiLineString (bare, in a Feature or FeatureCollection), a KML 2.2 Polygon or LineString, or a bbox [west,south,east,north]";

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
    return { polygons: [bboxPolygon(nums, source)], lines: [], format: "bbox" };
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
  const { container, parts } = geoJsonParts(obj, source);
  const polygons: LonLatPolygon[] = [];
  const lines: LonLatLine[] = [];
  const others = new Map<string, number>();
  let name: string | undefined;
  let lineName: string | undefined;
  for (const part of parts) {
    if (part.notObject) continue;
    for (const p of part.polygons) polygons.push(p);
    for (const l of part.lines) lines.push(l);
    if (lineName === undefined && part.lines.length > 0 && part.properties && typeof part.properties.name === "string") lineName = part.properties.name;
    for (const [type, n] of part.others) others.set(type, (others.get(type) ?? 0) + n);
    const props = part.properties;
    if (name === undefined && part.polygons.length > 0 && props && typeof props.name === "string") name = props.name;
  }
  if (polygons.length === 0 && lines.length > 0) return { polygons, lines, name: lineName, format: "geojson" };
  if (polygons.length === 0) {
    throw new InputError(source, describeFound(container, others), ALLOWED, "no polygon found");
  }
  return { polygons, lines: [], name, format: "geojson" };
}

/** What one GeoJSON feature (or a bare geometry) holds. */
export interface GeoJsonPart {
  /** Position in the FeatureCollection's `features` (0 for a lone Feature or a bare geometry). */
  index: number;
  /** True for an entry of `features` that is not an object (no geometry was read from it). */
  notObject: boolean;
  /** Its Polygons and MultiPolygons' polygons, GeometryCollections opened. */
  polygons: LonLatPolygon[];
  /** Its LineStrings and MultiLineStrings' lines (also counted in `others`, for messages that want polygons). */
  lines: LonLatLine[];
  /** Other geometry types found, with counts ("null geometry" for a missing or malformed one). */
  others: Map<string, number>;
  /** The feature's `properties` when it is an object; null for a bare geometry. */
  properties: Record<string, unknown> | null;
}

/**
 * A GeoJSON object cut into its features, each with its polygons and what else
 * it holds. `container` is "FeatureCollection", "Feature" or "" for a bare
 * geometry. Refuses a declared CRS other than WGS84 on any member and
 * malformed coordinates, at the first one met in file order; `subject` names
 * what must be WGS84 in that message ("the site", "keep-out zones").
 * @example geoJsonParts({ type: "Feature", properties: { name: "a" }, geometry: poly }).parts[0].polygons.length // 1
 */
export function geoJsonParts(obj: unknown, source = "site", subject = "the site"): { container: string; parts: GeoJsonPart[] } {
  if (!isObject(obj) || typeof obj.type !== "string") throw new InputFileError(source, "not a GeoJSON object (no `type` member)");
  const checkCrs = (o: Record<string, unknown>) => checkCrsMember(o, source, subject);
  checkCrs(obj);
  const parts: GeoJsonPart[] = [];
  // An explicit stack, not recursion: GeometryCollections nested 10^4 deep overflow the call stack.
  const visitGeometry = (root: unknown, part: GeoJsonPart): void => {
    const { polygons, lines, others } = part;
    const pending: unknown[] = [root];
    while (pending.length) {
      const g = pending.pop();
      if (!isObject(g) || typeof g.type !== "string") {
        others.set("null geometry", (others.get("null geometry") ?? 0) + 1);
        continue;
      }
      checkCrs(g);
      if (g.type === "Polygon") polygons.push(coordsOf(g, 3, source) as LonLatPolygon);
      else if (g.type === "MultiPolygon") for (const p of coordsOf(g, 4, source) as LonLatPolygon[]) polygons.push(p);
      else if (g.type === "GeometryCollection" && Array.isArray(g.geometries)) for (let i = g.geometries.length - 1; i >= 0; i--) pending.push(g.geometries[i]);
      else {
        if (g.type === "LineString") lines.push(coordsOf(g, 2, source) as LonLatLine);
        else if (g.type === "MultiLineString") for (const l of coordsOf(g, 3, source) as LonLatLine[]) lines.push(l);
        others.set(g.type, (others.get(g.type) ?? 0) + 1);
      }
    }
  };
  const newPart = (index: number, notObject: boolean, properties: Record<string, unknown> | null): GeoJsonPart => {
    const part: GeoJsonPart = { index, notObject, polygons: [], lines: [], others: new Map(), properties };
    parts.push(part);
    return part;
  };
  const visitFeature = (f: unknown, index: number): void => {
    if (!isObject(f)) {
      newPart(index, true, null);
      return;
    }
    checkCrs(f);
    const part = newPart(index, false, isObject(f.properties) ? f.properties : null);
    visitGeometry(f.geometry, part);
  };
  let container = obj.type;
  if (obj.type === "FeatureCollection") {
    if (!Array.isArray(obj.features)) throw new InputFileError(source, "FeatureCollection without a `features` array");
    for (let i = 0; i < obj.features.length; i++) visitFeature(obj.features[i], i);
  } else if (obj.type === "Feature") {
    visitFeature(obj, 0);
  } else {
    container = "";
    visitGeometry(obj, newPart(0, false, null));
  }
  return { container, parts };
}

/**
 * KML 2.2 text -> polygons: every <Polygon>, inside MultiGeometry or not,
 * with its outerBoundaryIs and innerBoundaryIs rings (OGC 07-147r2, KML 2.2).
 * @example parseKmlSite(kmlText).polygons[0][0] // outer ring
 */
export function parseKmlSite(text: string, source = "site"): ParsedSite {
  const root = parseKmlRoot(text, source);
  const polygons: LonLatPolygon[] = [];
  const lines: LonLatLine[] = [];
  const others = new Map<string, number>();
  for (const el of descendants(root)) {
    const tag = el.localName ?? "";
    if (tag === "Polygon") {
      polygons.push(kmlPolygon(el, source));
    } else if (KML_OTHER_GEOMETRIES.has(tag)) {
      if (tag === "LineString") lines.push(kmlCoordinates(el, source));
      others.set(tag, (others.get(tag) ?? 0) + 1);
    }
  }
  if (polygons.length === 0 && lines.length === 0) throw new InputError(source, describeFound("KML document", others), ALLOWED, "no polygon found");
  let name: string | undefined;
  for (const el of descendants(root)) {
    if (el.localName === "name" && el.textContent?.trim()) {
      name = el.textContent.trim();
      break;
    }
  }
  return { polygons, lines: polygons.length ? [] : lines, name, format: "kml" };
}

/** KML geometries that hold no area (counted to say what a file holds instead of polygons). */
export const KML_OTHER_GEOMETRIES: ReadonlySet<string> = new Set(["Point", "LineString", "Model", "Track"]);

/**
 * The <kml> root element of KML text; refuses text that is not well-formed XML
 * or whose root is not <kml>.
 * @example parseKmlRoot('<kml xmlns="http://www.opengis.net/kml/2.2"/>').localName // "kml"
 */
export function parseKmlRoot(text: string, source = "site"): Element {
  let root: Element | null;
  try {
    root = new (xmldom().DOMParser)().parseFromString(text, "text/xml").documentElement;
  } catch (e) {
    throw new InputFileError(source, `not well-formed XML (${(e as Error).message.split("\n")[0]})`);
  }
  if (!root || root.localName !== "kml") throw new InputFileError(source, "not a KML document (root element is not <kml>)");
  return root;
}

/**
 * The rings of a KML <Polygon> element: its outerBoundaryIs ring first, then
 * every innerBoundaryIs ring, as [lon, lat] (altitudes dropped).
 * @example kmlPolygon(polygonElement, "zones.kml")[0] // the outer ring
 */
export function kmlPolygon(el: Element, source = "site"): LonLatPolygon {
  const outer = childrenNamed(el, "outerBoundaryIs").flatMap((b) => childrenNamed(b, "LinearRing"));
  if (outer.length !== 1) throw new InputFileError(source, "a KML Polygon needs exactly one outerBoundaryIs/LinearRing");
  const rings = [kmlRing(outer[0], source)];
  for (const b of childrenNamed(el, "innerBoundaryIs")) for (const r of childrenNamed(b, "LinearRing")) rings.push(kmlRing(r, source));
  return rings;
}

function kmlRing(ring: Element, source: string): number[][] {
  return kmlCoordinates(ring, source, "LinearRing");
}

/** The [lon, lat] positions of a KML element's <coordinates> child (altitudes dropped). */
function kmlCoordinates(el: Element, source: string, what = "LineString"): number[][] {
  const coords = childrenNamed(el, "coordinates")[0];
  if (!coords) throw new InputFileError(source, `a KML ${what} without <coordinates>`);
  const out: number[][] = [];
  for (const tuple of (coords.textContent ?? "").trim().split(/\s+/)) {
    if (!tuple) continue;
    const [lon, lat] = tuple.split(",").map(Number);
    if (!Number.isFinite(lon) || !Number.isFinite(lat)) throw new InputError(`${source} <coordinates>`, tuple, "lon,lat[,alt] tuples separated by spaces");
    out.push([lon, lat]);
  }
  return out;
}

function checkCrsMember(obj: Record<string, unknown>, source: string, subject: string): void {
  const crs = obj.crs;
  if (crs === undefined || crs === null) return;
  const props = isObject(crs) ? crs.properties : undefined;
  const nameVal = isObject(props) ? (props.name ?? props.href) : undefined;
  const named = typeof nameVal === "string" ? nameVal : JSON.stringify(crs);
  if (!WGS84_CRS_NAMES.test(named)) {
    throw new InputError(`${source} crs`, named, "WGS84 longitude/latitude (RFC 7946 allows no other CRS)", `${subject} must be WGS84; reproject it first (e.g. ogr2ogr -t_srs EPSG:4326)`);
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

/**
 * Words for what a file holds instead of polygons, e.g. "a FeatureCollection
 * with only 2 Points"; `container` "" for a bare geometry.
 * @example describeFound("FeatureCollection", new Map([["Point", 2]])) // "a FeatureCollection with only 2 Points"
 */
export function describeFound(container: string, others: ReadonlyMap<string, number>): string {
  const parts = [...others.entries()].map(([type, n]) => (n === 1 ? `a ${type}` : `${n} ${type}s`));
  const what = parts.length === 0 ? "nothing" : parts.length === 1 ? parts[0] : `${parts.slice(0, -1).join(", ")} and ${parts[parts.length - 1]}`;
  if (!container) return what === "nothing" ? "an empty geometry" : what;
  if (what === "nothing") return `an empty ${container}`;
  const article = /^[AEIOU]/.test(container) ? "an" : "a";
  return `${article} ${container} with only ${what}`;
}

/**
 * A plain object (not null, not an array).
 * @example isObject({ type: "Feature" }) // true
 */
export function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === "object" && v !== null && !Array.isArray(v);
}

/**
 * Element descendants in document order. Walks with an explicit stack rather
 * than recursing: a hostile file nested some 10^4 levels deep would otherwise
 * overflow the call stack.
 * @example for (const el of descendants(root)) if (el.localName === "Placemark") count++;
 */
export function* descendants(el: Element): Generator<Element> {
  const pending: XmlNode[] = [];
  for (let n: XmlNode | null = el.lastChild; n; n = n.previousSibling) pending.push(n);
  while (pending.length) {
    const n = pending.pop() as XmlNode;
    if (n.nodeType !== 1) continue;
    yield n as Element;
    for (let c: XmlNode | null = n.lastChild; c; c = c.previousSibling) pending.push(c);
  }
}

/**
 * Child elements of `el` with the given local name (any namespace), in order.
 * @example childrenNamed(placemark, "name")[0]?.textContent
 */
export function childrenNamed(el: Element, localName: string): Element[] {
  const out: Element[] = [];
  for (let n: XmlNode | null = el.firstChild; n; n = n.nextSibling) if (n.nodeType === 1 && (n as Element).localName === localName) out.push(n as Element);
  return out;
}
