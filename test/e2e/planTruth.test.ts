/**
 * Plan truth on GDAL-written fixtures (fixtures/truth, scripts/make-truth-fixtures.mjs): the
 * ground the plan uses is the DEM's own bilinear surface, on geographic DEMs (1" and 3" cells,
 * steep ridges) as on projected ones, and the assessment's figures agree with an independent
 * computation on the DEM's own cells.
 *
 * References: GDAL reads the DEM's cell values (`gdallocationinfo`) and the textbook bilinear
 * weights between cell centres give the ground (GDAL's bilinear convention; GDAL 3.6 has no
 * `-r bilinear` in gdallocationinfo), GDAL reads the written rasters (`gdal_translate -of XYZ`),
 * and the pinhole relation GSD = H p / f (any photogrammetry text) gives each cell's GSD from
 * the flown path in waypoints.csv alone.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
import path from "node:path";
import { parse as parseYaml } from "yaml";
import { booleanPointInPolygon } from "@turf/turf";
import type { Feature, Polygon } from "geojson";
import { HAS_GDAL } from "../helpers/tools.js";
import { ROOT, runCli, tempDir, parseCsv } from "./cli.js";
import { gdalBilinearM, gdalinfoJson, cs2csFromWgs84 } from "./reference.js";
import { loadPlanFile, resolvePlanOptions } from "../../src/plan/options.js";
import { prepareMission } from "../../src/plan/plan.js";
import { sampleBilinear } from "../../src/dem/sample.js";

interface Case {
  name: string;
  demEpsg: number;
}

const CASES: Case[] = [
  { name: "ridges_geo3s", demEpsg: 4326 },
  { name: "ridges_geo1s", demEpsg: 4326 },
  { name: "gorge_utm", demEpsg: 32632 },
];

const dir = (c: Case) => path.join(ROOT, "fixtures", "truth");
const demFile = (c: Case) => path.join(dir(c), `${c.name}.tif`);
const planFile = (c: Case) => path.join(dir(c), `${c.name}-plan.yaml`);

/** DEM-CRS coordinates of WGS84 points (PROJ's cs2cs; identity for EPSG:4326). */
function toDem(c: Case, lonLats: [number, number][]): [number, number][] {
  return c.demEpsg === 4326 ? lonLats : cs2csFromWgs84(c.demEpsg, lonLats);
}

/** A raster read by GDAL as [x, y, value] rows (cell centres in the raster's CRS). */
function gdalXyz(file: string): [number, number, number][] {
  const out = execFileSync("gdal_translate", ["-q", "-of", "XYZ", file, "/vsistdout/"], { encoding: "utf8", maxBuffer: 1 << 28 });
  return out.trim().split("\n").map((l) => l.trim().split(/\s+/).map(Number) as [number, number, number]);
}

function median(v: number[]): number {
  const s = [...v].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
}

describe.skipIf(!HAS_GDAL).each(CASES)("plan truth on $name", (c) => {
  let out: string;
  let rows: Record<string, number | string>[];
  let summary: { withinBandPct: number; gsdCm: { median: number }; verification: { ok: boolean; breaches: number; undeclared: number } };
  beforeAll(() => {
    out = path.join(tempDir(`truth-${c.name}`), "out");
    const r = runCli(["plan", planFile(c), "--out", out, "--quiet"], { timeoutMs: 300_000 });
    expect(r.status, r.stderr).toBe(0);
    const csv = parseCsv(readFileSync(path.join(out, "waypoints.csv"), "utf8"));
    rows = csv.rows.map((v) => Object.fromEntries(csv.header.map((h, i) => [h, h === "segment" ? v[i] : Number(v[i])])));
    summary = JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8"));
  }, 300_000);

  it("the plan's own independent check (as gsdplan verify) finds no breach on the whole path", () => {
    expect(summary.verification).toMatchObject({ ok: true, breaches: 0, undeclared: 0 });
  });

  it("every waypoint's ground and height above ground equal GDAL's bilinear ground within 0.05 m", () => {
    const withGround = rows.filter((w) => Number.isFinite(w.ground_amsl_m as number) && w.ground_amsl_m !== 0);
    expect(withGround.length).toBeGreaterThan(10);
    const ref = gdalBilinearM(demFile(c), toDem(c, withGround.map((w) => [w.longitude as number, w.latitude as number])));
    withGround.forEach((w, i) => {
      // 0.05 m is the contract; the CSV keeps centimetres and coordinates to 1e-8 degree (1 mm).
      expect(Math.abs((w.ground_amsl_m as number) - ref[i]), `row ${i}`).toBeLessThanOrEqual(0.05);
      expect(Math.abs((w.altitude_amsl_m as number) - (w.height_above_ground_m as number) - ref[i])).toBeLessThanOrEqual(0.05);
    });
  });

  it("ground at 400 points over the window equals GDAL's bilinear ground within 0.05 m (the working grid is the DEM's own cells)", async () => {
    const file = await loadPlanFile(planFile(c));
    const m = await prepareMission(resolvePlanOptions(file.data, {}, file.dir));
    const site = JSON.parse(readFileSync(path.join(dir(c), `${c.name}-site.geojson`), "utf8"));
    const ring: [number, number][] = (site.features?.[0]?.geometry ?? site.geometry).coordinates[0];
    const lons = ring.map((p) => p[0]), lats = ring.map((p) => p[1]);
    const [w, e, s, n] = [Math.min(...lons), Math.max(...lons), Math.min(...lats), Math.max(...lats)];
    let seed = 7;
    const rnd = () => ((seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0) / 2 ** 32);
    const pts: [number, number][] = Array.from({ length: 400 }, () => [w + (e - w) * rnd(), s + (n - s) * rnd()]);
    const ref = gdalBilinearM(demFile(c), toDem(c, pts));
    const xy = pts.map(([lon, lat]) => m.frame.fromWgs84(lon, lat));
    const ours = sampleBilinear(m.grid, xy.map((p) => p[0]), xy.map((p) => p[1]));
    let worst = 0;
    pts.forEach((_p, i) => (worst = Math.max(worst, Math.abs(ours[i] - ref[i]))));
    expect(worst).toBeLessThanOrEqual(0.05);
  });

  it("images.tif covers every site cell the DEM has (cell centres inside the site, by turf), gsd.tif every one a photo sees", () => {
    const site = JSON.parse(readFileSync(path.join(dir(c), `${c.name}-site.geojson`), "utf8"));
    const poly = (site.features?.[0] ?? site) as Feature<Polygon>;
    const images = gdalXyz(path.join(out, "images.tif"));
    const gsd = gdalXyz(path.join(out, "gsd.tif"));
    const info = gdalinfoJson(path.join(out, "images.tif"));
    const nodata = Number(info.bands[0].noDataValue);
    const lonLat = images.map(([x, y]) => [x, y] as [number, number]);
    const wgs = c.demEpsg === 4326 ? lonLat : cs2csToWgs84(c.demEpsg, lonLat);
    let inSite = 0;
    images.forEach(([, , v], i) => {
      if (!booleanPointInPolygon(wgs[i], poly)) return;
      inSite++;
      expect(v, `site cell ${i} has no image count`).not.toBe(nodata);
      if (v > 0) expect(Number.isNaN(gsd[i][2]), `site cell ${i} seen by ${v} photos has no GSD`).toBe(false);
    });
    expect(inSite).toBeGreaterThan(20);
  });

  it("summary's within-band share and gsd.tif's median agree with an independent GSD per DEM cell from the flown path (3 points, 3 %)", () => {
    const plan = parseYaml(readFileSync(planFile(c), "utf8"));
    const pitchOverF = plan.camera.sensorWidthMm / plan.camera.imageWidthPx / plan.camera.focalLengthMm;
    const target = plan.target.gsdCm, tol = plan.target.tolerancePct / 100;
    const site = JSON.parse(readFileSync(path.join(dir(c), `${c.name}-site.geojson`), "utf8"));
    const poly = (site.features?.[0] ?? site) as Feature<Polygon>;
    // Strip segments of the flown path, in a local equirectangular metric frame of the test's own.
    const lat0 = rows[0].latitude as number, lon0 = rows[0].longitude as number;
    const kx = 111_320 * Math.cos((lat0 * Math.PI) / 180), ky = 110_950;
    const local = (lon: number, lat: number) => [(lon - lon0) * kx, (lat - lat0) * ky];
    const segs: { a: number[]; b: number[]; za: number; zb: number }[] = [];
    for (let i = 1; i < rows.length; i++) {
      if (rows[i].segment !== "strip" || rows[i].flight !== rows[i - 1].flight) continue;
      segs.push({
        a: local(rows[i - 1].longitude as number, rows[i - 1].latitude as number), b: local(rows[i].longitude as number, rows[i].latitude as number),
        za: rows[i - 1].altitude_amsl_m as number, zb: rows[i].altitude_amsl_m as number,
      });
    }
    // Every site cell of the DEM (GDAL reads it), its GSD below the nearest point of any strip.
    const dem = gdalXyz(path.join(out, "gsd.tif"));
    const demLonLat = c.demEpsg === 4326 ? dem.map(([x, y]) => [x, y] as [number, number]) : cs2csToWgs84(c.demEpsg, dem.map(([x, y]) => [x, y] as [number, number]));
    // Site cells with a GSD, at most 3000 of them (evenly strided) for GDAL to read the ground at.
    let pick = dem.map((_r, i) => i).filter((i) => !Number.isNaN(dem[i][2]) && booleanPointInPolygon(demLonLat[i], poly));
    if (pick.length > 3000) pick = pick.filter((_i, k) => k % Math.ceil(pick.length / 3000) === 0);
    const groundOf = new Map<number, number>();
    gdalBilinearM(demFile(c), pick.map((i) => [dem[i][0], dem[i][1]] as [number, number])).forEach((z, k) => groundOf.set(pick[k], z));
    const ground = (i: number) => groundOf.get(i)!;
    const ours: number[] = [], indep: number[] = [];
    let inBand = 0, cells = 0;
    dem.forEach(([, , g], i) => {
      if (!groundOf.has(i)) return;
      const [px, py] = local(...demLonLat[i]);
      let best = Infinity, z = NaN;
      for (const s of segs) {
        const dx = s.b[0] - s.a[0], dy = s.b[1] - s.a[1];
        const L2 = dx * dx + dy * dy;
        const t = L2 > 0 ? Math.max(0, Math.min(1, ((px - s.a[0]) * dx + (py - s.a[1]) * dy) / L2)) : 0;
        const d = Math.hypot(s.a[0] + t * dx - px, s.a[1] + t * dy - py);
        if (d < best) { best = d; z = s.za + t * (s.zb - s.za); }
      }
      const gsdCm = (z - ground(i)) * pitchOverF * 100;
      cells++;
      if (gsdCm >= target * (1 - tol) && gsdCm <= target * (1 + tol)) inBand++;
      ours.push(g);
      indep.push(gsdCm);
    });
    expect(cells).toBeGreaterThan(20);
    expect(Math.abs(summary.withinBandPct - (100 * inBand) / cells)).toBeLessThanOrEqual(3);
    expect(Math.abs(median(ours) / median(indep) - 1)).toBeLessThanOrEqual(0.03);
  });
});

/** WGS84 lon/lat of DEM-CRS points (PROJ's cs2cs; EPSG:4326 writes latitude first, its authority axis order). */
function cs2csToWgs84(epsg: number, xy: [number, number][]): [number, number][] {
  const input = xy.map(([x, y]) => `${x} ${y}`).join("\n") + "\n";
  const out = execFileSync("cs2cs", ["-f", "%.10f", `EPSG:${epsg}`, "EPSG:4326"], { input, encoding: "utf8", maxBuffer: 1 << 28 });
  return out.trim().split("\n").map((l) => {
    const [lat, lon] = l.trim().split(/\s+/).map(Number);
    return [lon, lat] as [number, number];
  });
}

describe.skipIf(!HAS_GDAL)("DEM accuracy and resolution count", () => {
  it("a 3\" DEM (cells about 64 x 93 m at 46.5 N: 3\" x 1852 m/' x cos(lat), from the nautical mile) is warned with both sizes", () => {
    const out = path.join(tempDir("truth-coarse"), "out");
    const r = runCli(["plan", path.join(ROOT, "fixtures/truth/ridges_geo3s-plan.yaml"), "--out", out, "--quiet", "--json"], { timeoutMs: 300_000 });
    expect(r.status, r.stderr).toBe(0);
    const s = JSON.parse(r.stdout);
    const w = (s.warnings as string[]).find((m) => /DEM's cells are/.test(m));
    expect(w).toMatch(/64\.0 x 92\.6 m, coarser than half the strip spacing \(\d+\.\d m\) and the 15 m safety radius/);
    expect(w).toMatch(/ground only at cell centres/);
  });

  it("demAccuracyM adds to the clearance floor, and the summary and report say so", () => {
    const out = path.join(tempDir("truth-accuracy"), "out");
    const r = runCli(["plan", path.join(ROOT, "fixtures/truth/gorge_utm-plan.yaml"), "--out", out, "--quiet"], { timeoutMs: 300_000 });
    expect(r.status, r.stderr).toBe(0);
    const s = JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8"));
    expect(s.clearance).toMatchObject({ minM: 30, demAccuracyM: 0.5, floorM: 30.5 });
    expect(s.clearance.statement).toBe("clearance 30 m + 0.5 m for the DEM's stated accuracy, above the highest ground within 15 m of the path");
    expect(readFileSync(path.join(out, "report.html"), "utf8")).toContain("clearance 30 m + 0.5 m for the DEM&#39;s stated accuracy");
  });
});

describe.skipIf(!HAS_GDAL)("unknown ground: flown around, or announced, never silent", () => {
  it("over an 80 m DEM hole the legs go around it: the plan's own check and gsdplan verify find no crossing of unknown ground", () => {
    const out = path.join(tempDir("truth-hole"), "out");
    const plan = path.join(ROOT, "fixtures/truth/hole_utm-plan.yaml");
    const r = runCli(["plan", plan, "--out", out, "--quiet", "--json"], { timeoutMs: 300_000 });
    expect(r.status, r.stderr).toBe(0);
    const s = JSON.parse(r.stdout);
    expect(s.verification).toMatchObject({ ok: true, breaches: 0, undeclared: 0 });
    expect((s.warnings as string[]).some((w) => /where the DEM has no data/.test(w))).toBe(false);
    // The flags still mark the strips' unflyable stretch at the hole (bit 64) and the hole itself (bit 32).
    expect(s.flagged.byKind.unflyable.cells).toBeGreaterThan(1000);
    const v = runCli(["verify", out, "--plan", plan, "--json"]);
    expect(v.status, v.stdout).toBe(0);
  });

  it("with assumeGroundM the legs may cross the hole on the assumed height: each crossing is announced, and verify lists it as a warning", () => {
    const out = path.join(tempDir("truth-hole-assume"), "out");
    const plan = path.join(ROOT, "fixtures/truth/hole_utm-assume-plan.yaml");
    const r = runCli(["plan", plan, "--out", out, "--quiet", "--json"], { timeoutMs: 300_000 });
    expect(r.status, r.stderr).toBe(0);
    const s = JSON.parse(r.stdout);
    expect(s.verification.undeclared).toBe(0);
    const v = JSON.parse(runCli(["verify", out, "--plan", plan, "--json"]).stdout);
    expect(v.breaches.filter((b: { limit: string }) => b.limit === "nodata")).toEqual([]);
    expect(v.warnings.some((b: { limit: string }) => b.limit === "nodata")).toBe(true);
  });
});

describe.skipIf(!HAS_GDAL)("ground = the DEM on a conformal CRS far from true scale (Web Mercator at 46.5 N)", () => {
  it("the DEM's cells are kept (its CRS divided by its point scale): ground at 300 points equals GDAL's bilinear ground within 0.05 m", async () => {
    // GDAL makes the DEM: the 1" ridges warped to EPSG:3857 (scale sec(46.5) = 1.45 there).
    const dir = tempDir("truth-merc");
    const dem = path.join(dir, "ridges_3857.tif");
    execFileSync("gdalwarp", ["-q", "-t_srs", "EPSG:3857", "-r", "bilinear", "-tr", "40", "40", path.join(ROOT, "fixtures/truth/ridges_geo1s.tif"), dem]);
    const file = await loadPlanFile(path.join(ROOT, "fixtures/truth/ridges_geo1s-plan.yaml"));
    const m = await prepareMission(resolvePlanOptions({ ...(file.data as object), dem }, {}, file.dir));
    expect(m.frame.source).toBe("dem-scaled");
    const site = JSON.parse(readFileSync(path.join(ROOT, "fixtures/truth/ridges_geo1s-site.geojson"), "utf8"));
    const ring: [number, number][] = (site.features?.[0]?.geometry ?? site.geometry).coordinates[0];
    const lons = ring.map((p) => p[0]), lats = ring.map((p) => p[1]);
    let seed = 11;
    const rnd = () => ((seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0) / 2 ** 32);
    const pts: [number, number][] = Array.from({ length: 300 }, () => [Math.min(...lons) + (Math.max(...lons) - Math.min(...lons)) * rnd(), Math.min(...lats) + (Math.max(...lats) - Math.min(...lats)) * rnd()]);
    const ref = gdalBilinearM(dem, cs2csFromWgs84(3857, pts));
    const xy = pts.map(([lon, lat]) => m.frame.fromWgs84(lon, lat));
    const ours = sampleBilinear(m.grid, xy.map((p) => p[0]), xy.map((p) => p[1]));
    let worst = 0;
    pts.forEach((_p, i) => (worst = Math.max(worst, Math.abs(ours[i] - ref[i]))));
    expect(worst).toBeLessThanOrEqual(0.05);
  });
});
