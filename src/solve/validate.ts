import { InputError } from "../errors.js";
import { clearanceFloorM } from "./clearance.js";
import type { SolverOptions } from "./types.js";

/** One-line InputErrors for options no plan can satisfy (before any DEM work). */
export function validateSolverOptions(o: SolverOptions): void {
  const pos = (field: string, v: number) => {
    if (!(Number.isFinite(v) && v > 0)) throw new InputError(field, v, "a number > 0");
  };
  const nonNeg = (field: string, v: number) => {
    if (!(Number.isFinite(v) && v >= 0)) throw new InputError(field, v, "a number >= 0");
  };
  pos("ceiling.heightM", o.ceiling.heightM);
  nonNeg("clearance.minM", o.clearance.minM);
  nonNeg("clearance.safetyRadiusM", o.clearance.safetyRadiusM);
  nonNeg("clearance.obstacleMarginM", o.clearance.obstacleMarginM);
  pos("aircraft.maxClimbMps", o.aircraft.maxClimbMps);
  pos("aircraft.maxDescentMps", o.aircraft.maxDescentMps);
  pos("aircraft.speedMps", o.aircraft.speedMps);
  pos("aircraft.transitSpeedMps", o.aircraft.transitSpeedMps);
  nonNeg("aircraft.minSpeedMps", o.aircraft.minSpeedMps);
  pos("stationStepM", o.stationStepM);
  nonNeg("zoneHalfAcrossM", o.zoneHalfAcrossM);
  if (o.aircraft.minSpeedMps > o.aircraft.speedMps) {
    throw new InputError("aircraft.minSpeedMps", o.aircraft.minSpeedMps, `at most the photo speed (${o.aircraft.speedMps} m/s)`);
  }
  const floorM = clearanceFloorM(o.clearance);
  if (o.ceiling.heightM <= floorM) {
    throw new InputError("ceiling.heightM", o.ceiling.heightM, `more than the minimum clearance + obstacle margin + DEM accuracy (${floorM} m)`,
      "the ceiling is at or below the minimum clearance, so no height is both legal and safe");
  }
  const { hMinM, hMaxM, hTargetM } = o.band;
  pos("band.hMinM", hMinM);
  if (!(hMinM <= hTargetM && hTargetM <= hMaxM)) {
    throw new InputError("band.hTargetM", hTargetM, `between band.hMinM (${hMinM}) and band.hMaxM (${hMaxM})`);
  }
  if (hTargetM < floorM) {
    throw new InputError("band.hTargetM", hTargetM, `at least the minimum clearance + obstacle margin (${floorM} m)${gsdRange(o, floorM, o.ceiling.heightM)}`,
      "the target height is below the terrain clearance everywhere");
  }
  if (o.ceiling.reference === "ground" && hTargetM > o.ceiling.heightM) {
    throw new InputError("band.hTargetM", hTargetM, `at most the ceiling (${o.ceiling.heightM} m above the ground below)${gsdRange(o, floorM, o.ceiling.heightM)}`,
      "the target height is above the legal ceiling everywhere");
  }
}

/** ", i.e. a nadir GSD of a-b cm/px for this camera" when ifov is known. */
export function gsdRange(o: SolverOptions, lowM: number, highM: number): string {
  if (!o.ifov) return "";
  const a = (lowM * o.ifov * 100).toFixed(2);
  const b = (highM * o.ifov * 100).toFixed(2);
  return `; this camera can legally reach a nadir GSD of about ${a}-${b} cm/px here`;
}
