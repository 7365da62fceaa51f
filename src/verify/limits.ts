import type { PlanOptions } from "../plan/options.js";
import type { VerifyLimits } from "./types.js";

/**
 * The limits a plan promises, taken from resolved plan options (only the
 * limits: the check does not read the camera, the layout or the solver).
 * @example limitsFromPlanOptions(resolvePlanOptions(file.data, {}, file.dir)).clearanceM // 30
 */
export function limitsFromPlanOptions(o: PlanOptions): VerifyLimits {
  return {
    clearanceM: o.clearance.minM,
    safetyRadiusM: o.clearance.safetyRadiusM,
    obstacleMarginM: o.clearance.obstacleMarginM,
    demAccuracyM: o.demAccuracyM ?? 0,
    ceilingM: o.ceiling.heightM,
    ceilingReference: o.ceiling.reference,
    maxClimbMps: o.aircraft.maxClimbMps,
    maxDescentMps: o.aircraft.maxDescentMps,
    assumeGroundM: o.assumeGroundM ?? null,
    takeoff: o.takeoff ? [o.takeoff[0], o.takeoff[1]] : null,
  };
}

/**
 * Height above the highest ground in the safety radius that the path must keep:
 * clearance + obstacle margin + the DEM's stated vertical accuracy (height the
 * clearance cannot trust).
 * @example clearanceFloorM({ clearanceM: 30, obstacleMarginM: 5, demAccuracyM: 0.5 }) // 35.5
 */
export function clearanceFloorM(l: Pick<VerifyLimits, "clearanceM" | "obstacleMarginM" | "demAccuracyM">): number {
  return l.clearanceM + l.obstacleMarginM + l.demAccuracyM;
}
