/**
 * The typed library API of gsdplan, one section per pipeline stage. The CLI
 * in src/cli is a thin layer over these.
 *
 * @example
 * import { loadPlanFile, resolvePlanOptions, planMission, planOutputs, writeOutputSet } from "gsdplan";
 * const file = await loadPlanFile("site/plan.yaml");
 * const { files } = planOutputs(await planMission(resolvePlanOptions(file.data, {}, file.dir)));
 * await writeOutputSet("out", files);
 */
export * from "./errors.js";
export { STANDARD_CAUTIONS } from "./cautions.js";

// dem: open, window, sample
export type * from "./dem/grid.js";
export { openDem, type DemSource, type OpenDemOptions } from "./dem/source.js";
export { readWindow, readCells, type ReadWindowOptions } from "./dem/window.js";
export { toMetricGrid } from "./dem/reproject.js";
export { demStatistics } from "./dem/statistics.js";
export { inspectDem, type DemReport } from "./dem/inspect.js";
export { sampleBilinear, extremaInRadius, extremaInOrientedRect, cellCentre, toColRow, makeGrid } from "./dem/sample.js";
export { dataMask, hasNodata } from "./dem/dataMask.js";

// geo and camera
export * from "./geo/index.js";
export * from "./camera/index.js";

// layout
export type * from "./layout/types.js";
export { readSite, siteFromBbox, siteFromLonLat, siteCoverage } from "./layout/site.js";
export { layoutStrips, type LayoutOptions } from "./layout/strips.js";
export { stationsAlong, exposureStations } from "./layout/stations.js";

// solve
export * from "./solve/index.js";

// assess
export type * from "./assess/types.js";
export * from "./assess/flags.js";
export { assessPlan, type AssessOptions } from "./assess/assess.js";

// export
export { writeOutputSet, type OutputFile } from "./export/atomicDir.js";
export { waypointRows, type WaypointRow } from "./export/rows.js";
export { waypointsCsv } from "./export/waypointsCsv.js";
export { planGeoJson } from "./export/geojson.js";
export { planKml } from "./export/kml.js";
export { planGpx } from "./export/gpx.js";
export { assessmentGeoTiffs } from "./export/geotiffRasters.js";

// route: keep-out zones, ways around obstacles, blocks, flights
export { splitFlights, type Flight } from "./route/flights.js";
export { readKeepOutFiles, parseKeepOutText, type ParsedKeepOut } from "./route/zoneFile.js";
export { makeDetour, type Detour } from "./route/detour.js";
export { blockGrid, blocksOf, blockLegs, stripFrame, stripPieces } from "./route/blocks.js";
export { proposeTakeoff } from "./route/takeoffSite.js";
export { cutLegAt } from "./route/resume.js";
export { flightsCsv, FLIGHT_CSV_COLUMNS } from "./export/flightsCsv.js";

// report
export { renderReport } from "./report/render.js";
export { serializeReportInput, parseReportInput } from "./report/serialize.js";
export { hillshade } from "./report/hillshade.js";
export type { ReportInput } from "./report/model.js";

// plan: options and the composed job
export { loadPlanFile, resolvePlanOptions, type PlanOptions } from "./plan/options.js";
export { PLAN_OPTION_SPECS, PLAN_DEFAULTS } from "./plan/optionsSchema.js";
export { planMission, prepareMission, type PlanRun } from "./plan/plan.js";
export { planOutputs, flightRows, OUTPUT_NAMES } from "./plan/outputs.js";
export { planSummary, type PlanSummary } from "./plan/summary.js";

// verify: the independent check of a written plan
export type { VerifyRow, VerifyLimits, Breach, VerifyResult, VerifyChecked, VerifyLimitName } from "./verify/types.js";
export { verifyWaypoints } from "./verify/verify.js";
export { loadVerifyInputs, readPaddedWindow, type VerifyInputs } from "./verify/load.js";
export { parseWaypointsCsv } from "./verify/csv.js";
export { limitsFromPlanOptions } from "./verify/limits.js";
export { verifyText, verifyJson } from "./verify/format.js";

// campaign: many sites in one run
export { runCampaign } from "./campaign/runCampaign.js";
