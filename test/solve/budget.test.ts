import { describe, it, expect } from "vitest";
import { solvePlan } from "../../src/solve/solveLegs.js";
import { waypointBudget, toleranceToFitBudget } from "../../src/solve/budget.js";
import { options, profileGrid, strip } from "./fixtures.js";

describe("waypoint budget", () => {
  // A wavy profile: h = 100 + 8 sin(x / 15). A wider band straightens the path, so fewer waypoints.
  const grid = profileGrid(700, (x) => 100 + 8 * Math.sin(x / 15));
  const legs = [strip(50.5, 650.5)];
  const opts = options({ band: { hMinM: 95, hMaxM: 105, hTargetM: 100 }, zoneHalfAcrossM: 5 });

  it("counts waypoints, junctions once, and the excess over the budget", () => {
    const r = solvePlan(grid, legs, opts);
    const n = r.legs[0].waypoints.length;
    const b = waypointBudget(r, 3);
    expect(b.waypoints).toBe(n);
    expect(b.over).toBe(Math.max(0, n - 3));
    expect(b.perKmStrip).toBeCloseTo(n / 0.6, 9);
  });

  it("names a wider tolerance that fits, by re-solving", () => {
    const n = waypointBudget(solvePlan(grid, legs, opts), 1e9).waypoints;
    const fit = toleranceToFitBudget(grid, legs, opts, n - 1, [1.5, 2, 3, 4]);
    expect(fit).not.toBeNull();
    expect(fit!.waypoints).toBeLessThanOrEqual(n - 1);
    expect(fit!.tolerance).toBeCloseTo(0.05 * fit!.factor, 9);
  });
});
