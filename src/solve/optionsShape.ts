import type { SolverOptions } from "./types.js";

/**
 * The options with every field present (undefined where not given), in one order, made at
 * this one place: every options object the solver's loops read then has one hidden class in
 * the engine. Objects of several shapes (the plan's literal with its optional fields, each
 * block's copy with its own take-off ground, the waypoint budget's copies with another band)
 * sent the compiled solver back to the interpreter at each shape it had not met (node
 * --trace-deopt on the 4 km2 plan: corridorAlong 7 times, solvePlan 3, solvePiece 2, each
 * then compiled again). The same values: no field's meaning depends on its being absent.
 * @example const o = shapedSolverOptions(opts); o.vertexStepM ?? DEFAULT_VERTEX_STEP_M
 */
export function shapedSolverOptions(o: SolverOptions): SolverOptions {
  // Every field of SolverOptions, each required here: a field added there and not here fails to compile.
  const shaped: { [K in keyof Required<SolverOptions>]: SolverOptions[K] } = {
    ceiling: o.ceiling,
    takeoffGroundM: o.takeoffGroundM,
    clearance: o.clearance,
    aircraft: o.aircraft,
    band: o.band,
    zoneHalfAcrossM: o.zoneHalfAcrossM,
    zoneHalfAlongM: o.zoneHalfAlongM,
    stationStepM: o.stationStepM,
    vertexStepM: o.vertexStepM,
    onConflict: o.onConflict,
    assumeGroundM: o.assumeGroundM,
    routeAround: o.routeAround,
    ifov: o.ifov,
    terrain: o.terrain,
  };
  return shaped;
}
