/**
 * Shared pieces of the route tests: OGR/SpatiaLite SQL on GeoJSON (the outside
 * reference for buffers and relations), seeded shapes, and the plain distance
 * formulas the brute-force references use.
 */
import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { XY } from "../../src/layout/types.js";
import { seededRandom } from "../geo/projCli.js";
import { HAS_GDAL } from "../helpers/tools.js";

const ENV = { ...process.env, GDAL_PAM_ENABLED: "NO" };

/** GDAL with SpatiaLite's SQL functions (ST_Buffer, ST_Difference, ST_Relate), probed once. */
export const HAS_SPATIALITE = HAS_GDAL && probeSpatialite();

function probeSpatialite(): boolean {
  try {
    const rows = ogrSql([{ id: 1, geometry: { type: "Point", coordinates: [0, 0] } }], "SELECT ST_Area(ST_Buffer(geometry, 1)) AS a FROM z");
    return Number(rows[0].a) > 3;
  } catch {
    if (process.env.CI === "true") throw new Error("GDAL without SpatiaLite SQL functions under CI=true");
    process.stderr.write("NOTICE: ogr2ogr has no SpatiaLite functions; skipping the route tests that compare against them\n");
    return false;
  }
}

/** One feature of the layer `z`: its properties and a GeoJSON geometry in local metres. */
export type SqlFeature = { geometry: object } & Record<string, unknown>;

/**
 * Runs SQLite-dialect SQL over a GeoJSON layer named `z` (metric CRS, EPSG:32633
 * as a label: SpatiaLite's geometry functions are planar) and returns the rows
 * as strings, through `ogr2ogr -f CSV /vsistdout/`.
 */
export function ogrSql(features: SqlFeature[], sql: string): Record<string, string>[] {
  const dir = mkdtempSync(join(tmpdir(), "gsdplan-route-ogr-"));
  try {
    const file = join(dir, "z.geojson");
    const fc = {
      type: "FeatureCollection",
      crs: { type: "name", properties: { name: "urn:ogc:def:crs:EPSG::32633" } },
      features: features.map(({ geometry, ...properties }) => ({ type: "Feature", properties, geometry })),
    };
    writeFileSync(file, JSON.stringify(fc));
    const csv = execFileSync("ogr2ogr", ["-f", "CSV", "/vsistdout/", file, "-dialect", "sqlite", "-sql", sql], { encoding: "utf8", env: ENV, maxBuffer: 1 << 28 });
    const [head, ...lines] = csv.trim().split(/\r?\n/);
    const names = head.split(",").map((s) => s.replace(/"/g, ""));
    return lines.map((l) => Object.fromEntries(l.split(",").map((v, i) => [names[i], v.replace(/"/g, "")])));
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** GeoJSON Polygon of open rings (closing vertex added). */
export function polygonGeometry(rings: readonly XY[][]): { type: "Polygon"; coordinates: number[][][] } {
  return { type: "Polygon", coordinates: rings.map((r) => [...r, r[0]].map((p) => [p[0], p[1]])) };
}

/** GeoJSON MultiPolygon of polygons of open rings. */
export function multiPolygonGeometry(polys: readonly XY[][][]): { type: "MultiPolygon"; coordinates: number[][][][] } {
  return { type: "MultiPolygon", coordinates: polys.map((p) => polygonGeometry(p).coordinates) };
}

/** Seeded uniform numbers in [0, 1) (mulberry32, shared with the geo tests). */
export const seeded = seededRandom;

/**
 * A star-shaped ring around (cx, cy): n vertices at radii in [rMin, rMax] — concave
 * in general, never self-intersecting. `clockwise` for holes.
 */
export function starRing(rand: () => number, cx: number, cy: number, n: number, rMin: number, rMax: number, clockwise = false): XY[] {
  const ring: XY[] = [];
  for (let i = 0; i < n; i++) {
    const a = ((clockwise ? -1 : 1) * 2 * Math.PI * (i + 0.3 * rand())) / n;
    const r = rMin + (rMax - rMin) * rand();
    ring.push([cx + r * Math.cos(a), cy + r * Math.sin(a)]);
  }
  return ring;
}

/** Distance from p to segment a-b. */
export function pointSegmentDistance(p: XY, a: XY, b: XY): number {
  const dx = b[0] - a[0];
  const dy = b[1] - a[1];
  const dd = dx * dx + dy * dy;
  const t = dd === 0 ? 0 : Math.max(0, Math.min(1, ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / dd));
  return Math.hypot(a[0] + t * dx - p[0], a[1] + t * dy - p[1]);
}

function properCross(a: XY, b: XY, c: XY, d: XY): boolean {
  const o = (p: XY, q: XY, r: XY) => Math.sign((q[0] - p[0]) * (r[1] - p[1]) - (q[1] - p[1]) * (r[0] - p[0]));
  return o(a, b, c) * o(a, b, d) < 0 && o(c, d, a) * o(c, d, b) < 0;
}

/** Even-odd point in polygon (rings of one polygon, holes included). */
export function pointInPolygonEvenOdd(p: XY, rings: readonly XY[][]): boolean {
  let inside = false;
  for (const ring of rings) {
    for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) {
      const [xi, yi] = ring[i];
      const [xj, yj] = ring[j];
      if (yi > p[1] !== yj > p[1] && p[0] < ((xj - xi) * (p[1] - yi)) / (yj - yi) + xi) inside = !inside;
    }
  }
  return inside;
}

/** Distance from segment a-b to a polygon (0 when they meet): the textbook segment-segment minimum. */
export function segmentPolygonDistance(a: XY, b: XY, rings: readonly XY[][]): number {
  if (pointInPolygonEvenOdd(a, rings)) return 0;
  let d = Infinity;
  for (const ring of rings) {
    for (let i = 0; i < ring.length; i++) {
      const c = ring[i];
      const e = ring[(i + 1) % ring.length];
      if (properCross(a, b, c, e)) return 0;
      d = Math.min(d, pointSegmentDistance(a, c, e), pointSegmentDistance(b, c, e), pointSegmentDistance(c, a, b), pointSegmentDistance(e, a, b));
    }
  }
  return d;
}

/** Length of a polyline. */
export function pathLength(path: readonly XY[]): number {
  let s = 0;
  for (let i = 1; i < path.length; i++) s += Math.hypot(path[i][0] - path[i - 1][0], path[i][1] - path[i - 1][1]);
  return s;
}

/** Plain Dijkstra over a dense weight function (O(V²)), the textbook version. */
export function denseDijkstra(n: number, source: number, weight: (i: number, j: number) => number): Float64Array {
  const dist = new Float64Array(n).fill(Infinity);
  const done = new Uint8Array(n);
  dist[source] = 0;
  for (;;) {
    let u = -1;
    for (let i = 0; i < n; i++) if (!done[i] && dist[i] < Infinity && (u < 0 || dist[i] < dist[u])) u = i;
    if (u < 0) return dist;
    done[u] = 1;
    for (let v = 0; v < n; v++) {
      if (done[v]) continue;
      const w = weight(u, v);
      if (dist[u] + w < dist[v]) dist[v] = dist[u] + w;
    }
  }
}

/** A binary heap of [key, value] pairs, smallest key first (the textbook array heap). */
export class PairHeap {
  private a: [number, number][] = [];
  get size(): number {
    return this.a.length;
  }
  push(key: number, value: number): void {
    const a = this.a;
    a.push([key, value]);
    for (let i = a.length - 1; i > 0; ) {
      const p = (i - 1) >> 1;
      if (a[p][0] <= a[i][0]) break;
      [a[p], a[i]] = [a[i], a[p]];
      i = p;
    }
  }
  pop(): [number, number] {
    const a = this.a;
    const top = a[0];
    const last = a.pop()!;
    if (a.length > 0) {
      a[0] = last;
      for (let i = 0; ; ) {
        const l = 2 * i + 1;
        const r = l + 1;
        let m = i;
        if (l < a.length && a[l][0] < a[m][0]) m = l;
        if (r < a.length && a[r][0] < a[m][0]) m = r;
        if (m === i) break;
        [a[m], a[i]] = [a[i], a[m]];
        i = m;
      }
    }
    return top;
  }
}
