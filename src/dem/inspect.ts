import { openDem, type DemSource, type OpenDemOptions } from "./source.js";
import { demStatistics, type DemStatisticsOptions } from "./statistics.js";
import { mosaicOf } from "./mosaic.js";
import { nativeBounds } from "./window.js";
import { transformBounds, WGS84_PROJ4 } from "./bounds.js";
import { cellSizeMetres } from "./cellsize.js";

/** Header facts of one source of a mosaic (no cell read). */
export interface DemSourceReport {
  file: string;
  width: number;
  height: number;
  epsg: number | null;
  crsName: string;
  geographic: boolean;
  cellSize: [number, number];
  cellSizeM: [number, number];
  boundsNative: [number, number, number, number];
  dataType: string;
  nodata: number | null;
  tiled: boolean;
  blockSize: [number, number];
  compression: string;
  overviews: number;
  verticalUnit: string;
  verticalDatum: string;
  /** How its cells reach the mosaic grid: copied cell for cell, or resampled bilinearly. */
  placement: "copied" | "resampled";
}

/** What `gsdplan inspect` reports about a DEM (also its --json output). */
export interface DemReport {
  /** The source as given (a list joined with ", "). */
  file: string;
  /** One GeoTIFF, a GDAL VRT mosaic, or a mosaic of several sources (list or folder). */
  kind: "GeoTIFF" | "VRT mosaic" | "mosaic";
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
  /** A mosaic's sources in mosaic order (later ones win), each described from its header. */
  sources?: DemSourceReport[];
}

/** Options of inspectDem. */
export interface InspectOptions extends OpenDemOptions, Pick<DemStatisticsOptions, "maxExactCells" | "budgetMs" | "maxSamples"> {}

const round = (v: number, d: number) => (Number.isFinite(v) ? Number(v.toFixed(d)) : null);

/**
 * Opens a DEM (one source or a list: see openDem), reads its header, its heights (every
 * cell when quick, else a bounded sample: see demStatistics) and, for a mosaic, every
 * source's header, and describes it.
 * @example const r = await inspectDem("fixtures/gdal/hills_utm33_f32.tif"); r.epsg // 32633
 */
export async function inspectDem(spec: string | readonly string[], opts: InspectOptions = {}): Promise<DemReport> {
  const dem = await openDem(spec, opts);
  try {
    const stats = await demStatistics(dem, { maxExactCells: opts.maxExactCells, budgetMs: opts.budgetMs, maxSamples: opts.maxSamples });
    const head = headerFacts(dem);
    const wgs = transformBounds(nativeBounds(dem), dem.crs.proj4, WGS84_PROJ4);
    const mosaic = mosaicOf(dem);
    const report: DemReport = {
      file: typeof spec === "string" ? spec : spec.join(", "),
      kind: !mosaic ? "GeoTIFF" : mosaic.kind === "vrt" ? "VRT mosaic" : "mosaic",
      width: head.width,
      height: head.height,
      bands: dem.bands,
      band: dem.band,
      epsg: head.epsg,
      crsName: head.crsName,
      proj4: dem.crs.proj4,
      geographic: head.geographic,
      cellSize: head.cellSize,
      cellSizeM: head.cellSizeM,
      boundsNative: head.boundsNative,
      boundsWgs84: [wgs.west, wgs.south, wgs.east, wgs.north],
      elevationM: { min: round(stats.minM, 3), max: round(stats.maxM, 3), mean: round(stats.meanM, 3) },
      statisticsExact: stats.exact,
      sampledCells: stats.sampledCells,
      verticalUnit: dem.verticalUnit,
      verticalDatum: dem.verticalDatum,
      verticalCrs: dem.verticalCrsName,
      nodata: dem.nodata,
      nodataFraction: stats.nodataFraction,
      dataType: head.dataType,
      scale: dem.scale,
      offset: dem.offset,
      pixelIsPoint: dem.pixelIsPoint,
      tiled: dem.tiled,
      blockSize: head.blockSize,
      compression: dem.compression,
      predictor: dem.predictor,
      overviews: dem.overviewCount,
      warnings: [...dem.warnings],
    };
    if (mosaic) {
      report.sources = [];
      // One header at a time: a folder of hundreds of tiles never holds them all open.
      for (const m of mosaic.members) {
        const src = await m.open();
        report.sources.push({ ...headerFacts(src), placement: m.place!.kind === "copy" ? "copied" : "resampled" });
      }
    }
    return report;
  } finally {
    await dem.close();
  }
}

/** What a header alone tells about a source. */
function headerFacts(dem: DemSource): Omit<DemSourceReport, "placement"> {
  const nb = nativeBounds(dem);
  const { dx, dy } = dem.transform;
  // Used for geographic CRSs only (the ground size of a degree there).
  const centreLat = (nb.south + nb.north) / 2;
  return {
    file: dem.path,
    width: dem.width,
    height: dem.height,
    epsg: dem.crs.epsg,
    crsName: dem.crs.name,
    geographic: dem.crs.geographic,
    cellSize: [dx, -dy],
    cellSizeM: cellSizeMetres(dx, dy, dem.crs.geographic, dem.crs.linearUnitM, centreLat),
    boundsNative: [nb.west, nb.south, nb.east, nb.north],
    dataType: `${dem.sampleFormat === "float" ? "Float" : dem.sampleFormat === "int" ? "Int" : "UInt"}${dem.bitsPerSample}`,
    nodata: dem.nodata,
    tiled: dem.tiled,
    blockSize: [dem.blockWidth, dem.blockHeight],
    compression: dem.compression,
    overviews: dem.overviewCount,
    verticalUnit: dem.verticalUnit,
    verticalDatum: dem.verticalDatum,
  };
}

/**
 * Human-readable lines for a DemReport.
 * @example formatDemReport(await inspectDem("dem.tif"))
 */
export function formatDemReport(r: DemReport): string {
  const n = (v: number | null, d = 2) => (v === null || !Number.isFinite(v) ? "n/a" : v.toFixed(d));
  const coord = (v: number) => (r.geographic ? v.toFixed(7) : v.toFixed(3));
  const lines = [
    `file:            ${r.file}${r.kind === "GeoTIFF" ? "" : ` (${r.kind} of ${r.sources?.length ?? "?"} sources; heights in metres on one grid)`}`,
    `CRS:             ${r.epsg !== null ? `EPSG:${r.epsg} (${r.crsName})` : `${r.crsName}: ${r.proj4}`}`,
    `size:            ${r.width} x ${r.height} cells, band ${r.band} of ${r.bands}, ${r.dataType}`,
    `cell size:       ${n(r.cellSizeM[0], 3)} x ${n(r.cellSizeM[1], 3)} m (${+r.cellSize[0].toPrecision(10)} x ${+r.cellSize[1].toPrecision(10)} ${r.geographic ? "degrees" : "CRS units"})${r.geographic ? " at the centre latitude" : ""}`,
    `extent native:   west ${coord(r.boundsNative[0])}, south ${coord(r.boundsNative[1])}, east ${coord(r.boundsNative[2])}, north ${coord(r.boundsNative[3])}`,
    `extent WGS84:    west ${r.boundsWgs84[0].toFixed(7)}, south ${r.boundsWgs84[1].toFixed(7)}, east ${r.boundsWgs84[2].toFixed(7)}, north ${r.boundsWgs84[3].toFixed(7)}`,
    `elevation (m):   min ${n(r.elevationM.min)}, max ${n(r.elevationM.max)}, mean ${n(r.elevationM.mean)}${r.statisticsExact ? "" : ` (estimated from ${r.sampledCells} sampled cells)`}`,
    `vertical:        unit ${r.verticalUnit}, datum ${r.verticalDatum}${r.verticalCrs ? ` (${r.verticalCrs})` : ""}`,
    `nodata:          ${r.nodata === null ? "none declared" : r.nodata}, ${(r.nodataFraction * 100).toFixed(2)} % of ${r.statisticsExact ? "cells" : "sampled cells"}`,
    r.sources
      ? `storage:         per source, below; ${r.sources.filter((x) => x.placement === "copied").length} copied cell for cell, ${r.sources.filter((x) => x.placement === "resampled").length} resampled bilinearly`
      : `storage:         ${r.tiled ? `tiled ${r.blockSize[0]}x${r.blockSize[1]}` : `striped, ${r.blockSize[1]} rows per strip`}, ${r.compression} compression${r.predictor > 1 ? `, predictor ${r.predictor}` : ""}${r.overviews ? `, ${r.overviews} overviews` : ""}`,
  ];
  if (r.scale !== 1 || r.offset !== 0) lines.push(`scale/offset:    ${r.scale} / ${r.offset}`);
  if (r.pixelIsPoint) lines.push("pixel is point:  yes (transform shifted half a cell to cell corners)");
  for (const w of r.warnings) lines.push(`warning:         ${w}`);
  if (r.sources) {
    lines.push(`sources:         ${r.sources.length}, in mosaic order (a later one wins where they overlap)`);
    r.sources.forEach((x, i) => {
      const xc = (v: number) => (x.geographic ? v.toFixed(7) : v.toFixed(3));
      lines.push(
        `  ${String(i + 1).padStart(3)}. ${x.file}: ${x.epsg !== null ? `EPSG:${x.epsg}` : x.crsName}, ${x.width} x ${x.height} cells of ${n(x.cellSizeM[0], 3)} x ${n(x.cellSizeM[1], 3)} m, ` +
          `west ${xc(x.boundsNative[0])}, south ${xc(x.boundsNative[1])}, east ${xc(x.boundsNative[2])}, north ${xc(x.boundsNative[3])}, ` +
          `${x.dataType}, ${x.tiled ? `tiled ${x.blockSize[0]}x${x.blockSize[1]}` : `strips of ${x.blockSize[1]} rows`}, ${x.compression}${x.overviews ? `, ${x.overviews} overviews` : ""}` +
          `${x.nodata !== null ? `, nodata ${x.nodata}` : ""}, ${x.verticalUnit} ${x.verticalDatum}, ${x.placement}`,
      );
    });
  }
  lines.push("note:            a DEM is not a survey of obstacles; check heights and local rules before flying.");
  return lines.join("\n") + "\n";
}
