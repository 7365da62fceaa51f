import type { DemGrid } from "../dem/grid.js";
import { extremaInRadius } from "../dem/sample.js";

/**
 * Highest ground within `radiusM` of each point (NaN where the disc touches
 * nodata or leaves the grid).
 *
 * When the disc spans many cells (fine DEMs: 15 m at 0.5 m is ~2 800 cells per
 * station) a per-cell scan would dominate the solve, so the grid is first
 * max-pooled into k x k blocks and the disc is scanned on the blocks with the
 * radius grown by the block's half diagonal. Every fine cell within the radius
 * lies in a block whose centre is within radius + half diagonal, so the result
 * is never lower than the exact maximum: conservative (more clearance, never
 * less), by at most the relief within one block diagonal beyond the radius.
 * @example maxGroundInRadius(grid, xs, ys, 15, out)
 */
export function maxGroundInRadius(grid: DemGrid, xs: ArrayLike<number>, ys: ArrayLike<number>, radiusM: number, out: Float64Array): void {
  const cellM = Math.max(grid.cellSizeM[0], grid.cellSizeM[1]);
  const k = radiusM / cellM > 16 ? Math.ceil(radiusM / cellM / 8) : 1;
  if (k === 1) {
    extremaInRadius(grid, xs, ys, radiusM, out);
    return;
  }
  const pooled = pooledMax(grid, k);
  const t = grid.transform;
  const halfDiag = (Math.hypot(t.dx, t.dy) * k) / 2;
  extremaInRadius(pooled, xs, ys, radiusM + halfDiag, out);
}

const cache = new WeakMap<DemGrid, Map<number, DemGrid>>();

/** k x k max pooling (NaN if any cell of the block is nodata); cached per grid. */
export function pooledMax(grid: DemGrid, k: number): DemGrid {
  let m = cache.get(grid);
  if (!m) { m = new Map(); cache.set(grid, m); }
  const hit = m.get(k);
  if (hit) return hit;
  const w = Math.ceil(grid.width / k);
  const h = Math.ceil(grid.height / k);
  const heights = new Float32Array(w * h).fill(-Infinity);
  const src = grid.heights;
  for (let r = 0; r < grid.height; r++) {
    const base = (Math.floor(r / k)) * w;
    for (let c = 0; c < grid.width; c++) {
      const z = src[r * grid.width + c];
      const bi = base + Math.floor(c / k);
      const cur = heights[bi];
      // NaN anywhere in the block poisons it (unknown ground is never assumed low).
      if (z !== z || cur !== cur) heights[bi] = NaN;
      else if (z > cur) heights[bi] = z;
    }
  }
  const valid = new Uint8Array(w * h);
  for (let i = 0; i < valid.length; i++) valid[i] = heights[i] === heights[i] ? 1 : 0;
  const t = grid.transform;
  const pooled: DemGrid = {
    ...grid,
    width: w,
    height: h,
    heights,
    valid,
    transform: { x0: t.x0, y0: t.y0, dx: t.dx * k, dy: t.dy * k },
    cellSizeM: [grid.cellSizeM[0] * k, grid.cellSizeM[1] * k],
  };
  m.set(k, pooled);
  return pooled;
}
