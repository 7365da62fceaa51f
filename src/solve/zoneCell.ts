import type { DemGrid } from "../dem/grid.js";

/**
 * What the windowed zone extrema (zoneExtrema.ts, zoneExtremaAxis.ts) share to stay exactly
 * extremaInOrientedRect: the margin within which a cell is settled by the rectangle test
 * itself, that test's own slack, and the test for one cell.
 */

/** Rounding margin, metres: cells this close to a zone edge get the rectangle test itself. */
export const EDGE_M = 1e-6;
/** extremaInOrientedRect's own slack on its edges. */
export const RECT_EPS = 1e-9;

/**
 * extremaInOrientedRect's own test for cell k and the zone of the point (px, py), along (ax, ay)
 * and across (bx, by): false when the cell is inside and nodata, else true, with its height
 * folded into acc (max, min) if inside.
 * @example if (!testCell(grid, k, px, py, ax, ay, bx, by, HA, HC, acc)) bad = true;
 */
export function testCell(
  grid: DemGrid, k: number, px: number, py: number, ax: number, ay: number, bx: number, by: number,
  HA: number, HC: number, acc: Float64Array,
): boolean {
  const { width: w, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const r = Math.floor(k / w), c = k - r * w;
  const rx = x0 + (c + 0.5) * dx - px;
  const ry = y0 + (r + 0.5) * dy - py;
  const along = rx * ax + ry * ay;
  const across = rx * bx + ry * by;
  if (Math.abs(along) > HA + RECT_EPS || Math.abs(across) > HC + RECT_EPS) return true;
  const z = heights[k];
  if (z !== z) return false;
  if (z > acc[0]) acc[0] = z;
  if (z < acc[1]) acc[1] = z;
  return true;
}
