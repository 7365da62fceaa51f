/**
 * Transits go around unknown ground (DEM nodata) when a way exists, on the hole fixture
 * (fixtures/truth/hole_utm.tif: an 80 m round nodata hole mid-site, 2 m cells, written by
 * GDAL; fixtures/truth/README.md).
 *
 * References: GDAL reads the DEM's nodata cells (`gdal_translate -of XYZ` for the cell
 * centres, `gdal_polygonize.py` for their footprint, `ogr2ogr -t_srs EPSG:4326` into WGS84);
 * PROJ's cs2cs takes the written legs into the DEM's CRS; turf's booleanIntersects tests the
 * written legs against the nodata footprint; the shortest path among polygonal obstacles runs
 * over their vertices (Lozano-Pérez and Wesley, CACM 1979), so an exhaustive search over every
 * outline vertex (test/route helpers) gives the reference length.
 */
import { dataMask } from "../../src/dem/dataMask.js";
import { describe, it, expect, beforeAll } from "vitest";
import { execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
import path from "node:path";
import { booleanIntersects } from "@turf/turf";
import type { Feature, FeatureCollection, LineString, Polygon } from "geojson";
import { HAS_GDAL } from "../helpers/tools.js";
import { ROOT, runCli, tempDir } from "../e2e/cli.js";
import { cs2csFromWgs84 } from "../e2e/reference.js";
import { denseDijkstra, pathLength, pointSegmentDistance } from "../route/helpers.js";
import { loadPlanFile, resolvePlanOptions } from "../../src/plan/options.js";
import { planMission, type PlanRun } from "../../src/plan/plan.js";
import { aroundUnknownGround } from "../../src/route/aroundUnknown.js";
import { pointInsideAny, segmentEntersAny, type ObstacleIndex } from "../../src/route/inside.js";
import type { XY } from "../../src/layout/types.js";

const TRUTH = path.join(ROOT, "fixtures", "truth");
const DEM = path.join(TRUTH, "hole_utm.tif");
const PLAN = path.join(TRUTH, "hole_utm-plan.yaml");
const ASSUME = path.join(TRUTH, "hole_utm-assume-plan.yaml");
/** The fixture's safety radius (hole_utm-plan.yaml) and cell diagonal (2 m cells). */
const SAFETY_M = 15;
const DIAG_M = Math.hypot(2, 2);

type LegFeature = Feature<LineString, { layer: string; segment: string; strip: number }>;

function legsOf(out: string): LegFeature[] {
  const fc = JSON.parse(readFileSync(path.join(out, "plan.geojson"), "utf8")) as FeatureCollection;
  return fc.features.filter((f) => f.properties?.layer === "leg" && f.geometry.type === "LineString") as LegFeature[];
}

/** Centres of the DEM's nodata cells in its CRS, as GDAL lists them. */
function nodataCentres(): XY[] {
  const xyz = execFileSync("gdal_translate", ["-q", "-of", "XYZ", DEM, "/vsistdout/"], { encoding: "utf8", maxBuffer: 1 << 28 });
  return xyz.trim().split("\n").map((l) => l.trim().split(/\s+/).map(Number)).filter((v) => v[2] === -9999).map((v) => [v[0], v[1]] as XY);
}

/** The nodata cells' footprint in WGS84: gdal_polygonize.py (nodata cells kept), then ogr2ogr. */
function nodataFootprint(): Feature<Polygon>[] {
  const dir = tempDir("around-unknown-gdal");
  const all = path.join(dir, "all.geojson");
  const nd = path.join(dir, "nd.geojson");
  execFileSync("gdal_polygonize.py", ["-q", "-nomask", DEM, "-f", "GeoJSON", all]);
  execFileSync("ogr2ogr", ["-f", "GeoJSON", "-t_srs", "EPSG:4326", "-where", "DN = -9999", nd, all]);
  return (JSON.parse(readFileSync(nd, "utf8")) as FeatureCollection).features as Feature<Polygon>[];
}

describe.skipIf(!HAS_GDAL)("transits go around an 80 m DEM hole", () => {
  let out: string;
  let summary: { verification: { breaches: number; undeclared: number; byLimit: Record<string, number> }; warnings: string[]; pathLengthM: number };
  beforeAll(() => {
    out = path.join(tempDir("around-unknown"), "out");
    const r = runCli(["plan", PLAN, "--out", out, "--quiet", "--json"], { timeoutMs: 300_000 });
    expect(r.status, r.stderr).toBe(0);
    summary = JSON.parse(r.stdout);
  }, 300_000);

  it("the plan's own independent check finds no flight over unknown ground, and no crossing is warned", () => {
    expect(summary.verification.breaches).toBe(0);
    expect(summary.verification.byLimit).toEqual({});
    expect(summary.warnings.some((w) => /where the DEM has no data \(or ends\)/.test(w))).toBe(false);
  });

  it("no written leg touches the nodata cells GDAL polygonizes (turf booleanIntersects)", () => {
    const holes = nodataFootprint();
    expect(holes.length).toBeGreaterThan(0);
    const legs = legsOf(out);
    expect(legs.length).toBeGreaterThan(10);
    for (const leg of legs) for (const h of holes) expect(booleanIntersects(leg, h)).toBe(false);
  });

  it("every transit keeps more than the safety radius plus a cell diagonal from every nodata cell centre", () => {
    // The clearance disc must not touch a quad with a nodata corner (unknown bilinear ground), and such a
    // quad lies within one cell diagonal of that corner: so > 15 m + 2.83 m from every nodata centre.
    const centres = nodataCentres();
    expect(centres.length).toBeGreaterThan(1000); // pi 40^2 / 4 = 1257 cells of 2 m
    const transits = legsOf(out).filter((l) => l.properties.segment === "transit");
    let nearest = Infinity;
    for (const leg of transits) {
      const utm = cs2csFromWgs84(32633, leg.geometry.coordinates.map((c) => [c[0], c[1]] as [number, number]));
      for (let i = 1; i < utm.length; i++) for (const c of centres) nearest = Math.min(nearest, pointSegmentDistance(c, utm[i - 1], utm[i]));
    }
    expect(nearest).toBeGreaterThan(SAFETY_M + DIAG_M);
  });

  it("with assumeGroundM the strips still cross the hole, warned that the site has no DEM heights there", () => {
    const o = path.join(tempDir("around-unknown-assume"), "out");
    const r = runCli(["plan", ASSUME, "--out", o, "--quiet", "--json"], { timeoutMs: 300_000 });
    expect(r.status, r.stderr).toBe(0);
    const s = JSON.parse(r.stdout);
    expect(s.warnings.some((w: string) => /has no DEM heights/.test(w))).toBe(true);
    const holes = nodataFootprint();
    const crossing = legsOf(o).filter((l) => holes.some((h) => booleanIntersects(l, h)));
    expect(crossing.length).toBeGreaterThan(0);
  });
});

/** Shortest path length over every outline vertex of the index (visibility by segmentEntersAny). */
function exhaustive(index: ObstacleIndex, a: XY, b: XY): number {
  const pts: XY[] = [a, b, ...index.rings.flat()];
  const n = pts.length;
  const w = new Float64Array(n * n).fill(NaN);
  return denseDijkstra(n, 0, (i, j) => {
    const k = Math.min(i, j) * n + Math.max(i, j);
    if (Number.isNaN(w[k])) w[k] = segmentEntersAny(index, pts[i], pts[j]) ? Infinity : Math.hypot(pts[i][0] - pts[j][0], pts[i][1] - pts[j][1]);
    return w[k];
  })[1];
}

describe("the detours are shortest paths around the buffered unknown ground", () => {
  let run: PlanRun;
  beforeAll(async () => {
    const file = await loadPlanFile(PLAN);
    run = await planMission(resolvePlanOptions(file.data, {}, file.dir));
  }, 300_000);

  it("each routed transit is within 1.05x of an exhaustive visibility search, and flight length includes it", () => {
    const g = run.grid;
    // As plan.ts buffers: safety radius + one station step (1 m) + one cell diagonal.
    const clearM = run.options.clearance.safetyRadiusM + 1 + Math.hypot(g.cellSizeM[0], g.cellSizeM[1]);
    const around = aroundUnknownGround(dataMask(g.heights), g.width, g.height, g.transform, clearM)!;
    const index = around.router.index;
    const legs = run.flights.flights.flatMap((f) => f.legs);
    const routed = legs.filter((l) => l.kind === "transit" && l.lengthM > Math.hypot(l.to[0] - l.from[0], l.to[1] - l.from[1]) + 1);
    // The three bridges over the hole (strips 2, 3 and 4) and the leg back to take-off.
    expect(routed.length).toBeGreaterThanOrEqual(3);
    for (const leg of routed) {
      const way: XY[] = leg.waypoints.map((w) => [w.x, w.y]);
      expect(pathLength(way)).toBeCloseTo(leg.lengthM, 6);
      // Ends beside the hole lie inside the buffer (their own floor is known): compare from the
      // first and last vertices outside it; the steps out are shorter than the buffer.
      const i0 = way.findIndex((p) => !pointInsideAny(index, p));
      const i1 = way.length - 1 - [...way].reverse().findIndex((p) => !pointInsideAny(index, p));
      expect(pathLength(way.slice(0, i0 + 1))).toBeLessThan(clearM);
      expect(pathLength(way.slice(i1))).toBeLessThan(clearM);
      const ref = exhaustive(index, way[i0], way[i1]);
      expect(Number.isFinite(ref)).toBe(true);
      expect(pathLength(way.slice(i0, i1 + 1))).toBeLessThanOrEqual(1.05 * ref + 1e-6);
      // No vertex between those ends is inside the buffered unknown ground.
      for (let i = i0; i < i1; i++) expect(segmentEntersAny(index, way[i], way[i + 1])).toBe(false);
    }
    // Each routed bridge keeps the strip's stations it skipped, on the strip's line, unflyable inside.
    for (const leg of routed.filter((l) => l.conflictGap)) {
      const k = leg.skipped!;
      expect(k.status.slice(1, -1).every((st) => st === 2)).toBe(true); // STATUS_UNFLYABLE
      expect([k.x[0], k.y[0]]).toEqual(leg.from);
    }
    // Flight length is the legs' sum, detours included.
    const f = run.flights.flights[0];
    expect(f.lengthM).toBeCloseTo(f.legs.reduce((a, l) => a + l.lengthM, 0), 6);
    expect(run.flights.flights.reduce((a, fl) => a + fl.lengthM, 0)).toBeGreaterThan(routed.reduce((a, l) => a + l.lengthM, 0));
  });
});
