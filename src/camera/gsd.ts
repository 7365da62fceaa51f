import type { Camera } from "./types.js";
import { positiveNumber } from "./validate.js";

/**
 * Nadir geometry of a frame camera over flat ground (pinhole model, the
 * similar-triangles relations of any photogrammetry text, e.g. Wolf &
 * DeWitt, Elements of Photogrammetry: photo scale = f / H).
 */

/**
 * Pixel pitch in mm (sensor width / image width), or undefined for a
 * camera given by its field of view (its physical pitch is unknown; use
 * camera.ifov, which is pitch / focal length).
 *
 * @example pixelPitchMm(camera) // 0.0024123 for 13.2 mm over 5472 px
 */
export function pixelPitchMm(camera: Camera): number | undefined {
  return camera.sensorWidthMm === undefined ? undefined : camera.sensorWidthMm / camera.imageWidthPx;
}

/**
 * Nadir ground sample distance in metres per pixel at heightM above the
 * ground point: GSD = H * p / f = H * ifov.
 *
 * @example groundSampleDistanceM(camera, 100) // 0.0274 for p = 2.41 um, f = 8.8 mm
 */
export function groundSampleDistanceM(camera: Camera, heightM: number): number {
  return positiveNumber("heightM", heightM) * camera.ifov;
}

/**
 * Height above ground that gives a nadir GSD: H = GSD * f / p = GSD / ifov.
 *
 * @example heightForGsdM(camera, 0.02) // 73.0 for p = 2.41 um, f = 8.8 mm
 */
export function heightForGsdM(camera: Camera, gsdM: number): number {
  return positiveNumber("gsdM", gsdM) / camera.ifov;
}

/**
 * Ground footprint of one photo over flat ground at heightM: across and
 * along the track. The image's long side lies across the track unless
 * camera.portrait is set (then the short side does).
 *
 * @example footprintM(camera, 100) // { acrossM: 150.0, alongM: 100.0 } for a 3:2 image
 */
export function footprintM(camera: Camera, heightM: number): { acrossM: number; alongM: number } {
  const gsd = groundSampleDistanceM(camera, heightM);
  const longPx = Math.max(camera.imageWidthPx, camera.imageHeightPx);
  const shortPx = Math.min(camera.imageWidthPx, camera.imageHeightPx);
  return camera.portrait ? { acrossM: shortPx * gsd, alongM: longPx * gsd } : { acrossM: longPx * gsd, alongM: shortPx * gsd };
}

/** Number of pixels across the track (long side unless portrait). @example acrossTrackPx(camera) // 5472 */
export function acrossTrackPx(camera: Camera): number {
  const longPx = Math.max(camera.imageWidthPx, camera.imageHeightPx);
  const shortPx = Math.min(camera.imageWidthPx, camera.imageHeightPx);
  return camera.portrait ? shortPx : longPx;
}
