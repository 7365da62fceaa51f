/**
 * The main job, composed: DEM window -> local frame -> camera and requirement
 * -> strips (cut at keep-out zones) -> altitude solver -> route (transits around
 * obstacles, flights) -> independent check -> assessment. Pure of terminal and
 * output files: the CLI and the exporters sit on top.
 */
import { readFile } from "node:fs/promises";
import path from "node:path";
import type { DemGrid } from "../dem/grid.js";
import { openDem } from "../dem/source.js";
import { nativeBounds, readWindow } from "../dem/window.js";
import { gridOnFrame } from "../dem/frameGrid.js";
import { terrainOnGrid } from "./terrainGrid.js";
import type { VerifyDem } from "../verify/types.js";
import { sampleBilinear } from "../dem/sample.js";
import { InputError, InputFileError } from "../errors.js";
import { localFrameFor, type SiteFrame } from "../geo/localFrame.js";
import { lonLatCentre } from "../geo/longitude.js";
import { egm96UndulationM, EGM2008_APPROXIMATION_WARNING } from "../geo/geoid.js";
import { makeCamera, type CameraSpec } from "../camera/makeCamera.js";
import { footprintM, heightForGsdM } from "../camera/gsd.js";
import { requirementFrom } from "../camera/requirement.js";
import { groundSpeed, type GroundSpeed } from "../camera/speed.js";
import { stripSpacingM, triggerDistanceM } from "../camera/overlap.js";
import type { Camera, Requirement } from "../camera/types.js";
import { parseSiteText } from "../layout/site-parse.js";
import { siteFromLonLat } from "../layout/site.js";
import { checkLineKeys, lineSiteFromLonLat } from "../layout/lineSite.js";
import { assertLineInRange, layoutLineSite, lineSiteWarnings } from "../layout/lineStrips.js";
import { siteCoverage } from "../layout/coverage.js";
import { layoutStrips } from "../layout/strips.js";
import type { Layout, LayoutLeg, Site, XY } from "../layout/types.js";
import { solveTransit } from "../solve/solveLegs.js";
import { clearanceFloorM } from "../solve/clearance.js";
import { solveInBestStripOrder } from "./stripOrder.js";
import { toleranceToFitBudget } from "../solve/budget.js";
import type { SolvedLeg, SolveResult, SolverOptions, SolveWarning } from "../solve/types.js";
import { assessPlan, siteMaskFor, startAssessmentSweep, type AssessOptions } from "../assess/assess.js";
import { bandPool, type BandPool } from "../assess/bandThreads.js";
import { sweepThreads } from "../assess/coverage.js";
import { photoPhaseOn, type AssessedLeg } from "../assess/exposures.js";
import type { Assessment, FlagPolygons } from "../assess/types.js";
import { flagPolygons, flagPolygonsInBackground } from "../assess/flagPolygons.js";
import { NOT_IN_BACKGROUND, type Background } from "../background.js";
import { farthestWaypointM, splitFlights, type FlightSplit } from "../route/flights.js";
import { baselineJob, ceilingBreachGsdCm, type Baseline } from "./baseline.js";
import { baselineBeforeSolve, constantAltitudeBaselineInBackground, earlyBaselineAllowed } from "./baselineBackground.js";
import { clearanceSummary } from "./summary.js";
import { reportMapsInBackground, type ReportMapsAndLayers, type ReportMapsInBackground } from "../report/serialize.js";
import { gsdTallyGrid } from "../report/histogram.js";
import { waypointRows, type WaypointRow } from "../export/rows.js";
import { verifyWaypoints } from "../verify/verify.js";
import { keepOutZonesFor, limitsFromPlanOptions } from "../verify/limits.js";
import type { Breach, VerifyResult, VerifyZone } from "../verify/types.js";
import type { PlanOptions } from "./options.js";
import { readKeepOutFiles } from "../route/zoneFile.js";
import { assertTakeoffOutside, keepOutSet, keepOutStretches, localKeepOuts, zoneReports, type KeepOutSet, type LonLatKeepOut } from "../route/keepOut.js";
import type { KeepOutReport } from "../route/types.js";
import { applyKeepOut, planObstacles } from "./obstacles.js";
import { assumedGroundCrossings } from "./assumedCrossings.js";
import { planBlocks, type PlannedBlock } from "./blocks.js";
import { crossStripOptions, numberedAfter, secondFamily } from "./crossStrips.js";

/** Everything a finished plan knows; the exporters and the report read it. */
export interface PlanRun {
  options: PlanOptions;
  frame: SiteFrame;
  /** The DEM window on the local frame's metric grid (metres, DEM datum). */
  grid: DemGrid;
  /** Datum of every height in the plan (the DEM's, after any override). */
  verticalDatum: DemGrid["verticalDatum"];
  site: Site;
  camera: Camera;
  requirement: Requirement;
  /** Height above ground giving the target GSD. */
  targetHeightM: number;
  speed: GroundSpeed;
  layout: Layout;
  solve: SolveResult;
  flights: FlightSplit;
  assessment: Assessment;
  baseline: Baseline;
  takeoff: { x: number; y: number; lon: number; lat: number; groundM: number };
  /** The keep-out zones and what each took from the site (an empty list without zones). */
  keepOut: KeepOutReport;
  /** The blocks, each flown from its own take-off point (one block when the range reaches the whole site). */
  blocks: PlanBlock[];
  /**
   * The independent check (gsdplan verify) of the waypoints this plan writes, against the
   * DEM in its own CRS; `undeclared` are its breaches that no plan warning announced.
   */
  verification: VerifyResult & { undeclared: Breach[] };
  /** The waypoint table the exporters write (and the check above read), in flight order. */
  rows: WaypointRow[];
  /** Waypoints per flight against the autopilot's limit (null: no limit given). */
  budget: WaypointBudgetSummary | null;
  warnings: SolveWarning[];
  /** Seconds spent per stage, for the benchmarks. */
  timings: Record<string, number>;
  /**
   * The report's reduced DEM and rasters and the DEM's hill shade and contours, made on a
   * worker thread (the DEM's part from the load on, the rasters' once final: report/serialize.ts
   * reportMapsInBackground); undefined when they were not (the report makes them itself).
   */
  reportMaps?: () => Promise<ReportMapsAndLayers | undefined>;
  /** Threads the run was limited to (PlanHooks.threads), if it was: the outputs keep to it too. */
  threads?: number;
}

/** A block of the plan and its take-off point. */
export interface PlanBlock {
  index: number;
  takeoff: { x: number; y: number; lon: number; lat: number; groundM: number };
  takeoffFrom: PlannedBlock["takeoffFrom"];
  slopeDeg?: number;
  strips: number[];
  /** Farthest strip point from the take-off point, metres. */
  farthestM: number;
}

export type PlanStage = "load" | "layout" | "solve" | "route" | "assess" | "baseline";

export interface PlanHooks {
  /** Called at the start of each stage (for a progress display). */
  onStage?: (stage: PlanStage) => void;
  /** Clock for the timings (injected so the library reads no clock of its own by default). */
  now?: () => number;
  /**
   * Threads for the coverage passes (a campaign planning several sites at once passes 1);
   * default the assessment's own choice. 1 also keeps the background work (the comparison,
   * the report's layers and maps, the small rasters: src/background.ts) on this thread.
   */
  threads?: number;
}

/**
 * Plans a mapping flight from resolved options.
 * @example
 * const run = await planMission(resolvePlanOptions(file, {}, dir));
 * run.assessment.stats.withinBandPct
 */
export async function planMission(options: PlanOptions, hooks: PlanHooks = {}): Promise<PlanRun> {
  const now = hooks.now ?? (() => 0);
  const timings: Record<string, number> = {};
  let t = now();
  const stage = (name: PlanStage) => {
    const t1 = now();
    hooks.onStage?.(name);
    return t1;
  };
  const lap = (name: string) => {
    const t1 = now();
    timings[name] = (t1 - t) / 1000;
    t = t1;
  };
  const warnings: SolveWarning[] = [];

  stage("load");
  const prepared = await prepareMission(options, hooks.threads);
  warnings.push(...prepared.warnings);
  lap("load");
  // The report's maps: the DEM's part on another core from here on, while this thread lays
  // out and solves; the rasters' part once they are final (reportMapsInBackground). A plan
  // that fails stops that worker (it waits for the rasters).
  const maps = reportMapsInBackground(prepared.grid, hooks.threads);
  // The assessment's band workers, started now: they share the `auto` heading choice's terrain
  // terms in a moment (a worker takes 50-200 ms to start, about what that choice takes at
  // 4 km2), then sweep and tally the assessment's bands; ended here whatever happens.
  const bands = bandPool();
  bands.start(sweepThreads(prepared.grid.width, prepared.grid.height, hooks.threads) - 1);
  try {
    return await planLoaded({ options, hooks, prepared, warnings, stage, lap, timings, maps, bands });
  } catch (e) {
    maps.cancel();
    throw e;
  } finally {
    bands.close();
  }
}

/** planMission from the loaded inputs on: layout, solve, route, verify, assess, comparison. */
async function planLoaded(ctx: {
  options: PlanOptions;
  hooks: PlanHooks;
  prepared: Awaited<ReturnType<typeof prepareMission>>;
  warnings: SolveWarning[];
  stage: (name: PlanStage) => void;
  lap: (name: string) => void;
  timings: Record<string, number>;
  maps: ReportMapsInBackground;
  bands: BandPool;
}): Promise<PlanRun> {
  const { options, hooks, prepared, warnings, stage, lap, timings, maps, bands } = ctx;
  const { camera, requirement, targetHeightM, footprint: fp, spacingM, triggerM, frame, grid, nativeGrid, site, speed, keepOut, keepOutZones } = prepared;

  stage("layout");
  // The assessment's band workers share the `auto` heading choice's terrain terms.
  const layoutThreads = { bandPool: bands, ...(hooks.threads !== undefined ? { threads: hooks.threads } : {}) };
  const fullLayout = missionLayout(prepared, options, layoutThreads);
  // Cross strips (crossStrips.ts): a second family at the heading plus 90 degrees, numbered
  // after the first, blocked, solved and flown like it. Its flights follow all of the first
  // family's, so the first family stays a complete plan on its own if the day ends early.
  // A line site's strips follow the line: a family across them would not cross the site.
  if (options.crossStrips && site.line) throw new InputError("crossStrips", true, "false with a line site (its strips follow the line)");
  const crossLayout = options.crossStrips ? secondFamily(fullLayout, missionLayout(prepared, crossStripOptions(options, fullLayout, frame, keepOut), layoutThreads)) : null;
  // Stations at the DEM's cell, at most 1 m apart: the hard bounds reach one station step
  // past each station (see corridorAlong), which on a coarse DEM must stay small. (2 m was
  // tried: on the 1" ridges the solver's zones then drift from the photos' ground, and the
  // within-band share moved 7.7 points from an independent count.)
  const stationStepM = Math.min(grid.cellSizeM[0], grid.cellSizeM[1], MAX_STATION_STEP_M);
  const obstacles = planObstacles(grid, crossLayout ? { ...fullLayout, legs: [...fullLayout.legs, ...crossLayout.legs] } : fullLayout, options, stationStepM, keepOut);
  const candidates = (options.takeoffs ?? (options.takeoff ? [options.takeoff] : [])).map(([lon, lat]) => frame.fromWgs84(lon, lat));
  if (keepOut) for (const [k, c] of candidates.entries()) assertTakeoffOutside(keepOut, c, (options.takeoffs ?? [options.takeoff])[k]);
  if (options.takeoffs) {
    for (const [k, c] of candidates.entries()) {
      if (!Number.isFinite(groundAt(prepared.terrain ?? grid, c, options.assumeGroundM))) {
        throw new InputError(`takeoff[${k}]`, options.takeoffs[k], "take-off points on the DEM", "the DEM has no height there");
      }
    }
  }
  // The site's cells on the grid: made once, for the blocks (if the site is cut into them) and the assessment.
  let siteCells: Uint8Array | undefined;
  const siteMask = () => (siteCells ??= siteMaskFor(grid, site.local, hooks.threads));
  const blockLayouts: { block: PlannedBlock; layout: Layout; groundM: number }[] = [];
  for (const familyLayout of crossLayout ? [fullLayout, crossLayout] : [fullLayout]) {
    // The second family's blocks prefer the first's take-off points (fewer launch sites)
    // and are numbered after them.
    const offset = blockLayouts.length;
    const blocking = planBlocks({
      layout: familyLayout, site, grid, rangeM: options.aircraft.maxRangeM, triggerM,
      candidates: offset && !candidates.length ? blockLayouts.map((b) => b.layout.takeoff) : candidates, givenOne: options.takeoff !== undefined, keepOut,
      inSite: siteMask,
    });
    warnings.push(...blocking.warnings);
    // Blocks number their strips afresh: the second family's continue after the first's.
    const numbered = offset ? numberedAfter(blocking.blocks, Math.max(...blockLayouts.flatMap((b) => b.layout.legs.map((l) => l.strip)))) : blocking.blocks;
    blockLayouts.push(...numbered.map((b) => {
      const blk = { ...b, index: b.index + offset };
      const given = blk.takeoffFrom === "layout" ? undefined : frame.toWgs84(...blk.takeoff);
      const applied = applyKeepOut({ ...familyLayout, takeoff: blk.takeoff, legs: blk.legs }, keepOut, obstacles.detour, given);
      warnings.push(...applied.warnings);
      // The take-off ground is the terrain's when a terrain model is given (not a roof or a tree top).
      const groundM = groundAt(prepared.terrain ?? grid, applied.layout.takeoff, options.assumeGroundM);
      if (!Number.isFinite(groundM)) {
        throw new InputError("takeoff", given ?? frame.toWgs84(...applied.layout.takeoff), "a point with DEM heights", "the DEM has no height at the take-off point");
      }
      return { block: blk, layout: applied.layout, groundM };
    }));
  }
  lap("layout");

  // The report's GSD histograms (the plan's and the comparison's) are read off tallies made
  // in the statistics' pass and the comparison's pass, on a grid their edges fall on.
  const gsdTally = gsdTallyGrid(requirement.lowGsdM * 100, requirement.highGsdM * 100);
  // The comparison's figures from the strips as laid out, on the other core while this one
  // solves (the solve keeps them as a rule: checked against the final strips at the route stage).
  const baselineOptions = {
    targetHeightM,
    triggerM,
    minImages: options.minImages,
    ceiling: options.ceiling,
    takeoffGroundM: blockLayouts[0].groundM,
    clearanceM: clearanceSummary(options).floorM,
    ...(hooks.threads !== undefined ? { threads: hooks.threads } : {}),
    ...(gsdTally ? { gsdTally } : {}),
  };
  const earlyBaseline = earlyBaselineAllowed(grid.width * grid.height, hooks.threads)
    ? baselineBeforeSolve(baselineJob(grid, { ...fullLayout, legs: blockLayouts.flatMap((b) => b.layout.legs) }, camera, requirement, baselineOptions, siteMask()))
    : undefined;

  stage("solve");
  const solverOptions: SolverOptions = {
    ceiling: options.ceiling,
    takeoffGroundM: blockLayouts[0].groundM,
    clearance: { ...options.clearance, ...(options.demAccuracyM !== undefined ? { demAccuracyM: options.demAccuracyM } : {}) },
    aircraft: {
      type: options.aircraft.type,
      speedMps: speed.speedMps,
      transitSpeedMps: options.aircraft.transitSpeedMps,
      minSpeedMps: options.aircraft.minSpeedMps,
      maxClimbMps: options.aircraft.maxClimbMps,
      maxDescentMps: options.aircraft.maxDescentMps,
    },
    band: {
      hMinM: heightForGsdM(camera, requirement.lowGsdM),
      hMaxM: heightForGsdM(camera, requirement.highGsdM),
      hTargetM: targetHeightM,
    },
    zoneHalfAcrossM: zoneHalfAcrossM(spacingM, triggerM),
    // Half a trigger distance plus one station step: a photo between two stations then
    // images only ground inside both stations' zones, and the band holds for every
    // cell at both, so also at the photo between them (the band for one cell is an
    // interval in altitude, and the path is straight between stations).
    zoneHalfAlongM: triggerM / 2 + stationStepM,
    stationStepM,
    onConflict: options.onConflict,
    ...(options.assumeGroundM !== undefined ? { assumeGroundM: options.assumeGroundM } : {}),
    ifov: camera.ifov,
    // Ceilings on the terrain model beside a surface model; clearance and band stay on the surface.
    ...(prepared.terrain ? { terrain: prepared.terrain } : {}),
  };
  if (obstacles.routeAround) solverOptions.routeAround = obstacles.routeAround;
  assertTargetReachable(requirement, camera, targetHeightM, options, clearanceFloorM(solverOptions.clearance));
  const solvedBlocks = blockLayouts.map((b) => {
    // Each block's own take-off ground: a `takeoff` ceiling is measured from it.
    const opts: SolverOptions = { ...solverOptions, takeoffGroundM: b.groundM };
    const ordered = solveInBestStripOrder(grid, b.layout.legs, b.layout.takeoff, opts);
    if (ordered.warning) warnings.push(ordered.warning);
    warnings.push(...ordered.solve.warnings);
    carryNoPhotoIntervals(ordered.solve.legs, ordered.legs);
    return { ...b, layout: { ...b.layout, legs: ordered.legs }, solve: ordered.solve, opts };
  });
  const solve = mergeSolves(solvedBlocks.map((b) => b.solve));
  let layout: Layout = { ...fullLayout, takeoff: solvedBlocks[0].layout.takeoff, legs: solvedBlocks.flatMap((b) => b.layout.legs) };
  if (crossLayout?.keepOutCuts) layout.keepOutCuts = [...(fullLayout.keepOutCuts ?? []), ...crossLayout.keepOutCuts];
  lap("solve");

  stage("route");
  // The constant-altitude comparison needs only the final strips, the DEM and the site: it
  // is made on the other core from here on (or from before the solve, when the solve kept
  // the strips as laid out), while this thread routes, checks and assesses.
  const inSite = siteMask();
  const takeoffGround = solvedBlocks[0].groundM;
  const baselineRun = constantAltitudeBaselineInBackground(grid, layout, camera, requirement, baselineOptions, inSite, earlyBaseline);
  let reportMaps: (() => Promise<ReportMapsAndLayers | undefined>) | undefined;
  let polygonsMade: Background<FlagPolygons> = NOT_IN_BACKGROUND;
  const cellAreaM2 = grid.cellSizeM[0] * grid.cellSizeM[1];
  // The comparison shows the plan's own ceiling breaches: under the ground and surface rules
  // they are counted in the statistics' pass (GSD at or above the breach threshold).
  const breachGsdCm = ceilingBreachGsdCm(camera.ifov, { ceiling: options.ceiling, takeoffGroundM: takeoffGround });
  const assessOptions: AssessOptions = {
    triggerM,
    minImages: options.minImages,
    zoneHalfAcrossM: zoneHalfAcrossM(spacingM, triggerM),
    toWgs84: frame.toWgs84,
    // The nearest nadir point splits the ground between strips at the midline, as the
    // solver's zones do; the view-angle choice would hand zone edges to a higher strip.
    nadirBy: "distance",
    ...(hooks.threads !== undefined ? { threads: hooks.threads } : {}),
    bandPool: bands,
    ...(layout.keepOutCuts ? { keepOut: { cuts: layout.keepOutCuts, footprintAcrossM: fp.acrossM, footprintAlongM: fp.alongM } } : {}),
    inSite,
    ...(breachGsdCm !== undefined ? { countGsdAtLeastCm: breachGsdCm } : {}),
    ...(gsdTally ? { gsdTally } : {}),
    // The flag polygons (below), the report's maps and the DEM's layers are made on the other
    // core while the statistics are made.
    polygons: false,
    onRasters: (r) => {
      polygonsMade = flagPolygonsInBackground({ flags: r.flags, width: r.width, height: r.height, transform: r.transform, frame: { proj4: frame.proj4, epsg: frame.epsg, name: frame.name }, cellAreaM2 }, hooks.threads);
      maps.withRasters(r);
      reportMaps = maps.result;
    },
  };
  // The assessment's footprint sweep starts now on the band workers, from the solved strips'
  // photos, while this thread routes and checks the waypoints (the other core is otherwise
  // idle then); the assessment takes it over when the flights' legs place the same photos to
  // the bit (they do unless a strip is cut between two flights), else makes it afresh.
  const early = startAssessmentSweep(grid, site.local, solve.legs as AssessedLeg[], camera, requirement, assessOptions);
  const transitWarnings = new WeakMap<SolvedLeg, SolveWarning[]>();
  const splits = solvedBlocks.map((b) =>
    splitFlights(b.solve.legs, {
      takeoff: b.layout.takeoff,
      enduranceMin: options.aircraft.enduranceMin,
      reservePct: options.reservePct,
      maxWaypoints: options.aircraft.maxWaypoints,
      maxClimbMps: options.aircraft.maxClimbMps,
      maxDescentMps: options.aircraft.maxDescentMps,
      takeoffGroundM: b.groundM,
      triggerM,
      // New legs to and from take-off go through the same solver, so they keep clearance.
      transitLeg: (from, to, strip, direction, joinM) => transitThroughSolver(grid, from, to, strip, direction, b.solve.legs, b.opts, transitWarnings, joinM),
    }),
  );
  const flights: FlightSplit = {
    flights: splits.flatMap((sp, bi) => sp.flights.map((f) => ({ ...f, block: bi + 1, takeoff: { xy: solvedBlocks[bi].layout.takeoff, groundM: solvedBlocks[bi].groundM } }))).map((f, i) => ({ ...f, index: i + 1 })),
    batteries: splits.reduce((n, sp) => n + sp.batteries, 0),
    warnings: splits.flatMap((sp) => sp.warnings),
  };
  warnings.push(...flights.warnings);
  // Flight splitting tries legs it then drops: only the warnings of legs flown count.
  for (const leg of flights.flights.flatMap((f) => f.legs)) warnings.push(...(transitWarnings.get(leg) ?? []));
  if (options.assumeGroundM !== undefined) warnings.push(...assumedGroundCrossings(grid, flights.flights.flatMap((f) => f.legs), options.assumeGroundM));
  warnings.push(...rangeBreaches(flights.flights, options.aircraft.maxRangeM));
  const budget = waypointBudgetCheck(grid, layout, flights, solverOptions, options.aircraft.maxWaypoints, options.target.tolerancePct);
  warnings.push(...budget.warnings);
  lap("route");

  // The same independent check `gsdplan verify` makes, on the rows about to be written.
  const rows = waypointRows(flights.flights.map((f) => f.legs), frame.toWgs84, {
    datum: grid.verticalDatum, undulationM: undulationFor(grid.verticalDatum), takeoffGroundM: flights.flights.map((f) => f.takeoff?.groundM ?? takeoffGround),
    ...(prepared.terrain ? { terrainAt: (x: number, y: number) => sampleBilinear(prepared.terrain!, [x], [y])[0] } : {}),
  });
  const checked = verifyWaypoints(rows, { ...limitsFromPlanOptions(options), keepOutZones }, nativeGrid);
  const undeclared = checked.breaches.filter((b) => !declared(b, warnings));
  for (const b of undeclared) warnings.push({ code: "verify-undeclared", message: `Independent check: ${b.message} (not announced by the plan: please report it)`, strip: b.strip });
  if (checked.breaches.length) {
    warnings.push({
      code: "verify",
      message: `Independent check of the waypoints against the DEM: ${checked.breaches.length} breach${checked.breaches.length === 1 ? "" : "es"} ` +
        `(${breachCounts(checked.breaches)}), ${undeclared.length ? `${undeclared.length} not announced above` : "each announced above"}. Run gsdplan verify on the outputs for the full list.`,
    });
  }
  const verification = { ...checked, undeclared };
  lap("verify");

  stage("assess");
  const flownLegs = flights.flights.flatMap((f) => f.legs);
  const assessed = assessPlan(grid, site.local, flownLegs as AssessedLeg[], camera, requirement, { ...assessOptions, early });
  // No rasters handed over (none were made): the maps' worker is not left waiting for them.
  if (!reportMaps) maps.cancel();
  const r = assessed.rasters;
  const polygons = (await polygonsMade.result()) ?? flagPolygons(r.flags, r.width, r.height, r.transform, frame.toWgs84, cellAreaM2);
  const assessment: Assessment = { ...assessed, polygons };
  lap("assess");

  stage("baseline");
  const baseline = await baselineRun.finish(assessment.rasters, assessment.stats.gsdAtLeast?.cells);
  lap("baseline");

  const [tLon, tLat] = frame.toWgs84(layout.takeoff[0], layout.takeoff[1]);
  return {
    options,
    frame,
    grid,
    verticalDatum: grid.verticalDatum,
    site,
    camera,
    requirement,
    targetHeightM,
    speed,
    layout,
    solve,
    flights,
    assessment,
    baseline,
    takeoff: { x: layout.takeoff[0], y: layout.takeoff[1], lon: tLon, lat: tLat, groundM: takeoffGround },
    keepOut: { zones: keepOut ? zoneReports(keepOut, site.local, site.areaM2) : [] },
    blocks: solvedBlocks.map((b) => {
      const [lon, lat] = frame.toWgs84(...b.layout.takeoff);
      return {
        index: b.block.index,
        takeoff: { x: b.layout.takeoff[0], y: b.layout.takeoff[1], lon, lat, groundM: b.groundM },
        takeoffFrom: b.block.takeoffFrom,
        ...(b.block.slopeDeg !== undefined ? { slopeDeg: b.block.slopeDeg } : {}),
        strips: [...new Set(b.layout.legs.filter((l) => l.kind === "strip").map((l) => l.strip))],
        farthestM: b.block.farthestM,
      };
    }),
    budget: budget.summary,
    verification,
    rows,
    warnings,
    timings,
    ...(reportMaps ? { reportMaps } : {}),
    ...(hooks.threads !== undefined ? { threads: hooks.threads } : {}),
  };
}

/**
 * A breach the plan announced: a ceiling breach or a crossing of unknown ground on a
 * leg of the same strip (the plan keeps clearance and says where it breaks the ceiling;
 * it flies over DEM holes only with a warning). Clearance, rates, ground and take-off
 * breaches are never announced: the plan promises them.
 */
function declared(b: Breach, warnings: readonly SolveWarning[]): boolean {
  const code = b.limit === "ceiling" ? "ceiling-breach" : b.limit === "nodata" ? "unknown-ground" : null;
  return code !== null && warnings.some((w) => w.code === code && (w.strip === undefined || w.strip === b.strip));
}

function breachCounts(bs: readonly Breach[]): string {
  const n = new Map<string, number>();
  for (const b of bs) n.set(b.limit, (n.get(b.limit) ?? 0) + 1);
  return [...n].map(([k, v]) => `${v} ${k}`).join(", ");
}

/**
 * The strips over a prepared mission: heading, spacing and trigger from the camera,
 * cut at the keep-out zones; a take-off point inside a zone is refused. With `threads`, the
 * `auto` heading's terrain terms are shared with its band workers (heading.ts).
 * @example const layout = missionLayout(await prepareMission(options), options);
 */
export function missionLayout(m: PreparedMission, options: PlanOptions, threads?: { bandPool: BandPool; threads?: number }): Layout {
  const takeoffXY: XY | undefined = options.takeoff ? m.frame.fromWgs84(options.takeoff[0], options.takeoff[1]) : undefined;
  const keepOut = m.keepOut;
  if (keepOut && takeoffXY) assertTakeoffOutside(keepOut, takeoffXY, options.takeoff);
  const layout = m.site.line ? layoutLineSite(m.site, {
    spacingM: m.spacingM,
    triggerM: m.triggerM,
    footprintAcrossM: m.footprint.acrossM,
    footprintAlongM: m.footprint.alongM,
    ...(options.lineStrips !== undefined ? { strips: options.lineStrips } : {}),
    ...(takeoffXY ? { takeoff: takeoffXY } : {}),
    ...(keepOut ? { keepOut: (a: XY, b: XY) => keepOutStretches(keepOut, a, b) } : {}),
  }) : layoutStrips(m.site, {
    headingDeg: options.headingDeg,
    spacingM: m.spacingM,
    triggerM: m.triggerM,
    footprintAcrossM: m.footprint.acrossM,
    footprintAlongM: m.footprint.alongM,
    ...(takeoffXY ? { takeoff: takeoffXY } : {}),
    photoSpeedMps: m.speed.speedMps,
    transitSpeedMps: options.aircraft.transitSpeedMps,
    grid: m.grid,
    maxClimbMps: options.aircraft.maxClimbMps,
    ...(keepOut ? { keepOut: (a: XY, b: XY) => keepOutStretches(keepOut, a, b) } : {}),
    ...(threads ? { bandPool: threads.bandPool, ...(threads.threads !== undefined ? { threads: threads.threads } : {}) } : {}),
  });
  if (m.site.line) assertLineInRange(layout, options.aircraft.maxRangeM);
  if (keepOut && !layout.legs.some((l) => l.kind === "strip")) {
    throw new InputError("keepOut", options.keepOut, "zones that leave part of the site to fly", "the site lies wholly inside keep-out zones and their buffers");
  }
  return layout;
}

/** Keep-out zones within this distance of the site's box widen the DEM window to hold them, metres. */
const ZONE_REACH_M = 1000;
/** Room beyond a zone's buffer and the safety radius for a way around it, metres. */
const ZONE_ROOM_M = 30;

/** True when some vertex of the zone lies within `reachM` of the box (degrees, in the wrap of `cLon`). */
function zoneNear(polygons: readonly number[][][][], box: { west: number; east: number; south: number; north: number }, cLon: number, reachM: number): boolean {
  const dLat = reachM / 110_000;
  for (const poly of polygons) for (const [lon, lat] of poly[0]) {
    const dLon = reachM / (110_000 * Math.max(0.01, Math.cos((lat * Math.PI) / 180)));
    const l = cLon + wrap180(lon - cLon);
    if (l >= box.west - dLon && l <= box.east + dLon && lat >= box.south - dLat && lat <= box.north + dLat) return true;
  }
  return false;
}

/** The blocks' solve results as one. */
function mergeSolves(all: readonly SolveResult[]): SolveResult {
  if (all.length === 1) return all[0];
  const counts = { ok: 0, detailLimited: 0, unflyable: 0 };
  for (const r of all) {
    counts.ok += r.counts.ok;
    counts.detailLimited += r.counts.detailLimited;
    counts.unflyable += r.counts.unflyable;
  }
  // Notes every block repeats (the ceiling rule, the obstacle margin) are said once.
  const seen = new Set<string>();
  const warnings = all.flatMap((r) => r.warnings).filter((w) => !seen.has(w.message) && seen.add(w.message));
  return { legs: all.flatMap((r) => r.legs), warnings, counts };
}

/**
 * A warning per flight with a waypoint farther than `rangeM` from its take-off point
 * (legs are straight, so the farthest point of a leg is one of its ends).
 */
function rangeBreaches(flights: FlightSplit["flights"], rangeM: number): SolveWarning[] {
  if (!(rangeM > 0)) return [];
  const out: SolveWarning[] = [];
  for (const f of flights) {
    const t = f.takeoff?.xy ?? f.legs[0]?.from;
    if (!t) continue;
    const far = farthestWaypointM(f.legs, t);
    if (far > rangeM + 0.01) {
      out.push({ code: "range", message: `Flight ${f.index} reaches ${far.toFixed(0)} m from its take-off point, beyond the ${rangeM} m range (aircraft.maxRangeM).` });
    }
  }
  return out;
}

/** Largest spacing of the solver's stations, metres (see planMission). */
export const MAX_STATION_STEP_M = 1;

/** The load stage's result: everything fixed before strips are laid out. */
export interface PreparedMission {
  camera: Camera;
  requirement: Requirement;
  targetHeightM: number;
  footprint: { acrossM: number; alongM: number };
  spacingM: number;
  triggerM: number;
  frame: SiteFrame;
  grid: DemGrid;
  /** The DEM window in its own CRS, as read (shares its heights with `grid` unless resampled). */
  nativeGrid: DemGrid;
  /** The terrain model (`dtm`) on the same cells as `grid`, when given beside a surface model. */
  terrain?: DemGrid;
  site: Site;
  speed: GroundSpeed;
  /** The keep-out zones on the local frame, buffered and indexed; null without zones. */
  keepOut: KeepOutSet | null;
  /** The same zones in WGS84 with their buffers, for the independent check. */
  keepOutZones: VerifyZone[];
  warnings: SolveWarning[];
}

/**
 * The load stage: camera and requirement, the site in its local frame, and
 * the DEM window (with margin) on that frame's metric grid.
 * @example const m = await prepareMission(options); m.spacingM
 */
export async function prepareMission(options: PlanOptions, threads?: number): Promise<PreparedMission> {
  const warnings: SolveWarning[] = [];
  // Camera and requirement first: the window margin depends on the footprint.
  const camera = makeCamera(cameraSpec(options));
  const requirement = requirementFrom(
    options.target.by === "gsd" ? { gsdCm: options.target.gsdCm } : { smallestFeatureCm: options.target.smallestFeatureCm, rule: options.target.rule },
    options.target.tolerancePct,
  );
  const targetHeightM = heightForGsdM(camera, requirement.targetGsdM);
  const fp = footprintM(camera, targetHeightM);
  const spacingM = stripSpacingM(fp.acrossM, options.overlap.sidePct);
  const triggerM = triggerDistanceM(fp.alongM, options.overlap.frontPct);

  const siteText = await readText(options.area, "area");
  const parsed = parseSiteText(siteText, path.basename(options.area));
  checkLineKeys(parsed, options.lineWidthM, options.lineStrips);
  // Loops, not Math.min(...list): an outline of 10^5 vertices would overflow the call stack.
  let west = Infinity, east = -Infinity, south = Infinity, north = -Infinity;
  const lons: number[] = [];
  const lats: number[] = [];
  for (const ring of parsed.polygons.length ? parsed.polygons.map((p) => p[0]) : parsed.lines) for (const [lon, lat] of ring) {
    lons.push(lon);
    lats.push(lat);
    if (lat < south) south = lat;
    if (lat > north) north = lat;
  }
  const [cLon, cLat] = lonLatCentre(lons, lats);
  for (const lon of lons) {
    // Longitudes in the wrap of the site's centre, so a site across the antimeridian has a narrow box.
    const l = cLon + wrap180(lon - cLon);
    if (l < west) west = l;
    if (l > east) east = l;
  }
  // The window also holds the take-off point and the keep-out zones near the site (with
  // their buffers and the safety radius): legs to take-off and ways around a zone fly there.
  const parsedZones: LonLatKeepOut[] = options.keepOut.length ? await readKeepOutFiles(options.keepOut) : [];
  const include = (lon: number, lat: number, padM: number) => {
    const l = cLon + wrap180(lon - cLon);
    const dLat = padM / 110_000, dLon = padM / (110_000 * Math.max(0.01, Math.cos((lat * Math.PI) / 180)));
    west = Math.min(west, l - dLon);
    east = Math.max(east, l + dLon);
    south = Math.max(-90, Math.min(south, lat - dLat));
    north = Math.min(90, Math.max(north, lat + dLat));
  };
  for (const [lon, lat] of options.takeoffs ?? (options.takeoff ? [options.takeoff] : [])) include(lon, lat, 0);
  // A line site reaches half its width past the line.
  if (!parsed.polygons.length) for (const line of parsed.lines) for (const [lon, lat] of line) include(lon, lat, (options.lineWidthM ?? 0) / 2);
  const siteBox = { west, east, south, north };
  for (const z of parsedZones) {
    const padM = (z.bufferM ?? options.keepOutBufferM) + options.clearance.safetyRadiusM + ZONE_ROOM_M;
    if (!zoneNear(z.polygons, siteBox, cLon, ZONE_REACH_M)) continue;
    for (const poly of z.polygons) for (const [lon, lat] of poly[0]) include(lon, lat, padM);
  }

  const source = await openDem(options.dem, {
    band: options.band,
    ...(options.demVerticalDatum ? { verticalDatum: options.demVerticalDatum } : {}),
    ...(options.demVerticalUnit ? { verticalUnit: VERTICAL_UNIT_NAMES[options.demVerticalUnit] } : {}),
  });
  let grid: DemGrid;
  let nativeGrid: DemGrid;
  let frame: SiteFrame;
  try {
    for (const w of source.warnings) warnings.push({ code: "dem", message: w });
    // Margin: the safety disc, the surface-ceiling disc, the strip run-out past the
    // boundary and a strip of transit room, so no bound is computed from missing cells.
    const ceilingReach = options.ceiling.reference === "surface" ? options.ceiling.heightM : 0;
    const marginM = Math.max(options.clearance.safetyRadiusM, ceilingReach) + fp.alongM / 2 + spacingM + 30;
    const marginLatDeg = marginM / 110_000;
    const marginLonDeg = marginM / (110_000 * Math.max(0.01, Math.cos((cLat * Math.PI) / 180)));
    frame = localFrameFor(cLon, cLat, source.crs, {
      west: west - marginLonDeg, east: east + marginLonDeg,
      south: Math.max(-90, south - marginLatDeg), north: Math.min(90, north + marginLatDeg),
    });
    const raw = source.crs.geographic
      ? // A geographic DEM: the box in its own degrees, in the wrap of its own longitudes
        // (a tile written from 179.95 to 180.05 E). The datum shift to the DEM's geographic
        // CRS is metres at most, well inside the margin.
        await readWindow(source, shiftedToDem(source, { west, south, east, north }), { marginM, threads })
      : await readWindow(source, { west: wrap180(west), south, east: wrap180(east) < wrap180(west) ? 180 : wrap180(east), north }, { crs: "+proj=longlat +datum=WGS84 +no_defs", marginM, threads });
    nativeGrid = raw;
    const onFrame = gridOnFrame(raw, frame);
    grid = onFrame.grid;
    if (onFrame.resampled) {
      warnings.push({
        code: "dem-resampled",
        message:
          `The DEM was resampled onto ${frame.name} (${frame.reason}): heights between its cells are an interpolation of an interpolation ` +
          "and can depart from the DEM's own surface on steep ground.",
      });
    }
    const datumNote = verticalDatumWarning(grid.verticalDatum, source.verticalCrsName);
    if (datumNote) warnings.push({ code: "vertical-datum", message: datumNote });
  } finally {
    await source.close();
  }
  let terrain: DemGrid | undefined;
  if (options.dtm !== undefined) {
    // The terrain model on the surface model's own cells, then onto the frame as the surface was.
    const t = await terrainOnGrid(options.dtm, {
      ...(options.demVerticalDatum ? { verticalDatum: options.demVerticalDatum } : {}),
      ...(options.demVerticalUnit ? { verticalUnit: VERTICAL_UNIT_NAMES[options.demVerticalUnit] } : {}),
    }, nativeGrid);
    for (const w of t.warnings) warnings.push({ code: t.resampled ? "dtm-resampled" : "dtm", message: w });
    terrain = gridOnFrame(t.grid, frame).grid;
    // The independent check reads the terrain beside the surface window (see VerifyDem).
    const withTerrain: VerifyDem = { ...nativeGrid, terrain: t.grid };
    nativeGrid = withTerrain;
  }
  const coarse = coarseDemWarning(grid.cellSizeM, spacingM, options.clearance.safetyRadiusM);
  if (coarse) warnings.push({ code: "dem-coarse", message: coarse });
  const siteName = options.name ?? parsed.name ?? stem(options.area);
  const site = parsed.polygons.length
    ? siteFromLonLat(parsed.polygons, frame, { name: siteName, source: path.basename(options.area) })
    : lineSiteFromLonLat(parsed.lines, frame, { widthM: options.lineWidthM as number, name: siteName, source: path.basename(options.area) });
  if (site.line) for (const message of lineSiteWarnings(site, spacingM, fp.alongM, options.lineStrips, frame.toWgs84)) warnings.push({ code: "line-site", message });
  const coverage = siteCoverage(site, grid);
  if (coverage.message) warnings.push({ code: "site-outside-dem", message: coverage.message });

  const speed = groundSpeed({
    cruiseMps: options.aircraft.speedMps,
    triggerM,
    minIntervalS: camera.minIntervalS,
    exposureS: camera.exposureS,
    // Blur in pixels is worst where the pixels are finest: the band's fine end.
    gsdM: requirement.lowGsdM,
    blurPx: options.blurPx,
  });
  const keepOut = parsedZones.length ? keepOutSet(localKeepOuts(parsedZones, frame.fromWgs84, options.keepOutBufferM)) : null;
  const keepOutZones = keepOutZonesFor(parsedZones, options.keepOutBufferM);
  return { camera, requirement, targetHeightM, footprint: fp, spacingM, triggerM, frame, grid, nativeGrid, ...(terrain ? { terrain } : {}), site, speed, keepOut, keepOutZones, warnings };
}

export interface WaypointBudgetSummary {
  maxWaypoints: number;
  perFlight: number[];
  /** Waypoints beyond the limit, summed over the flights that exceed it. */
  over: number;
  /** A tolerance (percent) whose plan fits, when one was found for an exceeding flight. */
  fittingTolerancePct: number | null;
}

/**
 * Flights are split at strip ends to respect the limit; a flight can still
 * exceed it when one strip alone needs more waypoints. Then say by how much,
 * and try wider tolerances on that flight's strips (toleranceToFitBudget).
 */
function waypointBudgetCheck(
  grid: DemGrid,
  layout: Layout,
  flights: FlightSplit,
  opts: SolverOptions,
  maxWaypoints: number | null,
  tolerancePct: number,
): { summary: WaypointBudgetSummary | null; warnings: SolveWarning[] } {
  if (maxWaypoints === null) return { summary: null, warnings: [] };
  const warnings: SolveWarning[] = [];
  const perFlight = flights.flights.map((f) => f.waypoints);
  let over = 0;
  let fittingTolerancePct: number | null = null;
  for (const f of flights.flights) {
    if (f.waypoints <= maxWaypoints) continue;
    over += f.waypoints - maxWaypoints;
    const legs = layout.legs.filter((l) => l.kind === "strip" && f.strips.includes(l.strip));
    const fit = toleranceToFitBudget(grid, legs, opts, maxWaypoints);
    if (fit) fittingTolerancePct = Math.max(fittingTolerancePct ?? 0, Math.round(fit.tolerance * 1000) / 10);
    warnings.push({
      code: "waypoint-budget",
      message:
        `Flight ${f.index} needs ${f.waypoints} waypoints, ${f.waypoints - maxWaypoints} over the autopilot's ${maxWaypoints} ` +
        (fit ? `(a tolerance of about ${(fit.tolerance * 100).toFixed(0)} % instead of ${tolerancePct} % would fit).` : "(no tolerance up to three times the current one fits: split the site)."),
    });
  }
  return { summary: { maxWaypoints, perFlight, over, fittingTolerancePct }, warnings };
}

/**
 * A target whose height lies below the clearance or above a ground-referenced
 * ceiling everywhere is bad input, named by the user's key, with the GSD range
 * this camera can legally and safely reach.
 */
function assertTargetReachable(requirement: Requirement, camera: Camera, targetHeightM: number, o: PlanOptions, floorM: number): void {
  const key = o.target.by === "gsd" ? "target.gsdCm" : "target.smallestFeatureCm";
  const value = o.target.by === "gsd" ? o.target.gsdCm : o.target.smallestFeatureCm;
  const lo = (floorM * camera.ifov * 100).toFixed(2);
  const hi = (o.ceiling.heightM * camera.ifov * 100).toFixed(2);
  const allowed = `a target GSD of about ${lo}-${hi} cm/px for this camera (heights ${floorM} m clearance to the ${o.ceiling.heightM} m ceiling)`;
  if (targetHeightM < floorM) {
    throw new InputError(key, value, allowed, `the target GSD (${(requirement.targetGsdM * 100).toFixed(2)} cm/px) needs ${targetHeightM.toFixed(1)} m above ground, below the terrain clearance`);
  }
  if (o.ceiling.reference === "ground" && targetHeightM > o.ceiling.heightM) {
    throw new InputError(key, value, allowed, `the target GSD (${(requirement.targetGsdM * 100).toFixed(2)} cm/px) needs ${targetHeightM.toFixed(1)} m above ground, above the legal ceiling`);
  }
}

/**
 * Across-track half-width of the ground a strip's photo images most nadir (the
 * nearest nadir point). Photos sit every t along strips d apart, and the strips'
 * photos need not line up, so a cell at the midline half a trigger distance from
 * its own strip's photos can be nearer a neighbour's photo: the neighbour's
 * Voronoi cell then reaches past the midline by up to t^2 / (8 d), from
 * (d - a)^2 < a^2 + (t/2)^2. The solver's zones cover that reach.
 * @example zoneHalfAcrossM(40, 20) // 21.25
 */
export function zoneHalfAcrossM(spacingM: number, triggerM: number): number {
  return spacingM / 2 + (triggerM * triggerM) / (8 * spacingM);
}

/**
 * A DEM whose cells are coarser than half the strip spacing, or than the safety
 * radius, cannot show the ground between its cell centres at the scale the plan
 * works at: say so with both sizes, or "" when the cells are fine enough.
 * @example coarseDemWarning([64, 93], 40, 15) // "The DEM's cells are 64 x 93 m, ..."
 */
export function coarseDemWarning(cellSizeM: readonly [number, number], spacingM: number, safetyRadiusM: number): string {
  const cellM = Math.max(cellSizeM[0], cellSizeM[1]);
  const against: string[] = [];
  if (cellM > spacingM / 2) against.push(`half the strip spacing (${(spacingM / 2).toFixed(1)} m)`);
  if (cellM > safetyRadiusM) against.push(`the ${safetyRadiusM} m safety radius`);
  if (!against.length) return "";
  const size = Math.abs(cellSizeM[0] - cellSizeM[1]) < 0.05 ? `${cellM.toFixed(1)} m` : `${cellSizeM[0].toFixed(1)} x ${cellSizeM[1].toFixed(1)} m`;
  return (
    `The DEM's cells are ${size}, coarser than ${against.join(" and ")}: the plan knows the ground only at cell centres that far apart ` +
    "and interpolates between them, so hills, trees, buildings and walls narrower than a cell are unknown to it. " +
    "Use a finer DEM, or add their height to the clearance (obstacleMarginM, demAccuracyM)."
  );
}

/** What the user must know about the DEM's vertical datum, or "" when it is EGM96 or ellipsoidal. */
export function verticalDatumWarning(datum: DemGrid["verticalDatum"], declared: string | null): string {
  if (datum === "egm2008") return EGM2008_APPROXIMATION_WARNING;
  if (datum === "other" || datum === "unknown") {
    const what = datum === "other" ? `declared as ${declared ?? "a datum other than EGM96"}` : "not declared by the file";
    return (
      `The DEM's vertical datum is ${what}: AMSL columns carry its heights as they are, and ellipsoidal heights ` +
      "add the EGM96 undulation, which can differ from a national datum by a metre or more. Set demVerticalDatum if you know it, " +
      "and check the first waypoint heights on site."
    );
  }
  return "";
}

/** Geoid undulation of the DEM's vertical datum (EGM96; EGM2008 approximated by it). */
export function undulationFor(datum: DemGrid["verticalDatum"]): (lon: number, lat: number) => number {
  if (datum === "ellipsoid") return () => 0;
  return (lon, lat) => egm96UndulationM(lat, lon);
}

const VERTICAL_UNIT_NAMES: Record<NonNullable<PlanOptions["demVerticalUnit"]>, string> = {
  metre: "metre",
  foot: "foot",
  "us-survey-foot": "US survey foot",
};

function cameraSpec(o: PlanOptions): CameraSpec {
  const c = o.camera;
  const common = { imageWidthPx: c.imageWidthPx, imageHeightPx: c.imageHeightPx, exposureS: c.exposureS, minIntervalS: c.minIntervalS, portrait: c.portrait };
  if (c.model === "sensor") {
    return { ...common, sensorWidthMm: c.sensorWidthMm, sensorHeightMm: c.sensorHeightMm ?? (c.sensorWidthMm * c.imageHeightPx) / c.imageWidthPx, focalLengthMm: c.focalLengthMm };
  }
  return c.model === "hfov" ? { ...common, hfovDeg: c.hfovDeg } : { ...common, dfovDeg: c.dfovDeg };
}

async function readText(file: string, key: string): Promise<string> {
  try {
    return await readFile(file, "utf8");
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputFileError(file, code === "ENOENT" ? `${key} file not found` : `cannot read the ${key} file (${code ?? String(e)})`);
  }
}

/** An angle difference in degrees, wrapped to [-180, 180). */
function wrap180(d: number): number {
  return d - 360 * Math.floor((d + 180) / 360);
}

/** A longitude box moved by whole turns to the wrap nearest the DEM's own longitudes. */
function shiftedToDem(source: Parameters<typeof nativeBounds>[0], b: { west: number; south: number; east: number; north: number }) {
  const nb = nativeBounds(source);
  const k = Math.round(((nb.west + nb.east) / 2 - (b.west + b.east) / 2) / 360);
  return { west: b.west + 360 * k, south: b.south, east: b.east + 360 * k, north: b.north };
}

function stem(file: string): string {
  return path.basename(file).replace(/\.[^.]+$/, "");
}

function groundAt(grid: DemGrid, xy: XY, assumeGroundM?: number): number {
  const z = sampleBilinear(grid, [xy[0]], [xy[1]])[0];
  return Number.isFinite(z) ? z : (assumeGroundM ?? NaN);
}

/**
 * A leg to or from take-off, solved over the terrain with its strip end pinned
 * to the solved path's height there ("out": it ends at the height the next
 * strip starts at; "back": it starts at the height the last leg ended at), so
 * the flight has no unannounced step in height where the legs join.
 */
function transitThroughSolver(
  grid: DemGrid, from: XY, to: XY, strip: number, direction: "out" | "back", solved: readonly SolvedLeg[], opts: SolverOptions,
  warningsOf: WeakMap<SolvedLeg, SolveWarning[]>,
  joinM?: number,
): SolvedLeg {
  const lengthM = Math.hypot(to[0] - from[0], to[1] - from[1]);
  const leg: LayoutLeg = { kind: "transit", strip, from, to, lengthM };
  const startAltM = direction === "back" ? (joinHeightM(solved, from, "end") ?? joinM) : undefined;
  const endAltM = direction === "out" ? (joinHeightM(solved, to, "start") ?? joinM) : undefined;
  const r = solveTransit(grid, leg, opts, startAltM, endAltM);
  warningsOf.set(r.leg, r.warnings);
  return r.leg;
}

/** Height of the solved path where a leg starts or ends at `xy` (strips first), or undefined. */
function joinHeightM(legs: readonly SolvedLeg[], xy: XY, end: "start" | "end"): number | undefined {
  let best: number | undefined, bestIsStrip = false;
  for (const l of legs) {
    const p = end === "start" ? l.from : l.to;
    if (Math.hypot(p[0] - xy[0], p[1] - xy[1]) > 1e-6 || l.waypoints.length === 0) continue;
    const w = end === "start" ? l.waypoints[0] : l.waypoints[l.waypoints.length - 1];
    if (best === undefined || (l.kind === "strip" && !bestIsStrip)) { best = w.altitudeAmslM; bestIsStrip = l.kind === "strip"; }
  }
  return best;
}

/**
 * The solver may split a strip around an unflyable stretch; the layout's
 * no-photo intervals (holes) and photo grid are in the original strip's
 * along-track distance, so shift them onto each solved piece.
 */
function carryNoPhotoIntervals(solved: SolvedLeg[], layoutLegs: LayoutLeg[]): void {
  const byStrip = new Map<number, LayoutLeg[]>();
  for (const l of layoutLegs) if (l.kind === "strip" && (l.noPhotoIntervals?.length || l.photoGrid)) {
    const list = byStrip.get(l.strip) ?? [];
    list.push(l);
    byStrip.set(l.strip, list);
  }
  for (const leg of solved as AssessedLeg[]) {
    if (leg.kind !== "strip") continue;
    for (const src of byStrip.get(leg.strip) ?? []) {
      const ux = (src.to[0] - src.from[0]) / src.lengthM;
      const uy = (src.to[1] - src.from[1]) / src.lengthM;
      const s0 = (leg.from[0] - src.from[0]) * ux + (leg.from[1] - src.from[1]) * uy;
      const s1 = (leg.to[0] - src.from[0]) * ux + (leg.to[1] - src.from[1]) * uy;
      // The piece must lie on this layout leg (same line, inside its extent).
      const off = Math.abs(-(leg.from[0] - src.from[0]) * uy + (leg.from[1] - src.from[1]) * ux);
      if (off > 0.01 || s0 < -0.01 || s1 > src.lengthM + 0.01) continue;
      if (src.photoGrid) {
        // A piece of a line cut at a block seam keeps the line's photo positions.
        leg.photoPhaseM = photoPhaseOn(src.photoGrid, s0);
      }
      const shifted = (src.noPhotoIntervals ?? [])
        .map(([a, b]) => [Math.max(0, a - s0), Math.min(leg.lengthM, b - s0)] as [number, number])
        .filter(([a, b]) => b > a);
      if (shifted.length) leg.noPhotoIntervals = shifted;
    }
  }
}
