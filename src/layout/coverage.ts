/**
 * How much of the site the DEM covers with valid heights. Ground without
 * heights cannot be planned over, so the uncovered part is reported, and a
 * site wholly outside is refused.
 */
import { InputError } from "../errors.js";
import type { DemGrid } from "../dem/grid.js";
import type { Site } from "./types.js";
import { siteRings } from "./rings.js";

export interface SiteCoverage {
  /** Site area without valid DEM heights (outside the grid or nodata), m². */
  outsideAreaM2: number;
  /** outsideAreaM2 / site area, in [0, 1]. */
  outsideFraction: number;
  /** One line for the summary; empty when the DEM covers the whole site. */
  message: string;
}

/** Most sample points used; the lattice coarsens beyond the DEM cell to stay under it. */
const MAX_SAMPLES = 250_000;

/**
 * Part of the site lying outside the DEM's valid cells. The grid must be in
 * the site's local frame (the working grid). Measured on a lattice of cell
 * size (coarser for very large sites), so the area is exact to about one
 * cell along the boundary.
 * @example siteCoverage(site, grid).message // "12.0 % of the site (1,500 m²) has no DEM heights ..."
 * @throws InputError when no part of the site has DEM heights.
 */
export function siteCoverage(site: Site, grid: DemGrid): SiteCoverage {
  const { all } = siteRings(site);
  let xMin = Infinity, xMax = -Infinity, yMin = Infinity, yMax = -Infinity;
  for (const r of all) for (const [x, y] of r) {
    if (x < xMin) xMin = x;
    if (x > xMax) xMax = x;
    if (y < yMin) yMin = y;
    if (y > yMax) yMax = y;
  }
  const cell = Math.min(grid.cellSizeM[0], grid.cellSizeM[1]);
  const step = Math.max(cell, Math.sqrt(((xMax - xMin) * (yMax - yMin)) / MAX_SAMPLES));
  const { x0, y0, dx, dy } = grid.transform;
  let inside = 0;
  let missing = 0;
  const crossings: number[] = [];
  // Scanline point-in-polygon (even-odd over all rings, so holes are outside).
  for (let y = yMin + step / 2; y < yMax; y += step) {
    crossings.length = 0;
    for (const r of all) {
      for (let i = 0; i + 1 < r.length; i++) {
        const [ax, ay] = r[i];
        const [bx, by] = r[i + 1];
        if (ay > y !== by > y) crossings.push(ax + ((y - ay) / (by - ay)) * (bx - ax));
      }
    }
    crossings.sort((p, q) => p - q);
    const row = Math.floor((y - y0) / dy);
    for (let k = 0; k + 1 < crossings.length; k += 2) {
      const first = xMin + step / 2 + Math.ceil((crossings[k] - xMin - step / 2) / step) * step;
      for (let x = first; x < crossings[k + 1]; x += step) {
        inside++;
        const col = Math.floor((x - x0) / dx);
        // Outside the grid, or nodata (NaN) there.
        const z = col < 0 || row < 0 || col >= grid.width || row >= grid.height ? NaN : grid.heights[row * grid.width + col];
        if (z !== z) missing++;
      }
    }
  }
  if (inside === 0) return { outsideAreaM2: 0, outsideFraction: 0, message: "" };
  const fraction = missing / inside;
  if (missing === inside) {
    throw new InputError("site", site.name, "a site at least partly inside the DEM's valid data", "the site lies wholly outside the DEM (or over nodata only); check the DEM covers the site and both use the same area");
  }
  const outsideAreaM2 = fraction * site.areaM2;
  const message =
    missing === 0
      ? ""
      : `${formatPct(fraction * 100)} % of the site (${Math.round(outsideAreaM2).toLocaleString("en-US")} m²) has no DEM heights (outside the DEM or nodata); no strip can be planned safely there — extend the DEM or trim the site`;
  return { outsideAreaM2, outsideFraction: fraction, message };
}

/** Percent with enough digits that a small uncovered part does not print as 0.0. */
function formatPct(pct: number): string {
  return pct >= 1 ? pct.toFixed(1) : pct.toPrecision(2);
}
