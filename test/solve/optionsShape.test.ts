import { describe, it, expect } from "vitest";
import { shapedSolverOptions } from "../../src/solve/optionsShape.js";
import type { SolverOptions } from "../../src/solve/types.js";

// The solver reads its options through one shape (solveLegs.ts solvePlan and solveTransit):
// the same values, every field kept, optional ones present as undefined.
describe("the solver's options in one shape", () => {
  const base: SolverOptions = {
    ceiling: { heightM: 120, reference: "ground" },
    takeoffGroundM: 312.5,
    clearance: { minM: 30, safetyRadiusM: 15, obstacleMarginM: 5 },
    aircraft: { type: "multirotor", speedMps: 8, transitSpeedMps: 12, minSpeedMps: 2, maxClimbMps: 4, maxDescentMps: 3 },
    band: { hMinM: 76, hMaxM: 84, hTargetM: 80 },
    zoneHalfAcrossM: 18,
    stationStepM: 0.5,
    onConflict: "skip",
  };

  it("keeps every value given, and only those", () => {
    const full: SolverOptions = { ...base, zoneHalfAlongM: 10.5, vertexStepM: 2, assumeGroundM: 380, routeAround: () => null, ifov: 2.7e-4, terrain: undefined };
    const shaped = shapedSolverOptions(full);
    for (const k of Object.keys(full) as (keyof SolverOptions)[]) expect(shaped[k], k).toBe(full[k]);
    // Fields not given are present but undefined, whatever the order they were given in.
    const { onConflict, ...rest } = base;
    const few = shapedSolverOptions({ onConflict, ...rest });
    expect(Object.keys(few)).toEqual(Object.keys(shaped));
    expect(few.vertexStepM).toBeUndefined();
    expect(few.assumeGroundM).toBeUndefined();
    expect(few.onConflict).toBe("skip");
    expect(few.band).toBe(base.band);
  });
});
