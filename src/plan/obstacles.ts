/**
 * What transits must go around in a plan: the user's keep-out zones (buffered)
 * and, without `assumeGroundM`, the unknown ground (DEM nodata and beyond the
 * window). Builds the solver's `routeAround`, drops strip pieces no way reaches,
 * and refuses a take-off point from which nothing can be reached.
 */
import { dataMask, hasNodata } from "../dem/dataMask.js";
import type { DemGrid } from "../dem/grid.js";
import { InputError } from "../errors.js";
import type { Layout, LayoutLeg, XY } from "../layout/types.js";
import { makeDetour, type Detour } from "../route/detour.js";
import { pointInsideAny, segmentEntersAny } from "../route/inside.js";
import { zonesHolding, type KeepOutSet } from "../route/keepOut.js";
import { unknownObstacles } from "../route/aroundUnknown.js";
import type { SolverOptions, SolveWarning } from "../solve/types.js";
import type { PlanOptions } from "./options.js";

export interface PlanObstacles {
  /** Around the keep-out zones and the unknown ground together; null when there is neither. */
  detour: Detour | null;
  routeAround?: SolverOptions["routeAround"];
}

/**
 * The obstacles of a plan. Unknown ground is buffered by the safety radius + one
 * station step + one cell diagonal: the solver's floor at a station reads the DEM
 * that far (the safety disc reaching one station step, widened by one cell diagonal
 * on fine DEMs), so along a routed leg it never touches nodata and the leg keeps its
 * clearance on known ground. It is left out when `assumeGroundM` is set (crossing is
 * allowed, on that height, and warned), or when there are no keep-out zones, the window has no nodata and its
 * outermost cell centres lie farther than the buffer from every leg end and the
 * take-off (the legs then lie in their convex hull, inside the window: nothing to
 * route around, and no polygon work).
 * @example const { routeAround } = planObstacles(grid, layout, options, 1, keepOut);
 */
export function planObstacles(grid: DemGrid, layout: Layout, options: PlanOptions, stationStepM: number, keepOut: KeepOutSet | null): PlanObstacles {
  // With keep-out zones a way around one may swing out towards the window's edge: the
  // known ground is then always the bound.
  const unknown = options.assumeGroundM === undefined && (keepOut !== null || needsUnknown(grid, layout, options, stationStepM))
    ? unknownObstacles(dataMask(grid.heights), grid.width, grid.height, grid.transform, unknownBufferM(grid, options, stationStepM))
    : null;
  if (!unknown && !keepOut) return { detour: null };
  const detour = makeDetour([...(keepOut?.buffered ?? []), ...(unknown?.zones ?? [])], unknown?.bounds);
  const entersZone = (a: XY, b: XY) =>
    keepOut !== null && (segmentEntersAny(keepOut.index, a, b) || pointInsideAny(keepOut.index, a) || pointInsideAny(keepOut.index, b));
  // Unknown ground alone is routed around only where the solver found the straight floor
  // needs it; a keep-out zone whenever the straight leg enters it.
  const routeAround = (a: XY, b: XY, unknownOnStraight: boolean) => (unknownOnStraight || entersZone(a, b) ? detour.route(a, b) : null);
  return { detour, routeAround };
}

function unknownBufferM(grid: DemGrid, options: PlanOptions, stationStepM: number): number {
  return options.clearance.safetyRadiusM + stationStepM + Math.hypot(grid.cellSizeM[0], grid.cellSizeM[1]);
}

function needsUnknown(grid: DemGrid, layout: Layout, options: PlanOptions, stationStepM: number): boolean {
  if (hasNodata(grid.heights)) return true;
  const diagM = Math.hypot(grid.cellSizeM[0], grid.cellSizeM[1]);
  const clearM = unknownBufferM(grid, options, stationStepM);
  const { x0, y0, dx, dy } = grid.transform;
  const xs = [x0 + 0.5 * dx, x0 + (grid.width - 0.5) * dx], ys = [y0 + 0.5 * dy, y0 + (grid.height - 0.5) * dy];
  const w = Math.min(...xs) + clearM + diagM, e = Math.max(...xs) - clearM - diagM;
  const s = Math.min(...ys) + clearM + diagM, n = Math.max(...ys) - clearM - diagM;
  const inside = (p: XY) => p[0] >= w && p[0] <= e && p[1] >= s && p[1] <= n;
  return !(inside(layout.takeoff) && layout.legs.every((l) => inside(l.from) && inside(l.to)));
}

/**
 * The layout with keep-out zones applied: a take-off point chosen by the layout
 * (a site corner) that falls in a zone moves to the nearest point outside it; strip
 * pieces that no way from the take-off reaches without entering a zone are dropped
 * (warned); the transits are rebuilt between what is left. Refuses a site wholly
 * inside zones, and a take-off point from which no strip can be reached around the
 * obstacles (keep-out zones and unknown ground).
 * @example const { layout, warnings } = applyKeepOut(layout, keepOut, detour, Boolean(options.takeoff));
 */
export function applyKeepOut(layout: Layout, keepOut: KeepOutSet | null, all: Detour | null, takeoffGiven: unknown): { layout: Layout; warnings: SolveWarning[] } {
  const warnings: SolveWarning[] = [];
  let strips = layout.legs.filter((l) => l.kind === "strip");
  if (keepOut && strips.length === 0) {
    throw new InputError("keepOut", keepOut.zones.map((z) => z.source), "zones that leave part of the site to fly", "the site lies wholly inside keep-out zones and their buffers");
  }
  let takeoff = layout.takeoff;
  if (keepOut && takeoffGiven === undefined) {
    const names = zonesHolding(keepOut, takeoff);
    if (names.length) {
      const zonesOnly = makeDetour(keepOut.buffered);
      const moved = zonesOnly.outside(takeoff);
      if (!moved) throw new InputError("takeoff", undefined, "a take-off point outside every keep-out zone (give --takeoff)", `the site corner chosen lies in keep-out zone ${names.map((n) => JSON.stringify(n)).join(", ")} and no point outside was found`);
      warnings.push({
        code: "takeoff-moved",
        message: `The take-off point chosen (a site corner) lies in keep-out zone ${names.map((n) => JSON.stringify(n)).join(", ")}: moved ${Math.hypot(moved[0] - takeoff[0], moved[1] - takeoff[1]).toFixed(1)} m to the zone's edge. Give --takeoff for a point you can use.`,
      });
      takeoff = moved;
    }
  }
  if (keepOut) {
    const zonesOnly = makeDetour(keepOut.buffered);
    const kept = strips.filter((l) => zonesOnly.reachable(takeoff, l.from));
    const dropped = strips.filter((l) => !kept.includes(l));
    if (dropped.length) {
      const nums = [...new Set(dropped.map((l) => l.strip))];
      const lenM = dropped.reduce((s, l) => s + l.lengthM, 0);
      warnings.push({
        code: "keep-out-enclosed",
        message: `${dropped.length} strip piece${dropped.length === 1 ? "" : "s"} (${lenM.toFixed(0)} m, strip${nums.length === 1 ? "" : "s"} ${nums.join(", ")}) lie where no way from the take-off point reaches without entering a keep-out zone: not flown, their ground is flagged.`,
      });
      if (!kept.length) throw new InputError("takeoff", takeoffGiven, "a take-off point from which the site can be reached around the keep-out zones", "keep-out zones enclose every strip");
      strips = kept;
    }
  }
  if (all && !strips.some((l) => all.reachable(takeoff, l.from))) {
    throw new InputError("takeoff", takeoffGiven, "a point from which the site can be reached over known ground", "no way from the take-off point to any strip avoids unknown ground (DEM nodata) and keep-out zones");
  }
  if (takeoff === layout.takeoff && strips.length === layout.legs.filter((l) => l.kind === "strip").length) return { layout, warnings };
  return { layout: { ...layout, takeoff, legs: withTransits(strips, takeoff) }, warnings };
}

/** Strip legs joined by straight transits, from and back to take-off. */
function withTransits(strips: readonly LayoutLeg[], takeoff: XY): LayoutLeg[] {
  const legs: LayoutLeg[] = [];
  let here = takeoff;
  const transit = (strip: number, to: XY) => legs.push({ kind: "transit", strip, from: here, to, lengthM: Math.hypot(to[0] - here[0], to[1] - here[1]) });
  for (const s of strips) {
    transit(s.strip, s.from);
    legs.push(s);
    here = s.to;
  }
  transit(strips[strips.length - 1].strip, takeoff);
  return legs;
}
