import type { SolverOptions } from "./types.js";

/** Gradient cap when a multirotor may slow to 0 m/s (near-vertical climbs allowed). */
const STEEPEST = 1e3;

/**
 * Gradient limits dz/ds of a leg kind. A multirotor may slow down on a steep
 * segment (ground speed = climb or descent rate / |gradient|, never below
 * minSpeedMps), so its limit is rate / minSpeed; a fixed-wing keeps its speed,
 * so its limit is rate / speed.
 * @example gradientLimits(opts, "strip") // { gMin: -0.3, gMax: 0.3 }
 */
export function gradientLimits(o: SolverOptions, kind: "strip" | "transit"): { gMin: number; gMax: number } {
  const a = o.aircraft;
  const v = a.type === "multirotor" ? a.minSpeedMps : kind === "strip" ? a.speedMps : a.transitSpeedMps;
  if (!(v > 0)) return { gMin: -STEEPEST, gMax: STEEPEST };
  return { gMin: -Math.min(STEEPEST, a.maxDescentMps / v), gMax: Math.min(STEEPEST, a.maxClimbMps / v) };
}

/**
 * Ground speed on a segment of gradient g: the leg's speed, slowed for a
 * multirotor to rate / |g| on steep segments (never below minSpeedMps).
 * @example segmentSpeed(opts, "strip", 0.5)
 */
export function segmentSpeed(o: SolverOptions, kind: "strip" | "transit", g: number): number {
  const a = o.aircraft;
  const v = kind === "strip" ? a.speedMps : a.transitSpeedMps;
  // NaN: a zero-length segment (0/0), which takes no ground time at any speed.
  if (a.type !== "multirotor" || g === 0 || Number.isNaN(g)) return v;
  const rate = g > 0 ? a.maxClimbMps : a.maxDescentMps;
  return Math.max(a.minSpeedMps, Math.min(v, rate / Math.abs(g)));
}
