import { overlapPercent, positiveNumber } from "./validate.js";

/**
 * Spacing from overlap (common practice): strip spacing = footprint across *
 * (1 - side overlap); trigger distance = footprint along * (1 - front overlap).
 */

/**
 * Distance between neighbouring strips for a side overlap in percent (0 <= pct < 100).
 *
 * @example stripSpacingM(150, 70) // 45
 */
export function stripSpacingM(footprintAcrossM: number, sideOverlapPct: number): number {
  const w = positiveNumber("footprintAcrossM", footprintAcrossM);
  return w * (1 - overlapPercent("sideOverlapPct", sideOverlapPct) / 100);
}

/**
 * Distance between exposures along a strip for a front overlap in percent (0 <= pct < 100).
 *
 * @example triggerDistanceM(100, 80) // 20
 */
export function triggerDistanceM(footprintAlongM: number, frontOverlapPct: number): number {
  const l = positiveNumber("footprintAlongM", footprintAlongM);
  return l * (1 - overlapPercent("frontOverlapPct", frontOverlapPct) / 100);
}
