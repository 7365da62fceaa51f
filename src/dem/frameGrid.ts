import type { DemGrid } from "./grid.js";
import type { LocalFrame } from "../geo/frame.js";
import { toMetricGrid } from "./reproject.js";

/**
 * The DEM window on the site's working frame. When the frame is a per-axis scale
 * and shift of the DEM's own CRS (`frame.fromNative`), the cells are kept as they
 * are and only the geotransform changes: every height the plan reads between cell
 * centres is then the DEM's own bilinear surface (GDAL's `-r bilinear`), exactly.
 * Otherwise the window is resampled onto the frame (`resampled: true`), and heights
 * between cells carry the error of interpolating an interpolation.
 * @example const { grid, resampled } = gridOnFrame(raw, frame)
 */
export function gridOnFrame(raw: DemGrid, frame: LocalFrame): { grid: DemGrid; resampled: boolean } {
  const a = frame.fromNative;
  if (!a) return { grid: toMetricGrid(raw, frame.proj4, { epsg: frame.epsg, name: frame.name }), resampled: true };
  const t = raw.transform;
  let ox = a.ox;
  if (raw.crs.geographic && a.lon0Deg !== undefined) {
    // Take the DEM's longitudes in the wrap nearest the frame's centre (a 0..360 grid, or the antimeridian).
    const midLon = t.x0 + (raw.width * t.dx) / 2;
    ox -= a.sx * 360 * Math.round((midLon - a.lon0Deg) / 360);
  }
  const dx = a.sx * t.dx;
  const dy = a.sy * t.dy;
  if (!(dx > 0) || !(dy < 0)) throw new Error(`frame affine does not keep the grid north-up (dx ${dx}, dy ${dy})`);
  const grid: DemGrid = {
    ...raw,
    transform: { x0: ox + a.sx * t.x0, y0: a.oy + a.sy * t.y0, dx, dy },
    crs: { proj4: frame.proj4, epsg: frame.epsg, name: frame.name, geographic: false, linearUnitM: 1 },
    cellSizeM: [dx, -dy],
    native: { crs: raw.crs, transform: t },
  };
  return { grid, resampled: false };
}
