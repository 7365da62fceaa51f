/**
 * The full output set of a plan, as lazily built files for writeOutputSet:
 * waypoints.csv, plan.geojson, plan.kml, plan.gpx, summary.json and, when
 * the assessment rasters are given, gsd.tif, images.tif and flags.tif.
 */
import type { AssessmentRasters } from "../assess/types.js";
import type { OutputFile } from "./atomicDir.js";
import { planGeoJson } from "./geojson.js";
import { assessmentGeoTiffChunks, type RasterCrs } from "./geotiffRasters.js";
import { planGpx } from "./gpx.js";
import { planKml } from "./kml.js";
import type { PlanExportInput } from "./layers.js";
import { summaryJson, type Summary } from "./summary.js";
import { waypointsCsv } from "./waypointsCsv.js";

export interface PlanOutputsInput {
  map: PlanExportInput;
  summary: Summary;
  /** Assessment rasters and the CRS of their grid; omit both to skip the GeoTIFFs. */
  rasters?: { grid: AssessmentRasters; crs: RasterCrs };
}

/**
 * @example await writeOutputSet(outDir, planOutputFiles({ map, summary, rasters: { grid: a.rasters, crs: dem.crs } }), { force })
 */
export function planOutputFiles(i: PlanOutputsInput): OutputFile[] {
  const files: OutputFile[] = [
    { name: "waypoints.csv", data: () => waypointsCsv(i.map.rows) },
    { name: "plan.geojson", data: () => JSON.stringify(planGeoJson(i.map)) + "\n" },
    { name: "plan.kml", data: () => planKml(i.map) },
    { name: "plan.gpx", data: () => planGpx(i.map) },
  ];
  const r = i.rasters;
  if (r) {
    for (const name of ["gsd.tif", "images.tif", "flags.tif"] as const) {
      files.push({ name, data: () => assessmentGeoTiffChunks(r.grid, r.crs, name) });
    }
  }
  files.push({ name: "summary.json", data: () => summaryJson(i.summary) });
  return files;
}
