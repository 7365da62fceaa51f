import { openDem, type OpenDemOptions } from "./source.js";
import { demStatistics } from "./statistics.js";
import { nativeBounds } from "./window.js";
import { transformBounds, WGS84_PROJ4 } from "./bounds.js";
import { cellSizeMetres } from "./cellsize.js";

/** What `gsdplan inspect` reports about a DEM (also its --json output). */
export interface DemReport {
  file: string;
  width: number;
  height: number;
  bands: number;
  band: number;
  epsg: number | null;
  crsName: string;
  proj4: string;
  geographic: boolean;
  /** Cell size in native CRS units [x, y]. */
  cellSize: [number, number];
  /** Cell size in metres [x, y] (at the centre latitude for geographic CRSs). */
  cellSizeM: [number, number];
  /** [west, south, east, north] in the native CRS. */
  boundsNative: [number, number, number, number];
  /** [west, south, east, north] in WGS84 degrees. */
  boundsWgs84: [number, number, number, number];
  elevationM: { min: number | null; max: number | null; mean: number | null };
  /** True when the statistics come from every cell, false when from a sample. */
  statisticsExact: boolean;
  sampledCells: number;
  verticalUnit: string;
  verticalDatum: string;
  verticalCrs: string | null;
  nodata: number | null;
  nodataFraction: number;
  dataType: string;
  scale: number;
  offset: number;
  pixelIsPoint: boolean;
  tiled: boolean;
  blockSize: [number, number];
  compression: string;
  predictor: number;
  overviews: number;
  warnings: string[];
}

/** Options of inspectDem. */
export interface InspectOptions extends OpenDemOptions {
  /** Most cells decoded for the height statistics (default 1 000 000). */
  maxSamples?: number;
}

const round = (v: number, d: number) => (Number.isFinite(v) ? Number(v.toFixed(d)) : null);

/**
 * Opens a DEM, reads its header and a bounded sample, and describes it.
 * @example const r = await inspectDem("fixtures/gdal/hills_utm33_f32.tif"); r.epsg // 32633
 */
export async function inspectDem(path: string, opts: InspectOptions = {}): Promise<DemReport> {
  const dem = await openDem(path, opts);
  try {
    const stats = await demStatistics(dem, { maxSamples: opts.maxSamples });
    const nb = nativeBounds(dem);
    const wgs = transformBounds(nb, dem.crs.proj4, WGS84_PROJ4);
    const { dx, dy } = dem.transform;
    const centreLat = (wgs.south + wgs.north) / 2;
    const dataType = `${dem.sampleFormat === "float" ? "Float" : dem.sampleFormat === "int" ? "Int" : "UInt"}${dem.bitsPerSample}`;
    return {
      file: path,
      width: dem.width,
      height: dem.height,
      bands: dem.bands,
      band: dem.band,
      epsg: dem.crs.epsg,
      crsName: dem.crs.name,
      proj4: dem.crs.proj4,
      geographic: dem.crs.geographic,
      cellSize: [dx, -dy],
      cellSizeM: cellSizeMetres(dx, dy, dem.crs.geographic, dem.crs.linearUnitM, centreLat),
      boundsNative: [nb.west, nb.south, nb.east, nb.north],
      boundsWgs84: [wgs.west, wgs.south, wgs.east, wgs.north],
      elevationM: { min: round(stats.minM, 3), max: round(stats.maxM, 3), mean: round(stats.meanM, 3) },
      statisticsExact: stats.exact,
      sampledCells: stats.sampledCells,
      verticalUnit: dem.verticalUnit,
      verticalDatum: dem.verticalDatum,
      verticalCrs: dem.verticalCrsName,
      nodata: dem.nodata,
      nodataFraction: stats.nodataFraction,
      dataType,
      scale: dem.scale,
      offset: dem.offset,
      pixelIsPoint: dem.pixelIsPoint,
      tiled: dem.tiled,
      blockSize: [dem.blockWidth, dem.blockHeight],
      compression: dem.compression,
      predictor: dem.predictor,
      overviews: dem.overviewCount,
      warnings: [...dem.warnings],
    };
  } finally {
    await dem.close();
  }
}

/**
 * Human-readable lines for a DemReport.
 * @example formatDemReport(await inspectDem("dem.tif"))
 */
export function formatDemReport(r: DemReport): string {
  const n = (v: number | null, d = 2) => (v === null || !Number.isFinite(v) ? "n/a" : v.toFixed(d));
  const coord = (v: number) => (r.geographic ? v.toFixed(7) : v.toFixed(3));
  const lines = [
    `file:            ${r.file}`,
    `CRS:             ${r.epsg !== null ? `EPSG:${r.epsg} (${r.crsName})` : `${r.crsName}: ${r.proj4}`}`,
    `size:            ${r.width} x ${r.height} cells, band ${r.band} of ${r.bands}, ${r.dataType}`,
    `cell size:       ${n(r.cellSizeM[0], 3)} x ${n(r.cellSizeM[1], 3)} m (${+r.cellSize[0].toPrecision(10)} x ${+r.cellSize[1].toPrecision(10)} ${r.geographic ? "degrees" : "CRS units"})${r.geographic ? " at the centre latitude" : ""}`,
    `extent native:   west ${coord(r.boundsNative[0])}, south ${coord(r.boundsNative[1])}, east ${coord(r.boundsNative[2])}, north ${coord(r.boundsNative[3])}`,
    `extent WGS84:    west ${r.boundsWgs84[0].toFixed(7)}, south ${r.boundsWgs84[1].toFixed(7)}, east ${r.boundsWgs84[2].toFixed(7)}, north ${r.boundsWgs84[3].toFixed(7)}`,
    `elevation (m):   min ${n(r.elevationM.min)}, max ${n(r.elevationM.max)}, mean ${n(r.elevationM.mean)}${r.statisticsExact ? "" : ` (estimated from ${r.sampledCells} sampled cells)`}`,
    `vertical:        unit ${r.verticalUnit}, datum ${r.verticalDatum}${r.verticalCrs ? ` (${r.verticalCrs})` : ""}`,
    `nodata:          ${r.nodata === null ? "none declared" : r.nodata}, ${(r.nodataFraction * 100).toFixed(2)} % of ${r.statisticsExact ? "cells" : "sampled cells"}`,
    `storage:         ${r.tiled ? `tiled ${r.blockSize[0]}x${r.blockSize[1]}` : `striped, ${r.blockSize[1]} rows per strip`}, ${r.compression} compression${r.predictor > 1 ? `, predictor ${r.predictor}` : ""}${r.overviews ? `, ${r.overviews} overviews` : ""}`,
  ];
  if (r.scale !== 1 || r.offset !== 0) lines.push(`scale/offset:    ${r.scale} / ${r.offset}`);
  if (r.pixelIsPoint) lines.push("pixel is point:  yes (transform shifted half a cell to cell corners)");
  for (const w of r.warnings) lines.push(`warning:         ${w}`);
  lines.push("note:            a DEM is not a survey of obstacles; check heights and local rules before flying.");
  return lines.join("\n") + "\n";
}
