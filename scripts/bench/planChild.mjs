// The benchmark's child (scripts/bench/plan.mjs benchPlan runs it): plans one site from its
// plan file against the build (dist/, or GSDPLAN_DIST), writes the output set, times every
// stage (PlanRun.timings, plus the output files, grouped into export and report) with its CPU
// time, and prints one JSON line. It imports Node's modules and the build only, so the process
// spends what `gsdplan plan` spends and no more.
//
// Usage: node scripts/bench/planChild.mjs <plan.json> <out-dir>
import { existsSync, readFileSync } from "node:fs";
import { join, dirname } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..", "..");
const dist = process.env.GSDPLAN_DIST ?? join(root, "dist");

/** Output files by the stage that makes them (the rest are the export stage). */
const REPORT_FILES = new Set(["report-data.json", "report.html"]);

/**
 * CPU seconds of the calling thread (Linux): the nanoseconds it ran on a CPU from
 * /proc/thread-self/schedstat (sched-stats.rst), else utime + stime of /proc/thread-self/stat
 * in clock ticks of 10 ms (the kernel's USER_HZ of 100, proc(5)); NaN elsewhere.
 */
function mainThreadCpuS() {
  try {
    const ns = Number(readFileSync("/proc/thread-self/schedstat", "utf8").split(" ")[0]);
    if (Number.isFinite(ns)) return ns / 1e9;
  } catch {
    // no schedstat: the ticks below
  }
  try {
    const stat = readFileSync("/proc/thread-self/stat", "utf8");
    const f = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    return (Number(f[11]) + Number(f[12])) / 100;
  } catch {
    return NaN;
  }
}

/** The child: plans, writes the output set, measures itself, prints one JSON line. */
async function child(planFile, outDir) {
  const t0 = performance.now();
  const load = (p) => import(pathToFileURL(join(dist, p)).href);
  // The package's entry as users load it (the bundle, scripts/bundle.mjs); a build from
  // before the bundle: its modules one by one.
  const entry = existsSync(join(dist, "bundle", "index.js")) ? await load("bundle/index.js") : undefined;
  const { resolvePlanOptions } = entry ?? (await load("plan/options.js"));
  const { planMission } = entry ?? (await load("plan/plan.js"));
  const { planOutputs } = entry ?? (await load("plan/outputs.js"));
  const { writeOutputSet } = entry ?? (await load("export/atomicDir.js"));
  // The engine flags `gsdplan` sets for its process once its bundle is read (the optimising
  // compiler's budget and phases: cli/engineSettings.ts), likewise here after the entry, so
  // the child runs the plan as the command does (and its workers find their code caches).
  if (existsSync(join(dist, "cli", "engineSettings.js"))) await load("cli/engineSettings.js");
  const tImport = performance.now();

  const options = resolvePlanOptions(JSON.parse(readFileSync(planFile, "utf8")), {}, dirname(planFile));
  // Stage starts go to stderr, so a slow or failing run shows where it was.
  const log = (m) => process.stderr.write(`[bench plan ${((performance.now() - t0) / 1000).toFixed(1)} s] ${m}\n`);
  // CPU seconds (all threads, so the assessment's workers count) from one stage start to the next.
  const cpuNow = () => { const u = process.cpuUsage(); return (u.user + u.system) / 1e6; };
  // And this (the main) thread's alone: the stages it runs by itself (the solve) with a
  // worker beside them (the comparison started before the solve) count only their own.
  const stagesCpuS = {};
  const stagesMainCpuS = {};
  let cpuStage, cpuMark = cpuNow(), mainMark = mainThreadCpuS();
  const cpuLap = (next) => {
    const c = cpuNow(), m = mainThreadCpuS();
    if (cpuStage) {
      stagesCpuS[cpuStage] = c - cpuMark;
      stagesMainCpuS[cpuStage] = m - mainMark;
    }
    cpuStage = next;
    cpuMark = c;
    mainMark = m;
  };
  // The plan, its figures and its output set are made in a function of their own, which lets
  // go of the run when it returns, as `gsdplan plan` does (cli/planCommand.ts planToFolder):
  // while the files are written the run's DEM window is no longer held (plan/outputs.ts).
  const { figures, timings, maxRssAfterPlanBytes, prepS, files, runReleased, ownS, ownCpuS } = await (async () => {
    const run = await planMission(options, { now: () => performance.now(), onStage: (st) => { log(st); cpuLap(st); } });
    cpuLap("export");
    log("outputs");
    const maxRssAfterPlanBytes = process.resourceUsage().maxRSS * 1024;
    // The figures (the relief's pass over the site, the counts) are the benchmark's own work,
    // ~0.07-0.1 s at 4 km2: taken off the export stage's CPU here, and off the process's wall
    // and CPU time by the parent (benchOwnS), which then count what `gsdplan plan` does.
    const tFig = performance.now(), cFig = cpuNow(), mFig = mainThreadCpuS();
    const figures = planFigures(run);
    const ownCpuS = cpuNow() - cFig;
    cpuMark += ownCpuS;
    mainMark += mainThreadCpuS() - mFig;
    const ownS = (performance.now() - tFig) / 1000;
    // Export and report: planOutputs builds rows, summary and the report model; each file's
    // content is made lazily inside writeOutputSet, so wrap each maker with a timer.
    const tOut = performance.now();
    const { files, runReleased } = planOutputs(run, { generatedAt: new Date(0).toISOString() });
    return { figures, timings: run.timings, maxRssAfterPlanBytes, prepS: (performance.now() - tOut) / 1000, files, runReleased, ownS, ownCpuS };
  })();
  // As `gsdplan plan` does (cli/planCommand.ts): the run, let go (its report's input reduced:
  // runReleased), is collected before the files are written (counted in the export stage).
  const tGc = performance.now();
  const { collectGarbage } = await load("cli/fullGc.js");
  await runReleased;
  collectGarbage();
  const gcS = (performance.now() - tGc) / 1000;
  const fileS = {};
  const fileCpuS = {};
  const timed = files.map((f) => ({
    name: f.name,
    // A file its own worker writes (gsd.tif on large grids): timed with the whole write below.
    ...(f.background ? { background: f.background } : {}),
    data: async () => {
      const t = performance.now();
      const c = cpuNow();
      const d = typeof f.data === "function" ? await f.data() : f.data;
      fileS[f.name] = (performance.now() - t) / 1000;
      fileCpuS[f.name] = cpuNow() - c;
      return d;
    },
  }));
  const tWrite = performance.now();
  await writeOutputSet(outDir, timed);
  const writeAllS = (performance.now() - tWrite) / 1000;
  const makeS = Object.values(fileS).reduce((a, b) => a + b, 0);
  const reportS = Object.entries(fileS).filter(([n]) => REPORT_FILES.has(n)).reduce((a, [, v]) => a + v, 0);
  // File writes and renames count as export; the report model is built in planOutputs (prep).
  const exportS = prepS + gcS + (writeAllS - makeS) + (makeS - reportS);
  const tEnd = performance.now();
  const reportCpuS = Object.entries(fileCpuS).filter(([n]) => REPORT_FILES.has(n)).reduce((a, [, v]) => a + v, 0);
  stagesCpuS.export = cpuNow() - cpuMark - reportCpuS;
  stagesCpuS.report = reportCpuS;

  const result = {
    importS: (tImport - t0) / 1000,
    inProcessS: (tEnd - tImport) / 1000 - ownS,
    stagesS: { ...timings, export: exportS, report: reportS },
    stagesCpuS,
    stagesMainCpuS,
    filesS: fileS,
    maxRssAfterPlanBytes,
    maxRssBytes: process.resourceUsage().maxRSS * 1024,
    ...figures,
    // The parent takes the benchmark's own work (planFigures) off the process's wall and CPU time.
    benchOwnS: ownS,
    benchOwnCpuS: ownCpuS,
  };
  process.stdout.write(JSON.stringify(result) + "\n");
}

/** The run's figures the benchmark reports: the site and window, the plan's counts and quality. */
function planFigures(run) {
  const g = run.grid;
  const cells = g.width * g.height;
  const r = run.assessment.rasters;
  let zMin = Infinity, zMax = -Infinity;
  for (let i = 0; i < cells; i++) if (r.inSite[i]) {
    const z = g.heights[i];
    if (z < zMin) zMin = z;
    if (z > zMax) zMax = z;
  }
  const ifov = run.camera.ifov;
  const bandWindowM = run.requirement.highGsdM / ifov - run.requirement.lowGsdM / ifov;
  // Issue 4's naive plan: a waypoint every 25 m along each strip at the target height
  // above the ground below; counted on the same strips as ours.
  let naiveWaypoints = 0, stripKm = 0;
  for (const l of run.layout.legs) if (l.kind === "strip") {
    naiveWaypoints += Math.ceil(l.lengthM / 25) + 1;
    stripKm += l.lengthM / 1000;
  }
  let stripWaypoints = 0, allWaypoints = 0;
  for (const l of run.solve.legs) if (l.kind === "strip") stripWaypoints += l.waypoints.length;
  for (const f of run.flights.flights) for (const l of f.legs) allWaypoints += l.waypoints.length;
  const a = run.assessment.stats;
  const b = run.baseline.stats;
  return {
    siteKm2: (a.siteCells * a.cellAreaM2) / 1e6,
    window: {
      width: g.width,
      height: g.height,
      cells,
      // Float32 heights, the figure the DEM-window benchmark uses (the window holds nothing else a cell).
      bytes: cells * 4,
      west: g.transform.x0,
      north: g.transform.y0,
      east: g.transform.x0 + g.width * g.transform.dx,
      south: g.transform.y0 + g.height * g.transform.dy,
      crs: g.crs.epsg,
    },
    plan: {
      strips: run.layout.legs.filter((l) => l.kind === "strip").length,
      headingDeg: run.layout.headingDeg,
      stripKm,
      exposures: run.assessment.exposures.length,
      flights: run.flights.flights.length,
      waypoints: { strips: stripWaypoints, all: allWaypoints, naive25m: naiveWaypoints, perKmStrip: stripWaypoints / stripKm },
      reliefM: zMax - zMin,
      bandWindowM,
      reliefOverBandWindow: (zMax - zMin) / bandWindowM,
      stations: run.solve.counts,
      ours: { gsdCm: a.gsdCm, withinBandPct: a.withinBandPct, flaggedAreaM2: a.flagged.areaM2, flaggedPct: (100 * a.flagged.cells) / a.siteCells, flaggedByKind: a.flagged.byKind, images: a.images, ceilingBreaches: run.baseline.planCeilingBreaches },
      baseline: { altitudeAmslM: run.baseline.altitudeAmslM, gsdCm: b.gsdCm, withinBandPct: b.withinBandPct, flaggedAreaM2: b.flaggedAreaM2, flaggedPct: b.flaggedPct, flaggedByKind: b.flaggedByKind, images: b.images, ceilingBreaches: b.ceilingBreaches },
      band: { lowGsdCm: run.requirement.lowGsdM * 100, highGsdCm: run.requirement.highGsdM * 100 },
    },
  };
}

await child(process.argv[2], process.argv[3]);
