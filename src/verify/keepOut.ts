/**
 * Keep-out zones on the whole path: every leg, checked as the straight line it
 * is, against every zone and its buffer. A point of the path is "in" a zone
 * when its signed distance to the zone (negative inside the polygon, holes
 * being outside) is less than bufferM - KEEP_OUT_TOLERANCE_M.
 *
 * Geometry: legs and zone edges are straight in the DEM's own CRS, as the rest
 * of the check takes legs (path.ts; for a geographic DEM that is also straight
 * in longitude/latitude, as RFC 7946 section 3.1.1 reads a GeoJSON edge). Both
 * are cut into chords of at most CHORD_M and placed in a transverse Mercator
 * projection centred on the rows, where distances are true to 1.2e-6 within
 * 10 km of the centre (its scale is 1 + x^2 / 2R^2, x the distance from the
 * central meridian; Snyder, "Map Projections: A Working Manual", USGS PP 1395,
 * 1987, ch. 8). There each chord against each polygon is exact planar
 * arithmetic (planar.ts): no sampling decides a breach.
 */
import proj4 from "proj4";
import { InputError } from "../errors.js";
import type { FlightPath } from "./path.js";
import {
  deepestInside,
  insideIntervals,
  intervalsLength,
  mergeIntervals,
  nearOutlineIntervals,
  planarPolygon,
  segmentOutlineDistance,
  subtractIntervals,
  type PlanarPolygon,
} from "./planar.js";
import type { VerifyZone } from "./types.js";

/**
 * A leg may come this much nearer a zone than its buffer (and, with no buffer,
 * this far inside it) before it is a breach, metres. What it has to cover:
 * - the list's rounding: waypoints.csv writes 1e-8 degree, 1.1 mm at most;
 * - this check's own geometry: under 1 mm (see CHORD_M and the projection above);
 * - the planner's frame, one scale for the whole site: UTM's scale changes by
 *   under 1e-5 per km, but a geographic DEM's local equirectangular frame drifts
 *   east-west by tan(lat) x (north-south distance from its centre) / R, 0.07 %
 *   2.5 km from it at 60 degrees: 3.5 cm on a 50 m buffer. A transit that hugs a
 *   buffered outline there sits that much inside the true buffer.
 * A few centimetres is far below what GNSS positioning and wind hold an aircraft
 * to, which is what a buffer is for. The length a breach reports is measured
 * within the buffer itself, not less this tolerance.
 */
export const KEEP_OUT_TOLERANCE_M = 0.05;
/**
 * Longest chord of a leg or zone edge, metres. A line straight in a geographic
 * DEM's CRS bends in the projection by its geodesic curvature, at most about
 * tan(latitude) / R: a 25 m chord departs from it by 25^2 tan(lat) / 8R, 0.01 mm
 * at 45 degrees, 0.07 mm at 80.
 */
export const CHORD_M = 25;
/**
 * The deepest point inside a zone is found to this, metres: a figure for the
 * report, not the decision, so the tolerance's size is enough.
 */
const DEPTH_EPS_M = KEEP_OUT_TOLERANCE_M;

/** One leg against one zone: where it breaks the zone's buffer. */
export interface KeepOutHit {
  /** Leg index (row i -> row i + 1). */
  leg: number;
  /** Index into the zones. */
  zone: number;
  /** How far inside the buffer the leg goes at its worst point, metres (bufferM - signed distance). */
  depthM: number;
  /** Signed distance from the zone's outline at that point: > 0 inside the zone, < 0 outside. */
  insideM: number;
  /** Leg parameter of the worst point (as path.ts places it, straight in the DEM's CRS). */
  t: number;
  /**
   * Length of the leg inside the zone or its buffer (the buffer itself, not less the
   * tolerance), metres; 0 for a move with no horizontal length.
   */
  lengthM: number;
}

interface PlanarZone {
  bufferM: number;
  polygons: PlanarPolygon[];
  minX: number;
  minY: number;
  maxX: number;
  maxY: number;
}

/**
 * Every breach of a keep-out zone by a leg of the path, one per leg and zone,
 * in leg order.
 * @example
 * const hits = keepOutHits(path, [{ name: "school", polygons: [[ring]], bufferM: 20 }]);
 * hits[0].lengthM // metres of the first offending leg inside the school's 20 m buffer
 */
export function keepOutHits(path: FlightPath, zones: readonly VerifyZone[]): KeepOutHit[] {
  if (zones.length === 0 || path.n < 2) return [];
  const toXY = localProjection(path);
  const planar = zones.map((z) => planarZone(z, path, toXY));
  const hits: KeepOutHit[] = [];
  const xs: number[] = [];
  const ys: number[] = [];
  for (let i = 0; i + 1 < path.n; i++) {
    if (!path.isLeg[i]) continue;
    legChords(path, i, toXY, xs, ys);
    let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
    for (let k = 0; k < xs.length; k++) {
      minX = Math.min(minX, xs[k]);
      maxX = Math.max(maxX, xs[k]);
      minY = Math.min(minY, ys[k]);
      maxY = Math.max(maxY, ys[k]);
    }
    planar.forEach((z, zi) => {
      const reach = Math.max(z.bufferM - KEEP_OUT_TOLERANCE_M, 0);
      if (maxX < z.minX - reach || minX > z.maxX + reach || maxY < z.minY - reach || minY > z.maxY + reach) return;
      const hit = legAgainstZone(xs, ys, z);
      if (hit) hits.push({ leg: i, zone: zi, ...hit });
    });
  }
  return hits;
}

/** The chords of one leg against one zone: the breached length and the worst point, or null. */
function legAgainstZone(xs: readonly number[], ys: readonly number[], z: PlanarZone): Omit<KeepOutHit, "leg" | "zone"> | null {
  const b = z.bufferM;
  const reach = b - KEEP_OUT_TOLERANCE_M;
  const n = xs.length - 1;
  let lengthM = 0;
  let any = false;
  let depthM = -Infinity;
  let insideM = 0;
  let t = 0;
  for (let k = 0; k < n; k++) {
    const ax = xs[k], ay = ys[k], bx = xs[k + 1], by = ys[k + 1];
    const pieceM = Math.hypot(bx - ax, by - ay);
    const found: number[] = [];
    for (const p of z.polygons) {
      const r = Math.abs(reach);
      if (Math.max(ax, bx) < p.minX - r || Math.min(ax, bx) > p.maxX + r || Math.max(ay, by) < p.minY - r || Math.min(ay, by) > p.maxY + r) continue;
      const inside = insideIntervals(p, ax, ay, bx, by);
      // The decision: inside, or nearer the outline than the buffer less the tolerance; with a
      // buffer under the tolerance, inside and farther from the outline than what it leaves.
      const decided = reach > 0 ? mergeIntervals([...inside, ...nearOutlineIntervals(p, reach, ax, ay, bx, by)]) : subtractIntervals(inside, nearOutlineIntervals(p, -reach, ax, ay, bx, by));
      if (decided.length === 0) continue;
      any = true;
      // The length reported is the whole stretch within the buffer itself.
      for (const v of b > 0 ? [...inside, ...nearOutlineIntervals(p, b, ax, ay, bx, by)] : inside) found.push(v);
      // The worst point of this piece: the deepest inside, else the closest to the outline.
      if (inside.length) {
        for (let q = 0; q < inside.length; q += 2) {
          // Pieces that cannot beat the deepest point found so far on this leg are not searched.
          const d = deepestInside(p, ax, ay, bx, by, inside[q], inside[q + 1], DEPTH_EPS_M, insideM);
          if (b + d.d > depthM) {
            depthM = b + d.d;
            insideM = d.d;
            t = (k + d.t) / n;
          }
        }
      } else {
        const d = segmentOutlineDistance(p, ax, ay, bx, by);
        if (b - d.d > depthM) {
          depthM = b - d.d;
          insideM = -d.d;
          t = (k + d.t) / n;
        }
      }
    }
    if (found.length) lengthM += intervalsLength(mergeIntervals(found)) * pieceM;
  }
  return any ? { depthM, insideM, t, lengthM } : null;
}

/**
 * WGS84 -> metres in a transverse Mercator projection centred on the rows
 * (proj4's tmerc on the WGS84 ellipsoid is the extended Poder/Engsager series).
 */
function localProjection(path: FlightPath): (lon: number, lat: number) => [number, number] {
  let lon0 = 0;
  let lat0 = 0;
  const ref = path.rows[0].longitude;
  for (const row of path.rows) {
    lon0 += ref + (((row.longitude - ref + 540) % 360) - 180);
    lat0 += row.latitude;
  }
  lon0 /= path.n;
  lat0 /= path.n;
  lon0 = ((lon0 + 540) % 360) - 180;
  const conv = proj4("+proj=longlat +datum=WGS84 +no_defs", `+proj=tmerc +lat_0=${lat0} +lon_0=${lon0} +k=1 +x_0=0 +y_0=0 +datum=WGS84 +units=m +no_defs`);
  return (lon, lat) => {
    const [x, y] = conv.forward([lon, lat]);
    return [x, y];
  };
}

/** The chord points of leg i (row i -> row i + 1), cut evenly in the DEM's index space. */
function legChords(path: FlightPath, i: number, toXY: (lon: number, lat: number) => [number, number], xs: number[], ys: number[]): void {
  const a = path.rows[i], b = path.rows[i + 1];
  const [ax, ay] = toXY(a.longitude, a.latitude);
  const [bx, by] = toXY(b.longitude, b.latitude);
  const n = Math.max(1, Math.ceil(Math.hypot(bx - ax, by - ay) / CHORD_M));
  xs.length = 0;
  ys.length = 0;
  xs.push(ax);
  ys.push(ay);
  for (let k = 1; k < n; k++) {
    const f = k / n;
    const [x, y] = toXY(...path.toLonLat(path.c[i] + (path.c[i + 1] - path.c[i]) * f, path.r[i] + (path.r[i + 1] - path.r[i]) * f));
    xs.push(x);
    ys.push(y);
  }
  xs.push(bx);
  ys.push(by);
}

/**
 * A zone in the local projection, its edges cut into chords along lines
 * straight in the DEM's CRS (straight in longitude/latitude for a ring the DEM's
 * CRS cannot place).
 */
function planarZone(z: VerifyZone, path: FlightPath, toXY: (lon: number, lat: number) => [number, number]): PlanarZone {
  if (!(Number.isFinite(z.bufferM) && z.bufferM >= 0)) throw new InputError(`keep-out zone ${JSON.stringify(z.name)} bufferM`, z.bufferM, "a number of metres >= 0");
  const polygons = z.polygons.map((rings) =>
    planarPolygon(
      rings.map((ring) => {
        let m = ring.length;
        if (m > 1 && ring[0][0] === ring[m - 1][0] && ring[0][1] === ring[m - 1][1]) m--;
        const lonLat = ring.slice(0, m);
        const idx = lonLat.map(([lon, lat]) => {
          try {
            return path.fromLonLat(lon, lat);
          } catch {
            return [NaN, NaN];
          }
        });
        const inDem = idx.every(([c, r]) => Number.isFinite(c) && Number.isFinite(r));
        const out: number[][] = [];
        for (let v = 0; v < m; v++) {
          const w = (v + 1) % m;
          const [ax, ay] = toXY(lonLat[v][0], lonLat[v][1]);
          const [bx, by] = toXY(lonLat[w][0], lonLat[w][1]);
          out.push([ax, ay]);
          const n = Math.ceil(Math.hypot(bx - ax, by - ay) / CHORD_M);
          for (let k = 1; k < n; k++) {
            const f = k / n;
            const [lon, lat] = inDem
              ? path.toLonLat(idx[v][0] + (idx[w][0] - idx[v][0]) * f, idx[v][1] + (idx[w][1] - idx[v][1]) * f)
              : [lonLat[v][0] + (lonLat[w][0] - lonLat[v][0]) * f, lonLat[v][1] + (lonLat[w][1] - lonLat[v][1]) * f];
            out.push(toXY(lon, lat));
          }
        }
        return out;
      }),
    ),
  );
  let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
  for (const p of polygons) {
    minX = Math.min(minX, p.minX);
    minY = Math.min(minY, p.minY);
    maxX = Math.max(maxX, p.maxX);
    maxY = Math.max(maxY, p.maxY);
  }
  return { bufferM: z.bufferM, polygons, minX, minY, maxX, maxY };
}
