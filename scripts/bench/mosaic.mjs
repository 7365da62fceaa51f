#!/usr/bin/env node
// Benchmark: the DEM-window benchmark's 2 km x 2 km window at 0.5 m (4000 x 4000 cells),
// read (1) from four tiles that split the 8000 x 8000 raster into quadrants (the window
// meets all four) against the same window from the one file, and (2) from a cloud-optimized
// GeoTIFF of that raster served over loopback HTTP (a local Range-capable server in its own
// process) against the same COG from disk. GDAL's `gdal_translate -projwin` of the window on
// the tiles' VRT (gdalbuildvrt) and on the one file is printed beside them.
// Targets (issue 13): tiles within 1.2x of the one file; HTTP within 2x of disk.
//
// Usage: npm run build && node scripts/bench/mosaic.mjs [--repeat N]
import { execFileSync, spawn, spawnSync } from "node:child_process";
import { existsSync, mkdirSync, renameSync } from "node:fs";
import { join, dirname } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { ensureBenchDem } from "./dem-window.mjs";
import { timedRun, best } from "./lib/proc.mjs";

const root = join(dirname(fileURLToPath(import.meta.url)), "..", "..");
const dist = process.env.GSDPLAN_DIST ?? join(root, "dist");
// The DEM-window benchmark's window (dem-window.mjs): the middle of the 4 km x 4 km raster.
const X0 = 500000, Y0 = 5204000;
const WIN = { west: X0 + 1000, north: Y0 - 1000, east: X0 + 3000, south: Y0 - 3000 };
const ENC = ["-co", "TILED=YES", "-co", "BLOCKXSIZE=256", "-co", "BLOCKYSIZE=256", "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=3"];

/** The four quadrant tiles, their VRT, and a COG of the whole raster (made once, reused). */
export function ensureMosaicDems() {
  const dem = ensureBenchDem();
  const dir = join(dirname(dem), "mosaic");
  const tiles = ["nw", "ne", "sw", "se"].map((q) => join(dir, `tile_${q}.tif`));
  const vrt = join(dir, "tiles.vrt");
  const cog = join(dirname(dem), "dem8000_cog.tif");
  if (!tiles.every(existsSync) || !existsSync(vrt)) {
    mkdirSync(dir, { recursive: true });
    [[0, 0], [4000, 0], [0, 4000], [4000, 4000]].forEach(([c, r], i) => {
      const tmp = tiles[i] + ".part.tif";
      execFileSync("gdal_translate", ["-q", ...ENC, "-srcwin", String(c), String(r), "4000", "4000", dem, tmp]);
      renameSync(tmp, tiles[i]);
    });
    execFileSync("gdalbuildvrt", ["-q", vrt, ...tiles]);
  }
  if (!existsSync(cog)) {
    const tmp = cog + ".part.tif";
    execFileSync("gdal_translate", ["-q", "-of", "COG", "-co", "BLOCKSIZE=256", "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=YES", "-co", "NUM_THREADS=2", dem, tmp]);
    renameSync(tmp, cog);
  }
  return { dem, tiles, vrt, cog };
}

// The child that reads the window; it times the read itself (no Node start-up or import).
const CHILD = `
const { openDem } = await import(${JSON.stringify(pathToFileURL(join(dist, "dem/source.js")).href)});
const { readWindow } = await import(${JSON.stringify(pathToFileURL(join(dist, "dem/window.js")).href)});
const spec = JSON.parse(process.argv[1]);
const t0 = performance.now();
const c0 = process.cpuUsage();
const dem = await openDem(spec);
const grid = await readWindow(dem, ${JSON.stringify(WIN)});
const t1 = performance.now();
const c = process.cpuUsage(c0);
await dem.close();
process.stdout.write(JSON.stringify({ readS: (t1 - t0) / 1000, readCpuS: (c.user + c.system) / 1e6, width: grid.width, height: grid.height }));
`;

// A Range-capable static server (RFC 9110 byte ranges), in its own process so that the
// timed children (run synchronously) never wait on this one. Prints its port.
const SERVER = `
const http = require("node:http"), fs = require("node:fs");
const file = process.argv[1];
const fd = fs.openSync(file, "r"), size = fs.fstatSync(fd).size;
let sent = 0;
const srv = http.createServer((req, res) => {
  if (req.url === "/bytes") return res.end(String(sent));
  const m = /^bytes=(\\d+)-(\\d*)$/.exec(req.headers.range || "");
  if (!m) { res.writeHead(416); return res.end(); }
  const a = Number(m[1]), b = Math.min(size - 1, m[2] === "" ? size - 1 : Number(m[2]));
  const buf = Buffer.alloc(b - a + 1);
  fs.readSync(fd, buf, 0, buf.length, a);
  sent += buf.length;
  res.writeHead(206, { "Content-Range": "bytes " + a + "-" + b + "/" + size, "Content-Length": buf.length, "Accept-Ranges": "bytes" });
  res.end(buf);
});
srv.listen(0, "127.0.0.1", () => process.stdout.write(String(srv.address().port) + "\\n"));
`;

function readOurs(spec, repeat) {
  const runs = [];
  for (let i = 0; i < repeat; i++) {
    const t = timedRun(process.execPath, ["--input-type=module", "-e", CHILD, JSON.stringify(spec)]);
    const j = JSON.parse(t.stdout);
    if (j.width !== 4000 || j.height !== 4000) throw new Error(`unexpected window ${j.width} x ${j.height} from ${JSON.stringify(spec).slice(0, 80)}`);
    runs.push({ readS: j.readS, readCpuS: j.readCpuS, wallS: t.seconds, cpuS: t.cpuS, peakRssBytes: t.peakRssBytes });
  }
  return { readS: best(runs, "readS"), readCpuS: best(runs, "readCpuS"), wallS: best(runs, "wallS"), cpuS: best(runs, "cpuS"), peakRssBytes: best(runs, "peakRssBytes") };
}

function readGdal(file, repeat) {
  const runs = [];
  for (let i = 0; i < repeat; i++) {
    // Output to GDAL's in-memory driver, so neither side pays for writing a file.
    const t = timedRun("gdal_translate", ["-q", "-of", "MEM", "-projwin", String(WIN.west), String(WIN.north), String(WIN.east), String(WIN.south), file, "mem"]);
    runs.push({ wallS: t.seconds, cpuS: t.cpuS });
  }
  return { wallS: best(runs, "wallS"), cpuS: best(runs, "cpuS") };
}

/** Starts the loopback server on `file`; resolves with its base URL and a stop function. */
function serve(file) {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ["-e", SERVER, file], { stdio: ["ignore", "pipe", "inherit"] });
    let out = "";
    child.stdout.on("data", (d) => {
      out += d;
      const m = /^(\d+)\n/.exec(out);
      if (m) resolve({ url: `http://127.0.0.1:${m[1]}/cog.tif`, base: `http://127.0.0.1:${m[1]}`, stop: () => child.kill() });
    });
    child.on("error", reject);
    child.on("exit", (code) => reject(new Error(`the loopback server stopped (${code})`)));
  });
}

/**
 * Runs the benchmark and returns its figures.
 * @param {{ repeat?: number }} [opts]
 */
export async function runMosaicBench(opts = {}) {
  const repeat = opts.repeat ?? 3;
  if (!existsSync(join(dist, "dem/window.js"))) throw new Error("build first: npm run build");
  const { dem, tiles, vrt, cog } = ensureMosaicDems();
  const one = readOurs(dem, repeat);
  const four = readOurs(tiles, repeat);
  const gdalOne = readGdal(dem, repeat);
  const gdalVrt = readGdal(vrt, repeat);
  const cogDisk = readOurs(cog, repeat);
  const srv = await serve(cog);
  let cogHttp, bytesFetched;
  try {
    // The synchronous children below block this process only; the server runs in its own.
    cogHttp = readOurs(srv.url, repeat);
    const r = spawnSync(process.execPath, ["-e", `fetch(${JSON.stringify(srv.base + "/bytes")}).then((r) => r.text()).then((t) => process.stdout.write(t))`], { encoding: "utf8" });
    bytesFetched = Number(r.stdout) / repeat;
  } finally {
    srv.stop();
  }
  const result = {
    bench: "mosaic",
    window: { cells: [4000, 4000], box: WIN },
    sources: { oneFile: dem, tiles, vrt, cog },
    oneFile: one,
    fourTiles: four,
    cogDisk,
    cogHttp: { ...cogHttp, bytesFetchedPerRead: bytesFetched },
    gdal: { oneFile: gdalOne, vrt: gdalVrt },
  };
  // Wall times on a shared machine include waiting for a core (the HTTP case runs two
  // processes); the CPU-time ratios beside them do not.
  result.ratios = {
    tilesOverOneFile: four.readS / one.readS,
    tilesOverOneFileCpu: four.readCpuS / one.readCpuS,
    httpOverDisk: cogHttp.readS / cogDisk.readS,
    httpOverDiskCpu: cogHttp.readCpuS / cogDisk.readCpuS,
    tilesOverGdalVrt: four.readS / gdalVrt.wallS,
  };
  result.targets = { tilesWithin1_2x: result.ratios.tilesOverOneFile <= 1.2, httpWithin2x: result.ratios.httpOverDisk <= 2 };
  return result;
}

if (import.meta.url === pathToFileURL(process.argv[1]).href) {
  const i = process.argv.indexOf("--repeat");
  const repeat = i > 0 ? Number(process.argv[i + 1]) : 3;
  runMosaicBench({ repeat })
    .then((r) => process.stdout.write(JSON.stringify(r, null, 2) + "\n"))
    .catch((e) => {
      process.stderr.write(`${e?.stack ?? e}\n`);
      process.exit(1);
    });
}
