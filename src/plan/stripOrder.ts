/**
 * Strip order against ceiling crossings: a connector between strips that must
 * break the ceiling to keep clearance may be avoidable, since the other
 * boustrophedon order puts every connector at the strips' other ends.
 */
import type { DemGrid } from "../dem/grid.js";
import { flipStripDirections } from "../layout/flip.js";
import type { LayoutLeg, XY } from "../layout/types.js";
import { solvePlan } from "../solve/solveLegs.js";
import type { SolvedLeg, SolveResult, SolverOptions, SolveWarning } from "../solve/types.js";

/**
 * Solves the legs; when a connector breaks the ceiling, also the flipped order,
 * and keeps whichever crosses less (the first on a tie).
 * @example const { legs, solve } = solveInBestStripOrder(grid, layout.legs, layout.takeoff, opts);
 */
export function solveInBestStripOrder(
  grid: DemGrid,
  legs: LayoutLeg[],
  takeoff: XY,
  opts: SolverOptions,
): { legs: LayoutLeg[]; solve: SolveResult; warning?: SolveWarning } {
  const solve = solvePlan(grid, legs, opts);
  const crossingM = connectorBreachM(solve.legs);
  if (!(crossingM > 0)) return { legs, solve };
  const flipped = flipStripDirections(legs, takeoff);
  const alt = solvePlan(grid, flipped, opts);
  const altCrossingM = connectorBreachM(alt.legs);
  if (!(altCrossingM < crossingM)) return { legs, solve };
  return {
    legs: flipped,
    solve: alt,
    warning: {
      code: "strips-reordered",
      message:
        `Strips are flown in the other direction: in the first order a connector between strips broke the ceiling over ${crossingM.toFixed(0)} m, ` +
        (altCrossingM > 0 ? `in this order over ${altCrossingM.toFixed(0)} m.` : "in this order nowhere."),
    },
  };
}

/**
 * Metres of connector transits (not the bridges over a strip's own unflyable
 * stretch, which no order avoids) flown above the ceiling.
 * @example connectorBreachM(solvePlan(grid, legs, opts).legs) // 0
 */
export function connectorBreachM(legs: readonly SolvedLeg[]): number {
  let m = 0;
  for (const leg of legs) {
    if (leg.kind !== "transit" || leg.conflictGap) continue;
    const p = leg.profile;
    for (let k = 1; k < p.s.length; k++) {
      if (p.altitudeM[k] > p.hardHighM[k] + 1e-6 && p.altitudeM[k - 1] > p.hardHighM[k - 1] + 1e-6) m += p.s[k] - p.s[k - 1];
    }
  }
  return m;
}
