import type { DemGrid } from "../../src/dem/grid.js";
import { extremaInOrientedRect } from "../../src/dem/sample.js";
import { zoneExtremaOnAxis } from "../../src/solve/zoneExtremaAxis.js";
import { SlidingExtrema } from "../../src/solve/slidingExtrema.js";

/** Rounding margin, metres: cells this close to a zone edge are settled by extremaInOrientedRect's own test. */
const EDGE_M = 1e-6;
/** extremaInOrientedRect's own slack on its edges. */
const RECT_EPS = 1e-9;

/**
 * The former general path of zoneExtremaAlongLine (src/solve/zoneExtrema.ts),
 * kept unchanged as the reference its replacement is tested against: every
 * cell of the leg's band sorted by its distance along, the zones windows of
 * that order with a monotone deque for their max and min. Its own agreement
 * with extremaInOrientedRect (the per-station rectangle scan) is tested
 * beside it.
 */
export function zoneExtremaSortedReference(
  grid: DemGrid,
  xs: Float64Array,
  ys: Float64Array,
  ux: number,
  uy: number,
  halfAlongM: number,
  halfAcrossM: number,
  outMax: Float64Array,
  outMin: Float64Array,
): void {
  const n = xs.length;
  const { width: w, height: h, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const norm = Math.hypot(ux, uy);
  const ax = ux / norm, ay = uy / norm;
  const bx = -ay, by = ax;
  const brute = () => extremaInOrientedRect(grid, xs, ys, ux, uy, halfAlongM, halfAcrossM, outMax, outMin);
  if (n < 8) return brute();
  // A leg along a grid axis: whole columns (rows) share one distance along, no sort needed.
  if (zoneExtremaOnAxis(grid, xs, ys, ux, uy, halfAlongM, halfAcrossM, outMax, outMin)) return;
  const px0 = xs[0], py0 = ys[0];
  const t = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    t[i] = (xs[i] - px0) * ax + (ys[i] - py0) * ay;
    const q = (xs[i] - px0) * bx + (ys[i] - py0) * by;
    if (Math.abs(q) > EDGE_M * 0.01 || (i > 0 && t[i] < t[i - 1])) return brute();
  }
  const HA = halfAlongM, HC = halfAcrossM;
  // Candidate cells: the band from t[0] - HA to t[n-1] + HA, HC either side, row by row.
  const aLo = t[0] - HA - 2 * EDGE_M, aHi = t[n - 1] + HA + 2 * EDGE_M, cMax = HC + 2 * EDGE_M;
  const corners = [[aLo, -cMax], [aLo, cMax], [aHi, -cMax], [aHi, cMax]].map(([a, c]) => [px0 + a * ax + c * bx, py0 + a * ay + c * by]);
  const rowsF = corners.map(([, y]) => (y - y0) / dy - 0.5);
  const r0 = Math.max(0, Math.floor(Math.min(...rowsF)) - 1), r1 = Math.min(h - 1, Math.ceil(Math.max(...rowsF)) + 1);
  let cap = 1024;
  let key = new Float64Array(cap), cell = new Int32Array(cap), edge = new Uint8Array(cap), zc = new Float64Array(cap);
  let m = 0;
  for (let r = r0; r <= r1; r++) {
    const yc = y0 + (r + 0.5) * dy;
    const ry = yc - py0;
    // x range of the band on this row: intersection of the along and across slabs.
    let xa = -Infinity, xb = Infinity;
    const slab = (k: number, off: number, lo: number, hi: number) => {
      if (Math.abs(k) < 1e-12) { if (off < lo || off > hi) { xa = Infinity; xb = -Infinity; } return; }
      const u = (lo - off) / k, v = (hi - off) / k;
      xa = Math.max(xa, Math.min(u, v));
      xb = Math.min(xb, Math.max(u, v));
    };
    slab(ax, ry * ay, aLo, aHi);
    slab(bx, ry * by, -cMax, cMax);
    if (!(xa <= xb)) continue;
    const c0 = Math.max(0, Math.floor((px0 + xa - x0) / dx - 0.5) - 1);
    const c1 = Math.min(w - 1, Math.ceil((px0 + xb - x0) / dx - 0.5) + 1);
    if (m + (c1 - c0 + 1) > cap) {
      while (m + (c1 - c0 + 1) > cap) cap *= 2;
      const k2 = new Float64Array(cap); k2.set(key); key = k2;
      const c2 = new Int32Array(cap); c2.set(cell); cell = c2;
      const e2 = new Uint8Array(cap); e2.set(edge); edge = e2;
      const z2 = new Float64Array(cap); z2.set(zc); zc = z2;
    }
    const rowBase = r * w;
    for (let c = c0; c <= c1; c++) {
      const rx = x0 + (c + 0.5) * dx - px0;
      const a = rx * ax + ry * ay;
      const cc = Math.abs(rx * bx + ry * by);
      if (a < aLo || a > aHi || cc > cMax) continue;
      key[m] = a;
      cell[m] = rowBase + c;
      edge[m] = cc > HC - EDGE_M ? 1 : 0;
      // Read the height here, along the row, rather than after the sort (a scattered read of the grid).
      zc[m] = heights[rowBase + c];
      m++;
    }
  }
  // Sort by distance along: counting sort into buckets an eighth of a cell
  // wide, scattering the cells' fields straight to their places, then
  // insertion sort inside each bucket (a handful of cells, or ties).
  const beta = Math.min(Math.abs(dx), Math.abs(dy)) / 8;
  const nb = Math.max(1, Math.ceil((aHi - aLo) / beta) + 1);
  const start = new Int32Array(nb + 1);
  const bucket = new Int32Array(m);
  for (let j = 0; j < m; j++) {
    const b = Math.min(nb - 1, Math.floor((key[j] - aLo) / beta));
    bucket[j] = b;
    start[b + 1]++;
  }
  for (let b = 0; b < nb; b++) start[b + 1] += start[b];
  const fill = start.slice(0, nb);
  const sa = new Float64Array(m), sz = new Float64Array(m);
  const sCell = new Int32Array(m), sEdge = new Uint8Array(m);
  for (let j = 0; j < m; j++) {
    const d = fill[bucket[j]]++;
    sa[d] = key[j];
    sz[d] = zc[j];
    sCell[d] = cell[j];
    sEdge[d] = edge[j];
  }
  for (let b = 0; b < nb; b++) {
    const s0 = start[b];
    for (let j = s0 + 1; j < start[b + 1]; j++) {
      const v = sa[j];
      if (sa[j - 1] <= v) continue;
      const vz = sz[j], vc = sCell[j], ve = sEdge[j];
      let k = j - 1;
      while (k >= s0 && sa[k] > v) { sa[k + 1] = sa[k]; sz[k + 1] = sz[k]; sCell[k + 1] = sCell[k]; sEdge[k + 1] = sEdge[k]; k--; }
      sa[k + 1] = v; sz[k + 1] = vz; sCell[k + 1] = vc; sEdge[k + 1] = ve;
    }
  }
  const nanBefore = new Int32Array(m + 1);
  // Cells near the across edges, in along order, for the per-station test.
  const border: number[] = [];
  for (let j = 0; j < m; j++) {
    nanBefore[j + 1] = nanBefore[j] + (!sEdge[j] && sz[j] !== sz[j] ? 1 : 0);
    if (sEdge[j]) border.push(j);
  }
  let bLo = 0, bHi = 0;
  const window = new SlidingExtrema(sz, sz);
  // Sure window [lo, hi) of core cells; edge pointers [eLo, eHi) of cells within EDGE_M of either end.
  let lo = 0, hi = 0, eLo = 0, eHi = 0;
  const extX = Math.abs(ax) * HA + Math.abs(bx) * HC;
  const extY = Math.abs(ay) * HA + Math.abs(by) * HC;
  for (let i = 0; i < n; i++) {
    const px = xs[i], py = ys[i];
    // extremaInOrientedRect's bounding box: near the grid border let it decide.
    const cLo = Math.ceil((px - extX - x0) / dx - 0.5), cHi = Math.floor((px + extX - x0) / dx - 0.5);
    const rLo = Math.ceil((py + extY - y0) / dy - 0.5), rHi = Math.floor((py - extY - y0) / dy - 0.5);
    const inside = cLo >= 0 && rLo >= 0 && cHi < w && rHi < h;
    const sureLo = t[i] - HA + EDGE_M, sureHi = t[i] + HA - EDGE_M;
    while (hi < m && sa[hi] < sureHi) {
      if (!sEdge[hi] && sz[hi] === sz[hi]) window.push(hi);
      hi++;
    }
    while (lo < hi && sa[lo] <= sureLo) lo++;
    window.evictBelow(lo);
    while (eLo < m && sa[eLo] < t[i] - HA - 2 * EDGE_M) eLo++;
    while (eHi < m && sa[eHi] <= t[i] + HA + 2 * EDGE_M) eHi++;
    if (!inside) {
      extremaInOrientedRect(grid, xs.subarray(i, i + 1), ys.subarray(i, i + 1), ux, uy, HA, HC, outMax.subarray(i, i + 1), outMin.subarray(i, i + 1));
      continue;
    }
    let bad = nanBefore[hi] - nanBefore[lo] > 0;
    let mx = lo < hi ? window.max() : -Infinity;
    let mn = lo < hi ? window.min() : Infinity;
    // The cell under the point always counts.
    const pc = Math.floor((px - x0) / dx), pr = Math.floor((py - y0) / dy);
    const z0 = heights[pr * w + pc];
    if (z0 !== z0) bad = true;
    else { if (z0 > mx) mx = z0; if (z0 < mn) mn = z0; }
    // Cells near an edge: the rectangle test itself, per station.
    while (bLo < border.length && sa[border[bLo]] < t[i] - HA - 2 * EDGE_M) bLo++;
    while (bHi < border.length && sa[border[bHi]] <= t[i] + HA + 2 * EDGE_M) bHi++;
    const test = (j: number): boolean => {
      const k = sCell[j];
      const r = Math.floor(k / w), c = k - r * w;
      const rx = x0 + (c + 0.5) * dx - px;
      const ry = y0 + (r + 0.5) * dy - py;
      const along = rx * ax + ry * ay;
      const across = rx * bx + ry * by;
      if (Math.abs(along) > HA + RECT_EPS || Math.abs(across) > HC + RECT_EPS) return true;
      const z = sz[j];
      if (z !== z) return false;
      if (z > mx) mx = z;
      if (z < mn) mn = z;
      return true;
    };
    for (let j = eLo; j < lo && !bad; j++) if (!test(j)) bad = true;
    for (let j = hi; j < eHi && !bad; j++) if (!test(j)) bad = true;
    for (let q = bLo; q < bHi && !bad; q++) if (!test(border[q])) bad = true;
    outMax[i] = bad ? NaN : mx;
    outMin[i] = bad ? NaN : mn;
  }
}
