// Benchmark: one plan end to end (load, layout, solve, assess, baseline, export, report)
// in its own Node process (planChild.mjs), run against the build (dist/). The child times every stage
// (PlanRun.timings, plus the output files it writes, grouped into export and report) and
// reports its peak resident memory (process.resourceUsage().maxRSS); the parent also
// measures the child's wall time and peak RSS with GNU time, and times
// `gdal_translate -projwin` of the very window the plan read, as the reference.
//
// Usage: npm run build && node scripts/bench/plan.mjs [--km2 4] [--large]
//   (prints one JSON object; `npm run bench` runs it as part of the full table)
import { mkdtempSync, rmSync, statSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, dirname } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { nodeJson, timedRun, best } from "./lib/proc.mjs";
import { writeCase } from "./lib/site.mjs";
import { demSmall, demLarge, rasterInfo } from "./lib/dems.mjs";

const here = fileURLToPath(import.meta.url);
/**
 * The child, a script of its own: it imports nothing but Node's modules and the build, so its
 * time is the plan's (this module's imports, proj4 among them, took ~0.05 s of a child's wall
 * and CPU that `gsdplan plan` does not spend).
 */
const childScript = join(dirname(here), "planChild.mjs");

/**
 * Plans one square site of `areaKm2` centred on (cx, cy) (UTM 33N metres; default the
 * centre of the 8000 x 8000 DEM) in a child process and returns its timings, peak memory, window size, quality figures and the GDAL reference.
 * @example const r = benchPlan({ areaKm2: 4 }); r.wallS, r.peakRssBytes, r.ratios.wallOverGdalRead
 */
export function benchPlan({ areaKm2 = 4, dem = demSmall(), cx, cy, gdalRepeat = 2, label, timeoutS = 300, overrides, aspect, rotateDeg } = {}) {
  const info = rasterInfo(dem);
  // Default: the middle of the 8000 x 8000 raster (which is also the middle of the large
  // raster's north-west copy, so both DEMs give the same ground).
  const small = rasterInfo(demSmall());
  const x = cx ?? small.x0 + (small.size[0] * small.dx) / 2;
  const y = cy ?? small.y0 + (small.size[1] * small.dy) / 2;
  const dir = mkdtempSync(join(tmpdir(), "gsdplan-bench-plan-"));
  const base = { label: label ?? `${areaKm2} km2`, areaKm2, dem: { file: dem, size: info.size, bytes: fileBytes(dem) } };
  try {
    const planFile = writeCase(dir, { dem, areaKm2, cx: x, cy: y, overrides, aspect, rotateDeg });
    const child = nodeJson(childScript, [planFile, join(dir, "out")], { timeoutS });
    if (!child.json) {
      // Timed out: say which stage it was in, from the child's progress lines.
      const marks = [...child.stderr.matchAll(/\[bench plan ([\d.]+) s\] (\w+)/g)].map((m) => ({ atS: Number(m[1]), stage: m[2] }));
      return { ...base, timedOut: true, timeoutS, wallS: child.seconds, cpuS: child.cpuS, peakRssBytes: child.peakRssBytes, stageStarts: marks, stuckIn: marks.at(-1)?.stage ?? "start-up" };
    }
    const c = child.json;
    // Reference: GDAL reads the same window (in the DEM's CRS, which is the plan's frame here).
    const w = c.window;
    const gdal = [];
    for (let i = 0; i < gdalRepeat; i++) {
      gdal.push(timedRun("gdal_translate", ["-q", "-of", "MEM", "-projwin", String(w.west), String(w.north), String(w.east), String(w.south), dem, join(dir, "gdal.mem")]));
    }
    const gdalS = best(gdal, "seconds");
    const stageSumS = Object.values(c.stagesS).reduce((a, b) => a + b, 0);
    const stageCpuSumS = Object.values(c.stagesCpuS).reduce((a, b) => a + b, 0);
    return {
      ...base,
      timedOut: false,
      siteKm2: c.siteKm2,
      window: c.window,
      // The process's times less the child's own figures after the plan (see child).
      wallS: child.seconds - (c.benchOwnS ?? 0),
      cpuS: child.cpuS - (c.benchOwnCpuS ?? 0),
      processWallS: child.seconds,
      inProcessS: c.inProcessS,
      importS: c.importS,
      stagesS: c.stagesS,
      stagesCpuS: c.stagesCpuS,
      stagesMainCpuS: c.stagesMainCpuS,
      stageSumS,
      stageCpuSumS,
      stageShares: Object.fromEntries(Object.entries(c.stagesS).map(([k, v]) => [k, v / stageSumS])),
      stageCpuShares: Object.fromEntries(Object.entries(c.stagesCpuS).map(([k, v]) => [k, v / stageCpuSumS])),
      filesS: c.filesS,
      peakRssBytes: child.peakRssBytes,
      childMaxRssBytes: c.maxRssBytes,
      maxRssAfterPlanBytes: c.maxRssAfterPlanBytes,
      gdalReadS: gdalS,
      gdalReadCpuS: best(gdal, "cpuS"),
      gdalPeakRssBytes: best(gdal, "peakRssBytes"),
      ratios: {
        wallOverGdalRead: child.seconds / gdalS,
        stageSumOverGdalRead: stageSumS / gdalS,
        cpuOverGdalReadCpu: child.cpuS / best(gdal, "cpuS"),
        peakRssOverWindowBytes: child.peakRssBytes / c.window.bytes,
      },
      plan: c.plan,
      targets: { wallS: 8, peakRssBytes: 1.5 * 2 ** 30 },
    };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

function fileBytes(f) {
  return statSync(f).size;
}

if (process.argv[1] && pathToFileURL(process.argv[1]).href === import.meta.url) {
  const args = process.argv.slice(2);
  const i = args.indexOf("--km2");
  const areaKm2 = i >= 0 ? Number(args[i + 1]) : 4;
  const r = benchPlan({ areaKm2, ...(args.includes("--large") ? { dem: demLarge() } : {}), timeoutS: 900 });
  process.stdout.write(JSON.stringify(r, null, 2) + "\n");
}
