import type { PlanOptions } from "../plan/options.js";
import { makeCamera, type CameraSpec } from "../camera/makeCamera.js";
import { requirementFrom } from "../camera/requirement.js";
import type { ParsedKeepOut } from "../route/zoneFile.js";
import type { VerifyLimits, VerifyZone } from "./types.js";

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
    ...bandOf(o),
  };
}

/** The detail band from the plan's camera and target (the pinhole relation GSD = H p / f). */
function bandOf(o: PlanOptions): Pick<VerifyLimits, "band"> {
  try {
    const c = o.camera;
    const common = { imageWidthPx: c.imageWidthPx, imageHeightPx: c.imageHeightPx };
    const spec: CameraSpec =
      c.model === "sensor"
        ? { ...common, sensorWidthMm: c.sensorWidthMm, sensorHeightMm: c.sensorHeightMm ?? (c.sensorWidthMm * c.imageHeightPx) / c.imageWidthPx, focalLengthMm: c.focalLengthMm }
        : c.model === "hfov" ? { ...common, hfovDeg: c.hfovDeg } : { ...common, dfovDeg: c.dfovDeg };
    const req = requirementFrom(
      o.target.by === "gsd" ? { gsdCm: o.target.gsdCm } : { smallestFeatureCm: o.target.smallestFeatureCm, rule: o.target.rule },
      o.target.tolerancePct,
    );
    return { band: { lowGsdCm: req.lowGsdM * 100, highGsdCm: req.highGsdM * 100, gsdCmPerM: makeCamera(spec).ifov * 100 } };
  } catch {
    return {};
  }
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

/**
 * Keep-out zones as the check reads them: each zone's own buffer where its file
 * gives one, else the plan's keepOutBufferM.
 * @example keepOutZonesFor(await readKeepOutFiles(options.keepOut), options.keepOutBufferM)
 */
export function keepOutZonesFor(parsed: readonly ParsedKeepOut[], defaultBufferM: number): VerifyZone[] {
  return parsed.map((z) => ({ name: z.name, polygons: z.polygons, bufferM: z.bufferM ?? defaultBufferM }));
}
