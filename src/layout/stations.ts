/**
 * Points along a strip leg: dense stations for the altitude solver, and the
 * exposure positions where the camera fires.
 */
import type { LayoutLeg, Stations } from "./types.js";
import { subtractIntervals } from "./intervals.js";

/**
 * Stations every `stepM` or a little less (the leg is split into equal
 * steps so the first and last stations fall exactly on its ends). Each
 * station's zone is half the strip spacing across and half a step along.
 * @example stationsAlong(leg, 5, 20).s // Float64Array [0, 4.98, ..., leg.lengthM]
 */
export function stationsAlong(leg: LayoutLeg, stepM: number, zoneHalfAcrossM: number): Stations {
  if (!(stepM > 0)) throw new RangeError(`stationsAlong: stepM must be > 0, got ${stepM}`);
  const L = leg.lengthM;
  const steps = Math.max(1, Math.ceil(L / stepM - 1e-9));
  const n = L > 0 ? steps + 1 : 1;
  const step = L > 0 ? L / steps : 0;
  const { ux, uy } = unit(leg);
  const s = new Float64Array(n);
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const si = i === n - 1 ? L : i * step;
    s[i] = si;
    x[i] = leg.from[0] + ux * si;
    y[i] = leg.from[1] + uy * si;
  }
  if (n > 1) {
    x[n - 1] = leg.to[0];
    y[n - 1] = leg.to[1];
  }
  return { s, x, y, ux, uy, stepM: step, zoneHalfAcrossM, zoneHalfAlongM: step / 2 };
}

/**
 * Along-track distances of the exposures on a strip leg. Each stretch where
 * photos are needed (the leg minus its noPhotoIntervals) gets a photo at both
 * ends and equal gaps of at most `triggerM` between, so the front overlap
 * is never less than planned.
 * @example exposureStations(leg, 20) // Float64Array [0, 19.7, 39.4, ...]
 */
export function exposureStations(leg: LayoutLeg, triggerM: number): Float64Array {
  if (!(triggerM > 0)) throw new RangeError(`exposureStations: triggerM must be > 0, got ${triggerM}`);
  if (leg.kind !== "strip") return new Float64Array(0);
  const stretches = subtractIntervals([0, leg.lengthM], leg.noPhotoIntervals ?? []);
  let count = 0;
  const gaps = stretches.map(([a, b]) => {
    const k = b - a > 0 ? Math.ceil((b - a) / triggerM - 1e-9) : 0;
    count += k + 1;
    return k;
  });
  const out = new Float64Array(count);
  let j = 0;
  stretches.forEach(([a, b], i) => {
    const k = gaps[i];
    for (let m = 0; m <= k; m++) out[j++] = m === k ? b : a + ((b - a) * m) / Math.max(k, 1);
  });
  return out;
}

function unit(leg: LayoutLeg): { ux: number; uy: number } {
  const dx = leg.to[0] - leg.from[0];
  const dy = leg.to[1] - leg.from[1];
  const len = Math.hypot(dx, dy);
  return len > 0 ? { ux: dx / len, uy: dy / len } : { ux: 0, uy: 1 };
}
