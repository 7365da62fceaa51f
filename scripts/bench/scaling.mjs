// Benchmark: how a plan's time and memory grow. The same plan (scripts/bench/plan.mjs) on
// square sites of 0.5, 1 and 4 km2 cut from the same 8000 x 8000 DEM: time per km2 should
// stay flat (time linear in site area) and peak memory should follow the DEM window the
// plan reads. One case is repeated from a source file four times the size (16000 x 16000,
// the same ground in its north-west quarter): its memory should not change, since only the
// window is decoded.
//
// Usage: npm run build && node scripts/bench/scaling.mjs   (prints one JSON object)
import { pathToFileURL } from "node:url";
import { benchPlan } from "./plan.mjs";
import { demLarge, demSmall } from "./lib/dems.mjs";

/**
 * Runs the scaling cases (reusing already measured ones from `reuse`, keyed by km2) and
 * derives the growth figures.
 * @example const s = benchScaling({ areasKm2: [0.5, 1, 4], largeKm2: 1 }); s.derived.cpuPerKm2LargestOverSmallest
 */
export function benchScaling({ areasKm2 = [0.5, 1, 4], largeKm2 = 1, reuse = {}, timeoutS = 300, log = () => {} } = {}) {
  const cases = areasKm2.map((a) => {
    if (reuse[a]) return reuse[a];
    log(`scaling: ${a} km2 from the 8000 x 8000 DEM`);
    return benchPlan({ areaKm2: a, dem: demSmall(), timeoutS });
  });
  log(`scaling: ${largeKm2} km2 from the 16000 x 16000 DEM`);
  const large = benchPlan({ areaKm2: largeKm2, dem: demLarge(), timeoutS, label: `${largeKm2} km2, 4x source` });
  const done = cases.filter((c) => !c.timedOut);
  const rows = cases.map((c) => row(c));
  const derived = {};
  if (done.length >= 2) {
    const lo = done[0], hi = done[done.length - 1];
    derived.areaRatio = hi.siteKm2 / lo.siteKm2;
    // Linear in area: time per km2 the same at both ends (ratio 1); the fixed cost of start-up
    // and of whole-window passes shows as a ratio below 1, anything super-linear above 1.
    derived.cpuPerKm2LargestOverSmallest = hi.cpuS / hi.siteKm2 / (lo.cpuS / lo.siteKm2);
    derived.wallPerKm2LargestOverSmallest = hi.wallS / hi.siteKm2 / (lo.wallS / lo.siteKm2);
    // Memory against the window: slope of peak RSS over window bytes between the two ends,
    // and the peak RSS per window byte at each end.
    derived.windowBytesRatio = hi.window.bytes / lo.window.bytes;
    derived.peakRssRatio = hi.peakRssBytes / lo.peakRssBytes;
    derived.rssBytesPerWindowByteSlope = (hi.peakRssBytes - lo.peakRssBytes) / (hi.window.bytes - lo.window.bytes);
    // Straight-line fits over all cases: CPU = fixed + perKm2 * area, and peak RSS =
    // fixed + perWindowByte * window bytes. Linear growth shows as small residuals (the
    // fixed part is start-up, module import and whole-window passes).
    derived.cpuFit = linearFit(done.map((c) => c.siteKm2), done.map((c) => c.cpuS));
    derived.wallFit = linearFit(done.map((c) => c.siteKm2), done.map((c) => c.wallS));
    derived.rssFit = linearFit(done.map((c) => c.window.bytes), done.map((c) => c.peakRssBytes));
    derived.solveCpuFit = linearFit(done.map((c) => c.siteKm2), done.map(solveCpuS));
    // Per-stage CPU per km2 at both ends: which stage grows faster than the area.
    derived.stageCpuPerKm2Ratio = Object.fromEntries(
      Object.keys(hi.stagesCpuS).map((k) => [k, hi.stagesCpuS[k] / hi.siteKm2 / (lo.stagesCpuS[k] / lo.siteKm2)]),
    );
  }
  const same = cases.find((c) => c.areaKm2 === largeKm2 && !c.timedOut);
  if (same && !large.timedOut) {
    derived.largeSource = {
      sourceBytesRatio: large.dem.bytes / same.dem.bytes,
      sourceCellsRatio: (large.dem.size[0] * large.dem.size[1]) / (same.dem.size[0] * same.dem.size[1]),
      windowBytesRatio: large.window.bytes / same.window.bytes,
      peakRssRatio: large.peakRssBytes / same.peakRssBytes,
      loadStageCpuRatio: large.stagesCpuS.load / same.stagesCpuS.load,
    };
  }
  return { cases: [...rows, row(large)], derived, full: [...cases, large] };
}

/**
 * The solve stage's own CPU seconds: the main thread's where measured. On large grids the
 * comparison's worker runs beside the solve, and V8's compiler threads serve both, so
 * all-threads CPU would count them; the 1 km2 point carries the solver's warm-up in the
 * interpreter (~0.08 s over a linear fit).
 * @example linearFit(cases.map((c) => c.siteKm2), cases.map(solveCpuS))
 */
export function solveCpuS(c) {
  return c.stagesMainCpuS?.solve ?? c.stagesCpuS.solve;
}

/**
 * Least-squares line y = a + b x with the largest residual relative to y.
 * @example linearFit([1, 2, 4], [3, 5, 9]) // { a: 1, b: 2, maxRelResidual: 0 }
 */
export function linearFit(xs, ys) {
  const n = xs.length;
  const mx = xs.reduce((p, v) => p + v, 0) / n, my = ys.reduce((p, v) => p + v, 0) / n;
  let sxy = 0, sxx = 0;
  for (let i = 0; i < n; i++) { sxy += (xs[i] - mx) * (ys[i] - my); sxx += (xs[i] - mx) ** 2; }
  const b = sxy / sxx, a = my - b * mx;
  const maxRelResidual = Math.max(...xs.map((x, i) => Math.abs(ys[i] - (a + b * x)) / Math.abs(ys[i])));
  return { a, b, maxRelResidual };
}

function row(c) {
  if (c.timedOut) return { label: c.label, timedOut: true, timeoutS: c.timeoutS, stuckIn: c.stuckIn, cpuS: c.cpuS };
  return {
    label: c.label,
    siteKm2: c.siteKm2,
    sourceCells: c.dem.size[0] * c.dem.size[1],
    sourceBytes: c.dem.bytes,
    windowCells: c.window.cells,
    windowBytes: c.window.bytes,
    wallS: c.wallS,
    cpuS: c.cpuS,
    wallSPerKm2: c.wallS / c.siteKm2,
    cpuSPerKm2: c.cpuS / c.siteKm2,
    peakRssBytes: c.peakRssBytes,
    peakRssOverWindowBytes: c.peakRssBytes / c.window.bytes,
    stagesCpuS: c.stagesCpuS,
    stagesMainCpuS: c.stagesMainCpuS,
  };
}

if (process.argv[1] && pathToFileURL(process.argv[1]).href === import.meta.url) {
  const r = benchScaling({ log: (m) => process.stderr.write(m + "\n") });
  process.stdout.write(JSON.stringify({ cases: r.cases, derived: r.derived }, null, 2) + "\n");
}
