import type { DemGrid } from "../dem/grid.js";
import { extremaInOrientedRect } from "../dem/sample.js";
import { SlidingExtrema } from "./slidingExtrema.js";
import { EDGE_M, testCell } from "./zoneCell.js";
import { foldColumns } from "./foldColumnsWasm.js";


/**
 * zoneExtremaAlongLine for a leg along a grid axis (east-west: uy = 0, or
 * north-south: ux = 0), the usual case of a heading chosen along the grid.
 * Every cell of one grid column (east-west leg) or row (north-south leg) then
 * has the same distance along the leg, and every cell of one row (column) the
 * same distance across, so the band is a rectangle of cells: each column's
 * core cells (not within EDGE_M of the across edges) fold to one max, one min
 * and a nodata count, and the zone of a station is a window of whole columns
 * whose max and min come from a monotone deque over the columns (the sliding
 * window extremum; D. Lemire, "Streaming maximum-minimum filter using no more
 * than three comparisons per element", 2006, from memory) — no sort. Cells
 * within EDGE_M of a zone's edge, columns near the window's ends and rows near
 * the across edges, are settled per station by extremaInOrientedRect's own
 * test; zones near the grid border go to extremaInOrientedRect. Returns false
 * (outputs untouched) when the leg is not along an axis or the points are not
 * on one line in increasing order along (ux, uy). An east-west leg's columns are folded in
 * WebAssembly where built (foldColumns.as.ts; `foldIn` "js" for the JavaScript loop): the
 * same extrema.
 * @example zoneExtremaOnAxis(grid, st.x, st.y, 1, 0, 11.9, 24, maxOut, minOut) // true
 */
export function zoneExtremaOnAxis(
  grid: DemGrid,
  xs: Float64Array,
  ys: Float64Array,
  ux: number,
  uy: number,
  halfAlongM: number,
  halfAcrossM: number,
  outMax: Float64Array,
  outMin: Float64Array,
  foldIn?: "js" | "wasm",
): boolean {
  const n = xs.length;
  if (n < 8) return false;
  const ew = uy === 0 && ux !== 0;
  const ns = ux === 0 && uy !== 0;
  if (!ew && !ns) return false;
  const { width: w, height: h, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  // Unit vectors exactly as zoneExtremaAlongLine and extremaInOrientedRect form them.
  const norm = Math.hypot(ux, uy);
  const ax = ux / norm, ay = uy / norm;
  const bx = -ay, by = ax;
  const px0 = xs[0], py0 = ys[0];
  const t = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    // On an axis the across offset is exactly the other coordinate's difference.
    if ((ew ? ys[i] !== py0 : xs[i] !== px0)) return false;
    t[i] = (xs[i] - px0) * ax + (ys[i] - py0) * ay;
    if (i > 0 && t[i] < t[i - 1]) return false;
  }
  const HA = halfAlongM, HC = halfAcrossM;
  // "Groups" are lines of cells sharing one distance along (columns for an east-west leg,
  // rows for a north-south one); "lanes" the lines across them.
  const nG = ew ? w : h, nL = ew ? h : w;
  const gStride = ew ? 1 : w, lStride = ew ? w : 1;
  // Along offset of group g from the first point; across offset of lane l (as the general code computes them).
  const alongOf = (g: number): number => (ew ? (x0 + (g + 0.5) * dx - px0) * ax + 0 * ay : 0 * ax + (y0 + (g + 0.5) * dy - py0) * ay);
  const acrossOf = (l: number): number => Math.abs(ew ? 0 * bx + (y0 + (l + 0.5) * dy - py0) * by : (x0 + (l + 0.5) * dx - px0) * bx + 0 * by);
  const cMax = HC + 2 * EDGE_M;
  // Lanes of the band: across within cMax; core lanes are not within EDGE_M of HC.
  let l0 = -1, l1 = -2;
  const laneEdge = new Uint8Array(nL);
  for (let l = 0; l < nL; l++) {
    const cc = acrossOf(l);
    if (cc > cMax) continue;
    if (l0 < 0) l0 = l;
    l1 = l;
    laneEdge[l] = cc > HC - EDGE_M ? 1 : 0;
  }
  if (l0 < 0) return false;
  for (let l = l0; l <= l1; l++) if (acrossOf(l) > cMax) return false; // not one run: leave it to the general code
  // Groups of the band in along order.
  const aLo = t[0] - HA - 2 * EDGE_M, aHi = t[n - 1] + HA + 2 * EDGE_M;
  const groups: number[] = [];
  const step = (ew ? dx * ax : dy * ay) > 0 ? 1 : -1;
  for (let k = 0, g = step > 0 ? 0 : nG - 1; k < nG; k++, g += step) {
    const a = alongOf(g);
    if (a >= aLo && a <= aHi) groups.push(g);
  }
  const m = groups.length;
  const ga = new Float64Array(m), gMax = new Float64Array(m), gMin = new Float64Array(m);
  const nanBefore = new Int32Array(m + 1);
  for (let j = 0; j < m; j++) {
    ga[j] = alongOf(groups[j]);
    if (j > 0 && ga[j] < ga[j - 1]) return false;
  }
  // Core lanes: one run in the middle of the band (the edge lanes lie at its sides).
  let cA = l0;
  while (cA <= l1 && laneEdge[cA]) cA++;
  let cB = l1;
  while (cB >= cA && laneEdge[cB]) cB--;
  let oneRun = true;
  for (let l = cA; l <= cB; l++) if (laneEdge[l]) oneRun = false;
  if (!oneRun) return false;
  const nanOf = new Int32Array(m);
  foldCoreCells(heights, groups, gStride, lStride, cA, cB, gMax, gMin, nanOf, foldIn);
  for (let j = 0; j < m; j++) nanBefore[j + 1] = nanBefore[j] + nanOf[j];
  const edgeLanes: number[] = [];
  for (let l = l0; l <= l1; l++) if (laneEdge[l]) edgeLanes.push(l);
  const window = new SlidingExtrema(gMax, gMin);
  const acc = new Float64Array(2);
  let lo = 0, hi = 0, eLo = 0, eHi = 0;
  const extX = Math.abs(ax) * HA + Math.abs(bx) * HC;
  const extY = Math.abs(ay) * HA + Math.abs(by) * HC;
  // The band, and the zone of the station at hand (its point set per station).
  const band: ZoneBand = { groups, gStride, lStride, l0, l1, edgeLanes };
  const zone: ZoneRect = { px: NaN, py: NaN, ax, ay, bx, by, HA, HC };
  const one = (i: number) => extremaInOrientedRect(grid, xs.subarray(i, i + 1), ys.subarray(i, i + 1), ux, uy, HA, HC, outMax.subarray(i, i + 1), outMin.subarray(i, i + 1));
  for (let i = 0; i < n; i++) {
    const px = xs[i], py = ys[i];
    const cLo = Math.ceil((px - extX - x0) / dx - 0.5), cHi = Math.floor((px + extX - x0) / dx - 0.5);
    const rLo = Math.ceil((py + extY - y0) / dy - 0.5), rHi = Math.floor((py - extY - y0) / dy - 0.5);
    const inside = cLo >= 0 && rLo >= 0 && cHi < w && rHi < h;
    const sureLo = t[i] - HA + EDGE_M, sureHi = t[i] + HA - EDGE_M;
    while (hi < m && ga[hi] < sureHi) {
      if (gMax[hi] !== -Infinity) window.push(hi);
      hi++;
    }
    while (lo < hi && ga[lo] <= sureLo) lo++;
    window.evictBelow(lo);
    while (eLo < m && ga[eLo] < t[i] - HA - 2 * EDGE_M) eLo++;
    while (eHi < m && ga[eHi] <= t[i] + HA + 2 * EDGE_M) eHi++;
    if (!inside) { one(i); continue; }
    let bad = nanBefore[hi] - nanBefore[lo] > 0;
    // acc: the zone's max and min so far.
    acc[0] = lo < hi ? window.max() : -Infinity;
    acc[1] = lo < hi ? window.min() : Infinity;
    const pc = Math.floor((px - x0) / dx), pr = Math.floor((py - y0) / dy);
    const z0 = heights[pr * w + pc];
    if (z0 !== z0) bad = true;
    else { if (z0 > acc[0]) acc[0] = z0; if (z0 < acc[1]) acc[1] = z0; }
    if (!bad) {
      zone.px = px;
      zone.py = py;
      bad = !settleEdges(grid, band, zone, eLo, lo, hi, eHi, acc);
    }
    outMax[i] = bad ? NaN : acc[0];
    outMin[i] = bad ? NaN : acc[1];
  }
  return true;
}

/** The band's cells as zoneExtremaOnAxis walks them: groups (lines along), lanes (lines across) and the edge lanes. */
interface ZoneBand {
  groups: readonly number[];
  gStride: number;
  lStride: number;
  l0: number;
  l1: number;
  edgeLanes: readonly number[];
}

/** One station's zone: its point, the leg's unit vectors along and across, and the half sizes. */
interface ZoneRect {
  px: number;
  py: number;
  ax: number;
  ay: number;
  bx: number;
  by: number;
  HA: number;
  HC: number;
}

/**
 * The cells of one station's zone that the sliding window does not settle, by the rectangle
 * test itself (testCell, folding into acc): every band cell of the groups near the window's
 * ends (eLo..lo-1 and hi..eHi-1), then the edge lanes' cells in the zone's groups; false at
 * the first nodata cell inside the zone. A function of its own, not closures made per station.
 */
function settleEdges(grid: DemGrid, b: ZoneBand, z: ZoneRect, eLo: number, lo: number, hi: number, eHi: number, acc: Float64Array): boolean {
  for (let j = eLo; j < lo; j++) if (!testGroup(grid, b, z, j, acc)) return false;
  for (let j = hi; j < eHi; j++) if (!testGroup(grid, b, z, j, acc)) return false;
  for (let q = 0; q < b.edgeLanes.length; q++) {
    const off = b.edgeLanes[q] * b.lStride;
    for (let j = eLo; j < eHi; j++) if (!testCell(grid, b.groups[j] * b.gStride + off, z.px, z.py, z.ax, z.ay, z.bx, z.by, z.HA, z.HC, acc)) return false;
  }
  return true;
}

/** Every band cell of group j by the rectangle test (false: a nodata cell inside the zone). */
function testGroup(grid: DemGrid, b: ZoneBand, z: ZoneRect, j: number, acc: Float64Array): boolean {
  const base = b.groups[j] * b.gStride;
  for (let l = b.l0; l <= b.l1; l++) if (!testCell(grid, base + l * b.lStride, z.px, z.py, z.ax, z.ay, z.bx, z.by, z.HA, z.HC, acc)) return false;
  return true;
}

/**
 * Fold each group's core cells (lanes cA..cB) to its max, min and nodata count, in memory
 * order: along the rows of the grid (a row is a group of a north-south leg, a lane of an
 * east-west one). A function of its own so that the engine's on-the-fly compilation of
 * this loop does not take in the code after it before that code has run (compiled
 * together, every later call left the compiled loop for the interpreter there: node
 * --trace-deopt, one deoptimisation per leg).
 */
function foldCoreCells(
  heights: Float32Array,
  groups: number[],
  gStride: number,
  lStride: number,
  cA: number,
  cB: number,
  gMax: Float64Array,
  gMin: Float64Array,
  nanOf: Int32Array,
  foldIn?: "js" | "wasm",
): void {
  const m = groups.length;
  gMax.fill(-Infinity);
  gMin.fill(Infinity);
  if (lStride === 1) {
    for (let j = 0; j < m; j++) {
      const base = groups[j] * gStride;
      let mx = -Infinity, mn = Infinity, nan = 0;
      for (let i = base + cA; i <= base + cB; i++) {
        const z = heights[i];
        if (z !== z) { nan++; continue; }
        if (z > mx) mx = z;
        if (z < mn) mn = z;
      }
      gMax[j] = mx;
      gMin[j] = mn;
      nanOf[j] = nan;
    }
  } else {
    // An east-west leg's columns, contiguous: in WebAssembly where built (foldIn "wasm", the default).
    const first = groups[0], last = groups[m - 1];
    if (foldIn !== "js" && gStride === 1 && m > 0 && Math.abs(last - first) === m - 1) {
      const c0 = Math.min(first, last);
      const f = foldColumns(heights, lStride, cA, cB, c0, Math.max(first, last));
      if (f) {
        for (let j = 0; j < m; j++) {
          const c = groups[j] - c0;
          gMax[j] = f.max[c];
          gMin[j] = f.min[c];
          nanOf[j] = f.nan[c];
        }
        return;
      }
    }
    for (let l = cA; l <= cB; l++) {
      const base = l * lStride;
      for (let j = 0; j < m; j++) {
        const z = heights[base + groups[j] * gStride];
        if (z !== z) { nanOf[j]++; continue; }
        if (z > gMax[j]) gMax[j] = z;
        if (z < gMin[j]) gMin[j] = z;
      }
    }
  }
}
