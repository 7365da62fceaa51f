import type { DemGrid } from "../dem/grid.js";
import { discOffGrid, extremaInRadius } from "../dem/sample.js";
import { discBlocks } from "./discBlocks.js";
import type { SolverOptions } from "./types.js";

/**
 * Height the path keeps above the highest ground within the safety radius: minimum
 * clearance + obstacle margin + the DEM's stated accuracy (height it cannot trust).
 * @example clearanceFloorM({ minM: 30, safetyRadiusM: 15, obstacleMarginM: 5, demAccuracyM: 0.5 }) // 35.5
 */
export function clearanceFloorM(c: SolverOptions["clearance"]): number {
  return c.minM + c.obstacleMarginM + (c.demAccuracyM ?? 0);
}

/**
 * Highest ground within `radiusM` of each point: exactly extremaInRadius's
 * maximum (the cells whose centres lie within the radius, the cell under the
 * point always counted; NaN where the disc touches nodata or leaves the grid).
 *
 * On fine DEMs the disc spans many cells (15 m at 0.5 m is ~2 800 per station),
 * so the grid is max-pooled once into k x k blocks (k about radius / 6 cells: at
 * 0.5 m cells over the 4 km2 benchmark's 176 k stations 195 ms against 208 ms at radius / 8,
 * 199 ms at radius / 4, 316 ms at radius / 11, one thread)
 * and each disc is covered block row by block row: blocks whose every cell
 * centre lies inside the radius (1e-6 m of margin for rounding) count by
 * their pooled maximum; blocks the circle crosses are scanned cell by cell,
 * with extremaInRadius's own row chords, only when their pooled maximum can
 * beat the best value so far, highest first (branch and bound: a block's
 * maximum bounds every cell in it, so skipping it cannot change the result).
 * NaN comes without a scan where it can: a station whose disc leaves the grid
 * (decided from extremaInRadius's own chords, see discOffGrid; many stations lie
 * past the DEM's edge), or a block wholly inside the disc that holds nodata;
 * a crossed block holding nodata is scanned for it.
 * @example maxGroundInRadius(grid, xs, ys, 15, out)
 */
export function maxGroundInRadius(grid: DemGrid, xs: ArrayLike<number>, ys: ArrayLike<number>, radiusM: number, out: Float64Array): void {
  const cellM = Math.max(grid.cellSizeM[0], grid.cellSizeM[1]);
  const k = radiusM / cellM > 16 ? Math.ceil(radiusM / cellM / 6) : 1;
  if (k === 1) {
    extremaInRadius(grid, xs, ys, radiusM, out);
    return;
  }
  const { k: kb, pooled } = poolFor(grid, k);
  const pw = pooled.width, ph = pooled.height;
  const pmax = pooled.heights;
  const { width: w, height: h, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const adx = Math.abs(dx), ady = Math.abs(dy);
  const r2 = radiusM * radiusM;
  const rIn = Math.max(0, radiusM - 1e-6), rOut = radiusM + 1e-6;
  const rIn2 = rIn * rIn, rOut2 = rOut * rOut;
  // Boundary blocks of the current station, scanned after the interior ones: room for every
  // block the disc's box spans, so the growth below is never taken (code first reached late
  // sent the stations' loop, compiled meanwhile, back to the interpreter: node --trace-deopt).
  const blocksAcross = Math.ceil((2 * rOut) / Math.min(adx, ady) / kb) + 3;
  // The disc's blocks by the station's place within its block (discBlocks.ts), for stations
  // whose blocks lie on the pooled grid; the others are classed row by row below.
  const disc = discBlocks(pooled, kb, pw, adx, ady, radiusM);
  const { inside, insideAt, rim, rimAt, bins, reach } = disc;
  let edge = new Int32Array(Math.max(blocksAcross * blocksAcross, disc.mostRim));
  for (let i = 0; i < xs.length; i++) {
    const px = xs[i], py = ys[i];
    // Point in cell-centre index coordinates.
    const pcx = (px - x0) / dx - 0.5;
    const pcy = (py - y0) / dy - 0.5;
    const ext = 2 + radiusM / Math.min(adx, ady);
    // Near the grid's edge: NaN when extremaInRadius's disc leaves the grid; else the
    // disc is on the grid and the blocks are clipped to it below (they hold no disc cell
    // past the edge).
    if (!(pcx - ext >= 0 && pcy - ext >= 0 && pcx + ext <= w - 1 && pcy + ext <= h - 1) && discOffGrid(grid, px, py, radiusM)) {
      out[i] = NaN;
      continue;
    }
    const pc = Math.floor((px - x0) / dx);
    const pr = Math.floor((py - y0) / dy);
    let best = heights[pr * w + pc];
    let bad = best !== best;
    let nEdge = 0;
    const bcS = Math.floor(pcx / kb), brS = Math.floor(pcy / kb);
    if (brS - reach >= 0 && brS + reach < ph && bcS - reach >= 0 && bcS + reach < pw) {
      let ix = Math.floor(((pcx - bcS * kb) / kb) * bins);
      let iy = Math.floor(((pcy - brS * kb) / kb) * bins);
      ix = ix < 0 ? 0 : ix >= bins ? bins - 1 : ix;
      iy = iy < 0 ? 0 : iy >= bins ? bins - 1 : iy;
      const p = iy * bins + ix;
      const base = brS * pw + bcS;
      for (let j = insideAt[p]; j < insideAt[p + 1]; j++) {
        const m = pmax[base + inside[j]];
        if (m !== m) { bad = true; break; }
        if (m > best) best = m;
      }
      for (let j = rimAt[p]; j < rimAt[p + 1]; j++) edge[nEdge++] = base + rim[j];
      out[i] = bad ? NaN : rimMax(grid, pooled, kb, edge, nEdge, best, px, py, r2);
      continue;
    }
    const rowA = Math.max(0, Math.floor((pcy - radiusM / ady) / kb)), rowB = Math.min(ph - 1, Math.floor((pcy + radiusM / ady) / kb));
    for (let br = rowA; br <= rowB && !bad; br++) {
      const r0 = br * kb, r1 = Math.min(h - 1, r0 + kb - 1);
      const dyNear = (pcy < r0 ? r0 - pcy : pcy > r1 ? pcy - r1 : 0) * ady;
      const dyFar = Math.max(Math.abs(r0 - pcy), Math.abs(r1 - pcy)) * ady;
      if (dyNear * dyNear > rOut2) continue;
      const hOut = Math.sqrt(rOut2 - dyNear * dyNear) / adx;
      const bcA = Math.max(0, Math.floor((pcx - hOut) / kb)), bcB = Math.min(pw - 1, Math.floor((pcx + hOut) / kb));
      // Interior blocks: whole column extent within the chord at the farthest row.
      // (No arithmetic in the rarely taken branch below: first taken after the engine compiled
      // this loop, an operation without type feedback sent it back to the interpreter.)
      const noneA = bcB + 1;
      let iA = noneA, iB = bcB;
      if (dyFar * dyFar <= rIn2) {
        const hIn = Math.sqrt(rIn2 - dyFar * dyFar) / adx;
        iA = Math.ceil((pcx - hIn) / kb);
        iB = Math.floor((pcx + hIn + 1) / kb) - 1;
        if (iA < bcA) iA = bcA;
        if (iB > bcB) iB = bcB;
        if (iA > iB) { iA = noneA; iB = bcB; }
      }
      const base = br * pw;
      for (let bc = iA; bc <= iB; bc++) {
        const m = pmax[base + bc];
        if (m !== m) { bad = true; break; }
        if (m > best) best = m;
      }
      if (nEdge + (bcB - bcA + 1) > edge.length) { const e = new Int32Array(2 * edge.length + bcB - bcA + 1); e.set(edge); edge = e; }
      for (let bc = bcA; bc <= bcB; bc++) if (bc < iA || bc > iB) edge[nEdge++] = base + bc;
    }
    // A block wholly inside the disc holds nodata: so does the disc (extremaInRadius's NaN).
    out[i] = bad ? NaN : rimMax(grid, pooled, kb, edge, nEdge, best, px, py, r2);
  }
}

/**
 * The disc's maximum from its interior's (`best`, with the station (px, py) and the radius
 * squared r2 in disc4: rimMax) and its boundary blocks (edge[0 .. nEdge),
 * pooled cells of `pooled`, kb cells a side): those that can still matter are those holding
 * nodata (the disc may reach it) and those whose maximum beats the interior's, scanned cell by
 * cell with extremaInRadius's own row chords, highest first, so the scan stops at the first
 * block that cannot beat the best value found so far; NaN where the disc meets nodata. Apart
 * from maxGroundInRadius: many stations need no such scan, and code first reached after the
 * engine compiled the stations' loop sent it back to the interpreter (node --trace-deopt).
 */
function edgeMax(grid: DemGrid, pooled: DemGrid, kb: number, edge: Int32Array, nEdge: number): number {
  let best = disc4[0];
  const px = disc4[1], py = disc4[2], r2 = disc4[3];
  const pmax = pooled.heights;
  const pw = pooled.width;
  const { width: w, height: h, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  let nKeep = 0;
  for (let e = 0; e < nEdge; e++) {
    const b = edge[e];
    const m = pmax[b];
    if (m !== m || m > best) {
      // Insertion by maximum, descending, NaN first (few blocks: the disc's uphill rim).
      let j = nKeep++;
      while (j > 0 && before(m, pmax[edge[j - 1]])) { edge[j] = edge[j - 1]; j--; }
      edge[j] = b;
    }
  }
  for (let e = 0; e < nKeep; e++) {
    const b = edge[e];
    const m = pmax[b];
    if (m === m && m <= best) break;
    const br = Math.floor(b / pw), bc = b - br * pw;
    const cA = bc * kb, cB = Math.min(w - 1, cA + kb - 1);
    for (let r = br * kb; r <= Math.min(h - 1, br * kb + kb - 1); r++) {
      // extremaInRadius's chord for this row, to the same rounding.
      const ddy = y0 + (r + 0.5) * dy - py;
      const rem = r2 - ddy * ddy;
      if (rem < 0) continue;
      const half = Math.sqrt(rem);
      const ca = Math.max(cA, Math.ceil((px - half - x0) / dx - 0.5));
      const cb = Math.min(cB, Math.floor((px + half - x0) / dx - 0.5));
      const rb = r * w;
      for (let c = ca; c <= cb; c++) {
        const z = heights[rb + c];
        if (z > best) best = z;
        else if (z !== z) return NaN;
      }
    }
  }
  return best;
}

/** edgeMax's numbers (best so far, the station, the radius squared): passed in a typed array, not as arguments, which a call the engine does not inline boxes (four numbers a station). */
const disc4 = new Float64Array(4);

/** edgeMax, its numbers handed over in disc4 (this small function is inlined where it is called). */
function rimMax(grid: DemGrid, pooled: DemGrid, kb: number, edge: Int32Array, nEdge: number, best: number, px: number, py: number, r2: number): number {
  disc4[0] = best;
  disc4[1] = px;
  disc4[2] = py;
  disc4[3] = r2;
  return edgeMax(grid, pooled, kb, edge, nEdge);
}

/** Sort order of boundary blocks: NaN (nodata) first, then by maximum, descending. */
function before(m: number, other: number): boolean {
  if (other !== other) return false;
  return m !== m || m > other;
}

const cache = new WeakMap<DemGrid, Map<number, DemGrid>>();

/**
 * The pooled grid for blocks of about k cells: radii differ a little from leg to leg
 * (the reach between stations), and a pooled grid already made for a neighbouring k
 * serves as well (a branch and bound over any k gives the same answer).
 * @example poolFor(grid, 5).pooled.width // ceil(grid.width / 5)
 */
export function poolFor(grid: DemGrid, k: number): { k: number; pooled: DemGrid } {
  const made = cache.get(grid);
  const kk = made && !made.has(k) ? (made.has(k + 1) ? k + 1 : made.has(k - 1) && k - 1 > 1 ? k - 1 : k) : k;
  return { k: kk, pooled: pooledMax(grid, kk) };
}

/**
 * k x k max pooling (NaN if any cell of the block is nodata); cached per grid. Each band of k
 * rows is first folded column by column into one row (contiguous reads, a compare a cell),
 * then each run of k columns of that row into its block: the same maxima as a block-by-block
 * scan (the maximum and NaN's poisoning do not depend on the order; of +0 and -0 in one block
 * either may be kept, both being its maximum): at 4 km2 (20.8 M cells, k 6) ~49 -> ~36 ms.
 */
export function pooledMax(grid: DemGrid, k: number): DemGrid {
  let m = cache.get(grid);
  if (!m) { m = new Map(); cache.set(grid, m); }
  const hit = m.get(k);
  if (hit) return hit;
  const w = Math.ceil(grid.width / k);
  const h = Math.ceil(grid.height / k);
  const heights = new Float32Array(w * h);
  const src = grid.heights;
  const W = grid.width;
  const band = new Float32Array(W);
  for (let br = 0; br < h; br++) {
    foldRowsInto(src, W, br * k, Math.min(grid.height, br * k + k), band);
    foldRuns(band, W, k, heights, br * w);
  }
  const t = grid.transform;
  const pooled: DemGrid = {
    ...grid,
    width: w,
    height: h,
    heights,
    transform: { x0: t.x0, y0: t.y0, dx: t.dx * k, dy: t.dy * k },
    cellSizeM: [grid.cellSizeM[0] * k, grid.cellSizeM[1] * k],
  };
  m.set(k, pooled);
  return pooled;
}

/**
 * Each column's highest height over rows r0 .. r1 - 1 of the W-wide `src` into `out`, NaN
 * where the column holds nodata there (a NaN met stays: no height compares above it; unknown
 * ground is never assumed low).
 */
function foldRowsInto(src: Float32Array, W: number, r0: number, r1: number, out: Float32Array): void {
  out.set(src.subarray(r0 * W, r0 * W + W));
  for (let r = r0 + 1; r < r1; r++) {
    const rb = r * W;
    for (let c = 0; c < W; c++) {
      const z = src[rb + c];
      if (z > out[c] || z !== z) out[c] = z;
    }
  }
}

/** The highest of each run of k entries of `row` (W of them, the last run shorter) into out[at ..], NaN where a run holds NaN. */
function foldRuns(row: Float32Array, W: number, k: number, out: Float32Array, at: number): void {
  for (let c0 = 0, o = at; c0 < W; c0 += k, o++) {
    let cur = row[c0];
    const end = Math.min(W, c0 + k);
    for (let c = c0 + 1; c < end && cur === cur; c++) {
      const z = row[c];
      if (z > cur || z !== z) cur = z;
    }
    out[o] = cur;
  }
}
