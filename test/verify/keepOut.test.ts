import { execFileSync } from "node:child_process";
import { copyFileSync, readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import { booleanPointInPolygon, pointToPolygonDistance } from "@turf/turf";
import proj4 from "proj4";
import { beforeAll, describe, expect, it } from "vitest";
import type { DemGrid } from "../../src/dem/grid.js";
import { readKeepOutFiles } from "../../src/route/zoneFile.js";
import { verifyJson, verifyText } from "../../src/verify/format.js";
import { KEEP_OUT_TOLERANCE_M } from "../../src/verify/keepOut.js";
import { keepOutZonesFor } from "../../src/verify/limits.js";
import {
  deepestInside,
  insideIntervals,
  intervalsLength,
  mergeIntervals,
  nearOutlineIntervals,
  planarPolygon,
  segmentOutlineDistance,
  subtractIntervals,
} from "../../src/verify/planar.js";
import type { Breach, VerifyLimits, VerifyRow, VerifyZone } from "../../src/verify/types.js";
import { verifyWaypoints } from "../../src/verify/verify.js";
import { ROOT, runCli, tempDir } from "../e2e/cli.js";
import { HAS_GDAL, HAS_PROJ } from "../helpers/tools.js";

// Keep-out zones in `gsdplan verify`. The zones are fixtures/keepout/hole-zones.geojson
// (rectangles given in UTM 33N, see its README): "Farm yard" 600180-600300 E x
// 5260360-5260440 N with a courtyard hole 600220-600260 x 5260385-5260415 and a 10 m buffer;
// "Pylons" two 10 m squares at 600330-600340 E, no buffer. The waypoint lists are test cases
// placed against them in UTM 33N (proj4 to WGS84). References: GDAL/OGR's SQLite dialect
// (SpatiaLite ST_Intersects, ST_Distance, ST_Buffer, ST_Intersection, ST_Length on the zones
// taken to EPSG:32633 by ST_Transform), PROJ's `proj -V` for the UTM scale factor that turns
// grid metres into metres on the ground, and turf for point-in-polygon and distance.

const UTM33 = "+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs";
const ZONES_FILE = path.join(ROOT, "fixtures/keepout/hole-zones.geojson");
type EN = [number, number];

/** A flat DEM (450 m) over the zones in UTM 33N, 2 m cells. */
function utmGrid(): DemGrid {
  const width = 250, height = 300;
  return {
    width, height,
    heights: new Float32Array(width * height).fill(450),
    transform: { x0: 600000, y0: 5260600, dx: 2, dy: -2 },
    crs: { proj4: UTM33, epsg: 32633, name: "WGS 84 / UTM zone 33N", geographic: false, linearUnitM: 1 },
    cellSizeM: [2, 2],
    verticalDatum: "egm96",
    verticalUnit: "metre",
  };
}

/** The same flat ground in a geographic DEM (EPSG:4326, 1 arc-second cells). */
function geoGrid(): DemGrid {
  const dx = 1 / 3600;
  const width = 60, height = 40;
  return {
    width, height,
    heights: new Float32Array(width * height).fill(450),
    transform: { x0: 16.322, y0: 47.4925, dx, dy: -dx },
    crs: { proj4: "+proj=longlat +datum=WGS84 +no_defs", epsg: 4326, name: "WGS 84", geographic: true, linearUnitM: NaN },
    cellSizeM: [21, 31],
    verticalDatum: "egm96",
    verticalUnit: "metre",
  };
}

/** One flight through the UTM points at 545 m (95 m above the flat ground), 5 m/s. */
function rowsAt(pts: EN[]): VerifyRow[] {
  return pts.map(([e, n], i) => {
    const [longitude, latitude] = proj4(UTM33, "WGS84", [e, n]);
    return {
      flight: 1, strip: 1, index: i + 1, segment: i === 0 ? "transit" : "strip", longitude, latitude,
      altitudeAmslM: 545, altitudeEllipsoidM: 590, groundAmslM: NaN, heightAboveGroundM: NaN, speedMps: i === 0 ? 0 : 5,
    };
  });
}

function limitsWith(zones: VerifyZone[]): VerifyLimits {
  return {
    clearanceM: 30, safetyRadiusM: 15, obstacleMarginM: 0, demAccuracyM: 0, ceilingM: 120, ceilingReference: "ground",
    maxClimbMps: 3, maxDescentMps: 2, assumeGroundM: null, takeoff: null, keepOutZones: zones,
  };
}

let zones: VerifyZone[];
let yard: VerifyZone;
let pylons: VerifyZone;
beforeAll(async () => {
  zones = keepOutZonesFor(await readKeepOutFiles([ZONES_FILE]), 0);
  yard = zones.find((z) => z.name === "Farm yard")!;
  pylons = zones.find((z) => z.name === "Pylons")!;
});

/** Out and back along the points: the keep-out breaches and everything else found. */
function check(pts: EN[], zs: VerifyZone[] = zones, grid: DemGrid = utmGrid()): { keepOut: Breach[]; other: Breach[] } {
  const r = verifyWaypoints(rowsAt([...pts, ...[...pts].reverse().slice(1)]), limitsWith(zs), grid);
  return { keepOut: r.breaches.filter((b) => b.limit === "keepOut"), other: r.breaches.filter((b) => b.limit !== "keepOut") };
}

/** One number from OGR's SQLite dialect over the zones file (layer "hole-zones"). */
function ogrNumber(select: string, where: string): number {
  const sql = `SELECT ${select} AS v FROM "hole-zones" WHERE ${where}`;
  const out = execFileSync("ogrinfo", [ZONES_FILE, "-dialect", "sqlite", "-sql", sql], { encoding: "utf8", stdio: ["ignore", "pipe", "ignore"] });
  const m = /v \((?:Real|Integer)\) = (\S+)/.exec(out);
  if (!m) throw new Error(`no value from OGR for ${sql}`);
  return Number(m[1]);
}

const line = (pts: EN[]) => `ST_GeomFromText('LINESTRING(${pts.map((p) => p.join(" ")).join(", ")})', 32633)`;
const zoneUtm = "ST_Transform(geometry, 32633)";

/** UTM 33N point scale factor at the zones (PROJ's `proj -V`: "Parallel scale (k)"). */
function utmScale(): number {
  const out = execFileSync("proj", ["-V", "+proj=utm", "+zone=33", "+datum=WGS84"], { input: "16.3307 47.4893\n", encoding: "utf8" });
  return Number(/Parallel scale \(k\) : (\S+)/.exec(out)![1]);
}

describe.skipIf(!HAS_GDAL || !HAS_PROJ)("keepOut breaches against OGR (UTM 33N DEM)", () => {
  let k: number;
  beforeAll(() => {
    k = utmScale();
    // from memory: UTM's scale is 0.9996 on the central meridian (15 E), growing eastwards; 100 km east of it 0.99972
    expect(k).toBeCloseTo(0.99972, 5);
  });
  /**
   * OGR: metres on the ground of `pts` inside the zone grown by `bufferM` metres on the ground.
   * The buffer's quarter circles are cut into 720 chords (GEOS's default 8 would err by 0.2 m at
   * 10 m; 720 by 10 (1 - cos(pi / 1440)) = 0.02 mm).
   */
  const ogrLengthM = (pts: EN[], name: string, bufferM: number) =>
    ogrNumber(`ST_Length(ST_Intersection(${bufferM > 0 ? `ST_Buffer(${zoneUtm}, ${bufferM * k}, 720)` : zoneUtm}, ${line(pts)}))`, `name = '${name}'`) / k;
  const ogrDistanceM = (pts: EN[], name: string) => ogrNumber(`ST_Distance(${zoneUtm}, ${line(pts)})`, `name = '${name}'`) / k;

  it("a leg across the farm yard: one breach per leg, in the zone 10 m deep, over the length OGR finds inside its 10 m buffer", () => {
    const pts: EN[] = [[600100, 5260370], [600400, 5260370]];
    expect(ogrNumber(`ST_Intersects(${zoneUtm}, ${line(pts)})`, "name = 'Farm yard'")).toBe(1);
    const { keepOut, other } = check(pts);
    expect(other).toEqual([]);
    expect(keepOut.map((b) => `${b.zone} ${b.fromRow}->${b.toRow}`)).toEqual(["Farm yard 1->2", "Farm yard 2->3"]);
    // From 10 m before the west edge to 10 m past the east edge: 120 grid metres and 2 x 10 m.
    const ref = ogrLengthM(pts, "Farm yard", 10);
    expect(ref).toBeCloseTo(120 / k + 20, 2);
    for (const b of keepOut) {
      expect(Math.abs(b.lengthM - ref)).toBeLessThan(0.002);
      // Deepest: 10 grid metres inside the south edge (15 from the courtyard), + the 10 m buffer.
      expect(b.sizeM).toBeCloseTo(10 / k + 10, 2);
      expect(booleanPointInPolygon([b.longitude, b.latitude], { type: "Polygon", coordinates: yard.polygons[0].map((r) => [...r, r[0]]) })).toBe(true);
      expect(b.message).toMatch(/enters keep-out zone "Farm yard", 10\.00 m inside its outline \(20\.00 m inside its 10 m buffer\), over 140\.03 m of the leg/);
    }
  });

  it("a leg 6 m beside the yard: within its 10 m buffer by 4 m, over the length OGR finds", () => {
    const pts: EN[] = [[600100, 5260354], [600400, 5260354]];
    expect(ogrNumber(`ST_Intersects(${zoneUtm}, ${line(pts)})`, "name = 'Farm yard'")).toBe(0);
    const d = ogrDistanceM(pts, "Farm yard");
    expect(d).toBeCloseTo(6 / k, 3);
    const { keepOut } = check(pts);
    expect(keepOut).toHaveLength(2);
    const b = keepOut[0];
    expect(b.sizeM).toBeCloseTo(10 - d, 3);
    expect(Math.abs(b.lengthM - ogrLengthM(pts, "Farm yard", 10))).toBeLessThan(0.002);
    // turf (great-circle distance on a sphere, within 0.5 % of the ellipsoid's): the place is 6 m out.
    const yardFeature = { type: "Polygon" as const, coordinates: yard.polygons[0].map((r) => [...r, r[0]]) };
    expect(pointToPolygonDistance([b.longitude, b.latitude], yardFeature, { units: "meters" })).toBeCloseTo(6, 1);
    expect(b.message).toMatch(/passes 6\.00 m from keep-out zone "Farm yard", 4\.00 m inside its 10 m buffer/);
  });

  it("just outside the buffer: no breach; inside it by less than the tolerance: none; by more: one", () => {
    // Offsets are metres on the ground south of the yard's south edge, in grid metres times k.
    const at = (m: number): EN[] => [[600100, 5260360 - m * k], [600400, 5260360 - m * k]];
    expect(ogrDistanceM(at(10.01), "Farm yard")).toBeCloseTo(10.01, 3);
    expect(check(at(10.01)).keepOut).toEqual([]);
    expect(check(at(10 - KEEP_OUT_TOLERANCE_M / 2)).keepOut).toEqual([]);
    const inside = check(at(10 - 2 * KEEP_OUT_TOLERANCE_M)).keepOut;
    expect(inside).toHaveLength(2);
    expect(inside[0].sizeM).toBeCloseTo(2 * KEEP_OUT_TOLERANCE_M, 3);
  });

  it("through the courtyard hole: allowed farther than the buffer from its rim, a breach nearer", () => {
    // The hole is 40 x 30 m; with a 10 m buffer only 20 x 10 m of it is free.
    const free: EN[] = [[600232, 5260400], [600248, 5260400]];
    expect(ogrNumber(`ST_Intersects(ST_Buffer(${zoneUtm}, ${10 * k}, 720), ${line(free)})`, "name = 'Farm yard'")).toBe(0);
    expect(check(free).keepOut).toEqual([]);
    const near: EN[] = [[600222, 5260400], [600248, 5260400]];
    const ref = ogrLengthM(near, "Farm yard", 10);
    expect(ref).toBeCloseTo(10 - 2 / k, 2); // from 2 m off the west rim to 10 m off it
    const { keepOut } = check(near);
    expect(keepOut).toHaveLength(2);
    expect(Math.abs(keepOut[0].lengthM - ref)).toBeLessThan(0.002);
    expect(keepOut[0].sizeM).toBeCloseTo(10 - ogrDistanceM(near, "Farm yard"), 3);
    // A leg across the whole yard through the hole: inside twice, one breach per leg.
    const across: EN[] = [[600240, 5260300], [600240, 5260500]];
    const all = check(across).keepOut;
    expect(all.map((b) => b.fromRow)).toEqual([1, 2]);
    expect(Math.abs(all[0].lengthM - ogrLengthM(across, "Farm yard", 10))).toBeLessThan(0.002);
  });

  it("a zone of two polygons (MultiPolygon, no buffer): one breach per leg, both crossings' length", () => {
    const pts: EN[] = [[600335, 5260150], [600335, 5260350]];
    const ref = ogrLengthM(pts, "Pylons", 0);
    expect(ref).toBeCloseTo(20 / k, 2);
    const { keepOut } = check(pts, [pylons]);
    expect(keepOut).toHaveLength(2);
    expect(Math.abs(keepOut[0].lengthM - ref)).toBeLessThan(0.002);
    // 5 m from the squares' sides at their middle, no buffer.
    expect(keepOut[0].sizeM).toBeCloseTo(5 / k, 2);
    expect(keepOut[0].message).toMatch(/enters keep-out zone "Pylons", 5\.00 m inside its outline, over 20\.01 m/);
  });

  it("without a buffer, flying along the outline is allowed; 10 cm inside it is not", () => {
    const bare: VerifyZone = { ...yard, bufferM: 0 };
    expect(check([[600100, 5260360], [600400, 5260360]], [bare]).keepOut).toEqual([]);
    const inside = check([[600100, 5260360.1], [600400, 5260360.1]], [bare]).keepOut;
    expect(inside).toHaveLength(2);
    expect(inside[0].sizeM).toBeCloseTo(0.1 / k, 3);
    expect(Math.abs(inside[0].lengthM - 120 / k)).toBeLessThan(0.002);
  });

  it("a geographic DEM gives the same breaches (legs and edges straight in lon/lat rather than UTM: millimetres apart here)", () => {
    for (const pts of [[[600100, 5260370], [600400, 5260370]], [[600100, 5260354], [600400, 5260354]], [[600222, 5260400], [600248, 5260400]]] as EN[][]) {
      const u = check(pts).keepOut;
      const g = check(pts, zones, geoGrid()).keepOut;
      expect(g.map((b) => b.zone)).toEqual(u.map((b) => b.zone));
      g.forEach((b, i) => {
        expect(Math.abs(b.lengthM - u[i].lengthM)).toBeLessThan(0.01);
        expect(Math.abs(b.sizeM - u[i].sizeM)).toBeLessThan(0.01);
      });
    }
  });
});

describe("keepOut in the text and JSON reports", () => {
  it("names the zone, its place and size; the verdict counts keepOut; JSON lists zones without their rings", () => {
    const r = verifyWaypoints(rowsAt([[600100, 5260370], [600400, 5260370], [600100, 5260370]]), limitsWith(zones), utmGrid());
    const limits = limitsWith(zones);
    const text = verifyText(r, limits);
    expect(text).toMatch(/^keep-out zones \(a leg inside a zone or its buffer\): 2 breaches$/m);
    expect(text).toMatch(/^ {2}flight 1, strip 1, row 1 -> row 2 at 16\.\d{7}, 47\.\d{7}: enters keep-out zone "Farm yard"/m);
    expect(text).toMatch(/3 keep-out zones \("Farm yard" buffer 10 m, "Pylons" no buffer, "hole-zones 3" buffer 2\.5 m\), tolerance 0\.05 m/);
    expect(text.trim().split("\n").pop()).toBe("verdict: FAIL, 2 breaches (keepOut 2)");
    const j = JSON.parse(verifyJson(r, limits));
    expect(j.breaches.map((b: { limit: string; zone: string }) => `${b.limit} ${b.zone}`)).toEqual(["keepOut Farm yard", "keepOut Farm yard"]);
    expect(j.limits.keepOutZones).toEqual([
      { name: "Farm yard", bufferM: 10, polygons: 1, vertices: 8 },
      { name: "Pylons", bufferM: 0, polygons: 2, vertices: 8 },
      { name: "hole-zones 3", bufferM: 2.5, polygons: 1, vertices: 3 },
    ]);
    expect(j.checked.keepOutZones).toBe(3);
  });
});

describe("planar segment against polygon = brute force along the segment", () => {
  // A concave outline (an L) with a square hole, metres. Brute force: 20 001 points along each
  // segment, inside by turf's booleanPointInPolygon (ray casting, holes excluded), distance to
  // the outline by the point-to-segment formula over every edge.
  const outer = [[0, 0], [100, 0], [100, 40], [40, 40], [40, 100], [0, 100]];
  const hole = [[10, 10], [30, 10], [30, 30], [10, 30]];
  const poly = planarPolygon([outer, hole]);
  const turfPoly = { type: "Polygon" as const, coordinates: [[...outer, outer[0]], [...hole, hole[0]]] };
  const edges = [outer, hole].flatMap((r) => r.map((p, i) => [p, r[(i + 1) % r.length]]));
  const dist = (x: number, y: number) =>
    Math.min(...edges.map(([a, b]) => {
      const dx = b[0] - a[0], dy = b[1] - a[1];
      const t = Math.max(0, Math.min(1, ((x - a[0]) * dx + (y - a[1]) * dy) / (dx * dx + dy * dy)));
      return Math.hypot(a[0] + t * dx - x, a[1] + t * dy - y);
    }));
  // A fixed pseudo-random sequence (Park and Miller's minimal standard generator, CACM 31(10), 1988).
  let seed = 12345;
  const rnd = () => (seed = (seed * 16807) % 2147483647) / 2147483647;

  it("length within r of the zone (inside, or nearer the outline than r), closest approach and deepest point inside, for 60 random segments", () => {
    for (let s = 0; s < 60; s++) {
      const [ax, ay, bx, by] = [rnd() * 160 - 30, rnd() * 160 - 30, rnd() * 160 - 30, rnd() * 160 - 30];
      const r = [0, 3, 7.5][s % 3];
      const len = Math.hypot(bx - ax, by - ay);
      const inside = insideIntervals(poly, ax, ay, bx, by);
      const got = intervalsLength(r > 0 ? mergeIntervals([...inside, ...nearOutlineIntervals(poly, r, ax, ay, bx, by)]) : inside) * len;
      const n = 20_000;
      let hit = 0;
      let closest = Infinity;
      let deepest = -Infinity;
      for (let i = 0; i <= n; i++) {
        const x = ax + ((bx - ax) * i) / n, y = ay + ((by - ay) * i) / n;
        const d = dist(x, y);
        closest = Math.min(closest, d);
        const inPoly = booleanPointInPolygon([x, y], turfPoly, { ignoreBoundary: true });
        if (inPoly) deepest = Math.max(deepest, d);
        if (inPoly || d < r) hit++;
      }
      // The deepest point inside, found to 1 cm by branch and bound; the samples to len / 2n.
      let found = -Infinity;
      for (let q = 0; q < inside.length; q += 2) found = Math.max(found, deepestInside(poly, ax, ay, bx, by, inside[q], inside[q + 1], 0.01).d);
      if (deepest > 0) {
        expect(found).toBeGreaterThan(deepest - 0.01 - len / n);
        expect(found).toBeLessThan(deepest + len / n);
      }
      // Each sample stands for len / n of the segment; the ends of each stretch cost one sample each.
      expect(Math.abs(got - (hit * len) / (n + 1))).toBeLessThan((4 * len) / n + 1e-9);
      const exact = segmentOutlineDistance(poly, ax, ay, bx, by).d;
      expect(exact).toBeLessThanOrEqual(closest + 1e-9);
      expect(closest - exact).toBeLessThan(len / n);
    }
  });

  it("interval arithmetic: subtraction and merging", () => {
    expect(subtractIntervals([0, 1], [0.2, 0.3, 0.5, 0.6])).toEqual([0, 0.2, 0.3, 0.5, 0.6, 1]);
    expect(mergeIntervals([0.5, 0.7, 0.1, 0.6, 0.8, 0.9])).toEqual([0.1, 0.7, 0.8, 0.9]);
  });
});

describe.skipIf(!HAS_GDAL)("gsdplan verify with a plan that has keepOut (CLI)", () => {
  it("a list crossing the farm yard: exit 3, the zone named in the text and the JSON", () => {
    // The hole fixture's plan and DEM (UTM 33N, 2 m cells, ground 435-475 m) with the zones file.
    const dir = tempDir("verify-keepout");
    for (const f of ["hole_utm.tif", "hole_utm-site.geojson"]) copyFileSync(path.join(ROOT, "fixtures/truth", f), path.join(dir, f));
    copyFileSync(ZONES_FILE, path.join(dir, "hole-zones.geojson"));
    const plan = path.join(dir, "plan.yaml");
    writeFileSync(plan, readFileSync(path.join(ROOT, "fixtures/truth/hole_utm-plan.yaml"), "utf8") + "keepOut: hole-zones.geojson\n");
    // North of the nodata hole (radius 40 m around 600250, 5260250), 545 m: 70-110 m above the ground.
    const header = "flight,strip,index,segment,longitude,latitude,altitude_amsl_m,altitude_ellipsoid_m,altitude_takeoff_m,ground_amsl_m,height_above_ground_m,speed_m_s";
    const csv = [header, ...rowsAt([[600100, 5260370], [600400, 5260370], [600100, 5260370]]).map((r, i) =>
      `1,1,${i + 1},${r.segment},${r.longitude.toFixed(8)},${r.latitude.toFixed(8)},545.00,590.00,,,,${r.speedMps.toFixed(2)}`)].join("\r\n") + "\r\n";
    const list = path.join(dir, "waypoints.csv");
    writeFileSync(list, csv);
    const t = runCli(["verify", list, "--plan", plan]);
    expect(t.stderr).toBe("");
    expect(t.status).toBe(3);
    expect(t.stdout).toMatch(/^keep-out zones \(a leg inside a zone or its buffer\): 2 breaches$/m);
    expect(t.stdout).toContain('enters keep-out zone "Farm yard"');
    expect(t.stdout.trim().split("\n").pop()).toMatch(/^verdict: FAIL, 2 breaches \(keepOut 2\)/);
    const j = JSON.parse(runCli(["verify", list, "--plan", plan, "--json"]).stdout);
    expect(j.breaches.map((b: { limit: string; zone: string }) => `${b.limit}:${b.zone}`)).toEqual(["keepOut:Farm yard", "keepOut:Farm yard"]);
    // A missing zone file is bad input: exit 2, one line naming it.
    writeFileSync(plan, readFileSync(path.join(ROOT, "fixtures/truth/hole_utm-plan.yaml"), "utf8") + "keepOut: nowhere.geojson\n");
    const bad = runCli(["verify", list, "--plan", plan]);
    expect(bad.status).toBe(2);
    expect(bad.stderr.trim()).toBe(`gsdplan: ${path.join(dir, "nowhere.geojson")}: keepOut file not found`);
  });
});
