/**
 * The plan's keep-out handling around the layout: a take-off corner in a zone moves out,
 * strip pieces ringed by a zone are not flown, and refusals. Geometry checked with turf
 * (booleanPointInPolygon) on the local frame's metres; numbers are worked by hand below.
 */
import { describe, it, expect } from "vitest";
import { booleanPointInPolygon, point, polygon } from "@turf/turf";
import { InputError } from "../../src/errors.js";
import type { Layout, LayoutLeg, XY } from "../../src/layout/types.js";
import { keepOutSet } from "../../src/route/keepOut.js";
import { applyKeepOut } from "../../src/plan/obstacles.js";
import { paintKeepOutCuts } from "../../src/assess/flagRaster.js";
import { FLAG_FEW_IMAGES, FLAG_KEEP_OUT } from "../../src/assess/flags.js";
import { assumedGroundCrossings } from "../../src/plan/assumedCrossings.js";
import { makeGrid } from "../../src/dem/sample.js";
import type { SolvedLeg } from "../../src/solve/types.js";

const strip = (n: number, from: XY, to: XY): LayoutLeg => ({ kind: "strip", strip: n, from, to, lengthM: Math.hypot(to[0] - from[0], to[1] - from[1]) });
const transit = (n: number, from: XY, to: XY): LayoutLeg => ({ kind: "transit", strip: n, from, to, lengthM: Math.hypot(to[0] - from[0], to[1] - from[1]) });

function layoutOf(strips: LayoutLeg[], takeoff: XY): Layout {
  const legs: LayoutLeg[] = [];
  let here = takeoff;
  for (const s of strips) { legs.push(transit(s.strip, here, s.from), s); here = s.to; }
  legs.push(transit(strips[strips.length - 1].strip, here, takeoff));
  return { headingDeg: 90, spacingM: 40, triggerM: 20, footprintAcrossM: 100, footprintAlongM: 50, legs, takeoff, headingCandidates: [], headingReason: "" };
}

// A ring-shaped zone (outer 200 x 200 m, hole 100 x 100 m) and strips inside and outside the hole.
const ring = { name: "ring", source: "z.geojson", bufferM: 5, polygons: [[
  [[0, 0], [200, 0], [200, 200], [0, 200]] as XY[],
  [[50, 50], [150, 50], [150, 150], [50, 150]] as XY[],
]] };
const set = keepOutSet([ring]);

describe("applyKeepOut", () => {
  it("drops a strip piece inside the ring's hole (no way in without crossing the zone) and warns", () => {
    const outside = strip(1, [-50, -20], [250, -20]);
    const inHole = strip(2, [70, 100], [130, 100]);
    const r = applyKeepOut(layoutOf([outside, inHole], [-60, -60]), set, null, [0, 0]);
    expect(r.layout.legs.filter((l) => l.kind === "strip")).toEqual([outside]);
    expect(r.warnings.map((w) => w.code)).toEqual(["keep-out-enclosed"]);
    expect(r.warnings[0].message).toMatch(/1 strip piece \(60 m, strip 2\)/);
    // Rebuilt transits: from take-off to the strip and back.
    expect(r.layout.legs.map((l) => [l.kind, l.from, l.to])).toEqual([["transit", [-60, -60], [-50, -20]], ["strip", [-50, -20], [250, -20]], ["transit", [250, -20], [-60, -60]]]);
  });

  it("moves a take-off corner the layout chose inside the zone to the buffered zone's edge (outside by turf), with a warning", () => {
    const outside = strip(1, [-50, -20], [250, -20]);
    const r = applyKeepOut(layoutOf([outside], [10, 10]), set, null, undefined);
    const t = r.layout.takeoff;
    const buffered = polygon(set.buffered[0].polygons[0].map((rg) => [...rg, rg[0]]));
    expect(booleanPointInPolygon(point(t), buffered, { ignoreBoundary: true })).toBe(false);
    // The nearest way out of (10, 10) is 15 m to the west or south (10 m to the zone edge + 5 m buffer).
    expect(Math.hypot(t[0] - 10, t[1] - 10)).toBeCloseTo(15, 2);
    expect(r.warnings[0].code).toBe("takeoff-moved");
    expect(r.layout.legs[0].from).toEqual(t);
  });

  it("refuses when every strip is ringed in (exit 2 as an InputError naming takeoff)", () => {
    const inHole = strip(1, [70, 100], [130, 100]);
    expect(() => applyKeepOut(layoutOf([inHole], [-60, -60]), set, null, [1, 2])).toThrow(InputError);
    expect(() => applyKeepOut(layoutOf([inHole], [-60, -60]), set, null, [1, 2])).toThrow(/takeoff: keep-out zones enclose every strip/);
  });

  it("returns the layout unchanged when nothing is in the way", () => {
    const l = layoutOf([strip(1, [-50, -20], [250, -20])], [-60, -60]);
    expect(applyKeepOut(l, set, null, [0, 0]).layout).toBe(l);
  });
});

describe("paintKeepOutCuts", () => {
  // 1 m cells over 0..100 x 0..60; a cut along y = 30 from x = 40 to 60; footprint 20 across, 10 along.
  const grid = makeGrid({ width: 100, height: 60, x0: 0, y0: 60, cellM: 1, heights: () => 0 });
  const inSite = new Uint8Array(100 * 60).fill(1);
  it("sets bit 256 on too-few-images cells within half the footprint of the cut (and half a footprint past its ends), nowhere else", () => {
    const flags = new Uint16Array(100 * 60).fill(FLAG_FEW_IMAGES);
    flags[30 * 100 + 50] = 0; // a cell with enough images under the cut keeps no bit
    paintKeepOutCuts(flags, grid, inSite, [{ from: [40, 30], to: [60, 30] }], 10, 5);
    let n = 0;
    for (let r = 0; r < 60; r++) for (let c = 0; c < 100; c++) {
      const x = c + 0.5, y = 60 - (r + 0.5);
      const inRect = x >= 35 && x <= 65 && y >= 20 && y <= 40;
      const has = (flags[r * 100 + c] & FLAG_KEEP_OUT) !== 0;
      if (r * 100 + c === 30 * 100 + 50) expect(has).toBe(false);
      else expect(has).toBe(inRect);
      if (has) n++;
    }
    // 30 x 20 cells, less the one with enough images.
    expect(n).toBe(30 * 20 - 1);
  });
});

describe("assumedGroundCrossings", () => {
  it("announces each crossing of nodata with its length (stations 1 m apart over a 20 m nodata band)", () => {
    const heights = new Float32Array(100 * 10).fill(300);
    for (let r = 0; r < 10; r++) for (let c = 40; c < 60; c++) heights[r * 100 + c] = NaN;
    const grid = makeGrid({ width: 100, height: 10, x0: 0, y0: 10, cellM: 1, heights });
    const n = 91;
    const s = Float64Array.from({ length: n }, (_, k) => k);
    const leg = { kind: "transit", strip: 3, from: [5, 5], to: [95, 5], profile: { s, x: Float64Array.from(s, (v) => v + 5), y: new Float64Array(n).fill(5) } } as unknown as SolvedLeg;
    const w = assumedGroundCrossings(grid, [leg], 350);
    expect(w).toHaveLength(1);
    // Nodata centres 40.5..59.5: the bilinear ground needs one of them for x in (39.5, 60.5), 21 m;
    // the stations at x = 40..60 are unknown, and the crossing runs half a step past each end.
    expect(w[0].message).toMatch(/Leg into strip 3 crosses ground the DEM does not know once \(21 m; 21 m in all\), flown on the assumed ground height of 350 m/);
  });
});

describe("a take-off point ringed by unknown ground", () => {
  it("is refused in one line that says no way avoids the unknown ground", async () => {
    const { makeDetour } = await import("../../src/route/detour.js");
    const { bufferZones } = await import("../../src/route/obstacles.js");
    // Unknown ground as a square ring around the take-off point at (0, 0).
    const ringZone = bufferZones([{ name: "unknown ground 1", bufferM: 0, rings: [[[-100, -100], [100, -100], [100, 100], [-100, 100]], [[-50, -50], [-50, 50], [50, 50], [50, -50]]] }]);
    const l = layoutOf([strip(1, [150, 0], [300, 0])], [0, 0]);
    const e = errorOf(() => applyKeepOut(l, null, makeDetour(ringZone), [12.5, 47.1]));
    expect(e.message).toBe("takeoff: no way from the take-off point to any strip avoids unknown ground (DEM nodata) and keep-out zones (got [12.5,47.1]; allowed: a point from which the site can be reached over known ground)");
    expect(e.message.split("\n")).toHaveLength(1);
  });
});

describe("the DEM window holds a take-off point beyond the site's margin", () => {
  it("plans from a take-off 300 m west of the site (the hills fixture, GDAL-written; heights read back by GDAL in the e2e suite)", async () => {
    const { loadPlanFile, resolvePlanOptions } = await import("../../src/plan/options.js");
    const { prepareMission } = await import("../../src/plan/plan.js");
    const f = await loadPlanFile(new URL("../../fixtures/e2e/hills-utm33-small-plan.yaml", import.meta.url).pathname);
    // UTM 33N 500440 E, 5200400 N (cs2cs, EPSG:32633 -> EPSG:4326): west of the site by about 300 m.
    const o = resolvePlanOptions(f.data, { takeoff: [15.0057829, 46.9571286] }, f.dir);
    const m = await prepareMission(o);
    const [x, y] = m.frame.fromWgs84(15.0057829, 46.9571286);
    const { x0, y0, dx, dy } = m.grid.transform;
    const col = (x - x0) / dx, row = (y - y0) / dy;
    expect(col).toBeGreaterThan(0.5);
    expect(row).toBeGreaterThan(0.5);
    expect(col).toBeLessThan(m.grid.width - 0.5);
    expect(row).toBeLessThan(m.grid.height - 0.5);
  });
});

function errorOf(fn: () => unknown): InputError {
  try {
    fn();
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error("expected an InputError");
}
