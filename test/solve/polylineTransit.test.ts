/**
 * Polyline transits: stations along every straight piece, every vertex a station and a
 * waypoint, one altitude path along the polyline's distance; and transits around a
 * nodata hole when the solver is given a way around it.
 *
 * References: lengths of 3-4-5 right triangles (Pythagoras); a straight, constant-gradient
 * path is linear in distance, so a point inserted on it keeps its height and the leg's time
 * (distance / speed, summed piecewise).
 */
import { dataMask } from "../../src/dem/dataMask.js";
import { describe, it, expect } from "vitest";
import { makeGrid } from "../../src/dem/sample.js";
import { solveTransit } from "../../src/solve/solveLegs.js";
import { stationsAlongPolyline } from "../../src/solve/stations.js";
import { aroundUnknownGround } from "../../src/route/aroundUnknown.js";
import type { LayoutLeg, XY } from "../../src/layout/types.js";
import { options } from "./fixtures.js";

describe("stationsAlongPolyline", () => {
  it("puts a station on every vertex and none more than one step apart", () => {
    // Pieces of 5 m (3-4-5) and 10 m (6-8-10): 15 m in all.
    const { stations: st, corners } = stationsAlongPolyline([[0, 0], [3, 4], [9, 12]], 2, 20);
    expect(Array.from(corners)).toEqual([0, 3, 8]); // ceil(5 / 2) = 3 steps, then ceil(10 / 2) = 5
    expect(st.s[st.s.length - 1]).toBeCloseTo(15, 12);
    expect([st.x[3], st.y[3]]).toEqual([3, 4]);
    expect([st.x[8], st.y[8]]).toEqual([9, 12]);
    for (let i = 1; i < st.s.length; i++) {
      const d = Math.hypot(st.x[i] - st.x[i - 1], st.y[i] - st.y[i - 1]);
      expect(d).toBeLessThanOrEqual(2 + 1e-12);
      expect(st.s[i] - st.s[i - 1]).toBeCloseTo(d, 12);
    }
  });
});

// Flat ground at 100 m on a 1 m grid, 200 x 120 cells, with a 40 x 40 m nodata square in the middle.
const HOLE = { w: 80, e: 120, s: 40, n: 80 };
const grid = makeGrid({
  width: 200, height: 120, x0: 0, y0: 120, cellM: 1,
  heights: (x, y) => (x > HOLE.w && x < HOLE.e && y > HOLE.s && y < HOLE.n ? NaN : 100),
});
const leg = (from: XY, to: XY, via?: XY[]): LayoutLeg => {
  const pts = [from, ...(via ?? []), to];
  let lengthM = 0;
  for (let i = 1; i < pts.length; i++) lengthM += Math.hypot(pts[i][0] - pts[i - 1][0], pts[i][1] - pts[i - 1][1]);
  return { kind: "transit", strip: 2, from, to, lengthM, ...(via ? { via } : {}) };
};

describe("solveTransit along a polyline", () => {
  it("makes every vertex a waypoint on the solved path, the length and time those of the polyline", () => {
    // 30 m east, then 30 m east and 10 m north, then 60 m east and 10 m south, south of the hole and clear of it.
    const l = leg([40.5, 10.5], [160.5, 10.5], [[70.5, 10.5], [100.5, 20.5]]);
    const r = solveTransit(grid, l, options(), 150, 130);
    const wps = r.leg.waypoints;
    for (const v of l.via!) expect(wps.some((w) => Math.hypot(w.x - v[0], w.y - v[1]) < 1e-9)).toBe(true);
    expect(r.leg.lengthM).toBeCloseTo(30 + Math.hypot(30, 10) + Math.hypot(60, 10), 9);
    // Each waypoint's height is the path's at its station; time = sum of piece length / speed.
    let t = 0;
    for (let i = 1; i < wps.length; i++) t += (wps[i].s - wps[i - 1].s) / wps[i].speedMps;
    expect(r.leg.timeS).toBeCloseTo(t, 9);
    for (const w of wps) {
      const k = r.leg.profile.s.findIndex((s) => Math.abs(s - w.s) < 1e-9);
      expect(r.leg.profile.altitudeM[k]).toBeCloseTo(w.altitudeAmslM, 9);
    }
    expect(wps[0].altitudeAmslM).toBeCloseTo(150, 9);
    expect(wps[wps.length - 1].altitudeAmslM).toBeCloseTo(130, 9);
  });
});

describe("solveTransit around a nodata hole", () => {
  // Buffer: safety radius 15 m + station step 1 m + cell diagonal (as plan.ts).
  const clearM = 15 + 1 + Math.SQRT2;
  const around = aroundUnknownGround(dataMask(grid.heights), grid.width, grid.height, grid.transform, clearM)!;
  const straight = leg([20.5, 60.5], [180.5, 60.5]);

  it("straight across, it guesses and warns (no way around given)", () => {
    const r = solveTransit(grid, straight, options());
    expect(r.warnings.some((w) => w.code === "unknown-ground")).toBe(true);
  });

  it("with a way around, it flies it: floor known everywhere, no warning, longer by the detour", () => {
    const r = solveTransit(grid, straight, options({ routeAround: (a, b) => around.route(a, b) }));
    expect(r.warnings.some((w) => w.code === "unknown-ground")).toBe(false);
    const p = r.leg.profile;
    for (let k = 0; k < p.s.length; k++) expect(Number.isFinite(p.hardLowM[k])).toBe(true);
    // Lower bound (Pythagoras): a path 15 m clear of the nodata centres (x 80.5-119.5, y 40.5-79.5)
    // passes above y = 94.5 (or below 25.5) from x = 80.5 to 119.5: hypot(60, 34) + 39 + hypot(61, 34).
    const lower = Math.hypot(60, 34) + 39 + Math.hypot(61, 34);
    expect(r.leg.lengthM).toBeGreaterThanOrEqual(lower);
    // The buffer adds one station step, a cell diagonal and the traced outline's cell: a few metres up and down.
    expect(r.leg.lengthM).toBeLessThan(lower + 12);
    expect(r.leg.waypoints.length).toBeGreaterThan(2);
    // No station is within the safety radius of a nodata cell centre.
    for (let k = 0; k < p.s.length; k++) {
      const dx = Math.max(HOLE.w + 0.5 - p.x[k], 0, p.x[k] - (HOLE.e - 0.5));
      const dy = Math.max(HOLE.s + 0.5 - p.y[k], 0, p.y[k] - (HOLE.n - 0.5));
      expect(Math.hypot(dx, dy)).toBeGreaterThan(15);
    }
  });
});
