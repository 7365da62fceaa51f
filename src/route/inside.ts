import type { XY } from "../layout/types.js";
import { edgesNearSegment, gridOfRings, regionsAcross, regionsAt, regionsBeside, type EdgeGrid } from "./edgeGrid.js";
import { zoneRings } from "./obstacles.js";
import { CROSSING, NO_CONTACT, OVERLAP, TOUCH, orient, segmentContact } from "./orient.js";
import { polygonLeft } from "./rings.js";
import type { BufferedZone } from "./types.js";

/**
 * Where the aircraft may not be: the union of buffered keep-out zones and, when
 * `bounds` is given, everything outside those polygons (the ground the DEM
 * knows). Points and segments are tested against the union directly: the
 * winding count over all rings is the number of regions holding a point
 * (edgeGrid.ts), so overlapping zones need no merging.
 *
 * "Inside" means in the open interior: a path may run along a zone's outline
 * and through its corners, which is where shortest paths go.
 */
export interface ObstacleIndex {
  grid: EdgeGrid;
  /** Every ring with its region on the left (zones' rings, then the bounds' rings reversed). */
  rings: XY[][];
  /** Regions holding a point far from every ring: 1 with bounds (the outside), else 0. */
  base: number;
}

/** Options of `indexObstacles`. */
export interface ObstacleOptions {
  /** Polygons (outer ring first, then holes; any winding) the aircraft must stay inside. */
  bounds?: readonly (readonly XY[][])[];
}

/**
 * Index of buffered zones (and the outside of `bounds`) for the tests below.
 * @example
 * const index = indexObstacles(bufferZones(zones), { bounds: [demOutline] });
 * pointInsideAny(index, [10, 20])
 */
export function indexObstacles(zones: readonly BufferedZone[], options: ObstacleOptions = {}): ObstacleIndex {
  const rings = zoneRings(zones);
  let base = 0;
  if (options.bounds) {
    base = 1;
    // The outside of a polygon is a region with its rings reversed, counted from
    // a base of one: -1 inside the outer ring, +1 back inside each hole.
    for (const poly of options.bounds) for (const r of polygonLeft(poly)) rings.push([...r].reverse());
  }
  return { grid: gridOfRings(rings), rings, base };
}

/**
 * True when p is in the interior of a zone or outside the bounds (a point on an
 * outline is not inside, unless regions hold it on every side).
 * @example pointInsideAny(index, [5, 5])
 */
export function pointInsideAny(index: ObstacleIndex, p: XY): boolean {
  const g = index.grid;
  const dirs = edgeDirectionsAt(g, p[0], p[1]);
  if (dirs.length === 0) return index.base + regionsAt(g, p[0], p[1]) > 0;
  // On an outline: inside only if every sector around p between the edges through it is held.
  dirs.sort((a, b) => a - b);
  for (let i = 0; i < dirs.length; i++) {
    const a0 = dirs[i];
    const a1 = i + 1 < dirs.length ? dirs[i + 1] : dirs[0] + 2 * Math.PI;
    if (a1 - a0 < 1e-12) continue;
    const mid = (a0 + a1) / 2;
    if (index.base + regionsBeside(g, p[0], p[1], Math.cos(mid), Math.sin(mid)) <= 0) return false;
  }
  return true;
}

/**
 * True when the segment a-b passes through the interior of a zone or leaves
 * the bounds. Touching an outline, running along it or through a corner is allowed.
 * @example segmentEntersAny(index, [0, 0], [100, 0])
 */
export function segmentEntersAny(index: ObstacleIndex, a: XY, b: XY): boolean {
  if (a[0] === b[0] && a[1] === b[1]) return pointInsideAny(index, a);
  const ts = contactParams(index.grid, a, b, true);
  if (ts === null) return true;
  return heldSpans(index, a, b, ts, true).length > 0;
}

/**
 * True when the segment a-b has any point in common with a zone (closed: touching
 * counts) or with the outside of the bounds.
 * @example segmentTouchesAny(index, [0, 0], [100, 0])
 */
export function segmentTouchesAny(index: ObstacleIndex, a: XY, b: XY): boolean {
  const g = index.grid;
  const k = edgesNearSegment(g, a[0], a[1], b[0], b[1]);
  const out = new Float64Array(2);
  for (let j = 0; j < k; j++) {
    const e = g.found[j];
    if (segmentContact(a[0], a[1], b[0], b[1], g.ax[e], g.ay[e], g.bx[e], g.by[e], out) !== NO_CONTACT) return true;
  }
  // No contact with any outline: the segment lies wholly inside or wholly outside.
  return index.base + regionsAt(g, a[0], a[1]) > 0;
}

/**
 * The parts of the segment a-b inside zones (or outside the bounds), as sorted,
 * merged parameter intervals [t0, t1] (0 at a, 1 at b), for cutting strips.
 * @example insideIntervals(index, [-50, 5], [50, 5]) // [[0.4, 0.6]] for a zone over x in [-10, 10]
 */
export function insideIntervals(index: ObstacleIndex, a: XY, b: XY): [number, number][] {
  if (a[0] === b[0] && a[1] === b[1]) return pointInsideAny(index, a) ? [[0, 1]] : [];
  const ts = contactParams(index.grid, a, b, false) ?? [];
  return heldSpans(index, a, b, ts, false);
}

/**
 * Parameters along a-b where it meets outlines, or null at the first crossing
 * when `stopAtCrossing` (a crossing always has a zone on one side of it).
 */
function contactParams(g: EdgeGrid, a: XY, b: XY, stopAtCrossing: boolean): number[] | null {
  const k = edgesNearSegment(g, a[0], a[1], b[0], b[1]);
  const ts: number[] = [];
  const out = new Float64Array(2);
  for (let j = 0; j < k; j++) {
    const e = g.found[j];
    const kind = segmentContact(a[0], a[1], b[0], b[1], g.ax[e], g.ay[e], g.bx[e], g.by[e], out);
    if (kind === CROSSING) {
      if (stopAtCrossing) return null;
      ts.push(out[0]);
    } else if (kind === TOUCH) ts.push(out[0]);
    else if (kind === OVERLAP) ts.push(out[0], out[1]);
  }
  return ts;
}

/**
 * Between consecutive contacts a segment is wholly in or out; a piece is held when
 * regions hold both its sides (a piece along an outline has the zone on one side only).
 */
function heldSpans(index: ObstacleIndex, a: XY, b: XY, ts: number[], firstOnly: boolean): [number, number][] {
  const g = index.grid;
  const cuts = [0, ...ts.filter((t) => t > 0 && t < 1).sort((p, q) => p - q), 1];
  const dx = b[0] - a[0];
  const dy = b[1] - a[1];
  const spans: [number, number][] = [];
  for (let i = 0; i + 1 < cuts.length; i++) {
    const t0 = cuts[i];
    const t1 = cuts[i + 1];
    if (t1 <= t0) continue;
    const tm = (t0 + t1) / 2;
    const mx = a[0] + tm * dx;
    const my = a[1] + tm * dy;
    const [right, left] = regionsAcross(g, mx, my, dx, dy);
    if (index.base + Math.min(right, left) <= 0) continue;
    const last = spans[spans.length - 1];
    if (last && last[1] === t0) last[1] = t1;
    else spans.push([t0, t1]);
    if (firstOnly) return spans;
  }
  return spans;
}

/** Directions (radians) of the outline edges leaving p, for p on an outline; empty when p is on none. */
function edgeDirectionsAt(g: EdgeGrid, px: number, py: number): number[] {
  const k = edgesNearSegment(g, px, py, px, py);
  const dirs: number[] = [];
  for (let j = 0; j < k; j++) {
    const e = g.found[j];
    const ax = g.ax[e];
    const ay = g.ay[e];
    const bx = g.bx[e];
    const by = g.by[e];
    if (orient(ax, ay, bx, by, px, py) !== 0) continue;
    const ex = bx - ax;
    const ey = by - ay;
    if (ex === 0 && ey === 0) continue;
    const s = ((px - ax) * ex + (py - ay) * ey) / (ex * ex + ey * ey);
    if (s < 0 || s > 1) continue;
    const toB = Math.atan2(by - py, bx - px);
    const toA = Math.atan2(ay - py, ax - px);
    if (px === ax && py === ay) dirs.push(toB);
    else if (px === bx && py === by) dirs.push(toA);
    else dirs.push(toA, toB);
  }
  return dirs;
}
