import { describe, it, expect } from "vitest";
import { shapedSolverOptions } from "../../src/solve/optionsShape.js";
import type { SolverOptions } from "../../src/solve/types.js";
import { options } from "./fixtures.js";

// The solver reads its options through one shape (solveLegs.ts solvePlan and solveTransit):
// the same values, every field kept, optional ones present as undefined.
describe("the solver's options in one shape", () => {
  it("keeps every value given, and only those", () => {
    const base = options();
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
