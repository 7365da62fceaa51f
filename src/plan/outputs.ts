/**
 * The output set of a plan run, as named files ready for the atomic writer:
 * waypoints.csv, flights.csv, plan.geojson, plan.kml, plan.gpx, gsd.tif, images.tif,
 * flags.tif, summary.json, report-data.json and report.html.
 */
import path from "node:path";
import type { OutputFile } from "../export/atomicDir.js";
import { waypointsCsv } from "../export/waypointsCsv.js";
import { flightsCsv, type FlightRow } from "../export/flightsCsv.js";
import { heightReferences, type WaypointRow } from "../export/rows.js";
import { farthestWaypointM } from "../route/flights.js";
import { exposuresFromLegs, type AssessedLeg } from "../assess/exposures.js";
import { planGeoJson } from "../export/geojson.js";
import { planKml } from "../export/kml.js";
import { planGpx } from "../export/gpx.js";
import { assessmentGeoTiffChunks, assessmentGeoTiffFileInBackground, siteWindow, type AssessmentTiffs, type RasterCrs, type RasterWindow } from "../export/geotiffRasters.js";
import { SPLIT_MIN_CELLS, splitAllowed } from "../background.js";
import type { PlanExportInput } from "../export/layers.js";
import { compactReportInput } from "../report/serialize.js";
import { REPORT_MAP_PX } from "../report/downsample.js";
import { reportFilesInBackground } from "../report/background.js";
import type { DemLayers } from "../report/demLayers.js";
import type { AssessmentRasters } from "../assess/types.js";
import type { ReportInput } from "../report/model.js";
import { REPORT_GSD_BINS, gsdBinEdges, histogram, histogramOfTally } from "../report/histogram.js";
import type { LocalFrame } from "../geo/frame.js";
import type { DemGrid } from "../dem/grid.js";
import type { MultiPolygon, Polygon } from "geojson";
import { ringBox } from "../geo/ringBox.js";
import { undulationFor, type PlanRun } from "./plan.js";
import { planSummary, type PlanSummary } from "./summary.js";

export const OUTPUT_NAMES = [
  "waypoints.csv",
  "flights.csv",
  "plan.geojson",
  "plan.kml",
  "plan.gpx",
  "gsd.tif",
  "images.tif",
  "flags.tif",
  "summary.json",
  "report-data.json",
  "report.html",
] as const;

type OutputMeta = { planFile?: string; toolVersion?: string; generatedAt?: string };

/**
 * Builds every output of a run (rasters lazily, so they are encoded one at a time).
 *
 * The files' makers keep only what they write (the waypoints, the flights, the assessment's
 * rasters, the report's input once reduced), not the run: a caller that lets go of the run
 * once this returns (as planToFolder does) lets the DEM window's cells go with it while the
 * files are written, the run's memory peak (79 MB at 4 km2). The report's input is made now
 * and reduced as soon as the report's maps are in (report/serialize.ts compactReportInput);
 * `runReleased` settles once it is (it never rejects: a failure surfaces from the report's
 * files), from when the output set holds nothing of the run's DEM window.
 * @example await writeOutputSet(out, planOutputs(run).files)
 */
export function planOutputs(run: PlanRun, meta: OutputMeta = {}): { files: OutputFile[]; summary: PlanSummary; runReleased: Promise<void> } {
  const summary = planSummary(run);
  const report = reducedReport(reportInput(run, summary, meta), run.reportMaps);
  return { files: outputFiles(writtenParts(run), summary, report), summary, runReleased: report.then(() => undefined, () => undefined) };
}

/** What the files other than the report's are made from: a few fields of the run, not the run itself. */
interface WrittenParts {
  rows: WaypointRow[];
  flights: FlightRow[];
  exportInput: PlanExportInput;
  rasters: AssessmentRasters;
  crs: RasterCrs;
  window: RasterWindow | undefined;
  threads: number | undefined;
}

function writtenParts(run: PlanRun): WrittenParts {
  const heights = { datum: run.verticalDatum, undulationM: undulationFor(run.verticalDatum), takeoffGroundM: run.takeoff.groundM };
  const rows = run.rows;
  const exportInput: PlanExportInput = {
    name: run.site.name,
    site: run.site,
    flights: run.flights.flights.map((f) => f.legs),
    rows,
    toWgs84: run.frame.toWgs84,
    heights,
    flags: run.assessment.polygons,
    takeoff: { lon: run.takeoff.lon, lat: run.takeoff.lat, groundAmslM: run.takeoff.groundM },
    keepOut: run.keepOut.zones,
  };
  // On the DEM's own cells, the rasters are written in the DEM's own CRS and geotransform,
  // so a GIS overlays them cell for cell on the DEM the plan was made from.
  const native = run.grid.native;
  const crs = native
    ? { epsg: native.crs.epsg, proj4: native.crs.proj4, geographic: native.crs.geographic, name: native.crs.name }
    : { epsg: run.grid.crs.epsg, proj4: run.grid.crs.proj4, geographic: false, name: run.grid.crs.name };
  const rasters = native ? { ...run.assessment.rasters, transform: native.transform } : run.assessment.rasters;
  // The files hold the site's box, not the DEM window's margin (every cell of it nodata):
  // at 4 km2 gsd.tif 126 -> 89 MB. The box is taken on the local grid, whose cells are the
  // native grid's when the rasters are written on that.
  const window = siteWindow(run.assessment.rasters, vertexBox(run.site.local));
  return { rows, flights: flightRows(run), exportInput, rasters, crs, window, threads: run.threads };
}

/** The report's input reduced (and the DEM's layers, when made beforehand), once the report's maps are in. */
type ReducedReport = Promise<{ input: ReportInput; layers: DemLayers | undefined }>;

/**
 * Starts reducing `input` (its DEM and rasters to the report's maps): the full-resolution DEM
 * it holds is let go once that is done. Never rejects before it is awaited.
 */
function reducedReport(input: ReportInput, maps: PlanRun["reportMaps"]): ReducedReport {
  const made = (async () => {
    const m = await maps?.();
    return { input: compactReportInput(input, REPORT_MAP_PX, m), layers: m?.layers };
  })();
  made.catch(() => undefined);
  return made;
}

function outputFiles(parts: WrittenParts, summary: PlanSummary, report: ReducedReport): OutputFile[] {
  const { rows, rasters, crs, window } = parts;
  // gsd.tif is streamed to disk chunk by chunk (the uncompressed file is never whole in
  // memory). On large grids (threads allowed) it is made and written by a worker thread of its
  // own, started before the other files (writeOutputSet's background files), while the rest
  // are made here and the page on its worker: at 4 km2 the run took ~0.15 s less (3.2 km2
  // oblique: ~0.4 s less) for some 30-70 MB more at its peak (which varies by ~40 MB from run
  // to run). Otherwise it is made here, the high point of the run's memory (its overviews).
  // images.tif and flags.tif (small once compressed) are made here: a worker of their own
  // beside gsd.tif's and the page's took the same time and more memory at 4 km2, and on the
  // demo the page's worker gained more from the core it left free (below).
  const cells = rasters.width * rasters.height;
  const gsdInBackground = splitAllowed(cells, parts.threads);
  // Both report files come from one reduced input, made in a worker thread (the page, and
  // report-data.json unless this thread comes to it first: report/background.ts), so they are
  // made on the other core while the rasters are written here:
  // on large grids started by the first small raster, after gsd.tif when that is made here
  // (the page's worker holds ~55-75 MB at 4 km2: its heap, the page's strings; workerHeap.ts);
  // on smaller grids as soon as its input is ready (the demo, 34 interleaved pairs: ~0.06 s
  // sooner done).
  let page: Promise<ReturnType<typeof reportFilesInBackground>> | undefined;
  const reportPage = () => (page ??= (async () => {
    const { input, layers } = await report;
    return reportFilesInBackground(input, layers);
  })());
  const tiff = (name: keyof AssessmentTiffs) => async () => {
    if (name !== "gsd.tif") await reportPage();
    return assessmentGeoTiffChunks(rasters, crs, name, window);
  };
  const files: OutputFile[] = [
    { name: "waypoints.csv", data: waypointsCsv(rows) },
    { name: "flights.csv", data: () => flightsCsv(parts.flights) },
    { name: "plan.geojson", data: () => JSON.stringify(planGeoJson(parts.exportInput)) + "\n" },
    { name: "plan.kml", data: () => planKml(parts.exportInput) },
    { name: "plan.gpx", data: () => planGpx(parts.exportInput) },
    {
      name: "gsd.tif",
      data: tiff("gsd.tif"),
      ...(gsdInBackground ? { background: async (filePath: string) => (await assessmentGeoTiffFileInBackground(rasters, crs, "gsd.tif", filePath, window).result()) === true } : {}),
    },
    { name: "images.tif", data: tiff("images.tif") },
    { name: "flags.tif", data: tiff("flags.tif") },
    { name: "summary.json", data: JSON.stringify(summary, null, 2) + "\n" },
    { name: "report-data.json", data: async () => (await reportPage()).data() },
    { name: "report.html", data: async () => (await reportPage()).bytes() },
  ];
  // On smaller grids the page starts now, once its input is ready (its failure surfaces from report.html).
  if (cells < SPLIT_MIN_CELLS) reportPage().catch(() => undefined);
  return files;
}

/**
 * What the HTML report needs, from a run and its summary.
 * @example renderReport(reportInput(run, planSummary(run)))
 */
export function reportInput(run: PlanRun, summary: PlanSummary, meta: { planFile?: string; toolVersion?: string; generatedAt?: string } = {}): ReportInput {
  const b = run.baseline;
  const datumName = DATUM_NAMES[run.verticalDatum];
  const g = summary.gsdCm;
  const planRasters = run.assessment.rasters;
  // Both histograms on the same bins, so the page can draw one over the other.
  const edges = gsdBinEdges(g.low, g.high, Math.min(g.min, b.stats.gsdCm.min), Math.max(g.max, b.stats.gsdCm.max), REPORT_GSD_BINS);
  // Counted by the comparison against the plan's clearance floor (the summary's figure).
  const shortfall = b.clearanceShortfall?.clearanceM === summary.clearance.floorM ? b.clearanceShortfall : undefined;
  const site = run.site.local;
  // Block take-off ground from the DEM's datum to AMSL, as flightRows and waypoints.csv write it.
  const toAmsl = (h: number, lon: number, lat: number) => heightReferences(h, lon, lat, { datum: run.verticalDatum, undulationM: undulationFor(run.verticalDatum), takeoffGroundM: 0 })[0];
  return {
    siteName: run.site.name,
    summary: summary as unknown as ReportInput["summary"],
    dem: run.grid,
    rasters: planRasters,
    site,
    legs: run.flights.flights.flatMap((f) => f.legs.map((l) => ({ ...l, flight: f.index, block: f.block ?? 1 }))),
    takeoff: [run.takeoff.x, run.takeoff.y],
    keepOut: run.keepOut,
    blocks: run.blocks.map((b) => ({
      index: b.index,
      takeoff: { x: b.takeoff.x, y: b.takeoff.y, lon: b.takeoff.lon, lat: b.takeoff.lat, groundAmslM: toAmsl(b.takeoff.groundM, b.takeoff.lon, b.takeoff.lat) },
      takeoffFrom: b.takeoffFrom,
      ...(b.slopeDeg !== undefined ? { slopeDeg: b.slopeDeg } : {}),
      strips: b.strips,
      farthestM: b.farthestM,
    })),
    maxRangeM: run.options.aircraft.maxRangeM,
    flights: flightRows(run),
    baseline: {
      altitudeAmslM: b.altitudeAmslM,
      heightAboveMedianGroundM: b.heightAboveMedianGroundM,
      gsdCm: b.stats.gsdCm,
      withinBandPct: b.stats.withinBandPct,
      ceilingBreaches: b.stats.ceilingBreaches,
      images: b.stats.images,
      ...(shortfall ? { maxSiteGroundM: shortfall.maxGroundM, clearanceShortfall: { cells: shortfall.cells, areaM2: shortfall.areaM2, clearanceM: shortfall.clearanceM } } : {}),
    },
    planCeilingBreaches: b.planCeilingBreaches,
    // Read off the statistics' tally when its edges fall on the tally's grid (they do, but for an empty band).
    gsdHistogram: histogramOfTally(run.assessment.stats.gsdTally, edges) ?? histogram(planRasters.gsdCm, planRasters.inSite, edges),
    baselineHistogram: b.gsdHistogram(edges),
    files: {
      dem: (Array.isArray(run.options.dem) ? run.options.dem : [run.options.dem]).map((d) => path.basename(d)).join(", "),
      area: path.basename(run.options.area),
      ...(meta.planFile ? { planFile: path.basename(meta.planFile) } : {}),
      outputs: [...OUTPUT_NAMES],
    },
    verticalReferences: {
      demDatum: `${datumName}${run.verticalDatum === "egm96" || run.verticalDatum === "egm2008" ? " geoid heights" : ""} (${run.verticalDatum})`,
      geoidModel: summary.geoidModel,
      altitudes: [
        { name: "altitude_amsl_m", reference: `above mean sea level (${datumName})` },
        { name: "altitude_ellipsoid_m", reference: "above the WGS84 ellipsoid (AMSL + EGM96 undulation)" },
        { name: "altitude_takeoff_m", reference: `above the take-off point's ground (${summary.takeoff.groundAmslM} m AMSL)` },
        { name: "height_above_ground_m", reference: "above the DEM ground straight below" },
      ],
    },
    assumptions: {
      surfaceModel: run.options.demSurface === "dtm" ? "DTM" : run.options.demSurface === "dsm" ? "DSM" : "unknown",
      ...(run.options.demAccuracyM !== undefined ? { demAccuracyM: run.options.demAccuracyM } : {}),
      notes: [
        `Clearance kept on the whole path: ${summary.clearance.statement} (${summary.clearance.floorM} m in all).`,
        "Global 1-arc-second DEMs err by several metres or more vertically (the SRTM requirement was 16 m at 90 %), lidar DTMs by decimetres: allow for it in the clearance.",
      ],
    },
    cautions: summary.cautions,
    minImages: run.options.minImages,
    crsName: run.frame.name,
    gridConvergenceDeg: gridConvergenceDeg(run.frame, siteCentre(site)),
    ...(meta.generatedAt ? { generatedAt: meta.generatedAt } : {}),
    ...(meta.toolVersion ? { toolVersion: meta.toolVersion } : {}),
  };
}

const DATUM_NAMES: Record<PlanRun["verticalDatum"], string> = {
  egm96: "EGM96",
  egm2008: "EGM2008",
  ellipsoid: "WGS84 ellipsoid",
  other: "other",
  unknown: "unknown (assumed EGM96)",
};

/**
 * The angle from grid north to true north at a local-frame point, degrees, positive
 * when true north lies east of grid north (clockwise). Measured, not from a formula for
 * one projection: the point goes to WGS84 and a short step north along its meridian
 * comes back through the frame, so it holds for any frame proj4 can run.
 *
 * @example gridConvergenceDeg(frame, [521020, 6142000]) // about -0.27 in UTM 30N at 2.67 W, 55.4 N
 */
export function gridConvergenceDeg(frame: Pick<LocalFrame, "fromWgs84" | "toWgs84">, xy: [number, number]): number | undefined {
  const [lon, lat] = frame.toWgs84(xy[0], xy[1]);
  // A 1e-4 degree (about 11 m) step: short enough that the meridian is straight in the
  // frame, long enough that rounding in the projection is far below it.
  const d = lat > 89 ? -1e-4 : 1e-4;
  const a = frame.fromWgs84(lon, lat);
  const b = frame.fromWgs84(lon, lat + d);
  const dx = (b[0] - a[0]) * Math.sign(d);
  const dy = (b[1] - a[1]) * Math.sign(d);
  const deg = (Math.atan2(dx, dy) * 180) / Math.PI;
  return Number.isFinite(deg) ? deg : undefined;
}

/** Centre of the site's bounding box, local frame. */
function siteCentre(site: PlanRun["site"]["local"]): [number, number] {
  const [x0, y0, x1, y1] = vertexBox(site);
  return [(x0 + x1) / 2, (y0 + y1) / 2];
}

/**
 * One row per flight: its block and take-off point, waypoints (rows of waypoints.csv),
 * photos (placed as the assessment places them), length, duration, the farthest
 * distance from its take-off point (legs are straight: the farthest point of a leg is
 * one of its waypoints) and the strip it resumes.
 * @example flightRows(run)[0].maxRangeM
 */
export function flightRows(run: PlanRun): FlightRow[] {
  return run.flights.flights.map((f) => {
    const t = f.takeoff?.xy ?? [run.takeoff.x, run.takeoff.y];
    const [lon, lat] = run.frame.toWgs84(t[0], t[1]);
    const far = farthestWaypointM(f.legs, t);
    return {
      flight: f.index,
      block: f.block ?? 1,
      takeoffLongitude: lon,
      takeoffLatitude: lat,
      // The DEM's datum to AMSL, as waypoints.csv writes ground heights.
      takeoffGroundAmslM: heightReferences(f.takeoff?.groundM ?? run.takeoff.groundM, lon, lat, { datum: run.verticalDatum, undulationM: undulationFor(run.verticalDatum), takeoffGroundM: 0 })[0],
      waypoints: f.waypoints,
      photos: exposuresFromLegs(f.legs as AssessedLeg[], run.layout.triggerM).length,
      lengthM: f.lengthM,
      durationS: f.timeS,
      maxRangeM: far,
      resumesStrip: f.resumesStrip ?? null,
    };
  });
}

/**
 * The bounding box [minX, minY, maxX, maxY] of a polygon or multipolygon: of its outer rings'
 * vertices (edges are straight, holes lie inside).
 */
function vertexBox(g: Polygon | MultiPolygon): [number, number, number, number] {
  return ringBox((g.type === "Polygon" ? [g.coordinates] : g.coordinates).flatMap((poly) => poly[0]));
}
