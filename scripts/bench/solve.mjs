// Benchmark of the altitude solver (issue 4): solve time and memory over a
// synthetic hilly 2 km x 2 km site on a 0.5 m DEM (16 M cells, ~95 km of
// strips), waypoints per km against tolerance, and quality against a naive
// plan (a waypoint every 25 m at the target height above the ground below).
// Runs from the build: `npx tsc -p tsconfig.build.json && node scripts/bench/solve.mjs`.
// Quality here is the solver's own station view (share of strip stations whose
// flown height lies inside the GSD band), not the independent per-cell
// assessment, which the assessment stage provides.
import { makeGrid, sampleBilinear } from "../../dist/dem/sample.js";
import { solvePlan, waypointBudget, gradientLimits } from "../../dist/solve/index.js";

/** Invented hilly terrain: relief ~140 m, several times the 20 m height window of a 10 % band at 100 m. */
function hills(x, y) {
  return 300 + 40 * Math.sin(x / 300) * Math.cos(y / 250) + 25 * Math.sin((x + 2 * y) / 200) + 8 * Math.cos((3 * x - y) / 150);
}

function layout(sizeM, spacingM, marginM) {
  const legs = [];
  const xs = [];
  for (let x = marginM; x <= sizeM - marginM; x += spacingM) xs.push(x);
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

function options(tol) {
  return {
    ceiling: { heightM: 120, reference: "ground" },
    takeoffGroundM: 300,
    clearance: { minM: 30, safetyRadiusM: 15, obstacleMarginM: 0 },
    aircraft: { type: "multirotor", speedMps: 10, transitSpeedMps: 12, minSpeedMps: 3, maxClimbMps: 3, maxDescentMps: 3 },
    band: { hMinM: 100 * (1 - tol), hMaxM: 100 * (1 + tol), hTargetM: 100 },
    zoneHalfAcrossM: 20,
    stationStepM: 0.5,
    onConflict: "skip",
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

/** The naive plan on the same strips: waypoints every 25 m at target AGL, judged on the same stations. */
function naive(grid, result, opts) {
  const { gMin, gMax } = gradientLimits(opts, "strip");
  let waypoints = 0, n = 0, inside = 0, steep = 0, segs = 0;
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
    for (let i = 1; i <= m; i++) { segs++; const g = (wz[i] - wz[i - 1]) / (ws[i] - ws[i - 1]); if (g > gMax || g < gMin) steep++; }
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
  return { waypoints, inBandShare: inside / n, segmentsOverGradientLimit: steep, segments: segs };
}

/** Runs the benchmark and returns its figures (for a later `npm run bench` runner). */
export async function benchSolve({ sizeM = 2000, cellM = 0.5, spacingM = 40 } = {}) {
  const w = Math.round(sizeM / cellM);
  const t0 = performance.now();
  const grid = makeGrid({ width: w, height: w, x0: 0, y0: sizeM, cellM, heights: hills });
  const demS = (performance.now() - t0) / 1000;
  const legs = layout(sizeM, spacingM, 40);
  const stripKm = legs.filter((l) => l.kind === "strip").reduce((a, l) => a + l.lengthM, 0) / 1000;
  const out = { dem: { cells: w * w, cellM, buildS: +demS.toFixed(2) }, stripKm: +stripKm.toFixed(1), byTolerance: [] };
  for (const tol of [0.05, 0.1, 0.2]) {
    const opts = options(tol);
    globalThis.gc?.();
    const rss0 = process.memoryUsage().rss;
    const t = performance.now();
    const r = solvePlan(grid, legs, opts);
    const solveS = (performance.now() - t) / 1000;
    const rss1 = process.memoryUsage().rss;
    const b = waypointBudget(r, 1e9);
    const row = {
      tolerancePct: tol * 100,
      solveS: +solveS.toFixed(2),
      rssGrowthMB: +((rss1 - rss0) / 1e6).toFixed(0),
      waypoints: b.waypoints,
      waypointsPerKmStrip: +b.perKmStrip.toFixed(1),
      inBandShareSolverView: +inBandShare(r).toFixed(4),
      counts: r.counts,
    };
    if (tol === 0.1) row.naive = naive(grid, r, opts);
    out.byTolerance.push(row);
  }
  out.note = "in-band shares are the solver's own station view (assessment stage not used); memory is process RSS growth during the solve";
  return out;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  benchSolve().then((r) => console.log(JSON.stringify(r, null, 2)));
}
