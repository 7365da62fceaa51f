/**
 * The in-memory DEM window every later stage reads. North-up only.
 *
 * Cell (col, row) covers x in [x0 + col*dx, x0 + (col+1)*dx] and
 * y in [y0 + (row+1)*dy, y0 + row*dy] (dy < 0). Its centre is
 * (x0 + (col + 0.5) * dx, y0 + (row + 0.5) * dy). This is GDAL's
 * geotransform with zero rotation terms, after any pixel-is-point shift.
 */
export interface GeoTransform {
  x0: number;
  y0: number;
  /** Cell width in CRS units, > 0. */
  dx: number;
  /** Cell height in CRS units, < 0 for north-up. */
  dy: number;
}

export type VerticalDatum = "egm96" | "egm2008" | "ellipsoid" | "other" | "unknown";

export interface CrsInfo {
  /** proj4 definition string usable by the `proj4` package. */
  proj4: string;
  /** EPSG code of the horizontal CRS, or null for user-defined ones. */
  epsg: number | null;
  /** Human-readable name (from the EPSG table or the GeoKeys citation). */
  name: string;
  /** True for longitude/latitude CRSs (cell sizes in degrees). */
  geographic: boolean;
  /** Metres per horizontal CRS unit (1 for metres, 0.3048006096 for US survey feet); NaN when geographic. */
  linearUnitM: number;
}

export interface DemGrid {
  width: number;
  height: number;
  /**
   * Heights in metres (after scale/offset and vertical unit conversion), row-major, NaN where
   * nodata: a cell has data where its height is a number (h === h). No separate mask is kept
   * (it was one byte a cell, 20 MB of a 4 km2 window, beside the same fact in the heights).
   */
  heights: Float32Array;
  transform: GeoTransform;
  crs: CrsInfo;
  /** Cell size in metres [x, y], both positive. */
  cellSizeM: [number, number];
  verticalDatum: VerticalDatum;
  /** Vertical unit as declared by the file (e.g. "metre", "US survey foot"). */
  verticalUnit: string;
  /**
   * The same cells in the DEM's own CRS, when this grid is the DEM's window
   * with only its geotransform rescaled onto the working frame (no
   * resampling): outputs on this grid are written in the DEM's CRS.
   */
  native?: { crs: CrsInfo; transform: GeoTransform };
}
