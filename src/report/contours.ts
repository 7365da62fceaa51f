/**
 * Contour lines and mask outlines by marching squares.
 *
 * The tracing (isoRings below) is d3-contour's algorithm (v4: the same case table, scan
 * order, fragment stitching, linear smoothing and hole assignment) re-written for typed
 * arrays: d3-contour reads the grid through generic per-cell callbacks and keeps its
 * fragments in sparse arrays, which made the report's contours one of the slower parts of
 * the page on a thousand-pixel map. The rings come out the same, point for point and in
 * the same order, as d3-contour's (test/report/contours.test.ts checks it against d3-contour).
 *
 * Filled rings also run along the grid's frame and around nodata holes (invalid values
 * count as -Infinity). For lines we cut those rings into polylines and drop the stretches
 * that run along the frame or hug nodata, so only true isolines remain. Coordinates come
 * back in the grid's column/row space (0..width, 0..height; cell centres at +0.5), which
 * the map converts to its own units.
 */
import type { ReportGrid } from "./model.js";

export type Polyline = number[]; // flat [c0, r0, c1, r1, ...]

export interface ContourLine {
  valueM: number;
  lines: Polyline[];
}

/**
 * A contour interval of 1, 2 or 5 x 10^k giving about 10 to 20 lines over [minM, maxM]
 * (the one whose line count is nearest 15).
 *
 * @example contourInterval(212, 398) // 10 (18 lines)
 */
export function contourInterval(minM: number, maxM: number): number {
  const span = maxM - minM;
  if (!(span > 0)) return 1;
  let best = 1;
  let bestScore = Infinity;
  const k0 = Math.floor(Math.log10(span / 15));
  for (let k = k0 - 1; k <= k0 + 1; k++)
    for (const m of [1, 2, 5]) {
      const step = m * Math.pow(10, k);
      const count = Math.floor(maxM / step) - Math.ceil(minM / step) + 1;
      const score = Math.abs(count - 15) + (count < 10 || count > 20 ? 100 : 0);
      if (score < bestScore) {
        bestScore = score;
        best = step;
      }
    }
  return +best.toPrecision(12);
}

/**
 * The least and greatest height (NaN left out), for contourLines and map.ts contourLayer,
 * which made this pass each. A function of its own: as contourLayer's first loop it was
 * compiled mid-call with the labelling after it not yet run, which then sent the whole
 * function back to the interpreter (node --trace-deopt). The range is written as the loop
 * goes, so nothing but the return follows the loop here either.
 */
export function heightRange(heights: ArrayLike<number>): Float64Array {
  const range = Float64Array.of(Infinity, -Infinity);
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < heights.length; i++) {
    const z = heights[i];
    if (z < lo) lo = z;
    if (z > hi) hi = z;
    range[0] = lo;
    range[1] = hi;
  }
  return range;
}

/**
 * Contour lines of the heights at multiples of `intervalM`; `range`: the heights' least and
 * greatest (heightRange), when the caller has it already.
 *
 * @example const lines = contourLines(dem, 10);
 */
export function contourLines(grid: Pick<ReportGrid, "width" | "height" | "heights">, intervalM: number, range: ArrayLike<number> = heightRange(grid.heights)): ContourLine[] {
  const { width: w, height: h, heights } = grid;
  const lo = range[0];
  const hi = range[1];
  if (!(hi > lo)) return [];
  const levels: number[] = [];
  for (let v = Math.ceil(lo / intervalM) * intervalM; v <= hi; v += intervalM) levels.push(+v.toPrecision(12));
  levels.sort((a, b) => a - b);
  const out: ContourLine[] = [];
  const ranges = rowRanges(heights, w, h);
  for (const value of levels) {
    const lines: Polyline[] = [];
    for (const poly of isoPolygons(heights, w, h, value, true, ranges)) for (const ring of poly) splitRing(ring, w, h, heights, lines);
    if (lines.length) out.push({ valueM: value, lines });
  }
  return out;
}

/**
 * Outline rings of the cells where `mask` is non-zero, on cell edges. Rings are flat
 * [c, r, ...] closed loops (outer rings and holes alike; draw with fill-rule evenodd).
 *
 * @example const rings = maskOutline(flags.map((f) => f & 8), w, h);
 */
export function maskOutline(mask: ArrayLike<number>, w: number, h: number): Polyline[] {
  // A byte mask is traced as it is (non-zero is at least 1, above the 0.5 level); any
  // other is copied to 0/1 first.
  let values: Uint8Array;
  if (mask instanceof Uint8Array && mask.length === w * h) values = mask;
  else {
    values = new Uint8Array(w * h);
    for (let i = 0; i < w * h; i++) values[i] = mask[i] ? 1 : 0;
  }
  let any = false;
  for (let i = 0; i < w * h; i++)
    if (values[i] !== 0) {
      any = true;
      break;
    }
  if (!any) return [];
  // Unsmoothed: vertices sit half-way between a 1 and a 0 cell centre, i.e. on the cell
  // boundary, with corners cut diagonally (a staircase with chamfers).
  const rings: Polyline[] = [];
  for (const poly of isoPolygons(values, w, h, 0.5, false)) for (const ring of poly) rings.push(ring);
  return rings;
}

/**
 * Marching-squares segments per cell case (bit 0 lower left, 1 lower right, 2 upper right,
 * 3 upper left at or above the level), each [x0, y0, x1, y1] in the cell's own half-cell
 * offsets, oriented so that the filled side is on a fixed hand (d3-contour's table).
 */
const CASES: number[][] = [
  [],
  [1.0, 1.5, 0.5, 1.0],
  [1.5, 1.0, 1.0, 1.5],
  [1.5, 1.0, 0.5, 1.0],
  [1.0, 0.5, 1.5, 1.0],
  [1.0, 1.5, 0.5, 1.0, 1.0, 0.5, 1.5, 1.0],
  [1.0, 0.5, 1.0, 1.5],
  [1.0, 0.5, 0.5, 1.0],
  [0.5, 1.0, 1.0, 0.5],
  [1.0, 1.5, 1.0, 0.5],
  [0.5, 1.0, 1.0, 0.5, 1.5, 1.0, 1.0, 1.5],
  [1.5, 1.0, 1.0, 0.5],
  [0.5, 1.0, 1.5, 1.0],
  [1.0, 1.5, 1.5, 1.0],
  [0.5, 1.0, 1.0, 1.5],
  [],
];

/**
 * A run of points of a fragment: `pts` flat [x, y, ...], in order, or in reverse order when
 * `reversed` (the points put in front of the fragment one by one).
 */
interface Piece {
  pts: number[];
  reversed: boolean;
  next: Piece | null;
}

/**
 * A ring being stitched: its points as a chain of pieces, so putting a point in front or
 * joining two fragments costs the same however long they are (d3-contour copies the whole
 * ring each time, which is quadratic on long outlines).
 */
interface Fragment {
  start: number;
  end: number;
  first: Piece;
  last: Piece;
}

function pushPoint(f: Fragment, x: number, y: number): void {
  if (!f.last.reversed) f.last.pts.push(x, y);
  else f.last = f.last.next = { pts: [x, y], reversed: false, next: null };
}

function unshiftPoint(f: Fragment, x: number, y: number): void {
  if (f.first.reversed) f.first.pts.push(x, y);
  else f.first = { pts: [x, y], reversed: true, next: f.first };
}

/** The fragment's points in order, flat. */
function ringPoints(f: Fragment): number[] {
  const out: number[] = [];
  for (let p: Piece | null = f.first; p; p = p.next) {
    const a = p.pts;
    if (!p.reversed) for (let i = 0; i < a.length; i++) out.push(a[i]);
    else for (let i = a.length - 2; i >= 0; i -= 2) out.push(a[i], a[i + 1]);
  }
  return out;
}

/**
 * The filled region at or above `value` as polygons (outer ring, then its holes), each ring
 * flat [x, y, ...] and closed (last point repeats the first): d3-contour's `contour`
 * (values outside the grid and NaN count as below).
 */
export function isoPolygons(values: Float32Array | Uint8Array, dx: number, dy: number, value: number, smooth: boolean, ranges = rowRanges(values, dx, dy)): number[][][] {
  const polygons: number[][][] = [];
  const boxes: number[] = [];
  const holes: number[][] = [];
  const rings: number[][] = [];
  isoRings(values, dx, dy, value, ranges, rings);
  for (const ring of rings) {
    if (smooth) smoothRing(ring, values, dx, dy, value);
    if (ringArea(ring) > 0) {
      polygons.push([ring]);
      boxes.push(...ringBox(ring));
    } else holes.push(ring);
  }
  // Each hole goes to the first polygon whose outer ring does not leave it outside. A ring
  // whose bounding box (widened by far more than rounding) misses the hole's first vertex
  // leaves it outside for certain (d3-contour's test answers -1 there too), so only the
  // rings around that vertex are tested.
  for (const hole of holes) {
    const hx = hole[0], hy = hole[1];
    for (let i = 0; i < polygons.length; i++) {
      if (hx < boxes[4 * i] || hy < boxes[4 * i + 1] || hx > boxes[4 * i + 2] || hy > boxes[4 * i + 3]) continue;
      if (contains(polygons[i][0], hole) !== -1) {
        polygons[i].push(hole);
        break;
      }
    }
  }
  return polygons;
}

/** Per grid row the least and the greatest value, NaN counting as -Infinity (below every level). */
interface RowRanges {
  min: Float64Array;
  max: Float64Array;
}

function rowRanges(values: Float32Array | Uint8Array, dx: number, dy: number): RowRanges {
  const min = new Float64Array(dy);
  const max = new Float64Array(dy);
  for (let y = 0; y < dy; y++) {
    let lo = Infinity;
    let hi = -Infinity;
    for (let i = y * dx, end = i + dx; i < end; i++) {
      const v = values[i];
      if (v !== v) lo = -Infinity;
      else {
        if (v < lo) lo = v;
        if (v > hi) hi = v;
      }
    }
    min[y] = lo;
    max[y] = hi;
  }
  return { min, max };
}

/** A flat ring's bounding box [xMin, yMin, xMax, yMax], widened by 1e-6 grid cells. */
function ringBox(r: number[]): [number, number, number, number] {
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (let i = 0; i < r.length; i += 2) {
    const x = r[i], y = r[i + 1];
    if (x < x0) x0 = x;
    if (x > x1) x1 = x;
    if (y < y0) y0 = y;
    if (y > y1) y1 = y;
  }
  const e = 1e-6;
  return [x0 - e, y0 - e, x1 + e, y1 + e];
}

/**
 * Marching squares with the segments stitched into rings, each added to `rings` as it
 * closes. A pair of rows wholly below the level has no segment, one wholly at or above it
 * only its two frame segments: those rows are passed over without reading their cells
 * (they add nothing, so the rings and their order stay d3-contour's). (The rings go into an
 * array, not to a callback: a callback made per call was a new call target each time, and
 * sent the compiled marching back to the interpreter at every level: node --trace-deopt.)
 */
function isoRings(values: Float32Array | Uint8Array, dx: number, dy: number, value: number, ranges: RowRanges, rings: number[][]): void {
  const st: Stitching = { byStart: new Map<number, Fragment>(), byEnd: new Map<number, Fragment>(), rowStep: (dx + 1) * 4, rings };
  let x: number, y: number, t0: number, t1: number, t2: number, t3: number, c: number;

  // The first row (y = -1: the row above the grid counts as below).
  x = y = -1;
  t1 = values[0] >= value ? 1 : 0;
  if ((c = t1 << 1)) stitch(st, c, x, y);
  while (++x < dx - 1) {
    t0 = t1;
    t1 = values[x + 1] >= value ? 1 : 0;
    if ((c = t0 | (t1 << 1))) stitch(st, c, x, y);
  }
  if ((c = t1)) stitch(st, c, x, y);

  // The rows between.
  const rowMin = ranges.min;
  const rowMax = ranges.max;
  while (++y < dy - 1) {
    const up = y * dx;
    const down = up + dx;
    if (rowMax[y] < value && rowMax[y + 1] < value) continue;
    if (rowMin[y] >= value && rowMin[y + 1] >= value) {
      // Cases 6 and 9 at the frame (x = -1 and x = dx - 1), 15 (nothing) between.
      stitch(st, 6, -1, y);
      stitch(st, 9, dx - 1, y);
      continue;
    }
    x = -1;
    t1 = values[down] >= value ? 1 : 0;
    t2 = values[up] >= value ? 1 : 0;
    if ((c = (t1 << 1) | (t2 << 2))) stitch(st, c, x, y);
    // The hot loop: the corner tests written out, a stitch only where the level crosses.
    for (x = 0; x < dx - 1; x++) {
      t0 = t1;
      t1 = values[down + x + 1] >= value ? 1 : 0;
      t3 = t2;
      t2 = values[up + x + 1] >= value ? 1 : 0;
      c = t0 | (t1 << 1) | (t2 << 2) | (t3 << 3);
      if (c !== 0 && c !== 15) stitch(st, c, x, y);
    }
    if ((c = t1 | (t2 << 3))) stitch(st, c, x, y);
  }

  // The last row (the row below the grid counts as below).
  x = -1;
  t2 = values[y * dx] >= value ? 1 : 0;
  if ((c = t2 << 2)) stitch(st, c, x, y);
  while (++x < dx - 1) {
    t3 = t2;
    t2 = values[y * dx + x + 1] >= value ? 1 : 0;
    if ((c = (t2 << 2) | (t3 << 3))) stitch(st, c, x, y);
  }
  if ((c = t2 << 3)) stitch(st, c, x, y);
}

/** isoRings's fragments in the making (start and end point keys) and the rings closed so far. */
interface Stitching {
  byStart: Map<number, Fragment>;
  byEnd: Map<number, Fragment>;
  rowStep: number;
  rings: number[][];
}

/**
 * The segments of marching-squares case `c` in the square at (x, y), joined to the fragments
 * they meet; a ring that closes goes to st.rings. A function of its own, not a closure made in
 * each isoRings call: a new closure per call was a new call target for the compiled marching
 * loop each time (node --trace-deopt: "wrong call target").
 */
function stitch(st: Stitching, c: number, x: number, y: number): void {
  const { byStart, byEnd, rowStep, rings } = st;
  const seg = CASES[c];
  for (let k = 0; k < seg.length; k += 4) {
    const sx = seg[k] + x, sy = seg[k + 1] + y, ex = seg[k + 2] + x, ey = seg[k + 3] + y;
    const startIndex = sx * 2 + sy * rowStep;
    const endIndex = ex * 2 + ey * rowStep;
    let f: Fragment | undefined, g: Fragment | undefined;
    if ((f = byEnd.get(startIndex))) {
      if ((g = byStart.get(endIndex))) {
        byEnd.delete(f.end);
        byStart.delete(g.start);
        if (f === g) {
          pushPoint(f, ex, ey);
          rings.push(ringPoints(f));
        } else {
          // f's points, then g's: f and g are dropped, so their pieces are linked in place.
          f.last.next = g.first;
          const m: Fragment = { start: f.start, end: g.end, first: f.first, last: g.last };
          byStart.set(f.start, m);
          byEnd.set(g.end, m);
        }
      } else {
        byEnd.delete(f.end);
        pushPoint(f, ex, ey);
        byEnd.set((f.end = endIndex), f);
      }
    } else if ((f = byStart.get(endIndex))) {
      // No fragment ends at the segment's start (the branch above): it only extends f backwards.
      byStart.delete(f.start);
      unshiftPoint(f, sx, sy);
      byStart.set((f.start = startIndex), f);
    } else {
      const piece: Piece = { pts: [sx, sy, ex, ey], reversed: false, next: null };
      const m: Fragment = { start: startIndex, end: endIndex, first: piece, last: piece };
      byStart.set(startIndex, m);
      byEnd.set(endIndex, m);
    }
  }
}

/** A value for smoothing: NaN (and a read past the grid's end) counts as -Infinity. */
function valid(v: number | undefined): number {
  return v === undefined || v !== v ? -Infinity : v;
}

/** Move each ring vertex along its cell edge to where the values cross `value` (linear). */
function smoothRing(ring: number[], values: Float32Array | Uint8Array, dx: number, dy: number, value: number): void {
  for (let k = 0; k < ring.length; k += 2) {
    const x = ring[k];
    const y = ring[k + 1];
    const xt = x | 0;
    const yt = y | 0;
    const v1 = valid(values[yt * dx + xt]);
    if (x > 0 && x < dx && xt === x) ring[k] = smooth1(x, valid(values[yt * dx + xt - 1]), v1, value);
    if (y > 0 && y < dy && yt === y) ring[k + 1] = smooth1(y, valid(values[(yt - 1) * dx + xt]), v1, value);
  }
}

function smooth1(x: number, v0: number, v1: number, value: number): number {
  const a = value - v0;
  const b = v1 - v0;
  const d = isFinite(a) || isFinite(b) ? a / b : Math.sign(a) / Math.sign(b);
  return isNaN(d) ? x : x + d - 0.5;
}

/** Twice the signed area of a flat ring, summed in d3-contour's order (its sign picks outer rings). */
function ringArea(r: number[]): number {
  const n = r.length;
  let area = r[n - 1] * r[0] - r[n - 2] * r[1];
  for (let i = 2; i < n; i += 2) area += r[i - 1] * r[i] - r[i - 2] * r[i + 1];
  return area;
}

/** 1 when the hole's first vertex off the ring's boundary is inside it, -1 outside, 0 when all lie on it. */
function contains(ring: number[], hole: number[]): number {
  for (let i = 0; i < hole.length; i += 2) {
    const c = ringContains(ring, hole[i], hole[i + 1]);
    if (c) return c;
  }
  return 0;
}

function ringContains(ring: number[], x: number, y: number): number {
  let inside = -1;
  const n = ring.length;
  for (let i = 0, j = n - 2; i < n; j = i, i += 2) {
    const xi = ring[i], yi = ring[i + 1], xj = ring[j], yj = ring[j + 1];
    if (segmentContains(xi, yi, xj, yj, x, y)) return 0;
    if (yi > y !== yj > y && x < ((xj - xi) * (y - yi)) / (yj - yi) + xi) inside = -inside;
  }
  return inside;
}

/** Point (cx, cy) on the segment a-b. */
function segmentContains(ax: number, ay: number, bx: number, by: number, cx: number, cy: number): boolean {
  if ((bx - ax) * (cy - ay) !== (cx - ax) * (by - ay)) return false;
  // Compare along y when the segment is vertical, else along x.
  if (ax === bx) return (ay <= cy && cy <= by) || (by <= cy && cy <= ay);
  return (ax <= cx && cx <= bx) || (bx <= cx && cx <= ax);
}

function splitRing(ring: number[], w: number, h: number, heights: Float32Array, out: Polyline[]): void {
  const n = ring.length / 2;
  let cur: number[] = [];
  const flush = () => {
    if (cur.length >= 4) out.push(cur);
    cur = [];
  };
  for (let i = 0; i + 1 < n; i++) {
    const ax = ring[2 * i], ay = ring[2 * i + 1];
    const bx = ring[2 * i + 2], by = ring[2 * i + 3];
    const bad = artefact(ax, ay, w, h, heights) && artefact(bx, by, w, h, heights);
    if (bad) {
      flush();
      continue;
    }
    if (cur.length === 0) cur.push(ax, ay);
    cur.push(bx, by);
  }
  flush();
}

/** On the frame, or next to a nodata cell. */
function artefact(x: number, y: number, w: number, h: number, heights: Float32Array): boolean {
  if (x <= 0 || y <= 0 || x >= w || y >= h) return true;
  // The sample cells nearest the vertex (cell centres at +0.5).
  const c0 = Math.max(0, Math.min(w - 1, Math.floor(x - 0.5)));
  const c1 = Math.max(0, Math.min(w - 1, Math.ceil(x - 0.5)));
  const r0 = Math.max(0, Math.min(h - 1, Math.floor(y - 0.5)));
  const r1 = Math.max(0, Math.min(h - 1, Math.ceil(y - 0.5)));
  const a = heights[r0 * w + c0], b = heights[r0 * w + c1], c = heights[r1 * w + c0], d = heights[r1 * w + c1];
  return a !== a || b !== b || c !== c || d !== d;
}
