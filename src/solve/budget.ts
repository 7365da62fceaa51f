import type { DemGrid } from "../dem/grid.js";
import type { LayoutLeg } from "../layout/types.js";
import { solvePlan } from "./solveLegs.js";
import type { SolveResult, SolverOptions } from "./types.js";

export interface WaypointBudget {
  waypoints: number;
  maxWaypoints: number;
  /** Waypoints beyond the budget (0 when it fits). */
  over: number;
  /** Waypoints per km of strip. */
  perKmStrip: number;
}

/**
 * Waypoints of a solved plan against the autopilot's budget. Consecutive legs
 * share their junction point, counted once.
 * @example waypointBudget(result, 99).over
 */
export function waypointBudget(result: SolveResult, maxWaypoints: number): WaypointBudget {
  let waypoints = 0, stripM = 0;
  result.legs.forEach((leg, i) => {
    waypoints += leg.waypoints.length - (i > 0 ? 1 : 0);
    if (leg.kind === "strip") stripM += leg.lengthM;
  });
  return { waypoints, maxWaypoints, over: Math.max(0, waypoints - maxWaypoints), perKmStrip: stripM > 0 ? waypoints / (stripM / 1000) : 0 };
}

/**
 * The smallest widening of the GSD band (factor on both half-widths around the
 * target, e.g. 10 % -> 15 %) among `factors` whose re-solved plan fits the
 * budget, or null when none does. Re-solves the whole plan per factor.
 * @example toleranceToFitBudget(grid, legs, opts, 99) // { factor: 1.5, tolerance: 0.15, waypoints: 90 }
 */
export function toleranceToFitBudget(
  grid: DemGrid, legs: LayoutLeg[], opts: SolverOptions, maxWaypoints: number, factors: number[] = [1.5, 2, 3],
): { factor: number; tolerance: number; waypoints: number } | null {
  const { hMinM, hMaxM, hTargetM } = opts.band;
  for (const f of factors) {
    const band = { hTargetM, hMinM: hTargetM - f * (hTargetM - hMinM), hMaxM: hTargetM + f * (hMaxM - hTargetM) };
    if (!(band.hMinM > opts.clearance.minM)) continue;
    const b = waypointBudget(solvePlan(grid, legs, { ...opts, band }), maxWaypoints);
    if (b.over === 0) return { factor: f, tolerance: (band.hMaxM - hTargetM) / hTargetM, waypoints: b.waypoints };
  }
  return null;
}
