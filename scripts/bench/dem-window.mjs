#!/usr/bin/env node
// Benchmark: windowed read of a 2 km x 2 km window at 0.5 m (4000 x 4000 cells) from a
// tiled, Deflate-compressed 8000 x 8000 Float32 GeoTIFF, with our loader (built dist/)
// beside GDAL's `gdal_translate -projwin` of the same window. Reports wall time and peak
// resident memory of each, in child processes, and their ratios.
// Targets (issue): time within 3x of GDAL; peak memory under 4x the window's bytes.
//
// Usage: npm run build && node scripts/bench/dem-window.mjs [--repeat N]
import { execFileSync, spawnSync } from "node:child_process";
import { existsSync, mkdirSync, rmSync } from "node:fs";
import { join, dirname } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..", "..");
const BENCH_DIR = "/tmp/gsdplan-bench";
const DEM = join(BENCH_DIR, "dem8000_f32_deflate.tif");
const X0 = 500000, Y0 = 5204000, CELL = 0.5, SIDE = 8000;
// The window: 2 km x 2 km in the middle of the 4 km x 4 km raster.
const WIN = { west: X0 + 1000, north: Y0 - 1000, east: X0 + 3000, south: Y0 - 3000 };

/** Makes the 8000 x 8000 test raster (smooth hills upsampled from the hilly fixture) if missing. */
export function ensureBenchDem() {
  if (existsSync(DEM)) return DEM;
  mkdirSync(BENCH_DIR, { recursive: true });
  execFileSync("gdal_translate", [
    "-q", "-outsize", String(SIDE), String(SIDE), "-r", "cubic", "-ot", "Float32",
    "-a_ullr", String(X0), String(Y0), String(X0 + SIDE * CELL), String(Y0 - SIDE * CELL),
    "-co", "TILED=YES", "-co", "BLOCKXSIZE=256", "-co", "BLOCKYSIZE=256", "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=3",
    join(root, "fixtures", "gdal", "hills_utm33_f32.tif"), DEM,
  ]);
  return DEM;
}

/** Runs a command under /usr/bin/time -v; returns wall seconds and peak RSS in bytes. */
function timed(cmd, args) {
  const r = spawnSync("/usr/bin/time", ["-v", cmd, ...args], { encoding: "utf8" });
  if (r.status !== 0) throw new Error(`${cmd} failed: ${r.stderr}`);
  const wall = /Elapsed \(wall clock\) time \(h:mm:ss or m:ss\): (?:(\d+):)?(\d+):([\d.]+)/.exec(r.stderr);
  const rss = /Maximum resident set size \(kbytes\): (\d+)/.exec(r.stderr);
  const seconds = wall ? Number(wall[1] ?? 0) * 3600 + Number(wall[2]) * 60 + Number(wall[3]) : NaN;
  return { seconds, peakRssBytes: rss ? Number(rss[1]) * 1024 : NaN, stdout: r.stdout };
}

// The child that reads the window with our loader; it reports its own timing of the read
// (excluding Node start-up) and its peak RSS.
const CHILD = `
const t0 = performance.now();
const { openDem } = await import(${JSON.stringify(pathToFileURL(join(root, "dist/dem/source.js")).href)});
const { readWindow } = await import(${JSON.stringify(pathToFileURL(join(root, "dist/dem/window.js")).href)});
const tImport = performance.now();
const dem = await openDem(process.argv[1]);
const grid = process.argv[2] === "read" ? await readWindow(dem, ${JSON.stringify(WIN)}) : null;
const t1 = performance.now();
await dem.close();
process.stdout.write(JSON.stringify({ readMs: t1 - tImport, totalMs: t1 - t0, width: grid?.width ?? 0, height: grid?.height ?? 0, maxRssBytes: process.resourceUsage().maxRSS * 1024 }));
`;

/**
 * Runs the benchmark and returns its figures (also printed as JSON when run directly).
 * @param {{ repeat?: number }} [opts]
 */
export function runDemWindowBench(opts = {}) {
  const repeat = opts.repeat ?? 3;
  if (!existsSync(join(root, "dist/dem/window.js"))) throw new Error("build first: npm run build");
  ensureBenchDem();
  const windowBytes = 4000 * 4000 * 4;

  // Baseline: Node plus our modules, file opened, nothing read.
  const base = JSON.parse(timed(process.execPath, ["--input-type=module", "-e", CHILD, DEM, "open"]).stdout);

  const ours = [];
  for (let i = 0; i < repeat; i++) {
    const t = timed(process.execPath, ["--input-type=module", "-e", CHILD, DEM, "read"]);
    const j = JSON.parse(t.stdout);
    if (j.width !== 4000 || j.height !== 4000) throw new Error(`unexpected window ${j.width} x ${j.height}`);
    ours.push({ wallS: t.seconds, readS: j.readMs / 1000, peakRssBytes: t.peakRssBytes });
  }
  const gdal = [];
  const out = join(BENCH_DIR, "gdal_window.tif");
  for (let i = 0; i < repeat; i++) {
    rmSync(out, { force: true });
    // Output to GDAL's in-memory driver, so neither side pays for writing a file.
    const t = timed("gdal_translate", ["-q", "-of", "MEM", "-projwin", String(WIN.west), String(WIN.north), String(WIN.east), String(WIN.south), DEM, out]);
    gdal.push({ wallS: t.seconds, peakRssBytes: t.peakRssBytes });
  }
  const best = (a, k) => Math.min(...a.map((x) => x[k]));
  const result = {
    bench: "dem-window",
    raster: { file: DEM, width: SIDE, height: SIDE, type: "Float32", tiling: "256x256", compression: "Deflate, predictor 3" },
    window: { cells: [4000, 4000], bytes: windowBytes },
    ours: {
      wallS: best(ours, "wallS"),
      readS: best(ours, "readS"),
      peakRssBytes: best(ours, "peakRssBytes"),
      baselineRssBytes: base.maxRssBytes,
      peakAboveBaselineBytes: best(ours, "peakRssBytes") - base.maxRssBytes,
    },
    gdal: { wallS: best(gdal, "wallS"), peakRssBytes: best(gdal, "peakRssBytes") },
  };
  result.ratios = {
    wallOursOverGdal: result.ours.wallS / result.gdal.wallS,
    readOursOverGdalWall: result.ours.readS / result.gdal.wallS,
    peakRssOverWindowBytes: result.ours.peakRssBytes / windowBytes,
    peakAboveBaselineOverWindowBytes: result.ours.peakAboveBaselineBytes / windowBytes,
  };
  result.targets = {
    timeWithin3xOfGdal: result.ratios.wallOursOverGdal <= 3,
    memoryUnder4xWindow: result.ratios.peakRssOverWindowBytes < 4,
  };
  return result;
}

if (import.meta.url === pathToFileURL(process.argv[1]).href) {
  const i = process.argv.indexOf("--repeat");
  const repeat = i > 0 ? Number(process.argv[i + 1]) : 3;
  process.stdout.write(JSON.stringify(runDemWindowBench({ repeat }), null, 2) + "\n");
}
