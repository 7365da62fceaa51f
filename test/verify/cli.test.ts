import { copyFileSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import proj4 from "proj4";
import { beforeAll, describe, expect, it } from "vitest";
import { ROOT, parseCsv, runCli, tempDir } from "../e2e/cli.js";
import { HAS_GDAL } from "../helpers/tools.js";
import { gdalHeights } from "./gdal.js";

// `gsdplan verify` on hand-made waypoint lists over the truth fixtures (see
// fixtures/truth/README.md), then on the planner's own output. The lists are test cases
// (places chosen against the fixtures' known terrain), not data.

const GORGE_PLAN = path.join(ROOT, "fixtures/truth/gorge_utm-plan.yaml");
const HOLE_PLAN = path.join(ROOT, "fixtures/truth/hole_utm-plan.yaml");
const HEADER = "flight,strip,index,segment,longitude,latitude,altitude_amsl_m,altitude_ellipsoid_m,altitude_takeoff_m,ground_amsl_m,height_above_ground_m,speed_m_s";

/** Gorge fixture: UTM 32N, north-west corner (420000, 5150300), 1 m cells; u east, v south of it. */
const gorgeXY = (u: number, v: number): [number, number] => [420000 + u, 5150300 - v];
const holeXY = (x: number, y: number): [number, number] => [x, y];

/**
 * A hand-made list (ground and height above ground left empty, as a pilot's edit may):
 * [x, y, altitude AMSL, speed] per row in the fixture's UTM zone; one flight.
 */
function handList(zone: number, pts: [number, number, number, number][]): string {
  const utm = `+proj=utm +zone=${zone} +datum=WGS84 +units=m +no_defs`;
  const lines = pts.map(([x, y, z, v], i) => {
    const [lon, lat] = proj4(utm, "WGS84", [x, y]);
    return `1,1,${i + 1},${i === 0 ? "transit" : "strip"},${lon.toFixed(8)},${lat.toFixed(8)},${z.toFixed(2)},${(z + 50).toFixed(2)},,,,${v.toFixed(2)}`;
  });
  return [HEADER, ...lines].join("\r\n") + "\r\n";
}

function writeList(dir: string, name: string, text: string): string {
  const file = path.join(dir, name);
  writeFileSync(file, text);
  return file;
}

describe("gsdplan verify on hand-made lists", () => {
  const dir = tempDir("verify");

  // Plateau about 902-905 m near the mast; the mast (columns 200-201, row 90) tops 984 m.
  // Plan limits: clearance 30 m + DEM accuracy 0.5 m within 15 m, ceiling 120 m above the
  // ground below, climb 3 m/s, descent 2 m/s.
  it("a leg passing 4 m beside the 80 m mast between two clear waypoints: exit 3, clearance", () => {
    // Both ends 140 m apart, 45 m above the plateau (floor 905 + 30.5 = 935.5 < 950): clear.
    // Midway the disc holds the mast: 984 + 30.5 = 1014.5 m needed, 950 m flown.
    const list = handList(32, [
      [...gorgeXY(205, 20), 950, 0],
      [...gorgeXY(205, 160), 950, 5],
      [...gorgeXY(205, 20), 950, 5],
    ]);
    const r = runCli(["verify", writeList(dir, "mast.csv", list), "--plan", GORGE_PLAN, "--json"]);
    expect(r.status).toBe(3);
    const j = JSON.parse(r.stdout);
    expect(j.ok).toBe(false);
    const clearance = j.breaches.filter((b: { limit: string }) => b.limit === "clearance");
    expect(clearance.map((b: { fromRow: number; toRow: number }) => `${b.fromRow}->${b.toRow}`)).toEqual(["1->2", "2->3"]);
    // The mast's top 983.27 m (gdalinfo -stats maximum of the fixture) + 30.5 m - 950 m = 63.77 m,
    // met within 15 m of the leg (the rim meets the mast's own cells).
    expect(clearance[0].sizeM).toBeCloseTo(983.27 + 30.5 - 950, 1);
    expect(j.breaches.every((b: { limit: string }) => b.limit === "clearance")).toBe(true);
    // The text form names the limit, one line per breach, and ends with the verdict.
    const t = runCli(["verify", path.join(dir, "mast.csv"), "--plan", GORGE_PLAN]);
    expect(t.status).toBe(3);
    const lines = t.stdout.trim().split("\n");
    expect(lines).toContain("clearance: 2 breaches");
    // (The hand-made heights also leave the detail band: counted as warnings, not breaches.)
    expect(lines[lines.length - 1]).toMatch(/^verdict: FAIL, 2 breaches \(clearance 2\)(, \d+ warning\(s\))?$/);
  });

  it("a leg climbing 50 m over 100 m at 10 m/s (5 m/s against 3 m/s): exit 3, climb", () => {
    const list = handList(32, [
      [...gorgeXY(60, 60), 950, 0],
      [...gorgeXY(60, 160), 1000, 10],
      [...gorgeXY(60, 60), 950, 1],
    ]);
    const r = runCli(["verify", writeList(dir, "climb.csv", list), "--plan", GORGE_PLAN, "--json"]);
    expect(r.status).toBe(3);
    const j = JSON.parse(r.stdout);
    expect(j.breaches.map((b: { limit: string }) => b.limit)).toEqual(["climb"]);
    // 50 m in 100 m / 10 m/s = 10 s: 5 m/s, 5/3 of the limit (UTM scale 0.9996 here changes
    // the ground length by 0.04 %).
    expect(j.breaches[0].sizeM).toBeCloseTo(5 / 3, 2);
    expect(j.breaches[0].fromRow).toBe(1);
  });

  it("a waypoint over the 80 m nodata hole: exit 3, unknown ground (nodata)", () => {
    // Hole fixture: UTM 33N, hole of 40 m radius around (600250, 5260250); ground 440-470 m.
    const list = handList(33, [
      [...holeXY(600150, 5260250), 545, 0],
      [...holeXY(600250, 5260250), 545, 5],
      [...holeXY(600150, 5260250), 545, 5],
    ]);
    const r = runCli(["verify", writeList(dir, "hole.csv", list), "--plan", HOLE_PLAN]);
    expect(r.status).toBe(3);
    expect(r.stdout).toMatch(/^unknown ground \(nodata\): 2 breaches$/m);
    // From the hole's rim (x = 600210) to its centre: 40 m straight over unknown ground,
    // give or take the 2 m cells' quads around the rim.
    expect(r.stdout).toMatch(/straight below for (3[89]|4[0-2])\.\d\d m/);
  });

  it("a clean list: exit 0", () => {
    const list = handList(32, [
      [...gorgeXY(60, 60), 960, 0],
      [...gorgeXY(60, 160), 960, 5],
      [...gorgeXY(60, 60), 960, 5],
    ]);
    const r = runCli(["verify", writeList(dir, "clean.csv", list), "--plan", GORGE_PLAN]);
    expect(r.stderr).toBe("");
    expect(r.status).toBe(0);
    expect(r.stdout.trim().split("\n").pop()).toMatch(/^verdict: OK, no breach on 2 legs(, \d+ warning\(s\))?$/);
  });

  it("the ceiling's reference: 145 m above the gorge floor breaks 'ground' but not 'surface' (the wall top is closer)", () => {
    // Row 250 across the gorge at 1015 m: 113-115 m above the plateau (900-902 m), 149 m above
    // the floor (about 866 m) 24 m wide. Closest terrain from over the floor: the wall top 12 m
    // aside, about sqrt(114^2 + 12^2) = 115 m (Regulation (EU) 2019/947 UAS.OPEN.010 measures
    // from the closest point of the surface; 14 CFR 107.51(b) from the ground below). Row 250
    // keeps the mast (row 90) over 160 m away: as part of the DEM's surface it is terrain too.
    const planDir = path.join(dir, "surface");
    mkdirSync(planDir, { recursive: true });
    copyFileSync(path.join(ROOT, "fixtures/truth/gorge_utm-site.geojson"), path.join(planDir, "gorge_utm-site.geojson"));
    copyFileSync(path.join(ROOT, "fixtures/truth/gorge_utm.tif"), path.join(planDir, "gorge_utm.tif"));
    const surfacePlan = path.join(planDir, "plan.yaml");
    writeFileSync(surfacePlan, readFileSync(GORGE_PLAN, "utf8").replace("reference: ground", "reference: surface"));
    const across = (z: number) => handList(32, [
      [...gorgeXY(130.5, 250.5), z, 0],
      [...gorgeXY(220.5, 250.5), z, 5],
      [...gorgeXY(130.5, 250.5), z, 5],
    ]);
    const low = writeList(dir, "across-1015.csv", across(1015));
    const ground = JSON.parse(runCli(["verify", low, "--plan", GORGE_PLAN, "--json"]).stdout);
    expect(ground.breaches.map((b: { limit: string }) => b.limit)).toEqual(["ceiling", "ceiling"]);
    // Over the floor (about 866 m on this row): 1015 - 866 - 120 = 29 m over.
    expect(ground.breaches[0].sizeM).toBeGreaterThan(27);
    expect(ground.breaches[0].sizeM).toBeLessThan(31);
    const r = runCli(["verify", low, "--plan", surfacePlan]);
    expect(r.status).toBe(0);
    // At 1024 m the plateau is 122-124 m below: over the limit from the closest point too.
    const high = JSON.parse(runCli(["verify", writeList(dir, "across-1024.csv", across(1024)), "--plan", surfacePlan, "--json"]).stdout);
    expect(high.ok).toBe(false);
    expect(high.breaches.every((b: { limit: string }) => b.limit === "ceiling")).toBe(true);
    expect(high.breaches[0].message).toContain("from the closest point of the terrain surface");
  });

  it("with assumeGroundM, crossing the nodata hole is a warning with its length, not a breach", () => {
    const list = handList(33, [
      [...holeXY(600150, 5260250), 545, 0],
      [...holeXY(600350, 5260250), 545, 5],
      [...holeXY(600150, 5260250), 545, 5],
    ]);
    const r = runCli(["verify", writeList(dir, "hole-assume.csv", list), "--plan", path.join(ROOT, "fixtures/truth/hole_utm-assume-plan.yaml"), "--json"]);
    expect(r.status).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.breaches).toEqual([]);
    expect(j.warnings.map((w: { limit: string }) => w.limit)).toEqual(["nodata", "nodata"]);
    // 80 m across the hole straight below (plus the quads around its rim, 2 m cells), and
    // 15 m more on each side within the safety radius.
    expect(j.warnings[0].message).toMatch(/straight below for 8[0-4]\.\d\d m/);
    expect(j.warnings[0].sizeM).toBeGreaterThan(108);
    expect(j.warnings[0].sizeM).toBeLessThan(116);
  });

  it("bad input: a wrong header, a missing list, a bad plan value: exit 2 with one line", () => {
    const bad = writeList(dir, "bad.csv", "flight,strip,lon,lat\r\n1,1,7.9,46.5\r\n");
    let r = runCli(["verify", bad, "--plan", GORGE_PLAN]);
    expect(r.status).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(/bad header/);

    r = runCli(["verify", path.join(dir, "nothing-here"), "--plan", GORGE_PLAN]);
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);

    const planDir = path.join(dir, "plan");
    mkdirSync(planDir, { recursive: true });
    copyFileSync(path.join(ROOT, "fixtures/truth/gorge_utm-site.geojson"), path.join(planDir, "gorge_utm-site.geojson"));
    copyFileSync(path.join(ROOT, "fixtures/truth/gorge_utm.tif"), path.join(planDir, "gorge_utm.tif"));
    writeFileSync(path.join(planDir, "plan.yaml"), readFileSync(GORGE_PLAN, "utf8").replace("safetyRadiusM: 15", "safetyRadiusM: -3"));
    r = runCli(["verify", path.join(dir, "clean.csv"), "--plan", path.join(planDir, "plan.yaml")]);
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toContain("clearance.safetyRadiusM");
    expect(r.stderr).toContain("-3");
  });
});

describe.skipIf(!HAS_GDAL)("gsdplan verify on the planner's own output (gorge fixture)", () => {
  const dir = tempDir("verify-plan");
  const out = path.join(dir, "out");
  beforeAll(() => {
    const r = runCli(["plan", GORGE_PLAN, "--out", out, "--quiet"], { timeoutMs: 120_000 });
    if (r.status !== 0) throw new Error(`plan failed: ${r.stderr}`);
  });

  it("reads an output folder and answers with a verdict (0 or 3) and JSON", () => {
    const r = runCli(["verify", out, "--plan", GORGE_PLAN, "--json"]);
    expect([0, 3]).toContain(r.status);
    const j = JSON.parse(r.stdout);
    expect(j.ok).toBe(r.status === 0);
    expect(j.checked.legs).toBeGreaterThan(3);
  });

  it("the planner's own output over the gorge (one-cell walls, a mast, a pit) verifies clean: exit 0, no breach, no band finding", () => {
    const r = runCli(["verify", out, "--plan", GORGE_PLAN, "--json"]);
    expect(r.status, r.stdout + r.stderr).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.ok).toBe(true);
    expect(j.breaches).toEqual([]);
    expect(j.checked.pathLengthM).toBeGreaterThan(500);
  });

  it("one strip waypoint lowered by 40 m in a copy of waypoints.csv: exit 3, clearance at that waypoint", () => {
    const { header, rows } = parseCsv(readFileSync(path.join(out, "waypoints.csv"), "utf8"));
    const col = (n: string) => header.indexOf(n);
    // Reference for "surely too low": the highest DEM cell centre within 15 m, read by GDAL
    // (gdal_translate -of XYZ), at points every 0.25 m along the two legs that meet at the
    // lowered row. The ground within the disc is at least that high, so a point flown under it
    // + 30.5 m (clearance + DEM accuracy of the plan) breaks clearance whatever the planner chose.
    const dem = gdalHeights(path.join(ROOT, "fixtures/truth/gorge_utm.tif"));
    const utm = "+proj=utm +zone=32 +datum=WGS84 +units=m +no_defs";
    const xy = rows.map((r) => proj4("WGS84", utm, [Number(r[col("longitude")]), Number(r[col("latitude")])]));
    const alt = rows.map((r) => Number(r[col("altitude_amsl_m")]));
    const centresMax = (x: number, y: number): number => {
      const c0 = x - 420000 - 0.5;
      const r0 = 5150300 - y - 0.5;
      let top = -Infinity;
      for (let r = Math.ceil(r0 - 15); r <= r0 + 15; r++)
        for (let c = Math.ceil(c0 - 15); c <= c0 + 15; c++) if ((c - c0) ** 2 + (r - r0) ** 2 <= 225) top = Math.max(top, dem.z[r * dem.width + c]);
      return top;
    };
    const surelyTooLow = (i: number): boolean => {
      for (const j of [i - 1, i + 1]) {
        if (j < 0 || j >= rows.length) continue;
        const len = Math.hypot(xy[j][0] - xy[i][0], xy[j][1] - xy[i][1]);
        for (let d = 0; d <= len; d += 0.25) {
          const t = len === 0 ? 0 : d / len; // from the lowered row towards its neighbour
          const z = (alt[i] - 40) * (1 - t) + alt[j] * t;
          if (z < centresMax(xy[i][0] + (xy[j][0] - xy[i][0]) * t, xy[i][1] + (xy[j][1] - xy[i][1]) * t) + 30.5 - 1) return true;
        }
      }
      return false;
    };
    let pick = -1;
    for (let i = 1; i < rows.length - 1 && pick < 0; i++) if (rows[i][col("segment")] === "strip" && surelyTooLow(i)) pick = i;
    expect(pick).toBeGreaterThan(0);
    for (const k of ["altitude_amsl_m", "altitude_ellipsoid_m", "altitude_takeoff_m"]) rows[pick][col(k)] = (Number(rows[pick][col(k)]) - 40).toFixed(2);
    const lowered = writeList(dir, "lowered.csv", [header.join(","), ...rows.map((r) => r.join(","))].join("\r\n") + "\r\n");
    const r = runCli(["verify", lowered, "--plan", GORGE_PLAN, "--json"]);
    expect(r.status).toBe(3);
    const j = JSON.parse(r.stdout);
    const row = pick + 1;
    const hits = j.breaches.filter((b: { limit: string; fromRow: number; toRow: number }) => b.limit === "clearance" && (b.fromRow === row || b.toRow === row));
    expect(hits.length).toBeGreaterThan(0);
    expect(Math.max(...hits.map((b: { sizeM: number }) => b.sizeM))).toBeGreaterThan(1);
    // 40 m lower is far below the band's lower height (82.1 m above ground for 2.25 cm/px with
    // this camera, by GSD = H p / f): the waypoint's detail is named too.
    const band = j.warnings.filter((b: { limit: string; fromRow: number }) => b.limit === "band" && b.fromRow === row);
    expect(band.length).toBe(1);
    expect(band[0].sizeM).toBeLessThan(2.25);
  });
});
