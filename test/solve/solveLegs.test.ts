import { describe, it, expect } from "vitest";
import { solvePlan } from "../../src/solve/solveLegs.js";
import { CAUSE_CLIMB, CAUSE_CEILING, CAUSE_CLEARANCE, STATUS_DETAIL_LIMITED, STATUS_OK, STATUS_UNFLYABLE } from "../../src/solve/types.js";
import { InputError } from "../../src/errors.js";
import { makeGrid } from "../../src/dem/sample.js";
import { options, profileGrid, strip } from "./fixtures.js";

// Stations sit on cell centres (x = k + 0.5) and the zone is half a step along,
// so each station's zone ground is the analytic height at the station: the
// band is exactly [h + H_min, h + H_max] and the expectations below are exact.

describe("solvePlan on analytic terrains", () => {
  it("flat ground: one leg, two waypoints, AGL = target height", () => {
    const grid = profileGrid(400, () => 100);
    const r = solvePlan(grid, [strip(50.5, 350.5)], options());
    expect(r.legs).toHaveLength(1);
    const w = r.legs[0].waypoints;
    expect(w).toHaveLength(2);
    // preference is the band's middle: (90.3 + 110) / 2 above flat ground
    for (const p of w) expect(p.heightAboveGroundM).toBeCloseTo((90.3 + 110) / 2, 9);
    expect(r.counts).toEqual({ ok: 301, detailLimited: 0, unflyable: 0 });
    // time at constant 10 m/s over 300 m
    expect(r.legs[0].timeS).toBeCloseTo(30, 9);
  });

  it("plane inclined within the climb limit (0.1 < 0.2): two waypoints", () => {
    const grid = profileGrid(400, (x) => 100 + 0.1 * x);
    const r = solvePlan(grid, [strip(50.5, 350.5)], options());
    expect(r.legs[0].waypoints).toHaveLength(2);
    expect(r.counts.ok).toBe(301);
  });

  it("incline steeper than the climb limit: path at the limit gradient, climb-limited exactly where derived", () => {
    // Ground: 100 m up to x = 150, slope 0.5 to x = 250 (150 m), flat beyond.
    // Band [h + 90.3, h + 110]; gradient limit g = 2 / 10 = 0.2.
    // Before the incline the path can be anywhere in [190.3, 210]; its highest
    // reachable height leaves 210 at the last flat station x = 149.5 and grows
    // at 0.2: top(x) = 210 + 0.2 (x - 149.5). It falls below the band when
    //   210 + 0.2 (x - 149.5) < 100 + 0.5 (x - 150) + 90.3  <=>  x > 216,
    // and regains it after the incline when 210 + 0.2 (x - 149.5) >= 240.3
    //   <=> x >= 301. So stations x = 216.5 ... 300.5 are climb-limited.
    const h = (x: number) => (x < 150 ? 100 : x < 250 ? 100 + 0.5 * (x - 150) : 150);
    const grid = profileGrid(460, h);
    const r = solvePlan(grid, [strip(50.5, 400.5)], options());
    const p = r.legs[0].profile;
    for (let k = 0; k < p.s.length; k++) {
      const x = p.x[k];
      const limited = x > 216 && x < 301;
      expect([x, p.status[k]]).toEqual([x, limited ? STATUS_DETAIL_LIMITED : STATUS_OK]);
      if (limited) expect(p.cause[k] & CAUSE_CLIMB).toBe(CAUSE_CLIMB);
    }
    // On the climb-limited stretch the path climbs at exactly the limit gradient.
    for (let k = 1; k < p.s.length; k++) {
      if (p.x[k] > 217 && p.x[k] < 300) expect(p.altitudeM[k] - p.altitudeM[k - 1]).toBeCloseTo(0.2, 6);
    }
  });

  it("cliff step: the path climbs at the limit after the step and keeps clearance", () => {
    // Ground 100, a 60 m step up at x = 200. After the step the band low is
    // 250.3; the top of the reachable heights leaves 210 at x = 199.5 and grows
    // at 0.2, reaching 250.3 at x = 401, so x = 200.5 ... 400.5 are climb-limited.
    const grid = profileGrid(520, (x) => (x < 200 ? 100 : 160));
    const r = solvePlan(grid, [strip(50.5, 450.5)], options());
    const p = r.legs[0].profile;
    for (let k = 0; k < p.s.length; k++) {
      expect(p.altitudeM[k]).toBeGreaterThanOrEqual(p.hardLowM[k] - 1e-6);
      const limited = p.x[k] > 200 && p.x[k] < 401;
      expect([p.x[k], p.status[k]]).toEqual([p.x[k], limited ? STATUS_DETAIL_LIMITED : STATUS_OK]);
    }
    expect(r.legs[0].waypoints.length).toBeLessThanOrEqual(4);
  });

  it("narrow deep gorge with walls inside the safety radius: unflyable exactly where clearance passes the ceiling", () => {
    // Gorge floor 0 for |x - 200| < 5 (cells 195..204), rim 100. Over the floor the
    // ceiling is 0 + 120 while the walls within 15 m demand 100 + 30: conflict.
    // On the rim the ceiling is 220 > 130: flyable. Nowhere else conflicts. The ceiling
    // holds between stations, so a station whose next 1 m of path may pass over the floor
    // takes the floor's ceiling: the floor within 1 m + one cell diagonal (1.414 m) of the
    // 1 m stations adds two stations each side (193.5, 194.5 and 205.5, 206.5).
    const grid = profileGrid(400, (x) => (Math.abs(x - 200) < 5 ? 0 : 100));
    const opts = options({ clearance: { minM: 30, safetyRadiusM: 15, obstacleMarginM: 0 } });
    const r = solvePlan(grid, [strip(50.5, 350.5)], opts);
    expect(r.counts.unflyable).toBe(14);
    expect(r.legs.map((l) => l.kind)).toEqual(["strip", "transit", "strip"]);
    const gap = r.legs[1];
    expect(gap.conflictGap).toBe(true);
    for (let k = 0; k < gap.profile.s.length; k++) {
      const x = gap.profile.x[k];
      const want = x > 195 - 2.42 && x < 205 + 2.42 ? STATUS_UNFLYABLE : STATUS_OK;
      expect([x, gap.profile.status[k]]).toEqual([x, want]);
      expect(gap.profile.altitudeM[k]).toBeGreaterThanOrEqual(gap.profile.hardLowM[k] - 1e-6);
    }
    expect(r.warnings.some((w) => w.code === "ceiling-breach")).toBe(true);

    const through = solvePlan(grid, [strip(50.5, 350.5)], { ...opts, onConflict: "clearance" });
    expect(through.legs).toHaveLength(1);
    const p = through.legs[0].profile;
    for (let k = 0; k < p.s.length; k++) expect(p.altitudeM[k]).toBeGreaterThanOrEqual(p.hardLowM[k] - 1e-6);
    expect(through.counts.unflyable).toBe(14);
    expect(through.warnings.find((w) => w.code === "ceiling-breach")?.message).toMatch(/above the ceiling/);
  });

  it("band above the ceiling: detail-limited by the ceiling, never above it", () => {
    // Ground rises across the track (0.5 per m), so the zone's highest ground is
    // 110 while the ground below is 100: band low 200.3 is above a take-off
    // ceiling of 100 + 96 = 196, although the target 100 + 95 is below it.
    const grid = makeGrid({ width: 400, height: 60, x0: 0, y0: 60, cellM: 1, heights: (_x, y) => 100 + 0.5 * Math.abs(y - 30.5) });
    const r = solvePlan(grid, [strip(50.5, 350.5)], options({ ceiling: { heightM: 96, reference: "takeoff" }, takeoffGroundM: 100, band: { hMinM: 90.3, hMaxM: 110, hTargetM: 95 } }));
    const p = r.legs[0].profile;
    for (let k = 0; k < p.s.length; k++) {
      expect(p.status[k]).toBe(STATUS_DETAIL_LIMITED);
      expect(p.cause[k] & CAUSE_CEILING).toBe(CAUSE_CEILING);
      expect(p.cause[k] & CAUSE_CLEARANCE).toBe(0);
      expect(p.altitudeM[k]).toBeLessThanOrEqual(196 + 1e-6);
    }
    expect(r.legs[0].waypoints).toHaveLength(2);
  });

  it("multirotor slows down on steep segments: speed = climb rate / gradient, time counts it", () => {
    const grid = profileGrid(460, (x) => (x < 150 ? 100 : x < 250 ? 100 + 0.5 * (x - 150) : 150));
    const opts = options({ aircraft: { type: "multirotor", speedMps: 10, transitSpeedMps: 12, minSpeedMps: 2, maxClimbMps: 2, maxDescentMps: 2 } });
    const r = solvePlan(grid, [strip(50.5, 400.5)], opts);
    const leg = r.legs[0];
    // gradient limit 2 / 2 = 1 > 0.5: the band can be followed, no climb limit
    expect(r.counts.detailLimited).toBe(0);
    let t = 0;
    for (let v = 1; v < leg.waypoints.length; v++) {
      const a = leg.waypoints[v - 1], b = leg.waypoints[v];
      const g = Math.abs(b.altitudeAmslM - a.altitudeAmslM) / (b.s - a.s);
      expect(b.speedMps).toBeCloseTo(Math.max(2, Math.min(10, g > 0 ? 2 / g : 10)), 9);
      t += (b.s - a.s) / b.speedMps;
    }
    expect(leg.timeS).toBeCloseTo(t, 9);
  });
});

describe("solvePlan bad input", () => {
  const grid = profileGrid(400, () => 100);
  it("ceiling below the minimum clearance", () => {
    expect(() => solvePlan(grid, [strip(50.5, 350.5)], options({ ceiling: { heightM: 5, reference: "ground" } }))).toThrow(InputError);
  });
  it("climb or descent rate not positive", () => {
    const o = options();
    expect(() => solvePlan(grid, [strip(50.5, 350.5)], { ...o, aircraft: { ...o.aircraft, maxClimbMps: 0 } })).toThrow(/aircraft.maxClimbMps/);
    expect(() => solvePlan(grid, [strip(50.5, 350.5)], { ...o, aircraft: { ...o.aircraft, maxDescentMps: -1 } })).toThrow(/aircraft.maxDescentMps/);
  });
  it("target height above the ceiling everywhere names the legal GSD range", () => {
    // ifov 2.4e-6 * ... : GSD = H * ifov; clearance 10 m -> 0.0x cm, ceiling 120 m
    const o = options({ band: { hMinM: 150, hMaxM: 170, hTargetM: 160 }, ifov: 2.41e-4 });
    expect(() => solvePlan(grid, [strip(50.5, 350.5)], o)).toThrow(/band.hTargetM.*above the legal ceiling.*0\.24-2\.89 cm\/px/);
  });
  it("takeoff ceiling below the target over every strip", () => {
    const o = options({ ceiling: { heightM: 50, reference: "takeoff" }, takeoffGroundM: 0 });
    expect(() => solvePlan(grid, [strip(50.5, 350.5)], o)).toThrow(/above the legal ceiling over every strip/);
  });
  it("nodata under a strip is unflyable unless assumeGroundM gives a height", () => {
    const g = profileGrid(400, (x) => (x > 190 && x < 210 ? NaN : 100));
    const r = solvePlan(g, [strip(50.5, 350.5)], options());
    expect(r.counts.unflyable).toBeGreaterThan(20);
    const r2 = solvePlan(g, [strip(50.5, 350.5)], options({ assumeGroundM: 100 }));
    expect(r2.counts).toEqual({ ok: 301, detailLimited: 0, unflyable: 0 });
  });
});
