#!/usr/bin/env node
// `npm run bench`: every gsdplan benchmark, each figure beside a reference measured in the
// same run, as a ratio, printed as one table and written to scripts/bench/results/
// (<ISO time>.json and latest.json) so later runs can be compared.
//
//   1. DEM window read vs `gdal_translate -projwin` of the same window (dem-window.mjs)
//   2. plan end to end on a 2 km x 2 km site at 0.5 m from an 8000 x 8000 tiled DEM
//   3. scaling over 0.5, 1 and 4 km2, and one case from a source four times the size
//   4. constant-altitude baseline vs ours, and the solver's quality figures
//   5. assessment alone at its working size (assess.mjs)
//   6. the DEM window from four tiles vs one file, and from a COG over loopback HTTP vs
//      the same COG from disk, beside gdal_translate on the tiles' VRT (mosaic.mjs)
//   7. the speed and scale targets: 4 km2 wall and peak RSS, a 3.2 km2 oblique site, a
//      25 km2 site (generated, not committed), gsdplan demo, and the fit of CPU and
//      memory against area (targets.mjs)
//
// Runs against the build in dist/ (built first with `npm run build` when missing, or when
// --build is given). Every measured job runs in its own process (peak memory is its own).
// Wall times on a shared machine include waiting for a core, so CPU time (user + system,
// all threads) is printed beside them, with the load average.
//
// Options: --build            rebuild dist/ first
//          --only 1,2,5       run only these sections
//          --timeout S        per plan process (default 300 s; a timed-out plan is reported
//                             with the stage it was in)
//          --repeat N         DEM-window repeats (default 3)
//          --table FILE       print the table of an earlier results file (no run)
//          --live-dist        measure dist/ itself instead of a copy taken at the start
//                             (by default the plan and assessment processes run a snapshot
//                             of dist/, so a rebuild during the run cannot mix versions)
import { spawnSync } from "node:child_process";
import { existsSync, mkdirSync, writeFileSync, renameSync, readFileSync, cpSync, rmSync } from "node:fs";
import { join, dirname } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { cpus, loadavg, totalmem } from "node:os";
import { runDemWindowBench } from "./dem-window.mjs";
import { runMosaicBench } from "./mosaic.mjs";
import { benchPlan } from "./plan.mjs";
import { benchScaling } from "./scaling.mjs";
import { benchQuality } from "./baseline.mjs";
import { benchTargets, targetRows } from "./targets.mjs";
import { demSmall, demLarge } from "./lib/dems.mjs";
import { nodeJson } from "./lib/proc.mjs";
import { fmt, row, markdownTable } from "./lib/table.mjs";

const here = dirname(fileURLToPath(import.meta.url));
const root = join(here, "..", "..");
let dist = process.env.GSDPLAN_DIST ?? join(root, "dist");
const GB = 2 ** 30;

const args = process.argv.slice(2);
const opt = (name, def) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 ? args[i + 1] : def;
};
const only = new Set(String(opt("only", "1,2,3,4,5,6,7")).split(",").map((s) => s.trim()));
const timeoutS = Number(opt("timeout", 300));
const repeat = Number(opt("repeat", 3));
const log = (m) => process.stderr.write(`[bench ${new Date().toISOString().slice(11, 19)} load ${loadavg()[0].toFixed(1)}] ${m}\n`);

if (opt("table")) {
  const earlier = JSON.parse(readFileSync(opt("table"), "utf8"));
  process.stdout.write(markdownTable(tableRows(earlier.sections)) + "\n");
  process.exit(0);
}

if (args.includes("--build") || !existsSync(join(dist, "plan", "plan.js"))) {
  log("building dist/ (npm run build)");
  const b = spawnSync("npm", ["run", "build"], { cwd: root, stdio: "inherit" });
  if (b.status !== 0) {
    process.stderr.write("bench: npm run build failed; fix the build first\n");
    process.exit(1);
  }
}

// Snapshot of the build, inside the repository so its imports still find node_modules.
// (dem-window.mjs and solve.mjs import ../../dist themselves and read the live build.)
let snapshot;
if (!args.includes("--live-dist") && !process.env.GSDPLAN_DIST) {
  snapshot = join(root, "node_modules", ".cache", "gsdplan-bench", "dist");
  rmSync(snapshot, { recursive: true, force: true });
  mkdirSync(dirname(snapshot), { recursive: true });
  cpSync(dist, snapshot, { recursive: true });
  dist = snapshot;
  process.env.GSDPLAN_DIST = snapshot;
}
// Fail early, with the reason, when the build does not load.
const check = spawnSync(process.execPath, ["--input-type=module", "-e", `await import(${JSON.stringify(pathToFileURL(join(dist, "plan", "outputs.js")).href)}); await import(${JSON.stringify(pathToFileURL(join(dist, "plan", "options.js")).href)});`], { encoding: "utf8" });
if (check.status !== 0) {
  process.stderr.write(`bench: the build in ${dist} does not load (rebuild with --build):\n${check.stderr.split("\n").slice(0, 8).join("\n")}\n`);
  process.exit(1);
}

const startedAt = new Date();
const results = {
  startedAt: startedAt.toISOString(),
  machine: { cpus: cpus().length, cpuModel: cpus()[0]?.model, totalMemBytes: totalmem(), node: process.version, loadAverageAtStart: loadavg() },
  options: { sections: [...only], timeoutS, repeat, dist: snapshot ? "snapshot of dist/ taken at the start" : dist },
  sections: {},
};
mkdirSync(join(here, "results"), { recursive: true });
const stamp = startedAt.toISOString().replace(/[:]/g, "-").replace(/\.\d+Z$/, "Z");
const outFile = join(here, "results", `${stamp}.json`);
/** Saves after every section, so an interrupted run still leaves what it measured. */
function save() {
  const tmp = outFile + ".tmp";
  writeFileSync(tmp, JSON.stringify(results, null, 2) + "\n");
  renameSync(tmp, outFile);
}
/** As attempt, for a section that is measured asynchronously (it runs a server meanwhile). */
async function attemptAsync(name, fn) {
  const t = performance.now();
  let value, error;
  try {
    value = await fn();
  } catch (e) {
    error = e;
  }
  return attempt(name, () => {
    if (error) throw error;
    return value;
  }, t);
}
function attempt(name, fn, t = performance.now()) {
  try {
    const r = fn();
    results.sections[name] = r;
  } catch (e) {
    results.sections[name] = { error: String(e?.message ?? e).split("\n").slice(0, 6).join("\n") };
    log(`${name} failed: ${results.sections[name].error}`);
  }
  results.sections[name + "Seconds"] = (performance.now() - t) / 1000;
  results.sections[name + "LoadAverage"] = loadavg()[0];
  save();
  return results.sections[name];
}

// The DEMs first (made once, reused by later runs).
log("benchmark DEMs");
demSmall();
if (only.has("3")) demLarge();

// Cheap sections first, the long 4 km2 plan and the solver's benchmark last.
if (only.has("1")) {
  log("1: DEM window read vs gdal_translate");
  attempt("demWindow", () => runDemWindowBench({ repeat }));
}
if (only.has("6")) {
  log("6: DEM window from four tiles and from a COG over loopback HTTP (scripts/bench/mosaic.mjs)");
  await attemptAsync("mosaic", () => runMosaicBench({ repeat }));
}
if (only.has("5")) {
  log("5: assessment alone (scripts/bench/assess.mjs)");
  attempt("assess", () => {
    const r = nodeJson(join(here, "lib", "callExport.mjs"), [join(here, "assess.mjs"), "benchAssess", JSON.stringify({ repeats: 1 })], { timeoutS });
    return r.json ? { wallS: r.seconds, cpuS: r.cpuS, peakRssBytes: r.peakRssBytes, result: r.json } : { timedOut: true, timeoutS, cpuS: r.cpuS };
  });
}
let plan1;
if (only.has("3") || only.has("4")) {
  log("3: 1 km2 plan");
  plan1 = attempt("plan1km2", () => benchPlan({ areaKm2: 1, timeoutS }));
}
let plan4;
if (only.has("2") || only.has("3") || only.has("4")) {
  log("2: 4 km2 plan (2 km x 2 km, 0.5 m)");
  plan4 = attempt("plan", () => benchPlan({ areaKm2: 4, timeoutS }));
}
if (only.has("3")) {
  attempt("scaling", () => {
    const s = benchScaling({ areasKm2: [0.5, 1, 4], largeKm2: 1, reuse: usable({ 1: plan1, 4: plan4 }), timeoutS, log });
    return { cases: s.cases, derived: s.derived, largeSource: s.full[s.full.length - 1] };
  });
}
if (only.has("4")) {
  attempt("quality", () => benchQuality({ plan: usable({ p: plan4 }).p, sweep10: usable({ p: plan4 }).p, sweepKm2: 4, timeoutS, solverTimeoutS: timeoutS, log }));
}

if (only.has("7")) {
  log("7: speed and scale targets (scripts/bench/targets.mjs)");
  attempt("targets", () => benchTargets({ reuse: usable({ 1: plan1, 4: plan4 }), timeoutS: Math.max(timeoutS, 600), log }));
}

if (snapshot) rmSync(snapshot, { recursive: true, force: true });
results.finishedAt = new Date().toISOString();
results.totalSeconds = (Date.now() - startedAt.getTime()) / 1000;
results.table = tableRows(results.sections);
save();
writeFileSync(join(here, "results", "latest.json"), JSON.stringify(results, null, 2) + "\n");

process.stdout.write(
  `\ngsdplan benchmarks, ${results.startedAt} (${results.machine.cpus} cores, load average ${results.machine.loadAverageAtStart[0].toFixed(1)} at start, ${fmt.n(results.totalSeconds)} s in all)\n` +
    "Wall times include waiting for a core on a shared machine; CPU times do not.\n\n" +
    markdownTable(results.table) +
    `\n\nResults: ${outFile.slice(root.length + 1)} (and results/latest.json)\n`,
);

/** Keeps only measured results (not failed ones) for reuse by later sections. */
function usable(byKey) {
  return Object.fromEntries(Object.entries(byKey).filter(([, v]) => v && !v.error));
}

/** The table rows from the measured sections. */
function tableRows(s) {
  const rows = [];
  const failed = (sec, name, r) => r?.error && rows.push(row(sec, name, `FAILED: ${r.error.split("\n")[0].slice(0, 80)}`));
  const timedOut = (sec, name, r) => r?.timedOut && rows.push(row(sec, name, `timed out after ${r.timeoutS} s (${fmt.s(r.cpuS)} CPU), in stage ${r.stuckIn ?? "?"}`, "", NaN, "", false));

  // 1. DEM window
  const d = s.demWindow;
  failed("1", "DEM window read", d);
  if (d && !d.error) {
    rows.push(row("1", "DEM window 4000x4000 read, process wall", fmt.s(d.ours.wallS), `gdal_translate -projwin ${fmt.s(d.gdal.wallS)}`, d.ratios.wallOursOverGdal, "<= 3x", d.ratios.wallOursOverGdal <= 3));
    rows.push(row("1", "DEM window read alone (no Node start-up)", fmt.s(d.ours.readS), `gdal_translate -projwin ${fmt.s(d.gdal.wallS)}`, d.ratios.readOursOverGdalWall, "<= 3x", d.ratios.readOursOverGdalWall <= 3));
    rows.push(row("1", "DEM window read, peak RSS", fmt.mb(d.ours.peakRssBytes), `window bytes ${fmt.mb(d.window.bytes)}`, d.ratios.peakRssOverWindowBytes, "< 4x", d.ratios.peakRssOverWindowBytes < 4));
  }

  // 2. Plan end to end
  const p = s.plan;
  failed("2", "plan 2 km x 2 km", p);
  timedOut("2", "plan 2 km x 2 km (4 km2), wall", p);
  if (p && !p.error && !p.timedOut) {
    rows.push(row("2", `plan ${fmt.n(p.siteKm2, 2)} km2 end to end, wall`, fmt.s(p.wallS), `GDAL read of its window ${fmt.s(p.gdalReadS)}`, p.ratios.wallOverGdalRead, "< 8 s", p.wallS < 8));
    rows.push(row("2", "plan end to end, CPU (all threads)", fmt.s(p.cpuS), `GDAL read CPU ${fmt.s(p.gdalReadCpuS)}`, p.ratios.cpuOverGdalReadCpu, "< 8 s", p.cpuS < 8));
    rows.push(row("2", "plan end to end, peak RSS", fmt.mb(p.peakRssBytes), `window ${p.window.width}x${p.window.height} Float32 ${fmt.mb(p.window.bytes)}`, p.ratios.peakRssOverWindowBytes, "< 1.5 GB", p.peakRssBytes < 1.5 * GB));
    for (const k of Object.keys(p.stagesS)) {
      rows.push(row("2", `  stage ${k}: wall (share) / CPU (share)`, `${fmt.s(p.stagesS[k])} (${fmt.pct(100 * p.stageShares[k])}) / ${fmt.s(p.stagesCpuS[k])} (${fmt.pct(100 * p.stageCpuShares[k])})`, `sum of stages ${fmt.s(p.stageSumS)} / ${fmt.s(p.stageCpuSumS)} CPU`, NaN));
    }
    rows.push(row("2", "  Node start-up and module import", fmt.s(p.importS), "", NaN));
  }

  // 3. Scaling
  const sc = s.scaling;
  failed("3", "scaling", sc);
  if (sc && !sc.error) {
    for (const c of sc.cases) {
      if (c.timedOut) {
        rows.push(row("3", `${c.label}`, `timed out (${fmt.s(c.cpuS)} CPU) in stage ${c.stuckIn}`, "", NaN, "", false));
        continue;
      }
      rows.push(row("3", `${c.label}: CPU per km2 / wall`, `${fmt.s(c.cpuSPerKm2)} per km2 / ${fmt.s(c.wallS)}`, `source ${fmt.n(c.sourceCells / 1e6)} M cells`, NaN));
      rows.push(row("3", `${c.label}: peak RSS vs window`, fmt.mb(c.peakRssBytes), `window ${fmt.mb(c.windowBytes)}`, c.peakRssOverWindowBytes));
    }
    const dv = sc.derived;
    if (dv.cpuPerKm2LargestOverSmallest !== undefined) {
      rows.push(row("3", `CPU per km2, largest / smallest site (${fmt.x(dv.areaRatio)} area)`, fmt.x(dv.cpuPerKm2LargestOverSmallest), "1x if no fixed cost; < 1x: fixed cost", dv.cpuPerKm2LargestOverSmallest));
      const cf = dv.cpuFit, rf = dv.rssFit, sf = dv.solveCpuFit;
      if (cf) rows.push(row("3", "CPU = fixed + slope x area (fit)", `${fmt.s(cf.b)} per km2 + ${fmt.s(cf.a)}`, `largest residual ${fmt.pct(100 * cf.maxRelResidual)}`, NaN, "residual < 10 %", cf.maxRelResidual < 0.1));
      if (sf) rows.push(row("3", "  solve stage CPU (main thread) = fixed + slope x area (fit)", `${fmt.s(sf.b)} per km2 + ${fmt.s(sf.a)}`, `largest residual ${fmt.pct(100 * sf.maxRelResidual)}`, NaN, "residual < 10 %", sf.maxRelResidual < 0.1));
      if (rf) rows.push(row("3", "peak RSS = fixed + slope x window bytes (fit)", `${fmt.n(rf.b, 1)} B per window byte + ${fmt.mb(rf.a)}`, `largest residual ${fmt.pct(100 * rf.maxRelResidual)}; window ${fmt.x(dv.windowBytesRatio)}, RSS ${fmt.x(dv.peakRssRatio)}`, NaN, "residual < 10 %", rf.maxRelResidual < 0.1));
      for (const [k, v] of Object.entries(dv.stageCpuPerKm2Ratio ?? {})) rows.push(row("3", `  stage ${k}: CPU per km2, largest / smallest`, fmt.x(v), "linear: 1x", v));
    }
    if (dv.largeSource) {
      const l = dv.largeSource;
      rows.push(row("3", "same site from a 4x source file: peak RSS", fmt.x(l.peakRssRatio), `source cells ${fmt.x(l.sourceCellsRatio)}, bytes ${fmt.x(l.sourceBytesRatio)}`, l.peakRssRatio, "~1x (<= 1.1x)", l.peakRssRatio <= 1.1));
      rows.push(row("3", "same site from a 4x source file: load CPU", fmt.x(l.loadStageCpuRatio), "", l.loadStageCpuRatio, "~1x"));
    }
  }

  // 4. Baseline and solver quality
  const q = s.quality;
  failed("4", "baseline and quality", q);
  if (q && !q.error) {
    const ca = q.constantAltitude;
    if (ca) {
      rows.push(row("4", "GSD spread p5-p95 (ours)", `${fmt.cm(ca.ours.gsdP5Cm)}-${fmt.cm(ca.ours.gsdP95Cm)} (${fmt.cm(ca.ours.spreadCm)})`, `constant altitude ${fmt.cm(ca.baseline.gsdP5Cm)}-${fmt.cm(ca.baseline.gsdP95Cm)} (${fmt.cm(ca.baseline.spreadCm)})`, ca.ratios.spreadOursOverBaseline, `band ${fmt.cm(ca.band.lowGsdCm)}-${fmt.cm(ca.band.highGsdCm)}`));
      rows.push(row("4", "site cells within the band", fmt.pct(ca.ours.withinBandPct), `constant altitude ${fmt.pct(ca.baseline.withinBandPct)}`, ca.ratios.withinBandOursOverBaseline));
      rows.push(row("4", "flagged area", `${fmt.m2(ca.ours.flaggedAreaM2)} (${fmt.pct(ca.ours.flaggedPct)})`, `constant altitude ${fmt.m2(ca.baseline.flaggedAreaM2)} (${fmt.pct(ca.baseline.flaggedPct)})`, ca.ratios.flaggedOursOverBaseline));
      rows.push(row("4", "area photographed above the ceiling", fmt.m2(ca.ours.ceilingBreachAreaM2), `constant altitude ${fmt.m2(ca.baseline.ceilingBreachAreaM2)}`, NaN, "0", ca.ours.ceilingBreachAreaM2 === 0));
    }
    const sq = q.solverQuality;
    if (sq) {
      rows.push(row("4", "relief over the band's height window", `${fmt.n(sq.reliefM, 1)} m`, `window ${fmt.n(sq.bandWindowM, 1)} m`, sq.reliefOverBandWindow, "several x", sq.reliefOverBandWindow >= 3));
      rows.push(row("4", "within band by the assessment (hilly site)", fmt.pct(sq.withinBandPct), "", NaN, ">= 95 %", sq.withinBandPct >= 95));
      rows.push(row("4", "strip waypoints vs naive (every 25 m)", fmt.n(sq.waypointsStrips), `naive ${fmt.n(sq.naiveWaypoints25m)}`, sq.oursOverNaive, "< 0.5x", sq.oursOverNaive < 0.5));
    }
    for (const t of q.toleranceSweep ?? []) {
      if (t.timedOut) rows.push(row("4", `${t.siteKm2 ?? "?"} km2 site at ${t.tolerancePct} %`, `timed out in ${t.stuckIn}`, "", NaN, "", false));
      else rows.push(row("4", `${fmt.n(t.siteKm2, 0)} km2 site at tolerance ${t.tolerancePct} %: waypoints per km`, fmt.n(t.waypointsPerKmStrip, 2), `within band ${fmt.pct(t.withinBandPct)}, solve CPU ${fmt.s(t.solveCpuS)}`, NaN));
    }
    const sb = q.solverBench;
    if (sb?.error) rows.push(row("4", "solver benchmark (solve.mjs)", `FAILED: ${sb.error.slice(0, 80)}`));
    else if (sb?.timedOut) rows.push(row("4", "solver benchmark (solve.mjs)", `timed out after ${sb.timeoutS} s (${fmt.s(sb.cpuS)} CPU)`, "", NaN, "< 2 s", false));
    else if (sb?.result) {
      for (const t of sb.result.byTolerance ?? []) {
        const cpu = Number.isFinite(t.cpuS) ? ` (${fmt.s(t.cpuS)} CPU)` : "";
        rows.push(row("4", `solve.mjs at ${t.tolerancePct} %: waypoints per km / solve time`, `${fmt.n(t.waypointsPerKmStrip, 1)} / ${fmt.s(t.solveS)}${cpu}`, `${fmt.n(sb.result.stripKm, 1)} km of strips`, NaN, "solve < 2 s", t.solveS < 2));
        if (t.naive) rows.push(row("4", "solve.mjs naive plan (25 m) waypoints", fmt.n(t.naive.waypoints), `ours ${fmt.n(t.waypointsStrips ?? t.waypoints)}`, (t.waypointsStrips ?? t.waypoints) / t.naive.waypoints, "< 0.5x", (t.waypointsStrips ?? t.waypoints) / t.naive.waypoints < 0.5));
      }
      for (const m of sb.result.memory ?? []) {
        // Field names as solve.mjs writes them (older versions: peakRssMB; newer: solvePeakOverBaseMB).
        const growth = m.solvePeakOverBaseMB;
        const txt = Number.isFinite(growth) ? `solve adds ${fmt.n(growth)} MB at peak` : `peak RSS ${fmt.n(m.peakRssMB)} MB`;
        rows.push(row("4", `solve.mjs memory: ${m.strips} strips (${fmt.n(m.stripKm, 1)} km)`, txt, `DEM alone ${fmt.n(m.rssAfterDemMB)} MB`, NaN, "linear in strip km"));
      }
    }
  }

  // 5. Assessment alone
  const a = s.assess;
  failed("5", "assessment", a);
  timedOut("5", "assessment", a);
  if (a && !a.error && !a.timedOut) {
    const r = a.result;
    const gdalS = d && !d.error ? d.gdal.wallS : NaN;
    rows.push(row("5", `assessment ${fmt.n(r.cells / 1e6)} M cells, ${fmt.n(r.exposures)} photos: time`, fmt.s(r.seconds), `GDAL read of the same-size window ${fmt.s(gdalS)}`, r.seconds / gdalS, "< 3 s", r.seconds < 3));
    if (Number.isFinite(r.cpuSeconds)) rows.push(row("5", "assessment CPU (all threads)", fmt.s(r.cpuSeconds), "", NaN, "", undefined));
    rows.push(row("5", "assessment process peak RSS", fmt.mb(a.peakRssBytes), `grid ${fmt.mb(r.cells * 4)}`, a.peakRssBytes / (r.cells * 4), "< 1 GB", a.peakRssBytes < GB));
    rows.push(row("5", "cells per second", fmt.n(r.cellsPerSecond), "", NaN));
    if (p && !p.error && !p.timedOut) rows.push(row("5", "assess stage inside the 4 km2 plan (wall / CPU)", `${fmt.s(p.stagesS.assess)} / ${fmt.s(p.stagesCpuS.assess)}`, "", NaN, "< 3 s", p.stagesS.assess < 3));
  }

  // 6. Tiles and COG over HTTP
  const mo = s.mosaic;
  failed("6", "DEM window from tiles / over HTTP", mo);
  if (mo && !mo.error) {
    const r = mo.ratios;
    rows.push(row("6", "DEM window 4000x4000 from 4 tiles, read", fmt.s(mo.fourTiles.readS), `one file ${fmt.s(mo.oneFile.readS)}; gdal_translate on the VRT ${fmt.s(mo.gdal.vrt.wallS)} (one file ${fmt.s(mo.gdal.oneFile.wallS)})`, r.tilesOverOneFile, "<= 1.2x", r.tilesOverOneFile <= 1.2));
    rows.push(row("6", "  the same, CPU (all threads)", fmt.s(mo.fourTiles.readCpuS), `one file ${fmt.s(mo.oneFile.readCpuS)}; gdal_translate on the VRT ${fmt.s(mo.gdal.vrt.cpuS)}`, r.tilesOverOneFileCpu, "<= 1.2x", r.tilesOverOneFileCpu <= 1.2));
    rows.push(row("6", "DEM window from a COG over loopback HTTP, read", fmt.s(mo.cogHttp.readS), `the COG from disk ${fmt.s(mo.cogDisk.readS)}`, r.httpOverDisk, "<= 2x", r.httpOverDisk <= 2));
    rows.push(row("6", "  the same, CPU of the reader", fmt.s(mo.cogHttp.readCpuS), `the COG from disk ${fmt.s(mo.cogDisk.readCpuS)}`, r.httpOverDiskCpu, "<= 2x", r.httpOverDiskCpu <= 2));
    rows.push(row("6", "  bytes fetched over HTTP per read", fmt.mb(mo.cogHttp.bytesFetchedPerRead), `window ${fmt.mb(4000 * 4000 * 4)} as Float32`, NaN));
  }

  // 7. Speed and scale targets
  const t = s.targets;
  failed("7", "speed and scale targets", t);
  if (t && !t.error) rows.push(...targetRows(t, row, fmt));
  return rows;
}
