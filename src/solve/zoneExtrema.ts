import type { DemGrid } from "../dem/grid.js";
import { extremaInOrientedRect } from "../dem/sample.js";
import { zoneExtremaOnAxis } from "./zoneExtremaAxis.js";
import { SlidingExtrema } from "./slidingExtrema.js";
import { EDGE_M, testCell } from "./zoneCell.js";


/**
 * Max and min ground over each station's zone, exactly as extremaInOrientedRect
 * (same cells: centres within `halfAlongM` along and `halfAcrossM` across the
 * unit vector (ux, uy) of each point, the cell under the point always counted,
 * NaN where a zone cell is nodata or the zone leaves the grid), for points on
 * one line in increasing order along (ux, uy): the stations of a leg.
 *
 * A zone half a photo spacing long holds thousands of cells at 0.5 m, and
 * neighbouring stations share nearly all of them, so the cells of the leg's
 * band are visited once, at any heading, without sorting them. The "sure"
 * ends of the zones (a margin EDGE_M inside each zone's along edges) cut the
 * leg's line into pieces; every cell of the band falls in one piece (or
 * exactly on one cut), which keeps one max, one min and a nodata count. A
 * zone's sure cells are then a run of whole pieces whose ends only move
 * forward from station to station, and a monotone deque over the pieces gives
 * the run's max and min in amortised O(1) per station (the sliding window
 * extremum; D. Lemire, "Streaming maximum-minimum filter using no more than
 * three comparisons per element", 2006, from memory) — the same scheme as
 * zoneExtremaOnAxis, whose pieces are whole columns or rows. Cells within
 * EDGE_M of a zone's along or across edge are tested per station with the
 * rectangle test itself, so rounding cannot move a cell across an edge; zones
 * near the grid's border, and points off one line, go to extremaInOrientedRect.
 * Hand-written: no library offers a windowed max/min over cells of an
 * oriented rectangle on a raster.
 * @example zoneExtremaAlongLine(grid, st.x, st.y, st.ux, st.uy, 11.9, 24, maxOut, minOut)
 */
export function zoneExtremaAlongLine(
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
  if (n < 8) return extremaInOrientedRect(grid, xs, ys, ux, uy, halfAlongM, halfAcrossM, outMax, outMin);
  // A leg along a grid axis: whole columns (rows) share one distance along.
  if (zoneExtremaOnAxis(grid, xs, ys, ux, uy, halfAlongM, halfAcrossM, outMax, outMin)) return;
  const px0 = xs[0], py0 = ys[0];
  const t = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    t[i] = (xs[i] - px0) * ax + (ys[i] - py0) * ay;
    const q = (xs[i] - px0) * bx + (ys[i] - py0) * by;
    if (Math.abs(q) > EDGE_M * 0.01 || (i > 0 && t[i] < t[i - 1])) return extremaInOrientedRect(grid, xs, ys, ux, uy, halfAlongM, halfAcrossM, outMax, outMin);
  }
  const HA = halfAlongM, HC = halfAcrossM;
  if (!(HA > 4 * EDGE_M)) return extremaInOrientedRect(grid, xs, ys, ux, uy, HA, HC, outMax, outMin);
  // Sure ends of each zone along (cells strictly between them are inside, unless near an across edge),
  // both non-decreasing in i (rounding is monotone).
  const sureLo = new Float64Array(n), sureHi = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    sureLo[i] = t[i] - HA + EDGE_M;
    sureHi[i] = t[i] + HA - EDGE_M;
  }
  // The cuts: both sequences merged, without repeats; each zone's ends as indices of the cuts.
  const cut = new Float64Array(2 * n);
  let nCut = 0;
  for (let p = 0, q = 0; p < n || q < n;) {
    const v = q >= n || (p < n && sureLo[p] <= sureHi[q]) ? sureLo[p++] : sureHi[q++];
    if (nCut === 0 || v !== cut[nCut - 1]) cut[nCut++] = v;
  }
  const kLo = new Int32Array(n), kHi = new Int32Array(n);
  for (let i = 0, k = 0; i < n; i++) {
    while (cut[k] < sureLo[i]) k++;
    kLo[i] = k;
  }
  for (let i = 0, k = 0; i < n; i++) {
    while (cut[k] < sureHi[i]) k++;
    kHi[i] = k;
  }
  // The cuts between sentinels -Infinity and Infinity (cs[k + 1] = cut[k]), for the walk below.
  const cs = new Float64Array(nCut + 2);
  cs[0] = -Infinity;
  cs.set(cut.subarray(0, nCut), 1);
  cs[nCut + 1] = Infinity;
  // Pieces: 2k holds the cells strictly between cut k-1 and cut k, 2k+1 those exactly on cut k.
  const nP = 2 * nCut + 1;
  const pMax = new Float64Array(nP).fill(-Infinity), pMin = new Float64Array(nP).fill(Infinity);
  const pNan = new Int32Array(nP);
  // Cells near a cut (the along edges of some zone) and near the across edges, for the per-station test.
  const near = new CellList(), border = new CellList();
  // Candidate cells: the band from t[0] - HA to t[n-1] + HA, HC either side, row by row.
  const aLo = t[0] - HA - 2 * EDGE_M, aHi = t[n - 1] + HA + 2 * EDGE_M, cMax = HC + 2 * EDGE_M, cCore = HC - EDGE_M;
  let rMinF = Infinity, rMaxF = -Infinity;
  for (const a of [aLo, aHi]) {
    for (const c of [-cMax, cMax]) {
      const rowF = (py0 + a * ay + c * by - y0) / dy - 0.5;
      rMinF = Math.min(rMinF, rowF);
      rMaxF = Math.max(rMaxF, rowF);
    }
  }
  const r0 = Math.max(0, Math.floor(rMinF) - 1), r1 = Math.min(h - 1, Math.ceil(rMaxF) + 1);
  foldBand(heights, w, r0, r1, x0, y0, dx, dy, px0, py0, ax, ay, bx, by, aLo, aHi, cMax, cCore, cs, pMax, pMin, pNan, near, border);
  near.sort();
  border.sort();
  const nanBefore = new Int32Array(nP + 1);
  for (let j = 0; j < nP; j++) nanBefore[j + 1] = nanBefore[j] + pNan[j];
  const window = new SlidingExtrema(pMax, pMin);
  const acc = new Float64Array(2); // max, min of the zone so far
  // Next piece to push; pointers into `near` (cells within EDGE_M of either along end) and `border`.
  let next = 0, e0 = 0, e1 = 0, e2 = 0, e3 = 0, bLo = 0, bHi = 0;
  const na = near.keys, nc = near.cells, nN = near.length;
  const ba = border.keys, bc = border.cells, nB = border.length;
  const extX = Math.abs(ax) * HA + Math.abs(bx) * HC;
  const extY = Math.abs(ay) * HA + Math.abs(by) * HC;
  for (let i = 0; i < n; i++) {
    const px = xs[i], py = ys[i];
    // extremaInOrientedRect's bounding box: near the grid border let it decide.
    const cLo = Math.ceil((px - extX - x0) / dx - 0.5), cHi = Math.floor((px + extX - x0) / dx - 0.5);
    const rLo = Math.ceil((py + extY - y0) / dy - 0.5), rHi = Math.floor((py - extY - y0) / dy - 0.5);
    const inside = cLo >= 0 && rLo >= 0 && cHi < w && rHi < h;
    // Sure pieces of this zone: from just above cut kLo to just below cut kHi.
    const first = 2 * kLo[i] + 2, last = 2 * kHi[i];
    while (next <= last) window.push(next++);
    window.evictBelow(first);
    const tLo = t[i] - HA - 2 * EDGE_M, tHi = t[i] + HA + 2 * EDGE_M;
    const sLo = sureLo[i], sHi = sureHi[i];
    while (e0 < nN && na[e0] < tLo) e0++;
    while (e1 < nN && na[e1] <= sLo) e1++;
    while (e2 < nN && na[e2] < sHi) e2++;
    while (e3 < nN && na[e3] <= tHi) e3++;
    while (bLo < nB && ba[bLo] < tLo) bLo++;
    while (bHi < nB && ba[bHi] <= tHi) bHi++;
    if (!inside) {
      extremaInOrientedRect(grid, xs.subarray(i, i + 1), ys.subarray(i, i + 1), ux, uy, HA, HC, outMax.subarray(i, i + 1), outMin.subarray(i, i + 1));
      continue;
    }
    let bad = nanBefore[last + 1] - nanBefore[first] > 0;
    acc[0] = window.max();
    acc[1] = window.min();
    // The cell under the point always counts.
    const pc = Math.floor((px - x0) / dx), pr = Math.floor((py - y0) / dy);
    const z0 = heights[pr * w + pc];
    if (z0 !== z0) bad = true;
    else { if (z0 > acc[0]) acc[0] = z0; if (z0 < acc[1]) acc[1] = z0; }
    // Cells near an edge: the rectangle test itself, per station.
    for (let j = e0; j < e1 && !bad; j++) if (!testCell(grid, nc[j], px, py, ax, ay, bx, by, HA, HC, acc)) bad = true;
    for (let j = e2; j < e3 && !bad; j++) if (!testCell(grid, nc[j], px, py, ax, ay, bx, by, HA, HC, acc)) bad = true;
    for (let j = bLo; j < bHi && !bad; j++) if (!testCell(grid, bc[j], px, py, ax, ay, bx, by, HA, HC, acc)) bad = true;
    outMax[i] = bad ? NaN : acc[0];
    outMin[i] = bad ? NaN : acc[1];
  }
}

/**
 * The row-by-row pass of zoneExtremaAlongLine over the band's cells (rows r0 to r1): each
 * cell within aLo..aHi along and cMax across goes to `border` if within EDGE_M of the across
 * edge, else folds into its piece (2k: strictly between cuts cs[k] and cs[k + 1]; 2k + 1: on
 * cut cs[k + 1]) and, if within NEAR of a cut, also goes to `near`. A function of its own,
 * without closures, so its locals stay in registers.
 */
function foldBand(
  heights: Float32Array, w: number, r0: number, r1: number,
  x0: number, y0: number, dx: number, dy: number, px0: number, py0: number,
  ax: number, ay: number, bx: number, by: number,
  aLo: number, aHi: number, cMax: number, cCore: number,
  cs: Float64Array, pMax: Float64Array, pMin: Float64Array, pNan: Int32Array,
  near: CellList, border: CellList,
): void {
  const span = new Float64Array(2);
  const NEAR = 4 * EDGE_M;
  for (let r = r0; r <= r1; r++) {
    const ry = y0 + (r + 0.5) * dy - py0;
    // x range of the band on this row: intersection of the along and across slabs.
    span[0] = -Infinity; span[1] = Infinity;
    slab(ax, ry * ay, aLo, aHi, span);
    slab(bx, ry * by, -cMax, cMax, span);
    if (!(span[0] <= span[1])) continue;
    const c0 = Math.max(0, Math.floor((px0 + span[0] - x0) / dx - 0.5) - 1);
    const c1 = Math.min(w - 1, Math.ceil((px0 + span[1] - x0) / dx - 0.5) + 1);
    const rowBase = r * w;
    // Core run [ca, cb] of the row: columns that pass the band test with no across edge near.
    // Rounding keeps the distances along and across monotone in c, so the cells passing form
    // one run: estimate it, then settle its ends with the test itself. Columns outside the run
    // (or all of them, if the estimate misses) get the full test per cell below.
    span[0] = -Infinity; span[1] = Infinity;
    slab(ax, ry * ay, aLo, aHi, span);
    slab(bx, ry * by, -cCore, cCore, span);
    let ca = c1 + 1, cb = c1;
    if (span[0] <= span[1]) {
      ca = Math.max(c0, Math.floor((px0 + span[0] - x0) / dx - 0.5) - 2);
      cb = Math.min(c1, Math.ceil((px0 + span[1] - x0) / dx - 0.5) + 2);
      while (ca <= cb && !isCore(x0 + (ca + 0.5) * dx - px0, ry, ax, ay, bx, by, aLo, aHi, cCore)) ca++;
      while (cb >= ca && !isCore(x0 + (cb + 0.5) * dx - px0, ry, ax, ay, bx, by, aLo, aHi, cCore)) cb--;
    }
    // Index in `cs` of the first cut at or above a; along a row a is monotone, so it walks a step or two per cell.
    let K = -1;
    for (let c = c0; c <= c1; c++) {
      const rx = x0 + (c + 0.5) * dx - px0;
      const a = rx * ax + ry * ay;
      if (c < ca || c > cb) {
        const cc = Math.abs(rx * bx + ry * by);
        if (a < aLo || a > aHi || cc > cMax) continue;
        if (cc > cCore) { border.push(a, rowBase + c); continue; }
      }
      if (K < 0) K = lowerBound(cs, a);
      else {
        while (cs[K] < a) K++;
        while (cs[K - 1] >= a) K--;
      }
      const up = cs[K];
      const piece = up === a ? 2 * K - 1 : 2 * K - 2;
      const z = heights[rowBase + c];
      if (z !== z) pNan[piece]++;
      else {
        if (z > pMax[piece]) pMax[piece] = z;
        if (z < pMin[piece]) pMin[piece] = z;
      }
      if (up - a <= NEAR || a - cs[K - 1] <= NEAR) near.push(a, rowBase + c);
    }
  }
}

/** The band test of foldBand for a cell at offset (rx, ry) from the first point, its across edges moved in by EDGE_M. */
function isCore(rx: number, ry: number, ax: number, ay: number, bx: number, by: number, aLo: number, aHi: number, cCore: number): boolean {
  const a = rx * ax + ry * ay;
  return a >= aLo && a <= aHi && Math.abs(rx * bx + ry * by) <= cCore;
}

/** Narrows span [lo, hi] to the offsets x with lo <= x * k + off <= hi (empty if k is near zero and off outside). */
function slab(k: number, off: number, lo: number, hi: number, span: Float64Array): void {
  if (Math.abs(k) < 1e-12) {
    if (off < lo || off > hi) { span[0] = Infinity; span[1] = -Infinity; }
    return;
  }
  const u = (lo - off) / k, v = (hi - off) / k;
  span[0] = Math.max(span[0], Math.min(u, v));
  span[1] = Math.min(span[1], Math.max(u, v));
}

/** First index k with v[k] >= a, for v sorted with v[0] = -Infinity and its last value Infinity. */
function lowerBound(v: Float64Array, a: number): number {
  let lo = 1, hi = v.length - 1;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (v[mid] < a) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** A growable list of cells (grid index) with their distance along, sortable by it. */
class CellList {
  keys = new Float64Array(64);
  cells = new Int32Array(64);
  length = 0;

  push(a: number, cell: number): void {
    if (this.length === this.keys.length) {
      const k2 = new Float64Array(this.length * 2); k2.set(this.keys); this.keys = k2;
      const c2 = new Int32Array(this.length * 2); c2.set(this.cells); this.cells = c2;
    }
    this.keys[this.length] = a;
    this.cells[this.length++] = cell;
  }

  /** Sorts by distance along (ties in any order: the test per station does not depend on it). */
  sort(): void {
    const m = this.length;
    const order = Array.from({ length: m }, (_, j) => j);
    const keys = this.keys, cells = this.cells;
    order.sort((p, q) => keys[p] - keys[q]);
    const k2 = new Float64Array(Math.max(1, m)), c2 = new Int32Array(Math.max(1, m));
    for (let j = 0; j < m; j++) { k2[j] = keys[order[j]]; c2[j] = cells[order[j]]; }
    this.keys = k2;
    this.cells = c2;
  }
}
