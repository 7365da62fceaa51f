/**
 * The output set of a plan run, as named files ready for the atomic writer:
 * waypoints.csv, plan.geojson, plan.kml, plan.gpx, gsd.tif, images.tif,
 * flags.tif, summary.json, report-data.json and report.html.
 */
import path from "node:path";
import type { OutputFile } from "../export/atomicDir.js";
import { waypointRows } from "../export/rows.js";
import { waypointsCsv } from "../export/waypointsCsv.js";
import { planGeoJson } from "../export/geojson.js";
import { planKml } from "../export/kml.js";
import { planGpx } from "../export/gpx.js";
import { assessmentGeoTiffs } from "../export/geotiffRasters.js";
import type { PlanExportInput } from "../export/layers.js";
import { renderReport } from "../report/render.js";
import { serializeReportInput } from "../report/serialize.js";
import type { ReportInput } from "../report/model.js";
import { undulationFor, type PlanRun } from "./plan.js";
import { planSummary, type PlanSummary } from "./summary.js";

export const OUTPUT_NAMES = [
  "waypoints.csv",
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

/**
 * Builds every output of a run (rasters lazily, so they are encoded one at a time).
 * @example await writeOutputSet(out, planOutputs(run).files)
 */
export function planOutputs(run: PlanRun, meta: { planFile?: string; toolVersion?: string; generatedAt?: string } = {}): { files: OutputFile[]; summary: PlanSummary } {
  const summary = planSummary(run);
  const flights = run.flights.flights.map((f) => f.legs);
  const heights = { datum: run.verticalDatum, undulationM: undulationFor(run.verticalDatum), takeoffGroundM: run.takeoff.groundM };
  const rows = waypointRows(flights, run.frame.toWgs84, heights);
  const exportInput: PlanExportInput = {
    name: run.site.name,
    site: run.site,
    flights,
    rows,
    toWgs84: run.frame.toWgs84,
    heights,
    flags: run.assessment.polygons,
    takeoff: { lon: run.takeoff.lon, lat: run.takeoff.lat, groundAmslM: run.takeoff.groundM },
  };
  const crs = { epsg: run.grid.crs.epsg, proj4: run.grid.crs.proj4, geographic: false, name: run.grid.crs.name };
  let tiffs: ReturnType<typeof assessmentGeoTiffs> | undefined;
  const tiff = (name: keyof ReturnType<typeof assessmentGeoTiffs>) => () => {
    tiffs ??= assessmentGeoTiffs(run.assessment.rasters, crs);
    return tiffs[name];
  };
  const report = reportInput(run, summary, meta);
  const files: OutputFile[] = [
    { name: "waypoints.csv", data: waypointsCsv(rows) },
    { name: "plan.geojson", data: () => JSON.stringify(planGeoJson(exportInput)) + "\n" },
    { name: "plan.kml", data: () => planKml(exportInput) },
    { name: "plan.gpx", data: () => planGpx(exportInput) },
    { name: "gsd.tif", data: tiff("gsd.tif") },
    { name: "images.tif", data: tiff("images.tif") },
    { name: "flags.tif", data: tiff("flags.tif") },
    { name: "summary.json", data: JSON.stringify(summary, null, 2) + "\n" },
    { name: "report-data.json", data: () => serializeReportInput(report) },
    { name: "report.html", data: () => renderReport(report) },
  ];
  return { files, summary };
}

/**
 * What the HTML report needs, from a run and its summary.
 * @example renderReport(reportInput(run, planSummary(run)))
 */
export function reportInput(run: PlanRun, summary: PlanSummary, meta: { planFile?: string; toolVersion?: string; generatedAt?: string } = {}): ReportInput {
  const b = run.baseline;
  const datumName = { egm96: "EGM96", egm2008: "EGM2008", ellipsoid: "WGS84 ellipsoid", other: "other", unknown: "unknown (assumed EGM96)" }[run.verticalDatum];
  return {
    siteName: run.site.name,
    summary: summary as unknown as ReportInput["summary"],
    dem: run.grid,
    rasters: run.assessment.rasters,
    site: run.site.local,
    legs: run.flights.flights.flatMap((f) => f.legs),
    takeoff: [run.takeoff.x, run.takeoff.y],
    baseline: {
      altitudeAmslM: b.altitudeAmslM,
      heightAboveMedianGroundM: b.heightAboveMedianGroundM,
      gsdCm: b.stats.gsdCm,
      withinBandPct: b.stats.withinBandPct,
      ceilingBreaches: b.stats.ceilingBreaches,
      images: b.stats.images,
    },
    planCeilingBreaches: b.planCeilingBreaches,
    files: {
      dem: path.basename(run.options.dem),
      area: path.basename(run.options.area),
      ...(meta.planFile ? { planFile: path.basename(meta.planFile) } : {}),
      outputs: [...OUTPUT_NAMES],
    },
    verticalReferences: {
      demDatum: run.verticalDatum,
      geoidModel: summary.geoidModel,
      altitudes: [
        { name: "altitude_amsl_m", reference: `above mean sea level (${datumName})` },
        { name: "altitude_ellipsoid_m", reference: "above the WGS84 ellipsoid (AMSL + EGM96 undulation)" },
        { name: "altitude_takeoff_m", reference: `above the take-off point's ground (${summary.takeoff.groundAmslM} m AMSL)` },
        { name: "height_above_ground_m", reference: "above the DEM ground straight below" },
      ],
    },
    assumptions: {
      surfaceModel: "unknown",
      notes: [
        "Clearance is computed from the DEM; if it is a bare-earth model (DTM), trees and buildings are not in it.",
        "DEM vertical accuracy limits the clearance that can be trusted: global 1-arc-second DEMs err by several metres or more, lidar DTMs by decimetres.",
      ],
    },
    cautions: summary.cautions,
    minImages: run.options.minImages,
    crsName: run.frame.name,
    ...(meta.generatedAt ? { generatedAt: meta.generatedAt } : {}),
    ...(meta.toolVersion ? { toolVersion: meta.toolVersion } : {}),
  };
}
