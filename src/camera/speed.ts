import { DEFAULT_BLUR_PX } from "./defaults.js";
import { positiveNumber } from "./validate.js";

/** Which limit sets the ground speed. */
export type SpeedLimit = "cruise" | "interval" | "blur";

export interface GroundSpeedInput {
  /** Aircraft cruise speed the user wants, m/s. */
  cruiseMps: number;
  /** Distance between exposures along the strip, m. */
  triggerM: number;
  /** Camera's minimum interval between photos, s. */
  minIntervalS: number;
  /** Exposure time, s. */
  exposureS: number;
  /** Nadir GSD the blur is measured in, m/px (use the finest GSD flown, where blur in pixels is worst). */
  gsdM: number;
  /** Allowed motion blur in pixels; default 0.5 (common practice: half a pixel to one pixel). */
  blurPx?: number;
}

export interface GroundSpeed {
  speedMps: number;
  /** The limit that binds (the first of cruise, interval, blur on a tie). */
  limit: SpeedLimit;
  /** Each limit's speed, m/s. */
  limits: Record<SpeedLimit, number>;
}

/**
 * Ground speed for a strip: the smallest of the cruise speed, the photo-rate
 * limit (trigger distance / minimum interval: the camera cannot fire faster)
 * and the motion-blur limit (allowed blur px * GSD / exposure: the ground must
 * not move more than that during one exposure). Common practice; see
 * the overlap and speed section of the domain notes.
 *
 * @example groundSpeed({ cruiseMps: 12, triggerM: 20, minIntervalS: 2, exposureS: 0.001, gsdM: 0.03 })
 *          // { speedMps: 10, limit: "interval", limits: { cruise: 12, interval: 10, blur: 15 } }
 */
export function groundSpeed(input: GroundSpeedInput): GroundSpeed {
  const cruise = positiveNumber("cruiseMps", input.cruiseMps);
  const triggerM = positiveNumber("triggerM", input.triggerM);
  const minIntervalS = positiveNumber("minIntervalS", input.minIntervalS);
  const exposureS = positiveNumber("exposureS", input.exposureS);
  const gsdM = positiveNumber("gsdM", input.gsdM);
  const blurPx = input.blurPx === undefined ? DEFAULT_BLUR_PX : positiveNumber("blurPx", input.blurPx);
  const limits: Record<SpeedLimit, number> = {
    cruise,
    interval: triggerM / minIntervalS,
    blur: (blurPx * gsdM) / exposureS,
  };
  let limit: SpeedLimit = "cruise";
  for (const k of ["interval", "blur"] as const) if (limits[k] < limits[limit]) limit = k;
  return { speedMps: limits[limit], limit, limits };
}
