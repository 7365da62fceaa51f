/**
 * Keep-out zone files (plan key `keepOut`): GeoJSON (RFC 7946) or KML 2.2
 * polygons in WGS84, one zone per feature, read into named zones of [lon, lat]
 * rings. Thin I/O (`readKeepOutFiles`) over a pure parser (`parseKeepOutText`).
 * The format reading is site-parse.ts's; the ring rules are ring-check.ts's.
 */
import { readFile } from "node:fs/promises";
import path from "node:path";
import type { Element, Node as XmlNode } from "@xmldom/xmldom";
import { InputError, InputFileError } from "../errors.js";
import { ringProblem } from "../layout/ring-check.js";
import {
  KML_OTHER_GEOMETRIES,
  childrenNamed,
  describeFound,
  descendants,
  geoJsonParts,
  kmlPolygon,
  parseKmlRoot,
  type LonLatPolygon,
} from "../layout/site-parse.js";

/** One keep-out zone as its file gives it. */
export interface ParsedKeepOut {
  /** The feature's name, or `<file stem> <k>` (k counts the file's zones from 1). */
  name: string;
  /** Base name of the file it came from. */
  source: string;
  /**
   * Polygons of [lon, lat] rings (WGS84 degrees), outer ring first; rings open
   * (no closing repeat, no repeated corners), outer rings counter-clockwise and
   * holes clockwise (RFC 7946 section 3.1.6).
   */
  polygons: number[][][][];
  /** The feature's own horizontal buffer, metres, when it gives one. */
  bufferM?: number;
}

const ALLOWED = "GeoJSON (RFC 7946) Polygon or MultiPolygon features, or KML 2.2 Placemarks with a Polygon or a MultiGeometry of polygons";

/** The feature property (GeoJSON) / ExtendedData field (KML) holding a zone's own buffer. */
const BUFFER_KEY = "bufferM";

/** A feature before its rings are checked. */
interface RawZone {
  /** How messages name it: `feature 2 ("school")` or `Placemark 3`. */
  label: string;
  name: string | undefined;
  polygons: LonLatPolygon[];
  bufferRaw: unknown;
}

/**
 * Zones from the text of one keep-out file: one per GeoJSON feature (a
 * MultiPolygon feature is one zone of several polygons; a bare Polygon or
 * MultiPolygon is one zone) or per KML Placemark with a Polygon or a
 * MultiGeometry of polygons. Refuses features that are not polygons, files
 * without a polygon, invalid rings, rings across the antimeridian, a declared
 * CRS other than WGS84, and a `bufferM` that is not a number >= 0.
 * `source` is the file as messages name it; zones keep its base name.
 * @example
 * parseKeepOutText('{"type":"Feature","properties":{"name":"school","bufferM":20},"geometry":{"type":"Polygon","coordinates":[[[15,47],[15.001,47],[15.001,47.001],[15,47]]]}}', "zones.geojson")
 * // [{ name: "school", source: "zones.geojson", polygons: [[[[15,47],[15.001,47],[15.001,47.001]]]], bufferM: 20 }]
 */
export function parseKeepOutText(text: string, source: string): ParsedKeepOut[] {
  const t = text.trim();
  if (!t) throw new InputFileError(source, "the keepOut file is empty");
  let raw: RawZone[];
  if (t.startsWith("<")) raw = kmlZones(t, source);
  else if (t.startsWith("{")) {
    let obj: unknown;
    try {
      obj = JSON.parse(t);
    } catch (e) {
      throw new InputFileError(source, `not valid JSON (${(e as Error).message})`);
    }
    raw = geoJsonZones(obj, source);
  } else {
    throw new InputFileError(source, `not a keep-out zone file: expected ${ALLOWED}`);
  }
  const base = path.basename(source);
  const stem = base.replace(/\.(geo)?json$|\.kml$/i, "") || base;
  return raw.map((z, k) => {
    const name = z.name ?? `${stem} ${k + 1}`;
    const label = `${source} ${z.label}`;
    const bufferM = bufferOf(z.bufferRaw, source, z.label);
    const polygons = z.polygons.map((p, pi) => cleanPolygon(p, z.polygons.length > 1 ? `${label} polygon ${pi + 1}` : label));
    return bufferM === undefined ? { name, source: base, polygons } : { name, source: base, polygons, bufferM };
  });
}

/**
 * Every zone of every file, in order, names made unique across files by
 * appending " (2)", " (3)"... to repeats.
 * @example const zones = await readKeepOutFiles(["/site/school.geojson", "/site/road.kml"])
 */
export async function readKeepOutFiles(files: readonly string[]): Promise<ParsedKeepOut[]> {
  const out: ParsedKeepOut[] = [];
  for (const file of files) {
    let text: string;
    try {
      text = await readFile(file, "utf8");
    } catch (e) {
      throw new InputFileError(file, readProblem((e as NodeJS.ErrnoException).code));
    }
    for (const z of parseKeepOutText(text, file)) out.push(z);
  }
  const taken = new Set<string>();
  for (const z of out) {
    let name = z.name;
    for (let k = 2; taken.has(name); k++) name = `${z.name} (${k})`;
    taken.add(name);
    z.name = name;
  }
  return out;
}

function readProblem(code: string | undefined): string {
  if (code === "ENOENT") return "keepOut file not found";
  if (code === "EISDIR") return "keepOut names a folder, not a file";
  if (code === "EACCES" || code === "EPERM") return "keepOut file cannot be read (permission denied)";
  return `keepOut file cannot be read${code ? ` (${code})` : ""}`;
}

function geoJsonZones(obj: unknown, source: string): RawZone[] {
  const { container, parts } = geoJsonParts(obj, source, "keep-out zones");
  const labelOf = (index: number, name: string | undefined) => {
    const what = container === "FeatureCollection" ? `feature ${index + 1}` : container === "Feature" ? "feature" : "geometry";
    return name === undefined ? what : `${what} (${JSON.stringify(name)})`;
  };
  if (!parts.some((p) => p.polygons.length > 0)) {
    const others = new Map<string, number>();
    for (const p of parts) for (const [type, n] of p.others) others.set(type, (others.get(type) ?? 0) + n);
    throw new InputError(source, describeFound(container, others), ALLOWED, "no polygon found");
  }
  return parts.map((p) => {
    if (p.notObject) throw new InputFileError(source, `${labelOf(p.index, undefined)} is not a GeoJSON Feature object`);
    const props = p.properties ?? {};
    const name = nameOf(props.name) ?? nameOf(props.Name) ?? nameOf(props.title);
    const label = labelOf(p.index, name);
    refuseOthers(source, label, p.others, p.polygons.length > 0);
    return { label, name, polygons: p.polygons, bufferRaw: props[BUFFER_KEY] };
  });
}

function kmlZones(text: string, source: string): RawZone[] {
  const root = parseKmlRoot(text, source);
  const found: { pm: Element; polygons: LonLatPolygon[]; others: Map<string, number> }[] = [];
  for (const el of descendants(root)) {
    if (el.localName !== "Placemark") continue;
    const polygons: LonLatPolygon[] = [];
    const others = new Map<string, number>();
    for (const g of geometriesOf(el)) {
      if (g.localName === "Polygon") polygons.push(kmlPolygon(g, source));
      else others.set(g.localName ?? "", (others.get(g.localName ?? "") ?? 0) + 1);
    }
    found.push({ pm: el, polygons, others });
  }
  if (!found.some((f) => f.polygons.length > 0)) {
    const others = new Map<string, number>();
    for (const f of found) for (const [type, n] of f.others) others.set(type, (others.get(type) ?? 0) + n);
    const what = found.length === 0 ? "a KML document without Placemarks" : describeFound("KML document", others);
    throw new InputError(source, what, ALLOWED, "no polygon found");
  }
  return found.map((f, k) => {
    const name = nameOf(childrenNamed(f.pm, "name")[0]?.textContent ?? undefined);
    const label = name === undefined ? `Placemark ${k + 1}` : `Placemark ${k + 1} (${JSON.stringify(name)})`;
    if (f.polygons.length === 0 && f.others.size === 0) throw new InputFileError(source, `${label} has no geometry; a keep-out zone must be a Polygon or a MultiGeometry of polygons`);
    refuseOthers(source, label, f.others, f.polygons.length > 0);
    return { label, name, polygons: f.polygons, bufferRaw: kmlExtendedValue(f.pm, BUFFER_KEY) };
  });
}

/**
 * The geometry elements of a Placemark: Polygons, and the geometries that hold
 * no area, without looking inside a Polygon (its LinearRings are its own).
 */
function geometriesOf(pm: Element): Element[] {
  const out: Element[] = [];
  const pending: XmlNode[] = [];
  for (let n: XmlNode | null = pm.lastChild; n; n = n.previousSibling) pending.push(n);
  while (pending.length) {
    const n = pending.pop() as XmlNode;
    if (n.nodeType !== 1) continue;
    const el = n as Element;
    const tag = el.localName ?? "";
    if (tag === "Polygon" || tag === "LinearRing" || KML_OTHER_GEOMETRIES.has(tag)) {
      out.push(el);
      continue;
    }
    for (let c: XmlNode | null = el.lastChild; c; c = c.previousSibling) pending.push(c);
  }
  return out;
}

/** A KML ExtendedData field: <Data name="key"><value> or <SchemaData><SimpleData name="key"> (KML 2.2, 9.3-9.5). */
function kmlExtendedValue(pm: Element, key: string): string | undefined {
  for (const ext of childrenNamed(pm, "ExtendedData")) {
    for (const d of childrenNamed(ext, "Data")) if (d.getAttribute("name") === key) return childrenNamed(d, "value")[0]?.textContent ?? "";
    for (const sd of childrenNamed(ext, "SchemaData")) for (const s of childrenNamed(sd, "SimpleData")) if (s.getAttribute("name") === key) return s.textContent ?? "";
  }
  return undefined;
}

function refuseOthers(source: string, label: string, others: ReadonlyMap<string, number>, hasPolygons: boolean): void {
  if (others.size === 0) return;
  const found = describeFound("", others);
  throw new InputFileError(
    source,
    hasPolygons
      ? `${label} holds ${found} besides its polygons; a keep-out zone must be polygons only (put other geometries in another file)`
      : `${label} is ${found}, not a polygon; a keep-out zone must be a Polygon or MultiPolygon`,
  );
}

function nameOf(v: unknown): string | undefined {
  if (typeof v === "number" && Number.isFinite(v)) return String(v);
  if (typeof v !== "string") return undefined;
  const s = v.trim();
  return s ? s : undefined;
}

/**
 * A zone's own buffer: a number >= 0, or text holding one (KML fields are
 * text; so are columns of some GIS exports). Missing, null or blank: none.
 */
function bufferOf(raw: unknown, source: string, label: string): number | undefined {
  if (raw === undefined || raw === null) return undefined;
  let n = NaN;
  if (typeof raw === "number") n = raw;
  else if (typeof raw === "string") {
    if (!raw.trim()) return undefined;
    n = Number(raw.trim());
  }
  if (!(Number.isFinite(n) && n >= 0)) {
    throw new InputFileError(source, `${label}: ${BUFFER_KEY} must be a number of metres >= 0 (got ${JSON.stringify(raw)})`);
  }
  return n;
}

/**
 * A polygon's rings checked and normalised: WGS84 positions, rings open, at
 * least three distinct corners, no ring crossing the antimeridian, the ring
 * rules of ring-check.ts (no ring touches or crosses itself or another, holes
 * inside the outer ring and not in each other), RFC 7946 winding.
 */
function cleanPolygon(poly: unknown, label: string): number[][][] {
  if (!Array.isArray(poly) || poly.length === 0) throw new InputError(label, poly, "a polygon with an outer ring", "empty polygon");
  const rings = poly.map((ring, ri) => {
    const rl = `${label} ${ri === 0 ? "outer ring" : `hole ${ri}`}`;
    if (!Array.isArray(ring)) throw new InputError(rl, ring, "a ring: a list of [longitude, latitude] positions", "malformed ring");
    const open: number[][] = [];
    for (const p of ring) {
      if (!Array.isArray(p) || !Number.isFinite(p[0]) || !Number.isFinite(p[1])) throw new InputError(rl, p, "[longitude, latitude] number pairs", "malformed position");
      if (Math.abs(p[0]) > 180 || Math.abs(p[1]) > 90) {
        throw new InputError(rl, [p[0], p[1]], "WGS84 longitude/latitude in degrees (|lon| <= 180, |lat| <= 90)", "coordinates are not WGS84 longitude/latitude; keep-out zones must be WGS84 (RFC 7946), reproject them first");
      }
      const last = open[open.length - 1];
      if (!last || last[0] !== p[0] || last[1] !== p[1]) open.push([p[0], p[1]]);
    }
    while (open.length > 1 && open[0][0] === open[open.length - 1][0] && open[0][1] === open[open.length - 1][1]) open.pop();
    const corners = new Set(open.map((p) => `${p[0]},${p[1]}`)).size;
    if (corners < 3) throw new InputError(rl, ring, "a ring with at least 3 distinct corners", `only ${corners} distinct corner${corners === 1 ? "" : "s"}`);
    for (let i = 0; i < open.length; i++) {
      const a = open[i], b = open[(i + 1) % open.length];
      // RFC 7946 (3.1.9) cuts shapes at 180 degrees; an edge longer than half a turn means the file did not.
      if (Math.abs(b[0] - a[0]) > 180) {
        throw new InputError(rl, [a, b], "a ring that stays on one side of the 180th meridian", "the ring crosses the antimeridian, which keep-out zones do not support (split the zone at 180 degrees)");
      }
    }
    return open;
  });
  const problem = ringProblem(rings);
  if (problem) {
    const at = `lon ${problem.x.toFixed(6)}, lat ${problem.y.toFixed(6)}`;
    const rl = (r: number) => `${label} ${r === 0 ? "outer ring" : `hole ${r}`}`;
    const holes = "holes that lie inside the outer ring without touching it or each other";
    if (problem.kind === "self") throw new InputError(rl(problem.ring), `kink at ${at}`, "a simple ring that does not cross or touch itself", "the ring self-intersects");
    if (problem.kind === "cross") {
      const other = problem.ringA === 0 ? "the outer ring" : `hole ${problem.ringA}`;
      throw new InputError(rl(problem.ringB), `meets ${other} at ${at}`, holes, `the hole crosses or touches ${other}`);
    }
    const where = problem.kind === "hole-outside" ? "lies outside the outer ring" : `lies inside hole ${problem.inside}`;
    throw new InputError(rl(problem.ring), `first corner at ${at}`, holes, `the hole ${where}`);
  }
  return rings.map((ring, ri) => {
    const a = signedArea(ring);
    if (a === 0) throw new InputError(`${label} ${ri === 0 ? "outer ring" : `hole ${ri}`}`, poly[ri], "a ring enclosing some area", "all corners lie on one line");
    return (a > 0) === (ri === 0) ? ring : ring.reverse();
  });
}

/** Shoelace area, positive for counter-clockwise rings (x east, y north). */
function signedArea(ring: readonly number[][]): number {
  let s = 0;
  const n = ring.length;
  // Relative to the first corner: lon/lat values share most of their digits.
  const [ox, oy] = ring[0];
  for (let i = 0; i < n; i++) {
    const p = ring[i], q = ring[(i + 1) % n];
    s += (p[0] - ox) * (q[1] - oy) - (q[0] - ox) * (p[1] - oy);
  }
  return s / 2;
}
