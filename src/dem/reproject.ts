import { InputError } from "../errors.js";
import type { CrsInfo, DemGrid } from "./grid.js";
import { transformBounds } from "./bounds.js";
import { proj4LinearUnitM } from "./crs.js";
import { MAX_CELLS } from "./limits.js";
import { CentreLattice } from "./lattice.js";

/** Options of toMetricGrid. */
export interface ToMetricOptions {
  /** Output cell size in metres (default: the smaller of the grid's metric cell sizes). */
  cellM?: number;
  /** EPSG code and name to record for the target CRS. */
  epsg?: number | null;
  name?: string;
}


function sameCrs(a: CrsInfo, targetProj4: string, epsg: number | null | undefined): boolean {
  if (a.proj4.trim() === targetProj4.trim()) return true;
  return epsg !== undefined && epsg !== null && a.epsg === epsg;
}

/**
 * The grid on a north-up grid of a metric projected CRS: returned as is when it already is
 * one (same CRS, metres), otherwise resampled bilinearly between cell centres. A target cell
 * whose four source neighbours are not all valid is nodata.
 * @example
 * const utm = toMetricGrid(geoGrid, "+proj=utm +zone=32 +datum=WGS84 +units=m +no_defs", { epsg: 32632 });
 */
export function toMetricGrid(grid: DemGrid, targetProj4: string, opts: ToMetricOptions = {}): DemGrid {
  const unitM = proj4LinearUnitM(targetProj4);
  if (/\+proj=(longlat|latlong|lonlat|latlon)\b/.test(targetProj4) || unitM !== 1)
    throw new InputError("targetProj4", targetProj4, "a projected CRS in metres");
  if (!grid.crs.geographic && grid.crs.linearUnitM === 1 && sameCrs(grid.crs, targetProj4, opts.epsg) && opts.cellM === undefined) return grid;

  const cellM = opts.cellM ?? Math.min(grid.cellSizeM[0], grid.cellSizeM[1]);
  if (!(cellM > 0) || !Number.isFinite(cellM)) throw new InputError("cellM", opts.cellM, "a cell size in metres > 0");

  const st = grid.transform;
  const srcBounds = { west: st.x0, north: st.y0, east: st.x0 + grid.width * st.dx, south: st.y0 + grid.height * st.dy };
  const tb = transformBounds(srcBounds, grid.crs.proj4, targetProj4, 41);
  const x0 = Math.floor(tb.west / cellM) * cellM;
  const y0 = Math.ceil(tb.north / cellM) * cellM;
  const width = Math.max(1, Math.ceil((tb.east - x0) / cellM));
  const height = Math.max(1, Math.ceil((y0 - tb.south) / cellM));
  if (width * height > MAX_CELLS) throw new InputError("cellM", cellM, "a cell size giving at most 2^31 cells", `reprojected grid would be ${width} x ${height} cells`);

  // Where each target cell centre lies in the source CRS (exact every LATTICE_STEP cells).
  const lattice = new CentreLattice({ x0, y0, dx: cellM, dy: -cellM }, 0, 0, width, height, targetProj4, grid.crs.proj4);

  const heights = new Float32Array(width * height);
  const sw = grid.width, sh = grid.height, src = grid.heights;
  for (let row = 0; row < height; row++) {
    for (let col = 0; col < width; col++) {
      const [sx, sy] = lattice.at(col, row);
      // Source column/row, cell centres at integers.
      let c = (sx - st.x0) / st.dx - 0.5;
      let r = (sy - st.y0) / st.dy - 0.5;
      const o = row * width + col;
      // Outside the source raster (beyond its outer cell edges): nodata.
      if (!(c >= -0.5 && c <= sw - 0.5 && r >= -0.5 && r <= sh - 0.5)) {
        heights[o] = NaN;
        continue;
      }
      // Within the outer half cell, hold the edge cell (no neighbour beyond it).
      if (c < 0) c = 0;
      else if (c > sw - 1) c = sw - 1;
      if (r < 0) r = 0;
      else if (r > sh - 1) r = sh - 1;
      let ci = Math.floor(c), ri = Math.floor(r);
      if (ci > sw - 2) ci = Math.max(0, sw - 2);
      if (ri > sh - 2) ri = Math.max(0, sh - 2);
      const fx = sw > 1 ? c - ci : 0, fy = sh > 1 ? r - ri : 0;
      const ci1 = sw > 1 ? ci + 1 : ci, ri1 = sh > 1 ? ri + 1 : ri;
      const a = ri * sw + ci, b = ri * sw + ci1, d = ri1 * sw + ci, e = ri1 * sw + ci1;
      // A neighbour without data (NaN) makes the cell nodata (NaN) through the sum.
      heights[o] = (1 - fy) * ((1 - fx) * src[a] + fx * src[b]) + fy * ((1 - fx) * src[d] + fx * src[e]);
    }
  }

  const crs: CrsInfo = { proj4: targetProj4, epsg: opts.epsg ?? null, name: opts.name ?? (opts.epsg ? `EPSG:${opts.epsg}` : "metric working CRS"), geographic: false, linearUnitM: 1 };
  return {
    width,
    height,
    heights,
    transform: { x0, y0, dx: cellM, dy: -cellM },
    crs,
    cellSizeM: [cellM, cellM],
    verticalDatum: grid.verticalDatum,
    verticalUnit: grid.verticalUnit,
  };
}
