// Hand-built solver output for the exporter tests: straight legs whose
// waypoints sit at given altitudes over a given ground.
import type { XY } from "../../src/layout/types.js";
import type { SolvedLeg, StationProfile } from "../../src/solve/types.js";

export interface WpSpec {
  /** Fraction along the leg, 0..1. */
  t: number;
  altM: number;
  groundM: number;
}

/** A leg from `from` to `to` with waypoints at the given fractions; speed on every segment `speedMps`. */
export function leg(kind: "strip" | "transit", strip: number, from: XY, to: XY, wps: WpSpec[], speedMps = 8): SolvedLeg {
  const lengthM = Math.hypot(to[0] - from[0], to[1] - from[1]);
  const waypoints = wps.map((w, i) => ({
    x: from[0] + w.t * (to[0] - from[0]),
    y: from[1] + w.t * (to[1] - from[1]),
    s: w.t * lengthM,
    altitudeAmslM: w.altM,
    groundAmslM: w.groundM,
    heightAboveGroundM: w.altM - w.groundM,
    speedMps: i === 0 ? 0 : speedMps,
  }));
  const n = waypoints.length;
  const f = (g: (i: number) => number) => Float64Array.from({ length: n }, (_, i) => g(i));
  const profile: StationProfile = {
    s: f((i) => waypoints[i].s),
    x: f((i) => waypoints[i].x),
    y: f((i) => waypoints[i].y),
    groundM: f((i) => waypoints[i].groundAmslM),
    hardLowM: f(() => NaN),
    hardHighM: f(() => NaN),
    bandLowM: f(() => NaN),
    bandHighM: f(() => NaN),
    altitudeM: f((i) => waypoints[i].altitudeAmslM),
    status: new Uint8Array(n),
    cause: new Uint8Array(n),
  };
  return { kind, strip, from, to, waypoints, profile, lengthM, timeS: lengthM / speedMps };
}

/** Same as `leg` but with a fixed time (for endurance arithmetic). */
export function timedLeg(kind: "strip" | "transit", strip: number, from: XY, to: XY, altM: number, timeS: number): SolvedLeg {
  const l = leg(kind, strip, from, to, [
    { t: 0, altM, groundM: altM - 100 },
    { t: 1, altM, groundM: altM - 100 },
  ]);
  return { ...l, timeS };
}

/**
 * A small plan in UTM zone 33N around 12.5 E, 47.1 N: take-off, two strips of
 * three waypoints joined by transits, as a solver would hand them over.
 */
export function smallPlan(): SolvedLeg[] {
  const T: XY = [500_000, 5_216_000];
  const A: XY = [500_100, 5_216_000];
  const B: XY = [500_100, 5_216_400];
  const C: XY = [500_150, 5_216_400];
  const D: XY = [500_150, 5_216_000];
  return [
    leg("transit", 1, T, A, [{ t: 0, altM: 560, groundM: 440 }, { t: 1, altM: 560, groundM: 445 }], 12),
    leg("strip", 1, A, B, [
      { t: 0, altM: 560, groundM: 445 },
      { t: 0.5, altM: 590.5, groundM: 470.25 },
      { t: 1, altM: 575, groundM: 455 },
    ]),
    leg("transit", 2, B, C, [{ t: 0, altM: 575, groundM: 455 }, { t: 1, altM: 578, groundM: 458 }], 10),
    leg("strip", 2, C, D, [
      { t: 0, altM: 578, groundM: 458 },
      { t: 0.5, altM: 592, groundM: 472 },
      { t: 1, altM: 566, groundM: 446 },
    ]),
  ];
}
