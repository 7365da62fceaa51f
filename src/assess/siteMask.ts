import type { MultiPolygon, Polygon } from "geojson";
import type { GeoTransform } from "../dem/grid.js";

/**
 * Marks the grid cells whose centre lies inside the site polygon.
 *
 * Written by hand as a scanline even-odd fill over typed arrays because the
 * working grid has up to 16 million cells: a point-in-polygon call per cell
 * (turf's booleanPointInPolygon walks every ring edge for every point) is
 * orders of magnitude slower than crossing each row once with the edges that
 * span it. Even-odd parity over all rings of all polygons makes holes come
 * out as holes without caring about ring winding.
 *
 * A cell centre exactly on an edge follows the half-open rule
 * (ymin <= y < ymax for crossings, xa <= x < xb for the fill), so cells on a
 * shared edge belong to exactly one of two neighbouring polygons.
 */

/**
 * Rasterise a local-frame polygon onto a grid: 1 where the cell centre is inside. `shared`:
 * the mask is made in shared memory (worker threads then read it in place).
 * @example
 * const inSite = rasteriseSite(site.local, grid.width, grid.height, grid.transform);
 */
export function rasteriseSite(
  geometry: Polygon | MultiPolygon,
  width: number,
  height: number,
  transform: GeoTransform,
  shared = false,
): Uint8Array {
  const { x0, y0, dx, dy } = transform;
  const rings: number[][][] = geometry.type === "Polygon" ? geometry.coordinates : geometry.coordinates.flat();
  let nEdges = 0;
  for (const ring of rings) nEdges += ring.length;
  // Edge table: endpoints and the rows whose centres the edge crosses.
  const ax = new Float64Array(nEdges);
  const ay = new Float64Array(nEdges);
  const bx = new Float64Array(nEdges);
  const by = new Float64Array(nEdges);
  const rowStart = new Int32Array(nEdges);
  const rowEnd = new Int32Array(nEdges);
  let e = 0;
  for (const ring of rings) {
    const n = ring.length;
    for (let i = 0; i < n; i++) {
      const p = ring[i];
      const q = ring[(i + 1) % n];
      const yLo = Math.min(p[1], q[1]);
      const yHi = Math.max(p[1], q[1]);
      if (yLo === yHi) continue; // horizontal edges never cross a row line under the half-open rule
      // Row r's centre y_r = y0 + (r + 0.5) dy must satisfy yLo <= y_r < yHi (dy < 0);
      // one row of slack each side, the exact test in the sweep decides.
      const r0 = Math.max(0, Math.floor((yHi - y0) / dy - 0.5));
      const r1 = Math.min(height - 1, Math.floor((yLo - y0) / dy - 0.5) + 1);
      if (r0 > r1) continue;
      ax[e] = p[0];
      ay[e] = p[1];
      bx[e] = q[0];
      by[e] = q[1];
      rowStart[e] = r0;
      rowEnd[e] = r1;
      e++;
    }
  }
  nEdges = e;

  // Bucket edges by their first row (counting sort), then sweep with an active list.
  const firstCount = new Int32Array(height + 1);
  for (let i = 0; i < nEdges; i++) firstCount[rowStart[i] + 1]++;
  for (let r = 0; r < height; r++) firstCount[r + 1] += firstCount[r];
  const byRow = new Int32Array(nEdges);
  const fill = firstCount.slice(0, height);
  for (let i = 0; i < nEdges; i++) byRow[fill[rowStart[i]]++] = i;

  const mask = new Uint8Array(shared ? new SharedArrayBuffer(width * height) : new ArrayBuffer(width * height));
  const active = new Int32Array(nEdges);
  const xs = new Float64Array(nEdges);
  let nActive = 0;
  for (let r = 0; r < height; r++) {
    for (let k = firstCount[r]; k < firstCount[r + 1]; k++) active[nActive++] = byRow[k];
    const y = y0 + (r + 0.5) * dy;
    let nx = 0;
    let keep = 0;
    for (let k = 0; k < nActive; k++) {
      const i = active[k];
      if (rowEnd[i] < r) continue; // finished: drop from the active list
      active[keep++] = i;
      const yi = ay[i];
      const yj = by[i];
      // Guard the derived row range with the exact half-open test against rounding.
      if (!(Math.min(yi, yj) <= y && y < Math.max(yi, yj))) continue;
      xs[nx++] = ax[i] + ((y - yi) * (bx[i] - ax[i])) / (yj - yi);
    }
    nActive = keep;
    if (nx < 2) continue;
    const row = xs.subarray(0, nx).sort();
    const base = r * width;
    for (let k = 0; k + 1 < nx; k += 2) {
      let c0 = Math.ceil((row[k] - x0) / dx - 0.5);
      let c1 = Math.ceil((row[k + 1] - x0) / dx - 0.5) - 1;
      if (c0 < 0) c0 = 0;
      if (c1 > width - 1) c1 = width - 1;
      // A run at a time (memset): cell by cell the fill was most of the 4 km2 site's ~25 ms.
      if (c0 <= c1) mask.fill(1, base + c0, base + c1 + 1);
    }
  }
  return mask;
}
