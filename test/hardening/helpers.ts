/**
 * Shared tools of the hardening suite: hostile inputs are generated into a temp
 * folder inside each test (GDAL writes the DEMs from raw Float32 through a VRT, so
 * the files come from an outside writer), then fed to the built CLI and to the
 * library. Each hostile case must give one clear error line, exit code 2 and no
 * output files (issue 8, "Hardening").
 */
import { execFile, execFileSync, spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readdirSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import proj4 from "proj4";
import { expect } from "vitest";
import { InputError, InputFileError } from "../../src/errors.js";
import { openDem } from "../../src/dem/source.js";
import { readWindow } from "../../src/dem/window.js";
import { loadPlanFile, resolvePlanOptions } from "../../src/plan/options.js";
import { planMission } from "../../src/plan/plan.js";

export const CLI = path.resolve("dist/bundle/main.js");

/** Builds the CLI once when dist/ is missing (vitest runs from the repository root). */
export function ensureBuilt(): void {
  if (!existsSync(CLI)) execFileSync("npm", ["run", "build"], { stdio: "ignore" });
}

/** A fresh temp folder for one test. */
export function tempDir(tag: string): string {
  return mkdtempSync(path.join(tmpdir(), `gsdplan-hard-${tag}-`));
}

export interface CliResult {
  code: number | null;
  out: string;
  err: string;
}

/** Runs the built CLI as a user would. */
export function cli(args: string[], cwd?: string): CliResult {
  const r = spawnSync(process.execPath, [CLI, ...args], { encoding: "utf8", cwd, timeout: 120_000 });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

/** The same, without blocking: lets a test run its CLI calls side by side. */
export function cliAsync(args: string[], cwd?: string): Promise<CliResult> {
  return new Promise((resolve) => {
    execFile(process.execPath, [CLI, ...args], { encoding: "utf8", cwd, timeout: 120_000 }, (err, stdout, stderr) => {
      const code = err ? (typeof (err as { code?: unknown }).code === "number" ? ((err as { code: number }).code) : null) : 0;
      resolve({ code, out: stdout, err: stderr });
    });
  });
}

/** The CLI contract for bad input: exactly one `gsdplan: ...` line on stderr, exit 2, no stack trace. */
export function expectOneLineError(r: CliResult, pattern?: RegExp): string {
  expect(r.code, `stderr: ${r.err}`).toBe(2);
  const lines = r.err.trimEnd().split("\n");
  expect(lines, r.err).toHaveLength(1);
  expect(lines[0]).toMatch(/^gsdplan: \S/);
  expect(r.err).not.toMatch(/\n\s+at |internal error/);
  if (pattern) expect(lines[0]).toMatch(pattern);
  return lines[0];
}

/** Nothing written: the out folder is absent or holds nothing (not even a hidden temp folder). */
export function expectNothingWritten(outDir: string): void {
  if (!existsSync(outDir)) return;
  expect(readdirSync(outDir)).toEqual([]);
}

/** Awaits `fn` and returns the user error it throws; fails on success or on any other error. */
export async function userErrorOf(fn: () => unknown): Promise<InputError | InputFileError> {
  let result: unknown;
  try {
    result = await fn();
  } catch (e) {
    if (e instanceof InputError || e instanceof InputFileError) {
      // One line, like the CLI prints it (PlanOptionsError may hold one line per problem).
      return e;
    }
    throw e;
  }
  throw new Error(`expected an InputError or InputFileError, got a result: ${String(result).slice(0, 80)}`);
}

export interface RasterSpec {
  width: number;
  height: number;
  /** Top-left corner and cell size in CRS units (dy < 0 for north-up). */
  x0: number;
  y0: number;
  dx: number;
  dy: number;
  /** Anything gdal_translate -a_srs takes, e.g. "EPSG:32633". */
  srs: string;
  heights: Float32Array;
  nodata?: number;
  /** GeoTIFF creation options beyond the defaults (tiled 256, Deflate). */
  creation?: string[];
}

/**
 * Writes a Float32 DEM as GeoTIFF with GDAL (Debian gdal-bin): the cells go to a raw
 * little-endian file described by a VRT (GDAL's raw raster band), and gdal_translate
 * turns that into the GeoTIFF, so the file is GDAL's own work, not ours.
 */
export function writeDemWithGdal(file: string, r: RasterSpec): string {
  const raw = `${file}.f32`;
  const bytes = new Uint8Array(r.heights.buffer, r.heights.byteOffset, r.heights.byteLength);
  writeFileSync(raw, bytes);
  const vrt = `${file}.vrt`;
  writeFileSync(
    vrt,
    `<VRTDataset rasterXSize="${r.width}" rasterYSize="${r.height}">
  <GeoTransform>${r.x0}, ${r.dx}, 0, ${r.y0}, 0, ${r.dy}</GeoTransform>
  <VRTRasterBand dataType="Float32" band="1" subClass="VRTRawRasterBand">
    ${r.nodata !== undefined ? `<NoDataValue>${r.nodata}</NoDataValue>` : ""}
    <SourceFilename relativeToVRT="1">${path.basename(raw)}</SourceFilename>
    <ImageOffset>0</ImageOffset><PixelOffset>4</PixelOffset><LineOffset>${4 * r.width}</LineOffset>
    <ByteOrder>LSB</ByteOrder>
  </VRTRasterBand>
</VRTDataset>
`,
  );
  const co = r.creation ?? ["TILED=YES", "BLOCKXSIZE=256", "BLOCKYSIZE=256", "COMPRESS=DEFLATE"];
  execFileSync("gdal_translate", ["-q", "-a_srs", r.srs, ...co.flatMap((c) => ["-co", c]), vrt, file], {
    env: { ...process.env, GDAL_PAM_ENABLED: "NO" },
  });
  return file;
}

/** Projects a local box of a projected CRS to a WGS84 ring (counter-clockwise, closed), via proj4. */
export function lonLatRing(srsProj4: string, x0: number, y0: number, x1: number, y1: number): number[][] {
  const p = proj4(srsProj4, "WGS84");
  return [[x0, y0], [x1, y0], [x1, y1], [x0, y1], [x0, y0]].map(([x, y]) => p.forward([x, y]));
}

/** A GeoJSON Polygon feature around one ring of [lon, lat]. */
export function siteGeoJson(ring: number[][], name = "hardening site"): string {
  return JSON.stringify({
    type: "FeatureCollection",
    features: [{ type: "Feature", properties: { name }, geometry: { type: "Polygon", coordinates: [ring] } }],
  });
}

/**
 * A plan file's content with a generic 20 MP 1-inch camera (13.2 x 8.8 mm sensor,
 * 5472 x 3648 px, 8.8 mm lens: sizes only, no brand) at 3 cm/px.
 */
export function basePlan(dem: string, area: string): Record<string, unknown> {
  return {
    dem,
    area,
    camera: { sensorWidthMm: 13.2, sensorHeightMm: 8.8, focalLengthMm: 8.8, imageWidthPx: 5472, imageHeightPx: 3648 },
    target: { gsdCm: 3 },
    ceiling: { heightM: 150, reference: "ground" },
    aircraft: { type: "multirotor", speedMps: 10, maxClimbMps: 3, maxDescentMps: 2, enduranceMin: 25 },
  };
}

/** UTM zone 33N (EPSG:32633) as proj4 text, from memory of the EPSG definition. */
export const UTM33 = "+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs";

export interface SmallScenario {
  dir: string;
  dem: string;
  area: string;
  planFile: string;
  plan: Record<string, unknown>;
}

/**
 * A small scenario (UTM 33N unless told): a `cells` x `cells` DEM at `cellM` metres
 * around the centre (default 500000, 5200000) with heights from `heightAt(x, y)` in
 * CRS coordinates, a square site of `siteM` metres in the
 * middle and a plan file (JSON) pointing at both.
 */
export function smallScenario(
  dir: string,
  heightAt: (x: number, y: number) => number,
  opts: {
    cells?: number; cellM?: number; siteM?: number; nodata?: number; plan?: (p: Record<string, unknown>) => void;
    /** Projected CRS of the DEM (default EPSG:32633) as GDAL -a_srs text and as proj4 text, and the site centre in it. */
    srs?: string; proj4?: string; centre?: [number, number];
  } = {},
): SmallScenario {
  const cells = opts.cells ?? 200;
  const cellM = opts.cellM ?? 4;
  const siteM = opts.siteM ?? 240;
  const [cx, cy] = opts.centre ?? [500000, 5200000];
  const x0 = cx - (cells * cellM) / 2;
  const y0 = cy + (cells * cellM) / 2;
  const heights = new Float32Array(cells * cells);
  for (let r = 0; r < cells; r++)
    for (let c = 0; c < cells; c++) heights[r * cells + c] = heightAt(x0 + (c + 0.5) * cellM, y0 - (r + 0.5) * cellM);
  const dem = writeDemWithGdal(path.join(dir, "dem.tif"), {
    width: cells, height: cells, x0, y0, dx: cellM, dy: -cellM, srs: opts.srs ?? "EPSG:32633", heights,
    ...(opts.nodata !== undefined ? { nodata: opts.nodata } : {}),
  });
  const h = siteM / 2;
  const area = path.join(dir, "site.geojson");
  writeFileSync(area, siteGeoJson(lonLatRing(opts.proj4 ?? UTM33, cx - h, cy - h, cx + h, cy + h)));
  const plan = basePlan("dem.tif", "site.geojson");
  opts.plan?.(plan);
  const planFile = path.join(dir, "plan.json");
  writeFileSync(planFile, JSON.stringify(plan, null, 2));
  return { dir, dem, area, planFile, plan };
}

/** Plans through the library exactly as the CLI does, from the plan file. */
export async function planFromFile(planFile: string) {
  const f = await loadPlanFile(planFile);
  return planMission(resolvePlanOptions(f.data, {}, f.dir));
}

/** Reads the whole raster through the library (openDem + readWindow). */
export async function readWholeDem(dem: string) {
  const src = await openDem(dem);
  try {
    const b = src.transform;
    return await readWindow(src, { west: b.x0, north: b.y0, east: b.x0 + src.width * b.dx, south: b.y0 + src.height * b.dy });
  } finally {
    await src.close();
  }
}

/**
 * A hostile DEM must be refused the same way by `gsdplan plan` (one line, exit 2,
 * nothing in --out), by planMission, and (unless `inspect: false`) by `gsdplan
 * inspect` and openDem + readWindow. The CLI calls run side by side.
 */
export async function expectRefusedEverywhere(planFile: string, dem: string, pattern: RegExp, opts: { inspect?: boolean } = {}): Promise<void> {
  const out = path.join(path.dirname(planFile), "out");
  const inspect = opts.inspect !== false;
  const [r, ri] = await Promise.all([cliAsync(["plan", planFile, "--out", out, "--quiet"]), inspect ? cliAsync(["inspect", dem]) : null]);
  expectOneLineError(r, pattern);
  expect(r.out).toBe("");
  expectNothingWritten(out);
  const e = await userErrorOf(() => planFromFile(planFile));
  expect(e.message.split("\n")).toHaveLength(1);
  expect(e.message).toMatch(pattern);
  if (ri) {
    expectOneLineError(ri, pattern);
    const e2 = await userErrorOf(() => readWholeDem(dem));
    expect(e2.message).toMatch(pattern);
  }
}
