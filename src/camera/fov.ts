import { openInterval, positiveInteger } from "./validate.js";

const DEG = Math.PI / 180;

/**
 * Horizontal (image-width) field of view from the diagonal one, for a
 * pinhole camera with square pixels on a w x h pixel image:
 * tan(HFOV/2) = tan(DFOV/2) * w / sqrt(w^2 + h^2)
 * (the half-diagonal and half-width of the image subtend those angles at
 * the same focal distance).
 *
 * @example dfovToHfov(84, 4000, 3000) // about 71.9 (4:3 image)
 */
export function dfovToHfov(dfovDeg: number, imageWidthPx: number, imageHeightPx: number): number {
  openInterval("camera.dfovDeg", dfovDeg, 0, 180, "an angle in degrees, > 0 and < 180");
  const w = positiveInteger("camera.imageWidthPx", imageWidthPx);
  const h = positiveInteger("camera.imageHeightPx", imageHeightPx);
  return (2 * Math.atan((Math.tan((dfovDeg * DEG) / 2) * w) / Math.hypot(w, h))) / DEG;
}

/**
 * Diagonal field of view from the horizontal one (inverse of dfovToHfov).
 *
 * @example hfovToDfov(73.74, 5472, 3648) // about 84.06 (3:2 image)
 */
export function hfovToDfov(hfovDeg: number, imageWidthPx: number, imageHeightPx: number): number {
  openInterval("camera.hfovDeg", hfovDeg, 0, 180, "an angle in degrees, > 0 and < 180");
  const w = positiveInteger("camera.imageWidthPx", imageWidthPx);
  const h = positiveInteger("camera.imageHeightPx", imageHeightPx);
  return (2 * Math.atan((Math.tan((hfovDeg * DEG) / 2) * Math.hypot(w, h)) / w)) / DEG;
}
