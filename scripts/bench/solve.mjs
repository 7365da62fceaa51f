// Benchmark of the altitude solver (issue 4): solve time (wall and CPU, split into the
// corridor stage and the path stage), memory against strip length, waypoints per km against
// tolerance, the cost of the vertex lattice against every-station vertices, and quality
// against a naive plan (a waypoint every 25 m at the target height above the ground below),
// over an invented hilly 2 km x 2 km site on a 0.5 m DEM (16 M cells, ~94 km of strips).
// Runs from the build: `npm run build && node --expose-gc scripts/bench/solve.mjs`.
// Quality here is the solver's own station view (share of strip stations whose flown height
// lies inside the GSD band), not the independent per-cell assessment, which the assessment
// stage provides. On a shared machine wall time includes waiting for a core: CPU time
// (user + system) is printed beside it, with the load average.
import { execFileSync } from "node:child_process";
import { Worker } from "node:worker_threads";
import { loadavg } from "node:os";
import { fileURLToPath } from "node:url";
import { makeGrid, sampleBilinear } from "../../dist/dem/sample.js";
import { solvePlan, waypointBudget, gradientLimits, corridorAlong } from "../../dist/solve/index.js";
import { stationsAlongLeg } from "../../dist/solve/stations.js";

const self = fileURLToPath(import.meta.url);

/**
 * Invented hilly terrain: rolling hills (~140 m of relief) plus two escarpments that cross
 * the strips (35 m over ~30 m and 25 m over ~20 m of ground, slopes up to ~1.2 and ~1.3),
 * so the relief is about ten times the 20 m height window of a 10 % band at 100 m and the
 * steepest ground is beyond what the aircraft can climb even slowed to its minimum speed.
 */
function terrain(x, y) {
  return (
    300 +
    40 * Math.sin(x / 300) * Math.cos(y / 250) +
    25 * Math.sin((x + 2 * y) / 200) +
    8 * Math.cos((3 * x - y) / 150) +
    35 * Math.tanh((y - 800 - 120 * Math.sin(x / 180)) / 15) -
    25 * Math.tanh((y - 1400 + 0.3 * (x - 1000)) / 10)
  );
}

function layout(sizeM, spacingM, marginM, maxStrips = Infinity) {
  const legs = [];
  const xs = [];
  for (let x = marginM; x <= sizeM - marginM && xs.length < maxStrips; x += spacingM) xs.push(x);
  let prev = [xs[0], marginM - 10];
  xs.forEach((x, i) => {
    const up = i % 2 === 0;
    const from = [x, up ? marginM : sizeM - marginM];
    const to = [x, up ? sizeM - marginM : marginM];
    legs.push({ kind: "transit", strip: i + 1, from: prev, to: from, lengthM: Math.hypot(from[0] - prev[0], from[1] - prev[1]) });
    legs.push({ kind: "strip", strip: i + 1, from, to, lengthM: Math.abs(to[1] - from[1]) });
    prev = to;
  });
  return legs;
}

function options(tol, cellM, over = {}) {
  return {
    ceiling: { heightM: 120, reference: "ground" },
    takeoffGroundM: 300,
    clearance: { minM: 30, safetyRadiusM: 15, obstacleMarginM: 0 },
    aircraft: { type: "multirotor", speedMps: 10, transitSpeedMps: 12, minSpeedMps: 3, maxClimbMps: 3, maxDescentMps: 3 },
    band: { hMinM: 100 * (1 - tol), hMaxM: 100 * (1 + tol), hTargetM: 100 },
    zoneHalfAcrossM: 20,
    stationStepM: cellM,
    onConflict: "skip",
    ...over,
  };
}

function inBandShare(result) {
  let n = 0, inside = 0;
  for (const leg of result.legs) {
    if (leg.kind !== "strip") continue;
    const p = leg.profile;
    for (let k = 0; k < p.s.length; k++) {
      n++;
      const lo = Math.min(p.bandLowM[k], p.bandHighM[k]), hi = Math.max(p.bandLowM[k], p.bandHighM[k]);
      if (p.altitudeM[k] >= lo - 1e-6 && p.altitudeM[k] <= hi + 1e-6) inside++;
    }
  }
  return inside / n;
}

/**
 * The naive plan on the same strips: waypoints every 25 m at target AGL, judged on the same
 * stations. Its legs are flown at the photo speed (it has no notion of slowing down), so a
 * segment breaks the climb or descent rate when |gradient| x speed exceeds it; the count of
 * segments beyond the solver's own gradient limit (slowing to the minimum speed) is given too.
 */
function naive(grid, result, opts) {
  const { gMin, gMax } = gradientLimits(opts, "strip");
  const a = opts.aircraft;
  let waypoints = 0, n = 0, inside = 0, steep = 0, overRate = 0, segs = 0;
  for (const leg of result.legs) {
    if (leg.kind !== "strip") continue;
    const p = leg.profile;
    const L = p.s[p.s.length - 1];
    const m = Math.max(1, Math.round(L / 25));
    const ws = new Float64Array(m + 1), wx = new Float64Array(m + 1), wy = new Float64Array(m + 1);
    const ux = (p.x[p.x.length - 1] - p.x[0]) / L, uy = (p.y[p.y.length - 1] - p.y[0]) / L;
    for (let i = 0; i <= m; i++) { ws[i] = (L * i) / m; wx[i] = p.x[0] + ux * ws[i]; wy[i] = p.y[0] + uy * ws[i]; }
    const wz = sampleBilinear(grid, wx, wy);
    for (let i = 0; i <= m; i++) wz[i] += opts.band.hTargetM;
    for (let i = 1; i <= m; i++) {
      segs++;
      const g = (wz[i] - wz[i - 1]) / (ws[i] - ws[i - 1]);
      if (g > gMax || g < gMin) steep++;
      if (g * a.speedMps > a.maxClimbMps || -g * a.speedMps > a.maxDescentMps) overRate++;
    }
    waypoints += m + 1;
    let seg = 0;
    for (let k = 0; k < p.s.length; k++) {
      while (seg < m - 1 && p.s[k] > ws[seg + 1]) seg++;
      const t = (p.s[k] - ws[seg]) / (ws[seg + 1] - ws[seg]);
      const z = wz[seg] + t * (wz[seg + 1] - wz[seg]);
      const lo = Math.min(p.bandLowM[k], p.bandHighM[k]), hi = Math.max(p.bandLowM[k], p.bandHighM[k]);
      n++;
      if (z >= lo - 1e-6 && z <= hi + 1e-6) inside++;
    }
  }
  return { waypoints, inBandShare: +(inside / n).toFixed(4), segments: segs, segmentsOverClimbRateAtPhotoSpeed: overRate, segmentsOverGradientLimit: steep };
}

function stripWaypoints(r) {
  return r.legs.filter((l) => l.kind === "strip").reduce((s, l) => s + l.waypoints.length, 0);
}

function cpuSince(c0) {
  const c = process.cpuUsage(c0);
  return (c.user + c.system) / 1e6;
}

/** The corridor stage alone over every leg (stations, clearance disc, ceiling, zone band). */
function corridorPass(grid, legs, opts) {
  const c0 = process.cpuUsage();
  for (const leg of legs) corridorAlong(grid, stationsAlongLeg(leg, opts.stationStepM, opts.zoneHalfAcrossM), opts, { band: leg.kind === "strip" });
  return cpuSince(c0);
}

/** One solve in a fresh process: its peak RSS over the DEM it was handed, for a given number of strips. */
async function child({ sizeM, cellM, spacingM, strips }) {
  const w = Math.round(sizeM / cellM);
  const grid = makeGrid({ width: w, height: w, x0: 0, y0: sizeM, cellM, heights: terrain });
  const legs = layout(sizeM, spacingM, 40, strips);
  globalThis.gc?.();
  const rssDem = process.memoryUsage().rss;
  const peakDem = process.resourceUsage().maxRSS * 1024;
  // The solve is synchronous: a worker thread samples the process RSS every 2 ms meanwhile.
  const shared = new Float64Array(new SharedArrayBuffer(16));
  const sampler = new Worker(
    `const { workerData: b } = require("node:worker_threads"); const a = new Float64Array(b);
     const t = setInterval(() => { const r = process.memoryUsage.rss(); if (r > a[0]) a[0] = r; if (a[1]) clearInterval(t); }, 2);`,
    { eval: true, workerData: shared.buffer },
  );
  await new Promise((ok) => sampler.once("online", ok));
  await new Promise((ok) => setTimeout(ok, 20));
  const rssBase = Math.max(rssDem, shared[0]);
  const r = solvePlan(grid, legs, options(0.1, cellM));
  await new Promise((ok) => setTimeout(ok, 10));
  shared[1] = 1;
  const peak = shared[0];
  await sampler.terminate();
  const stripKm = legs.filter((l) => l.kind === "strip").reduce((a, l) => a + l.lengthM, 0) / 1000;
  return {
    strips: legs.length / 2,
    stripKm: +stripKm.toFixed(1),
    waypoints: stripWaypoints(r),
    rssAfterDemMB: +(rssDem / 1e6).toFixed(0),
    peakRssBeforeSolveMB: +(peakDem / 1e6).toFixed(0),
    rssPeakDuringSolveMB: +(peak / 1e6).toFixed(0),
    solvePeakOverBaseMB: +((peak - rssBase) / 1e6).toFixed(0),
  };
}

/** Runs the benchmark and returns its figures (for `npm run bench`, scripts/bench/run.mjs). */
export async function benchSolve({ sizeM = 2000, cellM = 0.5, spacingM = 40, tolerances = [0.05, 0.1, 0.2], memoryStrips = [6, 24, 47], latticeStrips = 8, log = (m) => process.stderr.write(m + "\n") } = {}) {
  const w = Math.round(sizeM / cellM);
  const t0 = performance.now();
  const grid = makeGrid({ width: w, height: w, x0: 0, y0: sizeM, cellM, heights: terrain });
  const demS = (performance.now() - t0) / 1000;
  const legs = layout(sizeM, spacingM, 40);
  const stripKm = legs.filter((l) => l.kind === "strip").reduce((a, l) => a + l.lengthM, 0) / 1000;
  let lo = Infinity, hi = -Infinity;
  for (let i = 0; i < grid.heights.length; i++) { const z = grid.heights[i]; if (z < lo) lo = z; if (z > hi) hi = z; }
  const out = {
    dem: { cells: w * w, cellM, buildS: +demS.toFixed(2), reliefM: +(hi - lo).toFixed(0) },
    stripKm: +stripKm.toFixed(1),
    loadAverage1m: +loadavg()[0].toFixed(2),
    byTolerance: [],
  };
  for (const tol of tolerances) {
    const opts = options(tol, cellM);
    log(`solve: ${tol * 100} % tolerance`);
    globalThis.gc?.();
    const rss0 = process.memoryUsage().rss;
    const c0 = process.cpuUsage();
    const t = performance.now();
    const r = solvePlan(grid, legs, opts);
    const solveS = (performance.now() - t) / 1000;
    const cpuS = cpuSince(c0);
    const rss1 = process.memoryUsage().rss;
    const corridorS = corridorPass(grid, legs, opts);
    const b = waypointBudget(r, 1e9);
    const row = {
      tolerancePct: tol * 100,
      solveS: +solveS.toFixed(2),
      cpuS: +cpuS.toFixed(2),
      stagesCpuS: { corridor: +corridorS.toFixed(2), pathAndAssembly: +Math.max(0, cpuS - corridorS).toFixed(2) },
      rssGrowthMB: +((rss1 - rss0) / 1e6).toFixed(0),
      waypoints: b.waypoints,
      waypointsStrips: stripWaypoints(r),
      waypointsPerKmStrip: +b.perKmStrip.toFixed(1),
      inBandShareSolverView: +inBandShare(r).toFixed(4),
      counts: r.counts,
    };
    if (tol === 0.1) row.naive = naive(grid, r, opts);
    out.byTolerance.push(row);
  }

  // The vertex lattice (default 5 m) against vertices at every station, on the first strips.
  if (latticeStrips > 0) {
    const sub = layout(sizeM, spacingM, 40, latticeStrips);
    const rows = [];
    for (const tol of tolerances) {
      log(`lattice check: ${tol * 100} %, ${latticeStrips} strips, every-station vertices`);
      let c0 = process.cpuUsage();
      const lat = solvePlan(grid, sub, options(tol, cellM));
      const latCpu = cpuSince(c0);
      c0 = process.cpuUsage();
      const all = solvePlan(grid, sub, options(tol, cellM, { vertexStepM: cellM }));
      const allCpu = cpuSince(c0);
      rows.push({ tolerancePct: tol * 100, waypointsLattice: stripWaypoints(lat), waypointsEveryStation: stripWaypoints(all), cpuSLattice: +latCpu.toFixed(2), cpuSEveryStation: +allCpu.toFixed(2) });
    }
    out.latticeCheck = { strips: latticeStrips, rows };
  }

  // Peak memory against strip length, each solve in its own process on the same DEM.
  if (memoryStrips.length) {
    out.memory = [];
    for (const strips of memoryStrips) {
      log(`memory: ${strips} strips in a child process`);
      const txt = execFileSync(process.execPath, ["--expose-gc", self, "--child", JSON.stringify({ sizeM, cellM, spacingM, strips })], { encoding: "utf8", maxBuffer: 1 << 20 });
      out.memory.push(JSON.parse(txt.trim().split("\n").pop()));
    }
  }
  out.note =
    "in-band shares are the solver's own station view (assessment stage not used); cpuS is user + system time of the solve; " +
    "stagesCpuS.corridor is a separate pass of the corridor stage, pathAndAssembly the rest of the solve; " +
    "memory rows: a fresh process per row solving that many strips over the same DEM; solvePeakOverBaseMB is the RSS peak during the solve (sampled every 2 ms by a worker thread) over the RSS with the DEM loaded";
  return out;
}

if (process.argv[1] === self) {
  if (process.argv[2] === "--child") {
    child(JSON.parse(process.argv[3])).then((r) => process.stdout.write(JSON.stringify(r) + "\n"));
  } else {
    benchSolve().then((r) => console.log(JSON.stringify(r, null, 2)));
  }
}
