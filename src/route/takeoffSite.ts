/**
 * Where to take off for a block when the user gave no point that reaches it:
 * on DEM ground inside the site, outside keep-out zones, on the flattest ground
 * near the block's centre. Pure: grid, masks and tests in, a point out.
 */
import type { DemGrid } from "../dem/grid.js";
import type { XY } from "../layout/types.js";

export interface TakeoffSearch {
  grid: DemGrid;
  /** 1 where a cell centre lies inside the site (the assessment's rasterised site). */
  inSite: Uint8Array;
  /** True where the aircraft may not be (keep-out zones with their buffers). */
  blocked?: (p: XY) => boolean;
  /** True when every point of the block is within range of p. */
  reaches: (p: XY) => boolean;
}

export interface ProposedTakeoff {
  xy: XY;
  /** Ground slope there, degrees (Horn's 3 x 3 gradient). */
  slopeDeg: number;
  /** Distance from the block's centre, metres. */
  offsetM: number;
}

/** Slopes within this many degrees count as equally flat: the nearer point wins. */
const SLOPE_STEP_DEG = 0.5;
/** Candidate cells are visited on a lattice about this far apart, metres: a take-off spot is metres wide, and a 0.5 m DEM would otherwise cost 16x the work. */
const LATTICE_M = 2;

/**
 * The proposed take-off cell: among site cells within `radiusM` of `centre`
 * (widened by doubling up to `maxRadiusM` until one qualifies) whose 3 x 3
 * neighbourhood has data, that lie outside keep-out zones and from which the
 * whole block is in range (visited on a lattice about 2 m apart), the one with the least slope, rounded to 0.5 degrees,
 * nearest the centre on a tie. Slope is Horn's method (B. K. P. Horn, "Hill
 * shading and the reflectance map", Proc. IEEE 69(1), 1981: the 3 x 3 weighted
 * gradient GDAL's gdaldem slope uses). Null when no cell qualifies.
 * @example proposeTakeoff(search, [250, 300], 75, 500)?.xy
 */
export function proposeTakeoff(s: TakeoffSearch, centre: XY, radiusM: number, maxRadiusM: number): ProposedTakeoff | null {
  const { grid } = s;
  const { width, height } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const [cw, ch] = grid.cellSizeM;
  const stride = Math.max(1, Math.floor(LATTICE_M / Math.max(cw, ch)));
  for (let r = radiusM; ; r = Math.min(2 * r, maxRadiusM)) {
    const c0 = Math.max(1, Math.floor((centre[0] - r - x0) / dx - 0.5));
    const c1 = Math.min(width - 2, Math.ceil((centre[0] + r - x0) / dx - 0.5));
    const rA = Math.floor((centre[1] - r - y0) / dy - 0.5), rB = Math.ceil((centre[1] + r - y0) / dy - 0.5);
    const r0 = Math.max(1, Math.min(rA, rB)), r1 = Math.min(height - 2, Math.max(rA, rB));
    const found: Found = { best: null, key: Infinity };
    for (let row = r0; row <= r1; row += stride) scanRow(s, centre, r, row, c0, c1, stride, found);
    if (found.best || r >= maxRadiusM) return found.best;
  }
}

/** The best candidate so far and its key (slope step, then offset). */
interface Found {
  best: ProposedTakeoff | null;
  key: number;
}

/**
 * The lattice cells of one row (columns c0..c1 every `stride`) within `r` of the centre, each
 * kept in `found` when its key beats the best so far. A function of its own, called per row:
 * as the inner loop of proposeTakeoff its first call ran in the interpreter until compiled
 * mid-call, then was compiled again for the next call (node --trace-opt).
 */
function scanRow(s: TakeoffSearch, centre: XY, r: number, row: number, c0: number, c1: number, stride: number, found: Found): void {
  const { width, heights } = s.grid;
  const { x0, y0, dx, dy } = s.grid.transform;
  const [cw, ch] = s.grid.cellSizeM;
  for (let col = c0; col <= c1; col += stride) {
    const i = row * width + col;
    if (s.inSite[i] !== 1) continue;
    const px = x0 + (col + 0.5) * dx, py = y0 + (row + 0.5) * dy;
    const offsetM = Math.hypot(px - centre[0], py - centre[1]);
    if (offsetM > r) continue;
    // The key below is at least the offset (slope >= 0): a cell this far cannot win.
    if (offsetM >= found.key) continue;
    let ok = true;
    for (let a = -1; a <= 1 && ok; a++) for (let b = -1; b <= 1 && ok; b++) ok = heights[i + a * width + b] === heights[i + a * width + b];
    if (!ok) continue;
    const n = i - width, so = i + width;
    // Horn: dz/dx and dz/dy from the weighted 3 x 3 differences (rows run with dy).
    const gx = (heights[n + 1] + 2 * heights[i + 1] + heights[so + 1] - heights[n - 1] - 2 * heights[i - 1] - heights[so - 1]) / (8 * cw);
    const gy = (heights[so - 1] + 2 * heights[so] + heights[so + 1] - heights[n - 1] - 2 * heights[n] - heights[n + 1]) / (8 * ch);
    const slopeDeg = (Math.atan(Math.hypot(gx, gy)) * 180) / Math.PI;
    const key = Math.round(slopeDeg / SLOPE_STEP_DEG) * 1e7 + offsetM;
    if (key >= found.key) continue;
    const xy: XY = [px, py];
    if (s.blocked?.(xy) || !s.reaches(xy)) continue;
    found.best = { xy, slopeDeg, offsetM };
    found.key = key;
  }
}
