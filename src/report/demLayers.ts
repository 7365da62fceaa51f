import type { ReportGrid } from "./model.js";
import { hillshade } from "./hillshade.js";
import { pngDataUri, shadeRgba } from "./png.js";
import { contourLayer, mapView } from "./map.js";

/**
 * The report's layers that come from the DEM alone: the hill shade (a PNG data URI) and the
 * main map's contours. They take a good share of the page's rendering, so a plan has them
 * drawn on a worker thread with the report's maps while it makes its statistics
 * (serialize.ts reportMapsInBackground); the page is the same whether they were made then or
 * by renderReport itself (test/report/background.test.ts).
 */
export interface DemLayers {
  /** Which reduced DEM they were drawn from (size and geotransform; see demLayersKey). */
  key: string;
  shadeUri: string;
  contours: { svg: string; labels: string; intervalM: number };
}

/**
 * The layers of the reduced DEM the page draws (the report input's DEM after compactReportInput).
 * @example const layers = demLayers(compactReportInput(input).dem)
 */
export function demLayers(dem: ReportGrid): DemLayers {
  return {
    key: demLayersKey(dem),
    shadeUri: pngDataUri(dem.width, dem.height, shadeRgba(hillshade().azimuth(315).altitude(45).zFactor(1)(dem))),
    contours: contourLayer(mapView(dem, 1000), dem),
  };
}

/** A reduced DEM's size and geotransform: layers are used only for the DEM they were drawn from. */
export function demLayersKey(dem: ReportGrid): string {
  const t = dem.transform;
  return `${dem.width}x${dem.height} ${t.x0} ${t.y0} ${t.dx} ${t.dy}`;
}
