import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { HAS_GDAL, requireTool } from "../helpers/tools.js";
import { loadPlanFile, resolvePlanOptions } from "../../src/plan/options.js";
import { planMission, type PlanRun } from "../../src/plan/plan.js";
import { planSummary } from "../../src/plan/summary.js";
import { waypointsCsv, WAYPOINT_CSV_COLUMNS } from "../../src/export/waypointsCsv.js";
import { loadVerifyInputs } from "../../src/verify/load.js";
import { verifyWaypoints } from "../../src/verify/verify.js";
import { openDem } from "../../src/dem/source.js";
import { readCells } from "../../src/dem/window.js";
import { terrainOnGrid } from "../../src/plan/terrainGrid.js";

// Fixtures: fixtures/dsm/ written by GDAL (scripts/make-dsm-fixtures.mjs): a sloping terrain
// model (DTM) and a surface model (DSM) with buildings and trees on it, EPSG:32633 + EGM96.
// The independent reference: Debian's python3-gdal and python3-numpy (/usr/bin/python3),
// reading the same GeoTIFFs through GDAL and computing every figure on their own.
const PY = "/usr/bin/python3";
const HAS_PY_GDAL = HAS_GDAL && requireTool(PY, "python3-gdal", ["-c", "import osgeo.gdal, numpy"]);
const PLAN = "fixtures/dsm/dsm-plan.yaml";
const DSM = "fixtures/dsm/slope_dsm.tif";
const DTM = "fixtures/dsm/slope_dtm.tif";
const DTM_3M = "fixtures/dsm/slope_dtm_3m.tif";

// For each [lon, lat] point: the DTM bilinear between cell centres straight below (GDAL's
// convention, as `gdallocationinfo -r bilinear` in later GDAL releases), the DSM bilinear
// below, and the highest DSM within R: cell centres inside the disc and the bilinear surface
// on its rim (on a bilinear surface the maximum over a disc lies at one or the other).
const REFERENCE_PY = String.raw`
import json, sys, math
import numpy as np
from osgeo import gdal, osr
req = json.load(sys.stdin)
def load(p):
    ds = gdal.Open(p)
    return ds.GetRasterBand(1).ReadAsArray().astype(np.float64), ds.GetGeoTransform()
dsm, gt = load(req["dsm"])
dtm, gt2 = load(req["dtm"])
assert gt == gt2
src = osr.SpatialReference(); src.ImportFromEPSG(4326); src.SetAxisMappingStrategy(osr.OAMS_TRADITIONAL_GIS_ORDER)
dst = osr.SpatialReference(); dst.ImportFromEPSG(32633); dst.SetAxisMappingStrategy(osr.OAMS_TRADITIONAL_GIS_ORDER)
ct = osr.CoordinateTransformation(src, dst)
x0, dx, _, y0, _, dy = gt
H, W = dsm.shape
def bil(a, x, y):
    c = (x - x0) / dx - 0.5; r = (y - y0) / dy - 0.5
    c0 = min(max(int(math.floor(c)), 0), W - 2); r0 = min(max(int(math.floor(r)), 0), H - 2)
    fc = c - c0; fr = r - r0
    return (a[r0, c0] * (1 - fc) * (1 - fr) + a[r0, c0 + 1] * fc * (1 - fr) + a[r0 + 1, c0] * (1 - fc) * fr + a[r0 + 1, c0 + 1] * fc * fr)
cx = x0 + (np.arange(W) + 0.5) * dx
cy = y0 + (np.arange(H) + 0.5) * dy
R = req["radius"]
out = {"dtm": [], "dsm": [], "dsmMax": []}
ang = np.linspace(0, 2 * math.pi, 720, endpoint=False)
for lon, lat in req["points"]:
    x, y, _ = ct.TransformPoint(lon, lat)
    out["dtm"].append(bil(dtm, x, y)); out["dsm"].append(bil(dsm, x, y))
    cs = np.where(np.abs(cx - x) <= R)[0]; rs = np.where(np.abs(cy - y) <= R)[0]
    sub = dsm[np.ix_(rs, cs)]
    d2 = (cx[cs][None, :] - x) ** 2 + (cy[rs][:, None] - y) ** 2
    m = float(sub[d2 <= R * R].max())
    for a in ang:
        m = max(m, bil(dsm, x + R * math.cos(a), y + R * math.sin(a)))
    out["dsmMax"].append(m)
json.dump(out, sys.stdout)
`;

function reference(points: [number, number][], radius: number): { dtm: number[]; dsm: number[]; dsmMax: number[] } {
  const text = execFileSync(PY, ["-c", REFERENCE_PY], { input: JSON.stringify({ dsm: DSM, dtm: DTM, radius, points }), encoding: "utf8", maxBuffer: 1 << 28 });
  return JSON.parse(text);
}

interface CsvRow { [k: string]: string }
function parseCsv(text: string): CsvRow[] {
  const [head, ...lines] = text.trim().split("\r\n");
  const cols = head.split(",");
  return lines.map((l) => Object.fromEntries(l.split(",").map((v, i) => [cols[i], v])));
}

async function plan(overrides: Record<string, unknown> = {}): Promise<PlanRun> {
  const file = await loadPlanFile(PLAN);
  const data = { ...(file.data as Record<string, unknown>), ...overrides };
  for (const [k, v] of Object.entries(overrides)) if (v === undefined) delete data[k];
  return planMission(resolvePlanOptions(data, {}, file.dir));
}

describe.skipIf(!HAS_PY_GDAL)("surface model (dem) beside a terrain model (dtm)", () => {
  let run: PlanRun;
  let rows: CsvRow[];
  let samples: { lon: number; lat: number; alt: number; ground: boolean }[];
  let ref: ReturnType<typeof reference>;
  let dir: string;

  beforeAll(async () => {
    run = await plan();
    const csv = waypointsCsv(run.rows);
    rows = parseCsv(csv);
    dir = mkdtempSync(path.join(tmpdir(), "gsdplan-dtm-"));
    writeFileSync(path.join(dir, "waypoints.csv"), csv);
    // The path between waypoints (every ~1 m), not only the waypoints: the promises hold on the whole path.
    samples = [];
    for (let i = 0; i < rows.length; i++) {
      const a = rows[i];
      const lonA = +a.longitude, latA = +a.latitude, zA = +a.altitude_amsl_m;
      // A flight starts and ends on the ground at its take-off point (exempt from clearance).
      samples.push({ lon: lonA, lat: latA, alt: zA, ground: +a.altitude_takeoff_m < 0.5 });
      const b = rows[i + 1];
      if (!b || b.flight !== a.flight) continue;
      const dE = (+b.longitude - lonA) * 111_320 * Math.cos((latA * Math.PI) / 180), dN = (+b.latitude - latA) * 111_320;
      const n = Math.floor(Math.hypot(dE, dN));
      if (n < 1) continue;
      for (let k = 1; k < n; k++) {
        const t = k / n;
        samples.push({ lon: lonA + (+b.longitude - lonA) * t, lat: latA + (+b.latitude - latA) * t, alt: zA + (+b.altitude_amsl_m - zA) * t, ground: false });
      }
    }
    ref = reference(samples.map((s) => [s.lon, s.lat]), run.options.clearance.safetyRadiusM);
  }, 300_000);

  afterAll(() => {
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it("keeps the clearance above the highest surface (DSM) within the safety radius on the whole path", () => {
    const floorM = run.options.clearance.minM; // 30 m, no obstacle margin or accuracy in the plan file
    let worst = Infinity, checked = 0;
    samples.forEach((s, i) => {
      if (s.ground) return;
      checked++;
      worst = Math.min(worst, s.alt - ref.dsmMax[i]);
    });
    expect(checked).toBeGreaterThan(1000);
    // 2 cm: the CSV carries centimetres.
    expect(worst).toBeGreaterThanOrEqual(floorM - 0.02);
  });

  it("keeps the ground ceiling above the terrain (DTM) straight below, and the ceiling binds over roofs", () => {
    let worst = -Infinity;
    samples.forEach((s, i) => { worst = Math.max(worst, s.alt - ref.dtm[i]); });
    expect(worst).toBeLessThanOrEqual(75 + 0.02);
    // Over the 22-25 m roofs the band (at least 64 m above the roof for 2.5 cm/px +-10 %) wants
    // more than 75 m above the terrain: the ceiling over the DTM is what stops it.
    // The path crosses roofs (surface 15 m or more above the terrain), where a ceiling over the
    // surface would allow 15-25 m more: there too it stays within 75 m of the terrain.
    const overRoof = samples.map((s, i) => (ref.dsm[i] - ref.dtm[i] > 15 ? s.alt - ref.dtm[i] : NaN)).filter((v) => v === v);
    expect(overRoof.length).toBeGreaterThan(10);
    expect(Math.max(...overRoof)).toBeLessThanOrEqual(75 + 0.02);
  });

  it("writes height_above_terrain_m after the contract columns: altitude - GDAL's DTM bilinear within 0.05 m", () => {
    expect(WAYPOINT_CSV_COLUMNS.slice(-2)).toEqual(["speed_m_s", "height_above_terrain_m"]);
    let filled = 0;
    for (const r of rows) {
      if (r.height_above_terrain_m === "") continue;
      filled++;
      const k = samples.findIndex((s) => s.lon === +r.longitude && s.lat === +r.latitude);
      expect(Math.abs(+r.height_above_terrain_m - (+r.altitude_amsl_m - ref.dtm[k]))).toBeLessThanOrEqual(0.05);
      // height_above_ground_m stays the surface figure.
      expect(Math.abs(+r.height_above_ground_m - (+r.altitude_amsl_m - ref.dsm[k]))).toBeLessThanOrEqual(0.05);
    }
    expect(filled).toBeGreaterThan(rows.length * 0.8);
  });

  it("takes the take-off ground from the terrain and says which model each figure uses", () => {
    const at = reference([[run.takeoff.lon, run.takeoff.lat]], 1);
    // The fixture's take-off corner is bare ground: the DTM there, to the centimetre.
    expect(Math.abs(run.takeoff.groundM - at.dtm[0])).toBeLessThan(0.01);
    // altitude_takeoff_m is measured from it.
    for (const r of rows.slice(0, 5)) expect(Math.abs(+r.altitude_takeoff_m - (+r.altitude_amsl_m - at.dtm[0]))).toBeLessThanOrEqual(0.02);
    expect(planSummary(run).surfaces).toEqual({ clearance: "dsm", gsd: "dsm", ceiling: "dtm", takeoff: "dtm", heightAboveGround: "dsm", heightAboveTerrain: "dtm" });
  });

  it("verify checks the ceiling on the DTM: the plan passes, and the same path over a terrain lowered 5 m breaks it", async () => {
    const inputs = await loadVerifyInputs(dir, PLAN);
    expect(inputs.dem.terrain).toBeDefined();
    const ok = verifyWaypoints(inputs.rows, inputs.limits, inputs.dem);
    expect(ok.breaches).toEqual([]);
    // Terrain 5 m lower: the same path is up to 5 m too high for a 75 m ceiling over it.
    const lowered = { ...inputs.dem.terrain!, heights: inputs.dem.terrain!.heights.map((z) => z - 5) };
    const bad = verifyWaypoints(inputs.rows, inputs.limits, { ...inputs.dem, terrain: lowered });
    const ceiling = bad.breaches.filter((b) => b.limit === "ceiling");
    expect(ceiling.length).toBeGreaterThan(0);
    expect(Math.max(...ceiling.map((b) => b.sizeM))).toBeGreaterThan(4);
    expect(bad.breaches.filter((b) => b.limit === "clearance")).toEqual([]);
  });

  it("without dtm: height_above_terrain_m is empty and the ceiling is measured on the one DEM", async () => {
    const plain = await plan({ dtm: undefined });
    const r2 = parseCsv(waypointsCsv(plain.rows));
    expect(r2.every((r) => r.height_above_terrain_m === "")).toBe(true);
    expect(planSummary(plain).surfaces.ceiling).toBe("dem");
    const pts = r2.map((r) => [+r.longitude, +r.latitude] as [number, number]);
    const ref2 = reference(pts, 15);
    // Ceiling 75 m above the DSM now: every waypoint within it, measured by GDAL.
    r2.forEach((r, i) => expect(+r.altitude_amsl_m - ref2.dsm[i]).toBeLessThanOrEqual(75.02));
    // ...and some waypoint flies higher above the terrain than the DTM plan allowed.
    expect(Math.max(...r2.map((r, i) => +r.altitude_amsl_m - ref2.dtm[i]))).toBeGreaterThan(75.5);
  }, 300_000);
});

describe.skipIf(!HAS_PY_GDAL)("terrain model onto the surface model's cells", () => {
  it("copies the cells exactly on the same grid, and interpolates bilinearly (as gdalwarp -r bilinear) with a warning on another", async () => {
    const src = await openDem(DSM);
    const win = await readCells(src, { col0: 40, row0: 30, col1: 140, row1: 110 });
    await src.close();
    const same = await terrainOnGrid(DTM, {}, win);
    expect(same.resampled).toBe(false);
    const dtmSrc = await openDem(DTM);
    const exact = await readCells(dtmSrc, { col0: 40, row0: 30, col1: 140, row1: 110 });
    await dtmSrc.close();
    expect(Array.from(same.grid.heights)).toEqual(Array.from(exact.heights));

    const other = await terrainOnGrid(DTM_3M, {}, win);
    expect(other.resampled).toBe(true);
    expect(other.warnings.join(" ")).toMatch(/interpolated bilinearly/);
    // Reference: GDAL's own warp of the 3 m terrain onto the window's 2 m cells, bilinear.
    const t = win.transform;
    const py = String.raw`
import sys, json
from osgeo import gdal
b = json.loads(sys.argv[2])
ds = gdal.Warp("", sys.argv[1], format="MEM", outputBounds=b["bounds"], xRes=2, yRes=2, resampleAlg="bilinear")
json.dump(ds.GetRasterBand(1).ReadAsArray().astype(float).ravel().tolist(), sys.stdout)
`;
    const bounds = [t.x0, t.y0 + win.height * t.dy, t.x0 + win.width * t.dx, t.y0];
    const gdalHeights: number[] = JSON.parse(execFileSync(PY, ["-c", py, DTM_3M, JSON.stringify({ bounds })], { encoding: "utf8" }));
    let worst = 0;
    for (let i = 0; i < gdalHeights.length; i++) worst = Math.max(worst, Math.abs(gdalHeights[i] - other.grid.heights[i]));
    // A plane stays a plane under bilinear interpolation: a millimetre (Float32 heights).
    expect(worst).toBeLessThan(0.005);
  });
});
