import { describe, expect, it } from "vitest";
import { makeGrid } from "../../src/dem/sample.js";
import type { LayoutLeg, XY } from "../../src/layout/types.js";
import type { SolverOptions } from "../../src/solve/types.js";
import { connectorBreachM, solveInBestStripOrder } from "../../src/plan/stripOrder.js";
import { solvePlan } from "../../src/solve/solveLegs.js";

// Flat ground at 100 m with one mast-like spike of 300 m (a single 1 m cell) midway between
// the east ends of two strips 40 m apart. Strips stay 20 m from it, outside the 15 m safety
// radius; the connector at the east ends passes over it. Within 15 m of the spike clearance
// wants 300 + 30 = 330 m while a 120 m ceiling over the ground straight below allows 220 m:
// the hard bounds conflict (the geometry of the ceiling rule, 14 CFR 107.51(b)-style
// "above ground level"), so the connector must break the ceiling there; at the west ends
// it need not.
const SPIKE: XY = [180.5, 20.5];
const grid = makeGrid({
  width: 240,
  height: 120,
  x0: -20,
  y0: 80,
  cellM: 1,
  heights: (x, y) => (Math.abs(x - SPIKE[0]) < 0.5 && Math.abs(y - SPIKE[1]) < 0.5 ? 300 : 100),
});
const opts: SolverOptions = {
  ceiling: { heightM: 120, reference: "ground" },
  takeoffGroundM: 100,
  clearance: { minM: 30, safetyRadiusM: 15, obstacleMarginM: 0 },
  aircraft: { type: "multirotor", speedMps: 8, transitSpeedMps: 10, minSpeedMps: 1, maxClimbMps: 3, maxDescentMps: 2 },
  band: { hMinM: 72, hMaxM: 88, hTargetM: 80 },
  zoneHalfAcrossM: 20,
  stationStepM: 1,
  onConflict: "skip",
};
const leg = (kind: LayoutLeg["kind"], strip: number, from: XY, to: XY): LayoutLeg => ({ kind, strip, from, to, lengthM: Math.hypot(to[0] - from[0], to[1] - from[1]) });
const takeoff: XY = [0.5, -10.5];
const legs: LayoutLeg[] = [
  leg("transit", 1, takeoff, [20.5, 0.5]),
  leg("strip", 1, [20.5, 0.5], [180.5, 0.5]),
  leg("transit", 2, [180.5, 0.5], [180.5, 40.5]),
  leg("strip", 2, [180.5, 40.5], [20.5, 40.5]),
  leg("transit", 2, [20.5, 40.5], takeoff),
];

describe("strip order against a connector's ceiling crossing", () => {
  it("measures the first order's crossing on the east connector", () => {
    // The connector meets the conflict within 15 m either side of the spike (30 m of the
    // 40 m connector). Climbing 150 m from the strip's 180 m to 330 m at 3 m/s cannot happen
    // in the 5 m before the disc, so the aircraft is above the 220 m ceiling from the
    // connector's first metres to its last: more than the disc, at most the whole connector.
    const m = connectorBreachM(solvePlan(grid, legs, opts).legs);
    expect(m).toBeGreaterThanOrEqual(30);
    expect(m).toBeLessThanOrEqual(40);
  });

  it("flies the strips the other way, which puts the connector at the west ends and removes the crossing", () => {
    const r = solveInBestStripOrder(grid, legs, takeoff, opts);
    expect(r.warning?.code).toBe("strips-reordered");
    expect(r.legs.filter((l) => l.kind === "strip").map((l) => l.from)).toEqual([[180.5, 0.5], [20.5, 40.5]]);
    expect(connectorBreachM(r.solve.legs)).toBe(0);
  });

  it("keeps the given order when no connector crosses", () => {
    const flat = makeGrid({ width: 240, height: 120, x0: -20, y0: 80, cellM: 1, heights: () => 100 });
    const r = solveInBestStripOrder(flat, legs, takeoff, opts);
    expect(r.legs).toBe(legs);
    expect(r.warning).toBeUndefined();
  });
});
