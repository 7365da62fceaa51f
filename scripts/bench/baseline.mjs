// Benchmark: what terrain following buys, and the solver's quality figures.
// - The constant-altitude plan a user would otherwise fly (PlanRun.baseline: the same
//   strips at one altitude, target height over the site's median ground), assessed by the
//   same independent per-cell check as ours: GSD spread p5-p95, share within the band,
//   flagged area, ceiling breaches.
// - The solver's quality (issue 4): share of site cells within the band by the assessment
//   (target >= 95 %) on hilly ground whose relief is several times the band's height
//   window; waypoints against a naive plan with one every 25 m at the target height above
//   the ground below (target: fewer than half); waypoints per km of strip at tolerance
//   5, 10 and 20 %, from full plans of the 4 km2 site here and from the solver's own benchmark
//   (scripts/bench/solve.mjs benchSolve) on its synthetic terrain.
//
// Usage: npm run build && node scripts/bench/baseline.mjs   (prints one JSON object)
import { join, dirname } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { existsSync } from "node:fs";
import { benchPlan } from "./plan.mjs";
import { nodeJson } from "./lib/proc.mjs";

const here = dirname(fileURLToPath(import.meta.url));

/**
 * Quality figures from a measured 4 km2 plan (`plan`, from benchPlan) plus a tolerance
 * sweep on a `sweepKm2` site (`sweep10` is its 10 % case if already measured).
 * @example const q = benchQuality({ plan: benchPlan({ areaKm2: 4 }) }); q.constantAltitude.ours.withinBandPct
 */
export function benchQuality({ plan, sweep10, sweepKm2 = 4, timeoutS = 300, solverTimeoutS = 300, log = () => {} } = {}) {
  const out = {};
  if (plan && !plan.timedOut) {
    const p = plan.plan;
    const spread = (g) => g.p95 - g.p5;
    out.constantAltitude = {
      site: plan.label,
      ours: { gsdP5Cm: p.ours.gsdCm.p5, gsdP95Cm: p.ours.gsdCm.p95, spreadCm: spread(p.ours.gsdCm), withinBandPct: p.ours.withinBandPct, flaggedAreaM2: p.ours.flaggedAreaM2, flaggedPct: p.ours.flaggedPct, ceilingBreachAreaM2: p.ours.ceilingBreaches.areaM2, imagesMin: p.ours.images.min },
      baseline: { altitudeAmslM: p.baseline.altitudeAmslM, gsdP5Cm: p.baseline.gsdCm.p5, gsdP95Cm: p.baseline.gsdCm.p95, spreadCm: spread(p.baseline.gsdCm), withinBandPct: p.baseline.withinBandPct, flaggedAreaM2: p.baseline.flaggedAreaM2, flaggedPct: p.baseline.flaggedPct, ceilingBreachAreaM2: p.baseline.ceilingBreaches.areaM2, imagesMin: p.baseline.images.min },
      band: p.band,
    };
    out.constantAltitude.ratios = {
      spreadOursOverBaseline: out.constantAltitude.ours.spreadCm / out.constantAltitude.baseline.spreadCm,
      withinBandOursOverBaseline: p.ours.withinBandPct / p.baseline.withinBandPct,
      flaggedOursOverBaseline: p.baseline.flaggedAreaM2 > 0 ? p.ours.flaggedAreaM2 / p.baseline.flaggedAreaM2 : NaN,
    };
    out.solverQuality = {
      site: plan.label,
      reliefM: p.reliefM,
      bandWindowM: p.bandWindowM,
      reliefOverBandWindow: p.reliefOverBandWindow,
      withinBandPct: p.ours.withinBandPct,
      waypointsStrips: p.waypoints.strips,
      waypointsAll: p.waypoints.all,
      naiveWaypoints25m: p.waypoints.naive25m,
      oursOverNaive: p.waypoints.strips / p.waypoints.naive25m,
      stations: p.stations,
      targets: { withinBandPct: 95, oursOverNaive: 0.5 },
    };
  }

  // Tolerance sweep over full plans of one site (the same ground as the main plan).
  out.toleranceSweep = [5, 10, 20].map((tol) => {
    const r = tol === 10 && sweep10 ? sweep10 : (log(`quality: ${sweepKm2} km2 plan at ${tol} % tolerance`), benchPlan({ areaKm2: sweepKm2, overrides: { target: { tolerancePct: tol } }, timeoutS, gdalRepeat: 1 }));
    if (r.timedOut) return { tolerancePct: tol, siteKm2: sweepKm2, timedOut: true, stuckIn: r.stuckIn };
    return {
      tolerancePct: tol,
      siteKm2: r.siteKm2,
      stripKm: r.plan.stripKm,
      waypointsStrips: r.plan.waypoints.strips,
      waypointsPerKmStrip: r.plan.waypoints.perKmStrip,
      withinBandPct: r.plan.ours.withinBandPct,
      solveCpuS: r.stagesCpuS.solve,
    };
  });

  // The solver engineer's own benchmark, when present, in its own process.
  const solveScript = join(here, "solve.mjs");
  if (existsSync(solveScript)) {
    log("quality: the solver's benchmark (scripts/bench/solve.mjs)");
    try {
      const r = nodeJson(join(here, "lib", "callExport.mjs"), [solveScript, "benchSolve"], { timeoutS: solverTimeoutS });
      out.solverBench = r.json
        ? { wallS: r.seconds, cpuS: r.cpuS, peakRssBytes: r.peakRssBytes, result: r.json }
        : { timedOut: true, timeoutS: solverTimeoutS, cpuS: r.cpuS };
    } catch (e) {
      out.solverBench = { error: String(e.message).split("\n").slice(0, 3).join(" ") };
    }
  }
  return out;
}

if (process.argv[1] && pathToFileURL(process.argv[1]).href === import.meta.url) {
  const log = (m) => process.stderr.write(m + "\n");
  log("quality: 4 km2 plan");
  const plan = benchPlan({ areaKm2: 4, timeoutS: 900 });
  const r = benchQuality({ plan, sweep10: plan, log });
  process.stdout.write(JSON.stringify(r, null, 2) + "\n");
}
