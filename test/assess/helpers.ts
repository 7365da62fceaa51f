import type { Camera } from "../../src/camera/types.js";
import type { SolvedLeg, StationProfile, Waypoint } from "../../src/solve/types.js";

/**
 * Generic test camera: 20 MP, 1-inch sensor (13.2 mm x 8.8 mm, 5472 x 3648 px),
 * 8.8 mm lens. Pixel pitch p = 13.2 / 5472 mm, ifov = p / f.
 */
export function genericCamera(portrait = false): Camera {
  const sensorWidthMm = 13.2;
  const focalLengthMm = 8.8;
  const imageWidthPx = 5472;
  return {
    imageWidthPx,
    imageHeightPx: 3648,
    ifov: sensorWidthMm / imageWidthPx / focalLengthMm,
    sensorWidthMm,
    sensorHeightMm: 8.8,
    focalLengthMm,
    hfovDeg: (2 * Math.atan(sensorWidthMm / 2 / focalLengthMm) * 180) / Math.PI,
    exposureS: 1 / 1000,
    minIntervalS: 2,
    portrait,
  };
}

/**
 * A hand-built strip leg: waypoints at the given along-track distances and
 * altitudes, stations every stepM with status/cause from the callbacks.
 */
export function handLeg(opts: {
  from: [number, number];
  to: [number, number];
  strip: number;
  waypoints: { s: number; altitudeAmslM: number }[];
  stationStepM?: number;
  status?: (s: number) => number;
  cause?: (s: number) => number;
  kind?: "strip" | "transit";
}): SolvedLeg {
  const [ax, ay] = opts.from;
  const [bx, by] = opts.to;
  const len = Math.hypot(bx - ax, by - ay);
  const ux = (bx - ax) / len;
  const uy = (by - ay) / len;
  const step = opts.stationStepM ?? 1;
  const m = Math.floor(len / step) + 1;
  const profile: StationProfile = {
    s: new Float64Array(m),
    x: new Float64Array(m),
    y: new Float64Array(m),
    groundM: new Float64Array(m),
    hardLowM: new Float64Array(m),
    hardHighM: new Float64Array(m),
    bandLowM: new Float64Array(m),
    bandHighM: new Float64Array(m),
    altitudeM: new Float64Array(m),
    status: new Uint8Array(m),
    cause: new Uint8Array(m),
  };
  for (let k = 0; k < m; k++) {
    const s = k * step;
    profile.s[k] = s;
    profile.x[k] = ax + s * ux;
    profile.y[k] = ay + s * uy;
    profile.status[k] = opts.status?.(s) ?? 0;
    profile.cause[k] = opts.cause?.(s) ?? 0;
  }
  const waypoints: Waypoint[] = opts.waypoints.map((w) => ({
    x: ax + w.s * ux,
    y: ay + w.s * uy,
    s: w.s,
    altitudeAmslM: w.altitudeAmslM,
    groundAmslM: 0,
    heightAboveGroundM: w.altitudeAmslM,
    speedMps: 10,
  }));
  return { kind: opts.kind ?? "strip", strip: opts.strip, from: opts.from, to: opts.to, waypoints, profile, lengthM: len, timeS: len / 10 };
}

/**
 * Number of lattice points s0 + k * step, k = 0..n, within [a - half, a + half]:
 * how many photos (along a strip) or strips (across) reach a ground point.
 */
export function latticeCount(a: number, s0: number, step: number, n: number, half: number): number {
  const kHi = Math.min(n, Math.floor((a + half - s0) / step));
  const kLo = Math.max(0, Math.ceil((a - half - s0) / step));
  return Math.max(0, kHi - kLo + 1);
}
