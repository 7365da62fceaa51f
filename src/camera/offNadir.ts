import { InputError } from "../errors.js";
import type { Camera } from "./types.js";
import { acrossTrackPx } from "./gsd.js";
import { positiveNumber } from "./validate.js";

const DEG = Math.PI / 180;

/**
 * GSD of the pixel at the outer across-track edge of the image, over flat
 * ground, for a frame camera at heightM whose optical axis is tilted by
 * tiltDeg (roll) towards that edge. Reported, not used to plan: the trade
 * quotes the nadir figure.
 *
 * Derivation (pinhole camera, flat image plane, flat ground; the same result
 * follows from the collinearity equations, e.g. Wolf & DeWitt, Elements of
 * Photogrammetry, on tilted photographs):
 *   an image point u from the principal point across the track sees the
 *   ground along a ray at theta = atan(u / f) from the optical axis, i.e.
 *   alpha = tilt + theta from the vertical; it meets the ground at
 *   X = H tan(alpha). Then dX/du = H sec^2(alpha) * d(theta)/du and
 *   d(theta)/du = cos^2(theta) / f, so across the track
 *     GSD_across = (H p / f) * cos^2(theta) / cos^2(alpha).
 *   Along the track, the ray's length to the ground is H / cos(alpha) and its
 *   length to the image plane f / cos(theta), so
 *     GSD_along = (H p / f) * cos(theta) / cos(alpha).
 * With no tilt alpha = theta and both equal the nadir GSD: a truly vertical
 * photo of flat ground has one scale f / H everywhere (Wolf & DeWitt). The
 * often-quoted GSD / cos^2(theta) is the along-ray result for a sensor whose
 * pixels have a constant angular size (a scanner); on a frame camera the
 * flat image plane shrinks the pixel's angle by cos^2(theta), which cancels
 * it. Edge pixels do grow coarser with tilt (roll, gimbal error) and over
 * ground that falls away, which the plan check measures on the DEM.
 *
 * @example offNadirEdgeGsdM(camera, 100)      // { acrossM: nadir, alongM: nadir, rayAngleDeg: 36.9 }
 * @example offNadirEdgeGsdM(camera, 100, 10)  // coarser across the track at the far edge
 */
export function offNadirEdgeGsdM(
  camera: Camera,
  heightM: number,
  tiltDeg = 0,
): { acrossM: number; alongM: number; rayAngleDeg: number } {
  const h = positiveNumber("heightM", heightM);
  const halfAcrossPx = acrossTrackPx(camera) / 2;
  // tan(theta) at the edge = (half the pixels across) * p / f
  const theta = Math.atan(halfAcrossPx * camera.ifov);
  if (typeof tiltDeg !== "number" || !Number.isFinite(tiltDeg) || tiltDeg < 0 || tiltDeg * DEG + theta >= Math.PI / 2) {
    throw new InputError("tiltDeg", tiltDeg, `an angle >= 0 and < ${(90 - theta / DEG).toFixed(1)} degrees (so the edge ray meets the ground)`);
  }
  const alpha = tiltDeg * DEG + theta;
  const nadir = h * camera.ifov;
  const ct = Math.cos(theta);
  const ca = Math.cos(alpha);
  return { acrossM: (nadir * ct * ct) / (ca * ca), alongM: (nadir * ct) / ca, rayAngleDeg: alpha / DEG };
}
