import { makeGrid } from "../../src/dem/sample.js";
import type { LayoutLeg } from "../../src/layout/types.js";
import type { SolverOptions } from "../../src/solve/types.js";

/** Options for the analytic terrains; `over` replaces top-level fields. */
export function options(over: Partial<SolverOptions> = {}): SolverOptions {
  return {
    ceiling: { heightM: 120, reference: "ground" },
    takeoffGroundM: 100,
    clearance: { minM: 10, safetyRadiusM: 15, obstacleMarginM: 0 },
    // fixed-wing at 10 m/s, 2 m/s climb and descent: gradient limit 0.2
    aircraft: { type: "fixed-wing", speedMps: 10, transitSpeedMps: 10, minSpeedMps: 10, maxClimbMps: 2, maxDescentMps: 2 },
    band: { hMinM: 90.3, hMaxM: 110, hTargetM: 100 },
    zoneHalfAcrossM: 20,
    stationStepM: 1,
    onConflict: "skip",
    ...over,
  };
}

/** A 1 m grid, `width` x 60 cells, ground a function of x only; strips run along y = 30.5 (a row of cell centres). */
export function profileGrid(width: number, h: (x: number) => number) {
  return makeGrid({ width, height: 60, x0: 0, y0: 60, cellM: 1, heights: (x) => h(x) });
}

export function strip(x0: number, x1: number, y = 30.5): LayoutLeg {
  return { kind: "strip", strip: 1, from: [x0, y], to: [x1, y], lengthM: x1 - x0 };
}
