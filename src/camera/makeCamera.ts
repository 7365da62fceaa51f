import { InputError } from "../errors.js";
import type { Camera } from "./types.js";
import { DEFAULT_EXPOSURE_S, DEFAULT_MIN_INTERVAL_S } from "./defaults.js";
import { dfovToHfov } from "./fov.js";
import { openInterval, positiveInteger, positiveNumber } from "./validate.js";

const DEG = Math.PI / 180;

/** What every camera description carries besides its geometry. */
export interface CameraSpecCommon {
  imageWidthPx: number;
  imageHeightPx: number;
  /** Seconds; default DEFAULT_EXPOSURE_S (1/1000 s, an assumption). */
  exposureS?: number;
  /** Seconds; default DEFAULT_MIN_INTERVAL_S (2 s, an assumption). */
  minIntervalS?: number;
  /** true: short side across the track. Default false (long side across). */
  portrait?: boolean;
}

/** Camera given by its sensor and lens. */
export interface SensorCameraSpec extends CameraSpecCommon {
  sensorWidthMm: number;
  sensorHeightMm: number;
  focalLengthMm: number;
}

/** Camera given by a field of view: exactly one of hfovDeg (image width) or dfovDeg (diagonal). */
export interface FovCameraSpec extends CameraSpecCommon {
  hfovDeg?: number;
  dfovDeg?: number;
}

export type CameraSpec = SensorCameraSpec | FovCameraSpec;

/**
 * Largest mismatch we accept between the pixel pitch across the sensor width
 * (sensor width / image width) and across its height: 5 %. Published sensor
 * sizes are often rounded or give the nominal rather than the active area, so
 * a few percent is normal; more means non-square pixels or a wrong figure,
 * and the single-IFOV camera model would then mis-state the footprint.
 */
export const MAX_PIXEL_ASPECT_MISMATCH = 0.05;

const SENSOR_KEYS = ["sensorWidthMm", "sensorHeightMm", "focalLengthMm"] as const;
const FOV_KEYS = ["hfovDeg", "dfovDeg"] as const;
const CHOICE = "either sensorWidthMm + sensorHeightMm + focalLengthMm, or one of hfovDeg / dfovDeg";

/**
 * Build and validate a nadir mapping camera (pinhole model, square pixels).
 * Give either the sensor size and focal length, or one field of view and
 * say which: `hfovDeg` spans the image width, `dfovDeg` the diagonal. There
 * is no default between the two, because taking a diagonal angle for a
 * horizontal one overstates the footprint.
 *
 * @example makeCamera({ sensorWidthMm: 13.2, sensorHeightMm: 8.8, focalLengthMm: 8.8, imageWidthPx: 5472, imageHeightPx: 3648 })
 * @example makeCamera({ dfovDeg: 84, imageWidthPx: 4000, imageHeightPx: 3000, exposureS: 1 / 1600 })
 */
export function makeCamera(spec: CameraSpec): Camera {
  if (spec === null || typeof spec !== "object") throw new InputError("camera", spec, CHOICE, "not a camera description");
  const s = spec as unknown as Record<string, unknown>;
  const sensorGiven = SENSOR_KEYS.filter((k) => s[k] !== undefined);
  const fovGiven = FOV_KEYS.filter((k) => s[k] !== undefined);
  if (sensorGiven.length > 0 && fovGiven.length > 0) {
    throw new InputError(`camera.${fovGiven[0]}`, s[fovGiven[0]], CHOICE, `both sensor size (${sensorGiven.join(", ")}) and field of view given`);
  }
  if (sensorGiven.length === 0 && fovGiven.length === 0) {
    throw new InputError("camera", "no sensor size and no field of view", CHOICE, "neither sensor size nor field of view given");
  }
  if (fovGiven.length === 2) {
    throw new InputError("camera.dfovDeg", s.dfovDeg, "exactly one of hfovDeg (across the image width) or dfovDeg (diagonal)", "both hfovDeg and dfovDeg given");
  }

  const imageWidthPx = positiveInteger("camera.imageWidthPx", s.imageWidthPx);
  const imageHeightPx = positiveInteger("camera.imageHeightPx", s.imageHeightPx);
  const exposureS = s.exposureS === undefined ? DEFAULT_EXPOSURE_S : positiveNumber("camera.exposureS", s.exposureS);
  const minIntervalS = s.minIntervalS === undefined ? DEFAULT_MIN_INTERVAL_S : positiveNumber("camera.minIntervalS", s.minIntervalS);
  if (s.portrait !== undefined && typeof s.portrait !== "boolean") {
    throw new InputError("camera.portrait", s.portrait, "true or false");
  }
  const portrait = s.portrait === true;
  const common = { imageWidthPx, imageHeightPx, exposureS, minIntervalS, portrait };

  if (sensorGiven.length > 0) {
    const sensorWidthMm = positiveNumber("camera.sensorWidthMm", s.sensorWidthMm);
    const sensorHeightMm = positiveNumber("camera.sensorHeightMm", s.sensorHeightMm);
    const focalLengthMm = positiveNumber("camera.focalLengthMm", s.focalLengthMm);
    const pitchW = sensorWidthMm / imageWidthPx;
    const pitchH = sensorHeightMm / imageHeightPx;
    const mismatch = Math.abs(pitchH / pitchW - 1);
    if (mismatch > MAX_PIXEL_ASPECT_MISMATCH) {
      throw new InputError(
        "camera.sensorHeightMm",
        sensorHeightMm,
        `a sensor height giving square pixels: about ${(pitchW * imageHeightPx).toFixed(2)} mm for ${imageHeightPx} px`,
        `pixel pitch across the width (${(pitchW * 1000).toFixed(3)} um) and the height (${(pitchH * 1000).toFixed(3)} um) differ by ${(mismatch * 100).toFixed(1)} %`,
      );
    }
    return {
      ...common,
      // The width fixes the pitch; the height only had to agree with it (square pixels).
      ifov: pitchW / focalLengthMm,
      sensorWidthMm,
      sensorHeightMm,
      focalLengthMm,
      hfovDeg: (2 * Math.atan(sensorWidthMm / (2 * focalLengthMm))) / DEG,
    };
  }

  const hfovDeg =
    s.hfovDeg !== undefined
      ? openInterval("camera.hfovDeg", s.hfovDeg, 0, 180, "an angle in degrees, > 0 and < 180")
      : dfovToHfov(openInterval("camera.dfovDeg", s.dfovDeg, 0, 180, "an angle in degrees, > 0 and < 180"), imageWidthPx, imageHeightPx);
  return {
    ...common,
    // Pinhole with square pixels: the image width spans 2 tan(HFOV/2) at unit distance.
    ifov: (2 * Math.tan((hfovDeg * DEG) / 2)) / imageWidthPx,
    hfovDeg,
  };
}
