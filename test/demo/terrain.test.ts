import { execFileSync } from "node:child_process";
import { existsSync, readFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { booleanClockwise, booleanPointInPolygon, point } from "@turf/turf";
import type { Feature, FeatureCollection, Polygon } from "geojson";
import * as T from "../../scripts/demo-terrain.mjs";
import { HAS_GDAL, HAS_PROJ } from "../helpers/tools.js";

const HAS_CS2CS = HAS_PROJ;

// The demo GeoTIFF is read back with GDAL (Debian's gdal-bin) as the independent
// reader, and compared with the analytic terrain it was generated from
// (scripts/demo-terrain.mjs). PAM is off so GDAL writes no .aux.xml beside the fixture.

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..");
const demFile = path.join(root, "fixtures", "demo", `${T.SLUG}.tif`);
const siteFile = path.join(root, "fixtures", "demo", `${T.SLUG}-site.geojson`);
const gdalEnv = { ...process.env, GDAL_PAM_ENABLED: "NO" };

type XY = [number, number];

/** Snap a point to the centre of the DEM cell that holds it, so GDAL and the formula look at the same spot. */
function cellCentreOf([x, y]: XY): XY {
  const w = T.DEM_WINDOW;
  return [w.x0 + (Math.floor((x - w.x0) / w.cellM) + 0.5) * w.cellM, w.y0 - (Math.floor((w.y0 - y) / w.cellM) + 0.5) * w.cellM];
}

/** Cell values at UTM points, read by gdallocationinfo (one batch on stdin); NaN outside the raster. */
function gdalValues(points: XY[]): number[] {
  const input = points.map(([x, y]) => `${x} ${y}`).join("\n") + "\n";
  const out = execFileSync("gdallocationinfo", ["-valonly", "-geoloc", demFile], { input, encoding: "utf8", env: gdalEnv });
  const lines = out.split("\n").slice(0, points.length);
  expect(lines.length).toBe(points.length);
  return lines.map((l) => (l.trim() === "" ? NaN : Number(l)));
}

/** Points from `a` stepping `stepM` along the unit vector (ux, uy), `n` of them, snapped to cell centres. */
function transect(a: XY, ux: number, uy: number, stepM: number, n: number): XY[] {
  return Array.from({ length: n }, (_, i) => cellCentreOf([a[0] + i * stepM * ux, a[1] + i * stepM * uy]));
}

// Float32 keeps ~7 significant digits: 0.001 m is well above its rounding of heights near 400 m.
const FLOAT32_TOL_M = 1e-3;

describe.skipIf(!HAS_GDAL)("demo DEM read back with GDAL", () => {
  it("exists (regenerate with `node scripts/make-demo.mjs`)", () => {
    expect(existsSync(demFile)).toBe(true);
  });

  const info = () => JSON.parse(execFileSync("gdalinfo", ["-json", demFile], { encoding: "utf8", env: gdalEnv }));

  it("is a 1 m UTM zone 30N grid with EGM96 heights, on the generator's window", () => {
    const j = info();
    const w = T.DEM_WINDOW;
    expect(j.size).toEqual([w.width, w.height]);
    // GDAL geotransform order: [x0, dx, rx, y0, ry, dy] (GDAL data model documentation).
    expect(j.geoTransform).toEqual([w.x0, 1, 0, w.y0, 0, -1]);
    expect(j.bands[0].type).toBe("Float32");
    expect(j.bands[0].noDataValue).toBe(T.NODATA);
    const wkt: string = j.coordinateSystem.wkt;
    expect(wkt).toContain(`ID["EPSG",${T.EPSG_HORIZONTAL}]`);
    expect(wkt).toContain('VERTCRS["EGM96 height"');
    expect(wkt).toContain(`ID["EPSG",${T.EPSG_VERTICAL}]`);
    // The UTM zone for a longitude is floor((lon + 180) / 6) + 1, and EPSG 326zz is
    // WGS 84 / UTM zone zz north (the UTM grid definition; EPSG registry naming).
    const ring: number[][] = j.wgs84Extent.coordinates[0];
    const lon = ring.reduce((s, p) => s + p[0], 0) / ring.length;
    const lat = ring.reduce((s, p) => s + p[1], 0) / ring.length;
    expect(32600 + Math.floor((lon + 180) / 6) + 1).toBe(T.EPSG_HORIZONTAL);
    expect(lat).toBeGreaterThan(0);
  });

  it("holds the formula's heights, cell for cell, across the window", () => {
    const w = T.DEM_WINDOW;
    const pts: XY[] = [];
    // A lattice with odd strides, so rows and columns of every tile are visited.
    for (let r = 3; r < w.height; r += 37) for (let c = 5; c < w.width; c += 41) pts.push([w.x0 + c + 0.5, w.y0 - r - 0.5]);
    const got = gdalValues(pts);
    let nodata = 0;
    pts.forEach((p, i) => {
      const want = T.demValueM(p[0], p[1]);
      if (want === T.NODATA) nodata++;
      expect(Math.abs(got[i] - want)).toBeLessThan(FLOAT32_TOL_M);
    });
    expect(pts.length).toBeGreaterThan(1500);
    expect(nodata).toBeLessThan(pts.length);
  });

  it("has GDAL's statistics equal to the formula's over the whole window", () => {
    const j = JSON.parse(execFileSync("gdalinfo", ["-json", "-stats", demFile], { encoding: "utf8", env: gdalEnv }));
    const band = j.bands[0];
    const h = T.demHeights();
    let min = Infinity;
    let max = -Infinity;
    let sum = 0;
    let n = 0;
    for (let i = 0; i < h.length; i++) {
      if (h[i] === T.NODATA) continue;
      min = Math.min(min, h[i]);
      max = Math.max(max, h[i]);
      sum += h[i];
      n++;
    }
    expect(Math.abs(band.minimum - min)).toBeLessThan(FLOAT32_TOL_M);
    expect(Math.abs(band.maximum - max)).toBeLessThan(FLOAT32_TOL_M);
    expect(Math.abs(band.mean - sum / n)).toBeLessThan(0.01);
    // GDAL reports the share of valid cells to two decimals.
    expect(Math.abs(Number(band.metadata[""].STATISTICS_VALID_PERCENT) - (100 * n) / h.length)).toBeLessThan(0.006);
    expect(h.length - n).toBe(T.FEATURES.nodata.cells);
    // Total relief the scenario promises: hill country of 150-250 m.
    expect(band.maximum - band.minimum).toBeGreaterThan(150);
    expect(band.maximum - band.minimum).toBeLessThan(250);
  });

  it("has the ridge crest where the formula puts it", () => {
    for (const x of [521200.5, 522000.5, 522400.5]) {
      const crestY = T.ridgeCrestNorthingM(x);
      const pts = transect([x, crestY - 150], 0, 1, 1, 301);
      const got = gdalValues(pts);
      const want = pts.map(([px, py]) => T.demValueM(px, py));
      const iGot = got.indexOf(Math.max(...got));
      const iWant = want.indexOf(Math.max(...want));
      expect(iGot).toBe(iWant);
      expect(Math.abs(got[iGot] - want[iWant])).toBeLessThan(FLOAT32_TOL_M);
      // The noise moves the summit off the Gaussian's axis, but not far.
      expect(Math.abs(pts[iGot][1] - crestY)).toBeLessThan(40);
      // The crest stands well above the valley floor to the south.
      const valleyY = T.FEATURES.valley.centreNorthingAtM(x);
      const [valley] = gdalValues([cellCentreOf([x, valleyY])]);
      expect(got[iGot] - valley).toBeGreaterThan(100);
    }
  });

  it("has a narrow ravine, ~100 m deep where it cuts the crest, deeper than ceiling minus clearance", () => {
    const R = T.FEATURES.ravine;
    const [cx, cy] = R.crestCrossing;
    // East-west transect through the crossing: the line runs at 45 degrees, so a
    // width measured east-west is the true width / sin(45 degrees).
    const pts = transect([cx - 40, cy], 1, 0, 1, 81);
    const got = gdalValues(pts);
    pts.forEach((p, i) => expect(Math.abs(got[i] - T.demValueM(p[0], p[1]))).toBeLessThan(FLOAT32_TOL_M));
    const floor = Math.min(...got);
    const mid = got.indexOf(floor);
    // The lowest cell is on the flat floor, at the floor height of its own station along the line.
    expect(Math.abs(floor - T.ravineCentreLine(pts[mid][0], pts[mid][1]).floorM)).toBeLessThan(0.006);
    expect(Math.abs(floor - R.floorAtCrossingM)).toBeLessThan(1);
    // Highest ground within the 15 m safety radius of the floor's centre, on this transect
    // (a lower bound of the disc's maximum).
    const rim = Math.max(...got.slice(Math.max(0, mid - 15), mid + 16));
    const depth = rim - floor;
    expect(depth).toBeGreaterThan(95);
    expect(depth).toBeLessThan(110);
    // Clearance 30 m over the rim vs a 120 m ceiling over the floor (the demo plan):
    // z >= rim + 30 and z <= floor + 120 cannot both hold when depth > 90 m.
    expect(rim + 30).toBeGreaterThan(floor + 120);
    const cut = got.filter((z, i) => Math.abs(i - mid) < 30 && z < rim - 0.05 * depth).length;
    const widthM = cut * Math.SQRT1_2;
    expect(widthM).toBeGreaterThan(20);
    expect(widthM).toBeLessThan(30);
  });

  it("has a ravine 40-80 m deep further down its course", () => {
    const R = T.FEATURES.ravine;
    const [cx, cy] = R.crestCrossing;
    for (const s of [-230, 380]) {
      const x = cx + s * R.direction[0];
      const y = cy + s * R.direction[1];
      const pts = transect([x - 20, y], 1, 0, 1, 41);
      const got = gdalValues(pts);
      const floor = Math.min(...got);
      const low = pts[got.indexOf(floor)];
      const rim = Math.max(got[0], got[got.length - 1]);
      expect(Math.abs(floor - T.ravineCentreLine(low[0], low[1]).floorM)).toBeLessThan(0.006);
      expect(rim - floor).toBeGreaterThan(40);
      expect(rim - floor).toBeLessThan(80);
    }
  });

  it("has a near-vertical quarry face of 40-60 m above a flat floor", () => {
    const Q = T.FEATURES.quarry;
    const [fx, fy] = Q.faceCentre;
    // North-south across the face: 25 m of floor, the face, 15 m of ground above it.
    const pts = transect([fx + 0.5, fy - 25], 0, 1, 1, 41);
    const got = gdalValues(pts);
    pts.forEach((p, i) => expect(Math.abs(got[i] - T.demValueM(p[0], p[1]))).toBeLessThan(FLOAT32_TOL_M));
    const floorCells = got.slice(0, 20);
    for (const z of floorCells) expect(Math.abs(z - Q.floorM)).toBeLessThan(0.006);
    const top = got[26];
    expect(top - Q.floorM).toBeGreaterThan(40);
    expect(top - Q.floorM).toBeLessThan(60);
    // Steepest drop between neighbouring 1 m cells: over 10 m is steeper than
    // atan(10) = 84 degrees (plain trigonometry).
    let steepest = 0;
    for (let i = 1; i < got.length; i++) steepest = Math.max(steepest, got[i] - got[i - 1]);
    expect(steepest).toBeGreaterThan(10);
  });

  it("has the 30 m x 20 m lidar void, and data all round it", () => {
    const ring = T.FEATURES.nodata.ring;
    const [x0, y0] = ring[0];
    const [x1, y1] = ring[2];
    const inside: XY[] = [];
    const around: XY[] = [];
    for (let y = y0 - 0.5; y <= y1 + 0.5; y += 1) {
      for (let x = x0 - 0.5; x <= x1 + 0.5; x += 1) {
        const edge = y < y0 || y > y1 || x < x0 || x > x1;
        (edge ? around : inside).push([x, y]);
      }
    }
    expect(inside.length).toBe(600);
    for (const z of gdalValues(inside)) expect(z).toBe(T.NODATA);
    for (const z of gdalValues(around)) expect(z).not.toBe(T.NODATA);
  });
});

describe.skipIf(!HAS_CS2CS)("demo site polygon checked with PROJ", () => {
  const fc = JSON.parse(readFileSync(siteFile, "utf8")) as FeatureCollection<Polygon>;
  const site = fc.features[0] as Feature<Polygon>;

  /** WGS84 lon/lat -> UTM 30N with PROJ's cs2cs (EPSG:4326 takes latitude first). */
  function toUtm(lonLat: number[][]): XY[] {
    const input = lonLat.map(([lon, lat]) => `${lat} ${lon}`).join("\n") + "\n";
    const out = execFileSync("cs2cs", ["-f", "%.4f", "EPSG:4326", `EPSG:${T.EPSG_HORIZONTAL}`], { input, encoding: "utf8" });
    return out.trim().split("\n").map((l) => l.trim().split(/\s+/).slice(0, 2).map(Number) as XY);
  }
  function toLonLat(xy: XY[]): number[][] {
    const input = xy.map(([x, y]) => `${x} ${y}`).join("\n") + "\n";
    const out = execFileSync("cs2cs", ["-f", "%.9f", `EPSG:${T.EPSG_HORIZONTAL}`, "EPSG:4326"], { input, encoding: "utf8" });
    return out.trim().split("\n").map((l) => {
      const [lat, lon] = l.trim().split(/\s+/).map(Number);
      return [lon, lat];
    });
  }

  it("maps back onto the generator's UTM corners", () => {
    expect(site.properties?.name).toBe(T.SITE_NAME);
    const [ext, hole] = site.geometry.coordinates;
    const rings: [number[][], XY[]][] = [
      [ext, T.FEATURES.site.exterior],
      [hole, T.FEATURES.site.hole],
    ];
    for (const [lonLat, utm] of rings) {
      const back = toUtm(lonLat);
      expect(back.length).toBe(utm.length);
      // 7 decimals of a degree are at most ~1.1 cm on the ground.
      back.forEach(([x, y], i) => {
        expect(Math.abs(x - utm[i][0])).toBeLessThan(0.02);
        expect(Math.abs(y - utm[i][1])).toBeLessThan(0.02);
      });
    }
  });

  it("winds as RFC 7946 asks: exterior counter-clockwise, hole clockwise", () => {
    // RFC 7946 section 3.1.6 (right-hand rule).
    const [ext, hole] = site.geometry.coordinates;
    expect(booleanClockwise(ext)).toBe(false);
    expect(booleanClockwise(hole)).toBe(true);
  });

  it("holds the quarry, the ravine crossing and the void, and leaves out the yard", () => {
    const F = T.FEATURES;
    const [vx0, vy0] = F.nodata.ring[0];
    const [hx0, hy0] = F.site.hole[0];
    const probes: XY[] = [F.quarry.faceCentre, F.ravine.crestCrossing, [vx0 + 15, vy0 + 10], [hx0 + 40, hy0 + 30]];
    const inside = toLonLat(probes).map((p) => booleanPointInPolygon(point(p), site));
    expect(inside).toEqual([true, true, true, false]);
  });
});
