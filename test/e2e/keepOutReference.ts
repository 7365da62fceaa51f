/**
 * Outside references for the keep-out checks.
 *
 * - GDAL/OGR (Debian gdal-bin, built with SpatiaLite): `ogr2ogr -t_srs EPSG:326xx` takes the
 *   written legs, the zone files and the site into one SpatiaLite database in the site's UTM
 *   zone, so buffers and lengths are in metres; SQL (ST_Buffer, ST_Intersects, ST_Distance,
 *   ST_Intersection, ST_Area, ST_Length) runs there. SpatiaLite's ST_Buffer cuts a circle into
 *   120 sides with their corners on the circle (an inscribed polygon; probed in the tests).
 * - `gdal_polygonize.py` for the footprint of a DEM's nodata cells, and `gdal_translate -of XYZ`
 *   for the DEM read back cell by cell.
 * - The shortest path among polygonal obstacles runs along the visibility graph of their
 *   vertices (Lozano-Pérez and Wesley, CACM 22(10), 1979; de Berg et al., Computational
 *   Geometry, ch. 15): `visibilityShortestM` searches that whole graph, no pruning, with the
 *   textbook Dijkstra of test/route/helpers.ts.
 */
import { execFileSync } from "node:child_process";
import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import type { Feature, FeatureCollection, Geometry } from "geojson";
import type { XY } from "../../src/layout/types.js";
import { denseDijkstra } from "../route/helpers.js";

const ENV = { ...process.env, GDAL_PAM_ENABLED: "NO" };

function run(cmd: string, args: string[]): string {
  return execFileSync(cmd, args, { encoding: "utf8", env: ENV, maxBuffer: 1 << 28, stdio: ["ignore", "pipe", "pipe"] });
}

/** One layer to load: a vector file OGR reads, the table name, an optional OGR -where filter. */
export interface OgrLayer {
  file: string;
  table: string;
  where?: string;
}

/**
 * A SpatiaLite database holding the layers, each reprojected by OGR (PROJ underneath) to
 * `EPSG:<epsg>`, 2D, polygons promoted to multipolygons (layers naming the same table go into
 * it one after the other). Returns its path.
 */
export function ogrDatabase(layers: OgrLayer[], epsg: number): string {
  const db = path.join(mkdtempSync(path.join(tmpdir(), "gsdplan-keepout-ogr-")), "ref.sqlite");
  const tables = new Set<string>();
  layers.forEach((l, i) => {
    // A second file into the same table is appended, with any fields the first lacked.
    const mode = i === 0 ? ["-dsco", "SPATIALITE=YES"] : tables.has(l.table) ? ["-update", "-addfields"] : ["-update"];
    tables.add(l.table);
    const args = ["-f", "SQLite", ...mode, db, l.file, "-nln", l.table, "-t_srs", `EPSG:${epsg}`, "-dim", "XY", "-nlt", "PROMOTE_TO_MULTI"];
    if (l.where) args.push("-where", l.where);
    run("ogr2ogr", args);
  });
  return db;
}

/** Rows of a SQL query on the database (SpatiaLite SQL), as GeoJSON features (geometry may be null). */
export function ogrQuery(db: string, sql: string): Feature<Geometry | null, Record<string, unknown>>[] {
  const out = run("ogr2ogr", ["-f", "GeoJSON", "/vsistdout/", db, "-sql", sql]);
  return (JSON.parse(out) as FeatureCollection<Geometry | null, Record<string, unknown>>).features;
}

/** `ogrinfo --formats` lists SQLite and `spatialite_version()` answers: the SQL reference is usable. */
export function spatialiteVersion(): string | null {
  try {
    if (!/SQLite/.test(run("ogrinfo", ["--formats"]))) return null;
    const out = run("ogrinfo", [":memory:", "-dialect", "sqlite", "-sql", "SELECT spatialite_version() AS v"]);
    return /v \(String\) = (\S+)/.exec(out)?.[1] ?? null;
  } catch {
    return null;
  }
}

/** The footprint of a DEM's nodata cells (`gdal_polygonize.py -nomask`, DN = nodata) into a new GeoJSON file in the DEM's CRS. */
export function nodataFootprintFile(dem: string, nodata: number): string {
  const dir = mkdtempSync(path.join(tmpdir(), "gsdplan-keepout-nodata-"));
  const all = path.join(dir, "all.geojson");
  const nd = path.join(dir, "nodata.geojson");
  run("gdal_polygonize.py", ["-q", "-nomask", dem, "-f", "GeoJSON", all]);
  run("ogr2ogr", ["-f", "GeoJSON", "-where", `DN = ${nodata}`, nd, all]);
  return nd;
}

/** Cell centres of a DEM as GDAL reads them (`gdal_translate -of XYZ`): [x, y, value] in its CRS. */
export function demXyz(dem: string): [number, number, number][] {
  const xyz = run("gdal_translate", ["-q", "-of", "XYZ", dem, "/vsistdout/"]);
  return xyz.trim().split("\n").map((l) => l.trim().split(/\s+/).map(Number) as [number, number, number]);
}

/** Polygons (rings of [x, y], closing vertex dropped) of a GeoJSON Polygon or MultiPolygon. */
export function polygonsOf(g: Geometry | null): XY[][][] {
  if (!g) return [];
  const open = (r: number[][]) => {
    const ring = r.map((p) => [p[0], p[1]] as XY);
    const a = ring[0], b = ring[ring.length - 1];
    if (ring.length > 1 && a[0] === b[0] && a[1] === b[1]) ring.pop();
    return ring;
  };
  if (g.type === "Polygon") return [g.coordinates.map(open)];
  if (g.type === "MultiPolygon") return g.coordinates.map((p) => p.map(open));
  throw new Error(`expected a polygon, got ${g.type}`);
}

/** Vertices of a GeoJSON LineString or MultiLineString, in order. */
export function lineVertices(g: Geometry | null): XY[] {
  if (!g) return [];
  if (g.type === "LineString") return g.coordinates.map((p) => [p[0], p[1]] as XY);
  if (g.type === "MultiLineString") return g.coordinates.flat().map((p) => [p[0], p[1]] as XY);
  throw new Error(`expected a line, got ${g.type}`);
}

/** Points every `stepM` (and the last vertex) along a polyline, planar. */
export function samplesAlong(line: readonly XY[], stepM: number): XY[] {
  const out: XY[] = [];
  for (let i = 1; i < line.length; i++) {
    const [a, b] = [line[i - 1], line[i]];
    const len = Math.hypot(b[0] - a[0], b[1] - a[1]);
    const n = Math.max(1, Math.ceil(len / stepM));
    for (let k = 0; k < n; k++) out.push([a[0] + ((b[0] - a[0]) * k) / n, a[1] + ((b[1] - a[1]) * k) / n]);
  }
  if (line.length) out.push(line[line.length - 1]);
  return out;
}

/** Largest distance of a polyline's vertices from the chord between its ends (a routed leg bends). */
export function bendM(line: readonly XY[]): number {
  const a = line[0], b = line[line.length - 1];
  let worst = 0;
  for (const p of line) worst = Math.max(worst, pointSegmentM(p, a, b));
  return worst;
}

/** Planar distance from p to segment a-b (the textbook projection, clamped to the segment). */
export function pointSegmentM(p: XY, a: XY, b: XY): number {
  const dx = b[0] - a[0], dy = b[1] - a[1];
  const dd = dx * dx + dy * dy;
  const t = dd === 0 ? 0 : Math.max(0, Math.min(1, ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / dd));
  return Math.hypot(a[0] + t * dx - p[0], a[1] + t * dy - p[1]);
}

const orient = (p: XY, q: XY, r: XY) => (q[0] - p[0]) * (r[1] - p[1]) - (q[1] - p[1]) * (r[0] - p[0]);

/** Segments p-q and c-d cross at a point inside both (not at an end, not collinear), beyond `eps` of area. */
function properCross(p: XY, q: XY, c: XY, d: XY, eps: number): boolean {
  const o1 = orient(p, q, c), o2 = orient(p, q, d), o3 = orient(c, d, p), o4 = orient(c, d, q);
  return ((o1 > eps && o2 < -eps) || (o1 < -eps && o2 > eps)) && ((o3 > eps && o4 < -eps) || (o3 < -eps && o4 > eps));
}

/** Even-odd point in polygon over all of its rings (holes count as outside). */
export function insidePolygon(p: XY, rings: readonly XY[][]): boolean {
  let inside = false;
  for (const ring of rings) {
    for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) {
      const [xi, yi] = ring[i], [xj, yj] = ring[j];
      if (yi > p[1] !== yj > p[1] && p[0] < ((xj - xi) * (p[1] - yi)) / (yj - yi) + xi) inside = !inside;
    }
  }
  return inside;
}

/** Distance from p to the nearest side of any ring. */
export function boundaryDistanceM(p: XY, rings: readonly XY[][]): number {
  let d = Infinity;
  for (const ring of rings) for (let i = 0; i < ring.length; i++) d = Math.min(d, pointSegmentM(p, ring[i], ring[(i + 1) % ring.length]));
  return d;
}

/** p lies inside an obstacle by more than `eps` (a point on an outline is outside). */
export function strictlyInside(p: XY, obstacles: readonly XY[][][], eps = 1e-6): boolean {
  return obstacles.some((rings) => insidePolygon(p, rings) && boundaryDistanceM(p, rings) > eps);
}

/**
 * Length of the shortest path from a to b that enters no obstacle's interior (touching an
 * outline is allowed), by an exhaustive search of the full visibility graph: nodes a, b and
 * every obstacle vertex; an edge wherever the straight segment crosses no side and no point of
 * it (seven along it) lies strictly inside an obstacle. Infinity when b cannot be reached.
 */
export function visibilityShortestM(obstacles: readonly XY[][][], a: XY, b: XY): number {
  const pts: XY[] = [a, b, ...obstacles.flatMap((rings) => rings.flat())];
  const sides: [XY, XY][] = obstacles.flatMap((rings) => rings.flatMap((r) => r.map((p, i) => [p, r[(i + 1) % r.length]] as [XY, XY])));
  const n = pts.length;
  const w = new Float64Array(n * n).fill(NaN);
  const visible = (p: XY, q: XY): boolean => {
    // Cross products in m² on coordinates near the origin (callers shift them): 1e-7 m² tells
    // a touch or a collinear run from a crossing without hiding any real crossing.
    for (const [c, d] of sides) if (properCross(p, q, c, d, 1e-7)) return false;
    for (let k = 1; k < 8; k++) {
      const t = k / 8;
      if (strictlyInside([p[0] + (q[0] - p[0]) * t, p[1] + (q[1] - p[1]) * t], obstacles)) return false;
    }
    return true;
  };
  return denseDijkstra(n, 0, (i, j) => {
    const k = Math.min(i, j) * n + Math.max(i, j);
    if (Number.isNaN(w[k])) w[k] = visible(pts[i], pts[j]) ? Math.hypot(pts[i][0] - pts[j][0], pts[i][1] - pts[j][1]) : Infinity;
    return w[k];
  })[1];
}

/** Length of a polyline. */
export function polylineM(line: readonly XY[]): number {
  let s = 0;
  for (let i = 1; i < line.length; i++) s += Math.hypot(line[i][0] - line[i - 1][0], line[i][1] - line[i - 1][1]);
  return s;
}
