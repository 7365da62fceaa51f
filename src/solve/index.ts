export { corridorAlong } from "./corridor.js";
export { minLinkPath, minLinkPathOnLattice, vertexLattice, GATE_EPS_M, type MinLinkPath } from "./minLinkPath.js";
export { solvePlan, solveTransit, DEFAULT_VERTEX_STEP_M } from "./solveLegs.js";
export { waypointBudget, toleranceToFitBudget, type WaypointBudget } from "./budget.js";
export { gradientLimits, segmentSpeed } from "./gradient.js";
export { surfaceCeiling } from "./surfaceCeiling.js";
export * from "./types.js";
