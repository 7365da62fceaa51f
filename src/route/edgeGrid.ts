import type { XY } from "../layout/types.js";
import { orient } from "./orient.js";

/**
 * Directed edges bucketed in a uniform grid, and the one count everything in
 * this stage rests on: how many regions hold a point.
 *
 * Every edge has the region it bounds on its left (rings.ts), and all regions
 * are counted with weight one, so the winding number of a point over all edges
 * is the number of regions that hold it, never negative (offsetCycles.ts shows
 * why this also holds for a raw, self-overlapping buffer outline). A point is
 * inside some region exactly when that count is positive, however the regions
 * overlap: no union has to be computed before a point or segment can be tested.
 *
 * The winding number comes from a ray (Sunday's crossing rule, D. Sunday,
 * "Inclusion of a point in a polygon", 2001; from memory), cast in a direction
 * the caller picks, so a point on an edge can be judged on either side of it.
 *
 * The grid is hand-written (rbush ships with turf) because a segment query in a
 * uniform grid walks only the cells the segment crosses; an R-tree answers by
 * bounding box, which for the long diagonal segments of a visibility graph holds
 * most of the map.
 */
export interface EdgeGrid {
  ax: Float64Array;
  ay: Float64Array;
  bx: Float64Array;
  by: Float64Array;
  n: number;
  minX: number;
  minY: number;
  maxX: number;
  maxY: number;
  cell: number;
  nx: number;
  ny: number;
  /** Cells are widened by this much so that a contact on a cell line is never missed, metres. */
  pad: number;
  /** Compressed cell lists: the edges of cell k are items[start[k] .. start[k + 1]). */
  start: Uint32Array;
  items: Uint32Array;
  /** Scratch: visit stamps per edge, the cells and edges of the last query. */
  stamp: Uint32Array;
  now: number;
  cells: Uint32Array;
  found: Uint32Array;
}

/**
 * Grid over the edges of rings (each ring closed implicitly, last vertex to first).
 * @example const g = gridOfRings([[[0, 0], [10, 0], [10, 10], [0, 10]]]); g.n // 4
 */
export function gridOfRings(rings: readonly (readonly XY[])[]): EdgeGrid {
  let n = 0;
  for (const r of rings) n += r.length;
  const ax = new Float64Array(n);
  const ay = new Float64Array(n);
  const bx = new Float64Array(n);
  const by = new Float64Array(n);
  let k = 0;
  for (const r of rings) {
    for (let i = 0; i < r.length; i++) {
      const a = r[i];
      const b = r[(i + 1) % r.length];
      ax[k] = a[0];
      ay[k] = a[1];
      bx[k] = b[0];
      by[k] = b[1];
      k++;
    }
  }
  return buildEdgeGrid(ax, ay, bx, by);
}

/**
 * Grid over directed edges given as coordinate arrays (a -> b).
 * @example buildEdgeGrid(Float64Array.of(0), Float64Array.of(0), Float64Array.of(1), Float64Array.of(1)).n // 1
 */
export function buildEdgeGrid(ax: Float64Array, ay: Float64Array, bx: Float64Array, by: Float64Array): EdgeGrid {
  const n = ax.length;
  let minX = Infinity;
  let minY = Infinity;
  let maxX = -Infinity;
  let maxY = -Infinity;
  for (let i = 0; i < n; i++) {
    minX = Math.min(minX, ax[i], bx[i]);
    maxX = Math.max(maxX, ax[i], bx[i]);
    minY = Math.min(minY, ay[i], by[i]);
    maxY = Math.max(maxY, ay[i], by[i]);
  }
  if (n === 0) minX = minY = maxX = maxY = 0;
  const w = maxX - minX;
  const h = maxY - minY;
  const span = Math.max(w, h, 1e-6);
  // About one edge per cell, at most 1024 cells a side.
  const cell = Math.max(Math.sqrt((w * h) / Math.max(n, 1)), span / 1024);
  const nx = Math.floor(w / cell) + 1;
  const ny = Math.floor(h / cell) + 1;
  const g: EdgeGrid = {
    ax, ay, bx, by, n, minX, minY, maxX, maxY, cell, nx, ny,
    pad: span * 1e-9 + 1e-9,
    start: new Uint32Array(nx * ny + 1),
    items: new Uint32Array(0),
    stamp: new Uint32Array(n),
    now: 0,
    cells: new Uint32Array(64),
    found: new Uint32Array(64),
  };
  const counts = g.start;
  for (let e = 0; e < n; e++) {
    const m = cellsOnSegment(g, ax[e], ay[e], bx[e], by[e]);
    for (let j = 0; j < m; j++) counts[g.cells[j] + 1]++;
  }
  for (let k = 0; k < nx * ny; k++) counts[k + 1] += counts[k];
  const fill = counts.slice(0, nx * ny);
  g.items = new Uint32Array(counts[nx * ny]);
  for (let e = 0; e < n; e++) {
    const m = cellsOnSegment(g, ax[e], ay[e], bx[e], by[e]);
    for (let j = 0; j < m; j++) g.items[fill[g.cells[j]]++] = e;
  }
  return g;
}

/**
 * The cells a segment (widened by `pad`) passes, column by column, into
 * `g.cells`; returns their number. Cells outside the grid hold no edges and are skipped.
 * @example cellsOnSegment(gridOfRings([[[0, 0], [10, 0], [10, 10], [0, 10]]]), 0, 0, 10, 10) // the cells along the diagonal
 */
export function cellsOnSegment(g: EdgeGrid, x0: number, y0: number, x1: number, y1: number): number {
  const { pad, cell, minX, minY, nx, ny } = g;
  const xmin = Math.min(x0, x1) - pad;
  const xmax = Math.max(x0, x1) + pad;
  if (xmax < g.minX - pad || xmin > g.maxX + pad) return 0;
  if (Math.max(y0, y1) + pad < g.minY - pad || Math.min(y0, y1) - pad > g.maxY + pad) return 0;
  const c0 = Math.max(0, Math.floor((xmin - minX) / cell));
  const c1 = Math.min(nx - 1, Math.floor((xmax - minX) / cell));
  const dx = x1 - x0;
  let m = 0;
  for (let c = c0; c <= c1; c++) {
    let ylo: number;
    let yhi: number;
    if (dx === 0) {
      ylo = Math.min(y0, y1);
      yhi = Math.max(y0, y1);
    } else {
      const xa = Math.max(xmin, minX + c * cell);
      const xb = Math.min(xmax, minX + (c + 1) * cell);
      const ta = Math.min(1, Math.max(0, (xa - x0) / dx));
      const tb = Math.min(1, Math.max(0, (xb - x0) / dx));
      const ya = y0 + ta * (y1 - y0);
      const yb = y0 + tb * (y1 - y0);
      ylo = Math.min(ya, yb);
      yhi = Math.max(ya, yb);
    }
    const r0 = Math.max(0, Math.floor((ylo - pad - minY) / cell));
    const r1 = Math.min(ny - 1, Math.floor((yhi + pad - minY) / cell));
    if (r1 < r0) continue;
    if (m + r1 - r0 + 1 > g.cells.length) g.cells = grow(g.cells, m + r1 - r0 + 1);
    for (let r = r0; r <= r1; r++) g.cells[m++] = r * nx + c;
  }
  return m;
}

/**
 * The edges registered in the cells a segment passes, each once, into
 * `g.found`; returns their number. A superset of the edges the segment meets.
 * @example
 * const g = gridOfRings([[[0, 0], [10, 0], [10, 10], [0, 10]]]);
 * g.found.subarray(0, edgesNearSegment(g, 5, -1, 5, 1)) // includes edge 0, the bottom side
 */
export function edgesNearSegment(g: EdgeGrid, x0: number, y0: number, x1: number, y1: number): number {
  const m = cellsOnSegment(g, x0, y0, x1, y1);
  g.now++;
  if (g.now === 0xffffffff) {
    g.stamp.fill(0);
    g.now = 1;
  }
  const { start, items, stamp, now } = g;
  let k = 0;
  for (let j = 0; j < m; j++) {
    const cell = g.cells[j];
    for (let q = start[cell]; q < start[cell + 1]; q++) {
      const e = items[q];
      if (stamp[e] === now) continue;
      stamp[e] = now;
      if (k >= g.found.length) g.found = grow(g.found, k + 1);
      g.found[k++] = e;
    }
  }
  return k;
}

/**
 * How many regions hold the points just beside p in direction u (p + εu, ε -> 0+):
 * the winding number along the ray from p towards u. Edges through p are
 * skipped (they lie behind p + εu), so p may sit on an edge or a vertex; u must
 * not run along an edge through p.
 * @example regionsBeside(gridOfRings([[[0, 0], [2, 0], [2, 2], [0, 2]]]), 1, 1, 1, 0) // 1
 */
export function regionsBeside(g: EdgeGrid, px: number, py: number, ux: number, uy: number): number {
  const t = rayExit(g, px, py, ux, uy);
  if (t < 0) return 0;
  const k = edgesNearSegment(g, px, py, px + ux * t, py + uy * t);
  const { ax, ay, bx, by, found } = g;
  let w = 0;
  for (let j = 0; j < k; j++) {
    const e = found[j];
    // Side of each end across the ray: > 0 left of it. Exact signs (no tolerance)
    // keep the half-open rule consistent between edges sharing a vertex.
    const sa = ux * (ay[e] - py) - uy * (ax[e] - px);
    const sb = ux * (by[e] - py) - uy * (bx[e] - px);
    if (sa <= 0 && sb > 0) {
      if (orient(ax[e], ay[e], bx[e], by[e], px, py) > 0) w++;
    } else if (sb <= 0 && sa > 0) {
      if (orient(ax[e], ay[e], bx[e], by[e], px, py) < 0) w--;
    }
  }
  return w;
}

/**
 * Regions holding the points just right and just left of p, for p on a segment
 * of direction d that meets no edge at p except edges along it: one ray, cast
 * to the nearer side of the grid, and the edges along d through p, each of
 * which holds its region on its left. Returns [right, left].
 * @example
 * // On the bottom side of a square, heading east: nothing to the right (south), the square to the left.
 * regionsAcross(gridOfRings([[[0, 0], [2, 0], [2, 2], [0, 2]]]), 1, 0, 1, 0) // [0, 1]
 */
export function regionsAcross(g: EdgeGrid, px: number, py: number, dx: number, dy: number): [number, number] {
  const tr = rayExit(g, px, py, dy, -dx);
  const tl = rayExit(g, px, py, -dy, dx);
  let along = 0;
  const k = edgesNearSegment(g, px, py, px, py);
  for (let j = 0; j < k; j++) {
    const e = g.found[j];
    const ex = g.bx[e] - g.ax[e];
    const ey = g.by[e] - g.ay[e];
    if (ex === 0 && ey === 0) continue;
    // Any edge through p runs along d (the caller's promise), so no test of
    // parallelism, which a short segment's rounded direction would fail.
    if (orient(g.ax[e], g.ay[e], g.bx[e], g.by[e], px, py) !== 0) continue;
    const s = ((px - g.ax[e]) * ex + (py - g.ay[e]) * ey) / (ex * ex + ey * ey);
    if (s < 0 || s > 1) continue;
    along += ex * dx + ey * dy > 0 ? 1 : -1;
  }
  if (tr <= tl) {
    const right = regionsBeside(g, px, py, dy, -dx);
    return [right, right + along];
  }
  const left = regionsBeside(g, px, py, -dy, dx);
  return [left - along, left];
}

/**
 * Parameter where the ray p + t u leaves the grid's box (widened), -1 when it never meets it.
 * @example rayExit(gridOfRings([[[0, 0], [2, 0], [2, 2], [0, 2]]]), 1, 1, 1, 0) // just over 1
 */
export function rayExit(g: EdgeGrid, px: number, py: number, ux: number, uy: number): number {
  const m = 4 * g.pad + 1e-9;
  const x = slab(px, ux, g.minX - m, g.maxX + m);
  const y = slab(py, uy, g.minY - m, g.maxY + m);
  const tIn = Math.max(0, x[0], y[0]);
  const tOut = Math.min(x[1], y[1]);
  return tOut >= tIn ? tOut : -1;
}

/** Parameter interval of p + t u inside [lo, hi] along one axis. */
function slab(p: number, u: number, lo: number, hi: number): [number, number] {
  if (u === 0) return p < lo || p > hi ? [Infinity, -Infinity] : [-Infinity, Infinity];
  const t0 = (lo - p) / u;
  const t1 = (hi - p) / u;
  return t0 < t1 ? [t0, t1] : [t1, t0];
}

/**
 * Regions holding p, for p on no edge: the ray goes to the nearest side of the grid.
 * @example regionsAt(gridOfRings([[[0, 0], [2, 0], [2, 2], [0, 2]]]), 1, 1) // 1
 */
export function regionsAt(g: EdgeGrid, px: number, py: number): number {
  const dx = [g.maxX - px, px - g.minX, g.maxY - py, py - g.minY];
  let best = 0;
  for (let i = 1; i < 4; i++) if (dx[i] < dx[best]) best = i;
  const u = [[1, 0], [-1, 0], [0, 1], [0, -1]][best];
  return regionsBeside(g, px, py, u[0], u[1]);
}

function grow(a: Uint32Array, need: number): Uint32Array {
  const b = new Uint32Array(Math.max(need, a.length * 2));
  b.set(a);
  return b;
}
