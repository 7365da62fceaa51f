import { InputError } from "../errors.js";

/**
 * Shared checks for user-facing numbers: each throws an InputError naming
 * the field, the value and what is allowed, and returns the value typed.
 */

/** A finite number > 0. @example positiveNumber("camera.focalLengthMm", 8.8) // 8.8 */
export function positiveNumber(field: string, value: unknown): number {
  if (typeof value !== "number" || !Number.isFinite(value) || value <= 0) {
    throw new InputError(field, value, "a number > 0", value === undefined ? "missing" : undefined);
  }
  return value;
}

/** An integer > 0. @example positiveInteger("camera.imageWidthPx", 5472) // 5472 */
export function positiveInteger(field: string, value: unknown): number {
  if (typeof value !== "number" || !Number.isInteger(value) || value <= 0) {
    throw new InputError(field, value, "a whole number > 0", value === undefined ? "missing" : undefined);
  }
  return value;
}

/** An overlap percentage: 0 <= value < 100. @example overlapPercent("sideOverlapPct", 70) // 70 */
export function overlapPercent(field: string, value: unknown): number {
  if (typeof value !== "number" || !Number.isFinite(value) || value < 0 || value >= 100) {
    throw new InputError(field, value, "a percentage from 0 up to (not including) 100");
  }
  return value;
}

/** A finite number strictly between lo and hi. @example openInterval("camera.hfovDeg", 73.7, 0, 180) */
export function openInterval(field: string, value: unknown, lo: number, hi: number, allowed?: string): number {
  if (typeof value !== "number" || !Number.isFinite(value) || value <= lo || value >= hi) {
    throw new InputError(field, value, allowed ?? `a number greater than ${lo} and less than ${hi}`, value === undefined ? "missing" : undefined);
  }
  return value;
}
