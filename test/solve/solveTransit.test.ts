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
});
