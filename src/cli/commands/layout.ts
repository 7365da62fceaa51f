import type { Command } from "commander";
import type { PlanOptions } from "../../plan/options.js";
import type { CameraSpec } from "../../camera/makeCamera.js";
import { PLAN_OPTION_SPECS } from "../../plan/optionsSchema.js";

/**
 * `gsdplan layout`: lays out the flight strips for a plan (a plan file and/or
 * the plan's own flags) and prints the summary: strips, spacing, trigger
 * distance, ground speed and its binding limit, heading and why.
 * @example registerLayout(program)
 */
export function registerLayout(program: Command): void {
  const cmd = program
    .command("layout")
    .description("lay out flight strips over the site and print the summary: strips, spacing, trigger distance, ground speed and its binding limit, heading and why")
    .option("--plan <file>", "plan file (JSON or YAML); flags override its keys")
    .option("--json", "print the layout (local-frame metres) as JSON");
  for (const s of PLAN_OPTION_SPECS) cmd.option(s.kind === "boolean" ? s.flag : `${s.flag} <value>`, s.description);
  cmd.action(async (opts: Record<string, unknown>) => {
    process.stdout.write(await runLayoutCommand(opts));
  });
}

/** DEM margin around the site, metres: room for the strips' run-on past the boundary. */
const MARGIN_M = 200;

/**
 * Runs the layout for parsed command-line options and returns the text to print.
 * @example process.stdout.write(await runLayoutCommand({ plan: "plan.yaml" }))
 */
export async function runLayoutCommand(opts: Record<string, unknown>): Promise<string> {
  // Stage modules (geotiff, proj4, turf behind them) load only when the command runs.
  const { readFile } = await import("node:fs/promises");
  const { InputFileError } = await import("../../errors.js");
  const { loadPlanFile, resolvePlanOptions, flagOverridesFromParsed } = await import("../../plan/options.js");
  const { makeCamera } = await import("../../camera/makeCamera.js");
  const { requirementFrom } = await import("../../camera/requirement.js");
  const { heightForGsdM, footprintM } = await import("../../camera/gsd.js");
  const { stripSpacingM, triggerDistanceM } = await import("../../camera/overlap.js");
  const { groundSpeed } = await import("../../camera/speed.js");
  const { lonLatCentre } = await import("../../geo/longitude.js");
  const { localFrameFor } = await import("../../geo/localFrame.js");
  const { openDem } = await import("../../dem/source.js");
  const { readWindow } = await import("../../dem/window.js");
  const { toMetricGrid } = await import("../../dem/reproject.js");
  const { WGS84_PROJ4 } = await import("../../dem/bounds.js");
  const { parseSiteText } = await import("../../layout/site-parse.js");
  const { siteFromLonLat, siteCoverage } = await import("../../layout/site.js");
  const { layoutStrips } = await import("../../layout/strips.js");
  const { layoutSummaryLines } = await import("../../layout/summary.js");

  const file = typeof opts.plan === "string" ? await loadPlanFile(opts.plan) : undefined;
  const po = resolvePlanOptions(file?.data ?? {}, flagOverridesFromParsed(opts), file?.dir);

  const camera = makeCamera(cameraSpec(po));
  const req = requirementFrom(
    po.target.by === "gsd" ? { gsdCm: po.target.gsdCm } : { smallestFeatureCm: po.target.smallestFeatureCm, rule: po.target.rule },
    po.target.tolerancePct,
  );
  const heightM = heightForGsdM(camera, req.targetGsdM);
  const fp = footprintM(camera, heightM);
  const spacingM = stripSpacingM(fp.acrossM, po.overlap.sidePct);
  const triggerM = triggerDistanceM(fp.alongM, po.overlap.frontPct);
  // Blur is worst where the GSD is finest, the low end of the band.
  const speed = groundSpeed({ cruiseMps: po.aircraft.speedMps, triggerM, minIntervalS: camera.minIntervalS, exposureS: camera.exposureS, gsdM: req.lowGsdM, blurPx: po.blurPx });

  let text: string;
  try {
    text = await readFile(po.area, "utf8");
  } catch (e) {
    throw new InputFileError(po.area, `cannot read the site file (${(e as NodeJS.ErrnoException).code ?? String(e)})`);
  }
  const parsed = parseSiteText(text, po.area);
  const lons: number[] = [];
  const lats: number[] = [];
  for (const poly of parsed.polygons) for (const [lon, lat] of poly[0]) (lons.push(lon), lats.push(lat));

  const dem = await openDem(po.dem, { band: po.band, verticalDatum: po.demVerticalDatum, verticalUnit: verticalUnit(po.demVerticalUnit) });
  try {
    const [cLon, cLat] = lonLatCentre(lons, lats);
    const frame = localFrameFor(cLon, cLat, dem.crs);
    const site = siteFromLonLat(parsed.polygons, frame, { name: po.name ?? parsed.name ?? baseName(po.area), source: po.area });
    const bbox = lonLatBox(lons, lats);
    const raw = await readWindow(dem, bbox, { crs: WGS84_PROJ4, marginM: MARGIN_M });
    const grid = toMetricGrid(raw, frame.proj4, { epsg: frame.epsg, name: frame.name });
    const coverage = siteCoverage(site, grid);
    const layout = layoutStrips(site, {
      headingDeg: po.headingDeg,
      spacingM,
      triggerM,
      footprintAcrossM: fp.acrossM,
      footprintAlongM: fp.alongM,
      takeoff: po.takeoff ? frame.fromWgs84(po.takeoff[0], po.takeoff[1]) : undefined,
      photoSpeedMps: speed.speedMps,
      transitSpeedMps: po.aircraft.transitSpeedMps,
      grid,
      maxClimbMps: po.aircraft.maxClimbMps,
    });
    if (opts.json) return JSON.stringify({ frame: { proj4: frame.proj4, epsg: frame.epsg, name: frame.name }, site: { name: site.name, areaM2: site.areaM2, notes: site.notes ?? [] }, coverage, speed, layout }, null, 2) + "\n";
    const notes = [`local frame: ${frame.name} (${frame.reason})`, ...dem.warnings];
    if (coverage.message) notes.push(coverage.message);
    return (
      layoutSummaryLines({
        site,
        layout,
        speedMps: speed.speedMps,
        speedLimit: speed.limit,
        transitSpeedMps: po.aircraft.transitSpeedMps,
        heightAglM: heightM,
        targetGsdCm: req.targetGsdM * 100,
        notes,
      }).join("\n") + "\n"
    );
  } finally {
    await dem.close();
  }
}

function cameraSpec(po: PlanOptions): CameraSpec {
  const c = po.camera;
  const common = { imageWidthPx: c.imageWidthPx, imageHeightPx: c.imageHeightPx, exposureS: c.exposureS, minIntervalS: c.minIntervalS, portrait: c.portrait };
  if (c.model === "sensor") {
    // Square pixels: without a sensor height, it follows from the width and the image's aspect.
    const sensorHeightMm = c.sensorHeightMm ?? (c.sensorWidthMm * c.imageHeightPx) / c.imageWidthPx;
    return { ...common, sensorWidthMm: c.sensorWidthMm, sensorHeightMm, focalLengthMm: c.focalLengthMm };
  }
  return c.model === "hfov" ? { ...common, hfovDeg: c.hfovDeg } : { ...common, dfovDeg: c.dfovDeg };
}

function verticalUnit(u: PlanOptions["demVerticalUnit"]): string | undefined {
  return u === "us-survey-foot" ? "ftUS" : u;
}

/** Lon/lat box of the site; longitudes unwrapped around the first so a box across 180 stays narrow. */
function lonLatBox(lons: number[], lats: number[]): { west: number; south: number; east: number; north: number } {
  const ref = lons[0];
  const un = lons.map((l) => ref + (((l - ref + 540) % 360) - 180));
  return { west: Math.min(...un), east: Math.max(...un), south: Math.min(...lats), north: Math.max(...lats) };
}

function baseName(file: string): string {
  return (file.split(/[\\/]/).pop() ?? file).replace(/\.(geo)?json$|\.kml$/i, "");
}
