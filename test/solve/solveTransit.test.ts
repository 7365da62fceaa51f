import { describe, it, expect } from "vitest";
import { solveTransit } from "../../src/solve/solveLegs.js";
import { options, profileGrid } from "./fixtures.js";

// Flat ground at 100 m; clearance 10 m -> hard floor 110 m, ground-referenced ceiling
// 120 m -> 220 m. Fixed-wing at 10 m/s climbing and descending at 2 m/s: gradient limit
// 0.2 (vertical speed = gradient x ground speed, a straight-segment identity).
const grid = profileGrid(460, () => 100);
const transit = (x0: number, x1: number) => ({ kind: "transit" as const, strip: 2, from: [x0, 30.5] as [number, number], to: [x1, 30.5] as [number, number], lengthM: x1 - x0 });

describe("solveTransit: a transit whose ends join the legs beside it", () => {
  it("starts at the pinned start height and ends at the pinned end height", () => {
    const r = solveTransit(grid, transit(50.5, 350.5), options(), 150.123, 181.456);
    const w = r.leg.waypoints;
    expect(w[0].altitudeAmslM).toBeCloseTo(150.123, 6);
    expect(w[w.length - 1].altitudeAmslM).toBeCloseTo(181.456, 6);
    // 31.3 m over 300 m is a gradient of 0.10, inside the 0.2 limit: no step, no warning
    expect(r.warnings.filter((x) => x.code === "vertical-step")).toHaveLength(0);
    for (let k = 0; k < r.leg.profile.s.length; k++) expect(r.leg.profile.altitudeM[k]).toBeGreaterThanOrEqual(110 - 1e-6);
  });
  it("one end pinned leaves the other free", () => {
    const back = solveTransit(grid, transit(50.5, 350.5), options(), 160);
    expect(back.leg.waypoints[0].altitudeAmslM).toBeCloseTo(160, 6);
    const out = solveTransit(grid, transit(50.5, 350.5), options(), undefined, 170);
    expect(out.leg.waypoints[out.leg.waypoints.length - 1].altitudeAmslM).toBeCloseTo(170, 6);
  });
  it("too short to change height within the climb limit: a step on the spot at its end, with a warning", () => {
    // 100 m > 0.2 x 20 m = 4 m the leg can climb: the end height is reached on the spot.
    const r = solveTransit(grid, transit(50.5, 70.5), options(), 115, 215);
    const w = r.leg.waypoints;
    expect(w[0].altitudeAmslM).toBeCloseTo(115, 6);
    expect(w[w.length - 1].altitudeAmslM).toBe(215);
    expect(w[w.length - 1].x).toBe(w[w.length - 2].x);
    expect(r.warnings.some((x) => x.code === "vertical-step" && /too short to reach the strip's start height/.test(x.message))).toBe(true);
  });
  it("floor rising faster than the climb limit from the pinned start: climbs on the spot at its start, keeps clearance", () => {
    // Ground 100 m, then a ramp of gradient 1 from x = 100 to 200 (then 200 m): the
    // clearance floor (highest ground within 15 m + 10 m) rises at 1 m/m, five times the
    // 0.2 the aircraft can climb, so no path from 115 m keeps clearance without a climb
    // on the spot. Before this fallback the solver ended in an internal error.
    const ramp = profileGrid(460, (x) => (x < 100 ? 100 : x < 200 ? x : 200));
    const r = solveTransit(ramp, transit(80.5, 380.5), options(), 115);
    const w = r.leg.waypoints;
    expect(w[0].altitudeAmslM).toBe(115);
    expect(w[1].x).toBe(w[0].x);
    expect(w[1].altitudeAmslM).toBeGreaterThan(115);
    const p = r.leg.profile;
    for (let k = 0; k < p.s.length; k++) expect(p.altitudeM[k]).toBeGreaterThanOrEqual(p.hardLowM[k] - 1e-6);
    expect(r.warnings.some((x) => x.code === "vertical-step" && /climbs on the spot at its start/.test(x.message))).toBe(true);
  });

  it("no invented height: a wall the ceiling cannot clear is climbed only as high as clearance and the climb limit demand", () => {
    // A plateau at 100 m with a one-cell wall up to 300 m at x = 200 (a quarry face).
    // Clearance 10 m within 15 m; ceiling 120 m above the ground below; fixed-wing at 10 m/s
    // climbing 2 m/s (gradient 0.2). The start is pinned at 115 m. Keeping clearance needs
    // 310 m over the wall's top and, climbing at 0.2, the climb must begin 1000 m earlier:
    // the start cannot reach it, so the leg climbs on the spot at its start. Every height
    // of the path must be at most the larger of the ceiling and the least climb-feasible
    // clearance floor (the floor raised by the climb limit ahead): nothing above what the
    // limits themselves explain.
    const wall = profileGrid(460, (x) => (x < 200 ? 100 : 300));
    const o = options();
    const r = solveTransit(wall, transit(30.5, 400.5), o, 115);
    const p = r.leg.profile;
    const g = 0.2;
    for (let k = 0; k < p.s.length; k++) {
      // Least feasible floor: max over stations j ahead of hardLow(j) - g (s_j - s_k), and behind (descent 0.2).
      let f = -Infinity;
      for (let j = 0; j < p.s.length; j++) f = Math.max(f, p.hardLowM[j] - g * Math.abs(p.s[j] - p.s[k]));
      expect(p.altitudeM[k]).toBeGreaterThanOrEqual(p.hardLowM[k] - 1e-6);
      // Where clearance passes the ceiling (a conflict, reported as a breach) the solver's stated
      // allowance is up to one band width above the floor, to save waypoints.
      const conflict = p.hardLowM[k] > p.hardHighM[k] ? p.hardLowM[k] + (o.band.hMaxM - o.band.hMinM) : -Infinity;
      expect(p.altitudeM[k]).toBeLessThanOrEqual(Math.max(p.hardHighM[k], f, conflict) + 1e-6);
    }
    // The climb on the spot is no higher than the least feasible floor at the start.
    const w = r.leg.waypoints;
    expect(w[1].x).toBe(w[0].x);
    let f0 = -Infinity;
    for (let j = 0; j < p.s.length; j++) f0 = Math.max(f0, p.hardLowM[j] - g * p.s[j]);
    expect(w[1].altitudeAmslM).toBeLessThanOrEqual(Math.max(p.hardHighM[0], f0) + 1e-6);
  });
});
