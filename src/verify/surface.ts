/**
 * The ground as the check sees it: the DEM window in its own CRS, in index
 * space (cell centre (i, j) at the point (i, j); col = (x - x0) / dx - 0.5),
 * interpolated bilinearly between cell centres as GDAL does. The quad (i, j) is
 * the square between centres i..i+1, j..j+1; ground inside it is known when its
 * four corners are. With `assumeGroundM` the unknown centres take that height
 * for the clearance and ceiling checks, while `known` still says where the DEM
 * has data (the nodata check reads it).
 */
import proj4 from "proj4";
import type { DemGrid } from "../dem/grid.js";
import { buildPyramid, type Pyramid } from "./pyramid.js";

export interface Surface {
  width: number;
  height: number;
  /** Heights used by the checks (metres, the DEM's datum); NaN where unknown and not assumed. */
  z: Float32Array;
  /** True when unknown centres carry an assumed height in `z`. */
  assumed: boolean;
  pyramid: Pyramid;
  /** The DEM window: its heights are the DEM's own (NaN where it has no data), whatever ground `z` assumes. */
  grid: DemGrid;
}

/**
 * Wraps a DEM window for the checks (a copy of the heights only when ground is assumed).
 * @example const s = makeSurface(grid, null); groundAtIndex(s, 10.5, 20.25)
 */
export function makeSurface(grid: DemGrid, assumeGroundM: number | null): Surface {
  let z = grid.heights;
  if (assumeGroundM !== null) {
    z = new Float32Array(grid.heights);
    for (let i = 0; i < z.length; i++) if (z[i] !== z[i]) z[i] = assumeGroundM;
  }
  return { width: grid.width, height: grid.height, z, assumed: assumeGroundM !== null, pyramid: buildPyramid(z, grid.heights, grid.width, grid.height), grid };
}

/**
 * True when the quad (i, j) exists and its four corners have heights in `z`.
 * @example quadUsable(s, 10, 20) // false beside nodata that is not assumed
 */
export function quadUsable(s: Surface, i: number, j: number): boolean {
  if (i < 0 || j < 0 || i >= s.width - 1 || j >= s.height - 1) return false;
  const k = j * s.width + i;
  const z = s.z;
  return z[k] === z[k] && z[k + 1] === z[k + 1] && z[k + s.width] === z[k + s.width] && z[k + s.width + 1] === z[k + s.width + 1];
}

/**
 * True when the quad (i, j) exists and the DEM has data at its four corners.
 * @example quadKnown(s, 10, 20)
 */
export function quadKnown(s: Surface, i: number, j: number): boolean {
  if (i < 0 || j < 0 || i >= s.width - 1 || j >= s.height - 1) return false;
  const k = j * s.width + i;
  // The DEM's own heights (NaN where it has no data), whatever ground is assumed in `z`.
  const v = s.grid.heights;
  const a = v[k], b = v[k + 1], c = v[k + s.width], d = v[k + s.width + 1];
  return a === a && b === b && c === c && d === d;
}

/**
 * The quad holding index point (c, r) is (quadColumn(s, c), quadRow(s, r)): the last centre
 * line belongs to the quad before it. Two numbers rather than a pair, so the checks'
 * per-piece loops allocate nothing (the CLI's engine leaves escape analysis out, which had
 * removed the pairs: cli/engineSettings.ts).
 * @example quadColumn(s, 3.5) // 3
 */
export function quadColumn(s: Surface, c: number): number {
  const i = Math.floor(c);
  return i === s.width - 1 && c === i ? i - 1 : i;
}

/** The row of the quad holding index row r (see quadColumn). @example quadRow(s, 4.25) // 4 */
export function quadRow(s: Surface, r: number): number {
  const j = Math.floor(r);
  return j === s.height - 1 && r === j ? j - 1 : j;
}

/**
 * Bilinear ground at index point (c, r) from `z`; NaN outside the centres' hull
 * or where a corner is unknown (and not assumed).
 * @example groundAtIndex(s, 3, 4) // the height of centre (3, 4)
 */
export function groundAtIndex(s: Surface, c: number, r: number): number {
  const i = quadColumn(s, c), j = quadRow(s, r);
  if (!quadUsable(s, i, j)) return NaN;
  const w = s.width;
  const k = j * w + i;
  const u = c - i;
  const v = r - j;
  const z = s.z;
  return (z[k] * (1 - u) + z[k + 1] * u) * (1 - v) + (z[k + w] * (1 - u) + z[k + w + 1] * u) * v;
}

/**
 * Bilinear ground where the DEM itself has data (assumed heights not used): what the
 * DEM says at (c, r), NaN where a corner has no data or outside the centres' hull.
 * @example knownGroundAtIndex(s, 3.5, 4) // halfway between centres (3, 4) and (4, 4)
 */
export function knownGroundAtIndex(s: Surface, c: number, r: number): number {
  const i = quadColumn(s, c), j = quadRow(s, r);
  if (!quadKnown(s, i, j)) return NaN;
  const w = s.width;
  const k = j * w + i;
  const u = c - i;
  const v = r - j;
  const z = s.grid.heights;
  return (z[k] * (1 - u) + z[k + 1] * u) * (1 - v) + (z[k + w] * (1 - u) + z[k + w + 1] * u) * v;
}

/**
 * Index coordinates of a point in the DEM's CRS units.
 * @example toIndex(s, x, y) // [col, row] with centres at integers
 */
export function toIndex(s: Surface, x: number, y: number): [number, number] {
  const t = s.grid.transform;
  return [(x - t.x0) / t.dx - 0.5, (y - t.y0) / t.dy - 0.5];
}

/**
 * A point's CRS coordinates from index coordinates (inverse of toIndex).
 * @example fromIndex(s, 0, 0) // the north-west cell centre
 */
export function fromIndex(s: Surface, c: number, r: number): [number, number] {
  const t = s.grid.transform;
  return [t.x0 + (c + 0.5) * t.dx, t.y0 + (r + 0.5) * t.dy];
}

/**
 * The DEM's ground at WGS84 points, as the ground check uses it: each point
 * taken to the DEM's own CRS with proj4 (a geographic DEM stays in degrees)
 * and interpolated bilinearly between cell centres where the DEM has data.
 * @example groundAtLonLat(surface, [7.959], [46.5001])[0]
 */
export function groundAtLonLat(s: Surface, lons: ArrayLike<number>, lats: ArrayLike<number>, out: Float64Array = new Float64Array(lons.length)): Float64Array {
  const conv = proj4("+proj=longlat +datum=WGS84 +no_defs", s.grid.crs.proj4);
  for (let k = 0; k < lons.length; k++) {
    const [x, y] = conv.forward([lons[k], lats[k]]);
    const [c, r] = toIndex(s, x, y);
    out[k] = knownGroundAtIndex(s, c, r);
  }
  return out;
}
