import type { CrsInfo, DemGrid } from "./grid.js";

/**
 * Sampling a DEM window: point heights and local extrema, vectorised over
 * many points with caller-supplied output arrays so hot loops allocate nothing.
 * Coordinates are in the grid's own CRS units (for the working grid, metres of
 * the local frame). NaN means nodata or outside the grid: the planner never
 * guesses ground it does not know.
 */

/**
 * Centre of cell (col, row) in CRS units.
 * @example cellCentre(grid, 0, 0) // [x0 + dx/2, y0 + dy/2]
 */
export function cellCentre(grid: DemGrid, col: number, row: number): [number, number] {
  const t = grid.transform;
  return [t.x0 + (col + 0.5) * t.dx, t.y0 + (row + 0.5) * t.dy];
}

/**
 * Fractional column and row of a point, with cell centres at integers
 * (col = (x - x0) / dx - 0.5), the frame bilinear interpolation works in.
 * @example toColRow(grid, ...cellCentre(grid, 3, 4)) // [3, 4]
 */
export function toColRow(grid: DemGrid, x: number, y: number): [number, number] {
  const t = grid.transform;
  return [(x - t.x0) / t.dx - 0.5, (y - t.y0) / t.dy - 0.5];
}

/**
 * Bilinear height between the four surrounding cell centres. NaN when any of
 * them is nodata or outside the grid (a sample touching nodata is nodata).
 * Points exactly on the outer half-cell rim snap to the edge cells.
 * @example sampleBilinear(grid, [x], [y])[0]
 */
export function sampleBilinear(
  grid: Pick<DemGrid, "width" | "height" | "heights" | "transform">,
  xs: ArrayLike<number>,
  ys: ArrayLike<number>,
  out: Float64Array = new Float64Array(xs.length),
): Float64Array {
  const { width: w, height: h, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  // A cell of a power of two (0.5 m, 1 m, 2 m, ...): multiplying by its inverse gives the
  // quotient to the bit (both are the exact value, rounded once), ~10 % faster over the
  // heading term's ~6 M samples at 4 km2; other cells divide.
  const sx = inverseOfPowerOfTwo(dx), sy = inverseOfPowerOfTwo(dy);
  const scaled = sx !== 0 && sy !== 0;
  for (let i = 0; i < xs.length; i++) {
    let c = (scaled ? (xs[i] - x0) * sx : (xs[i] - x0) / dx) - 0.5;
    let r = (scaled ? (ys[i] - y0) * sy : (ys[i] - y0) / dy) - 0.5;
    // Within the outer half cell there is only one cell to use on that side.
    if (c < 0 && c >= -0.5) c = 0;
    if (r < 0 && r >= -0.5) r = 0;
    if (c > w - 1 && c <= w - 0.5) c = w - 1;
    if (r > h - 1 && r <= h - 0.5) r = h - 1;
    if (!(c >= 0 && r >= 0 && c <= w - 1 && r <= h - 1)) {
      out[i] = NaN;
      continue;
    }
    let c0 = Math.floor(c);
    let r0 = Math.floor(r);
    if (c0 === w - 1 && w > 1) c0 = w - 2;
    if (r0 === h - 1 && h > 1) r0 = h - 2;
    const fc = c - c0;
    const fr = r - r0;
    const c1 = w > 1 ? c0 + 1 : c0;
    const r1 = h > 1 ? r0 + 1 : r0;
    const z00 = heights[r0 * w + c0];
    const z01 = heights[r0 * w + c1];
    const z10 = heights[r1 * w + c0];
    const z11 = heights[r1 * w + c1];
    // NaN propagates through the arithmetic: nodata anywhere gives NaN.
    out[i] = (z00 * (1 - fc) + z01 * fc) * (1 - fr) + (z10 * (1 - fc) + z11 * fc) * fr;
  }
  return out;
}

/**
 * 1 / d when d is a power of two (positive or negative, normal), else 0: then x / d and
 * x * (1 / d) are the same number for every x.
 * @example inverseOfPowerOfTwo(0.5) // 2; inverseOfPowerOfTwo(0.3) // 0
 */
export function inverseOfPowerOfTwo(d: number): number {
  const a = Math.abs(d);
  if (!(a > 0 && a < Infinity)) return 0;
  const e = Math.round(Math.log2(a));
  // 2 ** e is exact; so is 2 ** -e while within the normal range.
  return 2 ** e === a && e > -1022 && e < 1023 ? (d > 0 ? 2 ** -e : -(2 ** -e)) : 0;
}

/** Scratch pair [max, min] for foldRow (the scans run one at a time). */
const acc = new Float64Array(2);

/**
 * Folds cells ca..cb of row r into acc = [max, min]; false when the run leaves
 * the grid or meets a nodata (NaN) cell, either of which makes the whole
 * neighbourhood unknown.
 */
function foldRow(grid: DemGrid, r: number, ca: number, cb: number, out: Float64Array): boolean {
  const { width: w, height: h, heights } = grid;
  if (r < 0 || r >= h || ca < 0 || cb >= w) return false;
  let mx = out[0];
  let mn = out[1];
  for (let i = r * w + ca; i <= r * w + cb; i++) {
    const z = heights[i];
    if (z !== z) return false;
    if (z > mx) mx = z;
    if (z < mn) mn = z;
  }
  out[0] = mx;
  out[1] = mn;
  return true;
}

/**
 * Max (and optionally min) height over the cells whose centres lie within
 * `radiusM` of each point, always including the cell under the point. NaN
 * where any such cell is nodata or the disc leaves the grid.
 * @example extremaInRadius(grid, xs, ys, 15, maxOut, minOut)
 */
export function extremaInRadius(
  grid: DemGrid,
  xs: ArrayLike<number>,
  ys: ArrayLike<number>,
  radiusM: number,
  outMax: Float64Array,
  outMin?: Float64Array,
): void {
  const { width: w, height: h, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const r2 = radiusM * radiusM;
  const chord = new Float64Array(2);
  for (let i = 0; i < xs.length; i++) {
    const px = xs[i];
    const py = ys[i];
    const pc = Math.floor((px - x0) / dx);
    const pr = Math.floor((py - y0) / dy);
    // Rows whose centres can be within the radius (dy < 0: rows grow southwards).
    const rLo = Math.min(Math.ceil((py + radiusM - y0) / dy - 0.5), pr);
    const rHi = Math.max(Math.floor((py - radiusM - y0) / dy - 0.5), pr);
    let mx = -Infinity;
    let mn = Infinity;
    let bad = pc < 0 || pr < 0 || pc >= w || pr >= h;
    // A disc that may leave the grid: find out from its row chords alone before reading
    // any cell (the answer is NaN either way; stations past the DEM's edge are many).
    if (!bad && (rLo < 0 || rHi >= h || (px - radiusM - x0) / dx - 1.5 < 0 || (px + radiusM - x0) / dx + 0.5 > w - 1)) {
      bad = discLeavesGrid(w, h, x0, y0, dx, dy, px, py, r2, rLo, rHi, pc, pr);
    }
    for (let r = rLo; r <= rHi && !bad; r++) {
      rowChord(x0, y0, dx, dy, px, py, r2, r, pc, pr, chord);
      const ca = chord[0];
      const cb = chord[1];
      if (ca > cb) continue;
      acc[0] = mx;
      acc[1] = mn;
      if (!foldRow(grid, r, ca, cb, acc)) {
        bad = true;
        break;
      }
      mx = acc[0];
      mn = acc[1];
    }
    outMax[i] = bad || mx === -Infinity ? NaN : mx;
    if (outMin) outMin[i] = bad || mn === Infinity ? NaN : mn;
  }
}

/**
 * Whether the disc of extremaInRadius (same rows, chords and rounding) leaves the grid
 * at (px, py), which makes its answer NaN whatever the cells hold.
 * @example discOffGrid(grid, x, y, 15) // true past the window's edge
 */
export function discOffGrid(grid: DemGrid, px: number, py: number, radiusM: number): boolean {
  const { width: w, height: h } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const pc = Math.floor((px - x0) / dx);
  const pr = Math.floor((py - y0) / dy);
  if (pc < 0 || pr < 0 || pc >= w || pr >= h) return true;
  const rLo = Math.min(Math.ceil((py + radiusM - y0) / dy - 0.5), pr);
  const rHi = Math.max(Math.floor((py - radiusM - y0) / dy - 0.5), pr);
  return discLeavesGrid(w, h, x0, y0, dx, dy, px, py, radiusM * radiusM, rLo, rHi, pc, pr);
}

/**
 * Whether any of extremaInRadius's row chords (same rounding) leaves the grid, which
 * makes its answer NaN.
 */
function discLeavesGrid(
  w: number, h: number, x0: number, y0: number, dx: number, dy: number, px: number, py: number, r2: number, rLo: number, rHi: number, pc: number, pr: number,
): boolean {
  const chord = new Float64Array(2);
  for (let r = rLo; r <= rHi; r++) {
    rowChord(x0, y0, dx, dy, px, py, r2, r, pc, pr, chord);
    if (chord[0] > chord[1]) continue;
    if (r < 0 || r >= h || chord[0] < 0 || chord[1] >= w) return true;
  }
  return false;
}

/**
 * The columns [out[0], out[1]] of row r whose centres lie within the disc of squared
 * radius r2 around (px, py), the centre's own cell (pc, pr) always included; empty
 * (out[0] > out[1]) when none. One rounding for extremaInRadius and discLeavesGrid.
 */
function rowChord(x0: number, y0: number, dx: number, dy: number, px: number, py: number, r2: number, r: number, pc: number, pr: number, out: Float64Array): void {
  const ddy = y0 + (r + 0.5) * dy - py;
  const rem = r2 - ddy * ddy;
  let ca = Infinity;
  let cb = -Infinity;
  if (rem >= 0) {
    const half = Math.sqrt(rem);
    ca = Math.ceil((px - half - x0) / dx - 0.5);
    cb = Math.floor((px + half - x0) / dx - 0.5);
  }
  if (r === pr) {
    ca = Math.min(ca, pc);
    cb = Math.max(cb, pc);
  }
  out[0] = ca;
  out[1] = cb;
}

/**
 * Max and min height over the cells whose centres lie in an oriented
 * rectangle around each point: `halfAlongM` along the unit vector (ux, uy)
 * and `halfAcrossM` across it; the cell under the point always counts. NaN
 * where any such cell is nodata or the rectangle leaves the grid.
 * @example extremaInOrientedRect(grid, xs, ys, 1, 0, 2.5, 40, maxOut, minOut)
 */
export function extremaInOrientedRect(
  grid: DemGrid,
  xs: ArrayLike<number>,
  ys: ArrayLike<number>,
  ux: number,
  uy: number,
  halfAlongM: number,
  halfAcrossM: number,
  outMax: Float64Array,
  outMin: Float64Array,
): void {
  const { width: w, height: h, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const norm = Math.hypot(ux, uy);
  const ax = ux / norm;
  const ay = uy / norm;
  // across-track unit vector (left of the track)
  const bx = -ay;
  const by = ax;
  const extX = Math.abs(ax) * halfAlongM + Math.abs(bx) * halfAcrossM;
  const extY = Math.abs(ay) * halfAlongM + Math.abs(by) * halfAcrossM;
  const eps = 1e-9;
  const hA = halfAlongM + eps;
  const hC = halfAcrossM + eps;
  const span = new Float64Array(2);
  for (let i = 0; i < xs.length; i++) {
    const px = xs[i];
    const py = ys[i];
    const pc = Math.floor((px - x0) / dx);
    const pr = Math.floor((py - y0) / dy);
    let bad = pc < 0 || pr < 0 || pc >= w || pr >= h;
    let mx = -Infinity;
    let mn = Infinity;
    if (!bad) {
      const z = heights[pr * w + pc];
      if (z !== z) bad = true;
      else mx = mn = z;
    }
    const cLo = Math.ceil((px - extX - x0) / dx - 0.5);
    const cHi = Math.floor((px + extX - x0) / dx - 0.5);
    const rLo = Math.ceil((py + extY - y0) / dy - 0.5);
    const rHi = Math.floor((py - extY - y0) / dy - 0.5);
    for (let r = rLo; r <= rHi && !bad; r++) {
      const ry = y0 + (r + 0.5) * dy - py;
      // The cells of this row inside the rectangle form one run (the rectangle is convex
      // and the rounded offsets are monotone in c): estimate its ends analytically, then
      // settle them with the exact test, so the cells in between need no test (the test
      // per cell of the bounding box was most of the solver's corridor time).
      span[0] = -Infinity;
      span[1] = Infinity;
      clipSpan(ax, ry * ay, hA, span);
      clipSpan(bx, ry * by, hC, span);
      if (span[0] > span[1]) continue;
      let ca = Math.max(cLo, Math.ceil((px + span[0] - x0) / dx - 0.5) - 2);
      let cb = Math.min(cHi, Math.floor((px + span[1] - x0) / dx - 0.5) + 2);
      while (ca <= cb && !insideRect(x0 + (ca + 0.5) * dx - px, ry, ax, ay, bx, by, hA, hC)) ca++;
      while (cb >= ca && !insideRect(x0 + (cb + 0.5) * dx - px, ry, ax, ay, bx, by, hA, hC)) cb--;
      if (ca > cb) continue;
      acc[0] = mx;
      acc[1] = mn;
      if (!foldRow(grid, r, ca, cb, acc)) {
        bad = true;
        break;
      }
      mx = acc[0];
      mn = acc[1];
    }
    outMax[i] = bad ? NaN : mx;
    outMin[i] = bad ? NaN : mn;
  }
}

/** The exact membership test of extremaInOrientedRect (cell centre offset rx, ry). */
function insideRect(rx: number, ry: number, ax: number, ay: number, bx: number, by: number, hA: number, hC: number): boolean {
  return Math.abs(rx * ax + ry * ay) <= hA && Math.abs(rx * bx + ry * by) <= hC;
}

/**
 * Narrows span [lo, hi] to the offsets rx with |rx * a + k| <= hh. Only an estimate, settled
 * by insideRect; a near-zero `a` leaves the span to that exact test.
 */
function clipSpan(a: number, k: number, hh: number, span: Float64Array): void {
  if (Math.abs(a) < 1e-12) return;
  const p = (-hh - k) / a;
  const q = (hh - k) / a;
  span[0] = Math.max(span[0], Math.min(p, q));
  span[1] = Math.min(span[1], Math.max(p, q));
}

const DEFAULT_CRS: CrsInfo = {
  proj4: "+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs",
  epsg: 32633,
  name: "WGS 84 / UTM zone 33N",
  geographic: false,
  linearUnitM: 1,
};

/**
 * An in-memory north-up metric DemGrid, for synthetic terrain and tests.
 * `heights` is row-major (row 0 = north edge) or a function of the cell
 * centre; NaN marks nodata.
 * @example makeGrid({ width: 100, height: 80, x0: 500000, y0: 4_600_000, cellM: 1, heights: (x, y) => 0.1 * x })
 */
export function makeGrid(opts: {
  width: number;
  height: number;
  x0: number;
  y0: number;
  cellM: number;
  heights: Float32Array | ((x: number, y: number) => number);
  crsProj4?: string;
  epsg?: number | null;
}): DemGrid {
  const { width, height, x0, y0, cellM } = opts;
  let heights: Float32Array;
  if (typeof opts.heights === "function") {
    heights = new Float32Array(width * height);
    for (let r = 0; r < height; r++) {
      const y = y0 - (r + 0.5) * cellM;
      for (let c = 0; c < width; c++) heights[r * width + c] = opts.heights(x0 + (c + 0.5) * cellM, y);
    }
  } else {
    if (opts.heights.length !== width * height) throw new Error("makeGrid: heights length must be width * height");
    heights = opts.heights;
  }
  const crs: CrsInfo = opts.crsProj4
    ? { proj4: opts.crsProj4, epsg: opts.epsg ?? null, name: "custom", geographic: false, linearUnitM: 1 }
    : { ...DEFAULT_CRS, epsg: opts.epsg === undefined ? DEFAULT_CRS.epsg : opts.epsg };
  return {
    width,
    height,
    heights,
    transform: { x0, y0, dx: cellM, dy: -cellM },
    crs,
    cellSizeM: [cellM, cellM],
    verticalDatum: "egm96",
    verticalUnit: "metre",
  };
}
