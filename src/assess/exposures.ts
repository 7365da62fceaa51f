import { InputError } from "../errors.js";
import type { SolvedLeg, Waypoint } from "../solve/types.js";
import type { Exposure } from "./types.js";

/**
 * Places the photos of a plan from its final waypoints.
 *
 * The check must see what the aircraft will fly, not what the solver
 * intended: altitudes come from the straight segments between waypoints
 * (linear in along-track distance), never from the solver's station profile.
 */

/** Along-track stretches of a leg where no photos are taken, [sStartM, sEndM] from the leg start. */
export type NoPhotoIntervals = ReadonlyArray<readonly [number, number]>;

/** A solved leg that layout may have marked with stretches without photos. */
export type AssessedLeg = SolvedLeg & {
  noPhotoIntervals?: NoPhotoIntervals;
  /** Along-track distance of the first photo from the leg start: a strip resumed after a battery change continues its spacing. */
  photoPhaseM?: number;
};

export interface ExposureOptions {
  /**
   * Where the first photo of each strip falls: `start` at s = 0 then every
   * trigger distance up to the leg end; `centred` spreads the remainder of
   * lengthM / triggerM evenly over both ends. Default `start`.
   */
  phase?: "start" | "centred";
}

/**
 * Photos along every `strip` leg, every `triggerM` metres of along-track distance.
 * @example
 * const exposures = exposuresFromLegs(solved.legs, layout.triggerM);
 * exposures[0]; // { x, y, altitudeAmslM, ux, uy, strip }
 */
export function exposuresFromLegs(legs: readonly AssessedLeg[], triggerM: number, opts: ExposureOptions = {}): Exposure[] {
  checkTrigger(triggerM);
  const out: Exposure[] = [];
  for (const leg of legs) {
    // Photos need the waypoints' altitudes.
    if (leg.waypoints.length === 0) continue;
    const lat = photoLattice(leg, triggerM, opts);
    if (!lat) continue;
    const wps = leg.waypoints;
    let seg = 0;
    for (let k = 0; k <= lat.n; k++) {
      if (lat.present[k] === 0) continue;
      const s = lat.s0 + k * triggerM;
      while (seg + 1 < wps.length - 1 && wps[seg + 1].s < s) seg++;
      out.push({
        x: leg.from[0] + s * lat.ux,
        y: leg.from[1] + s * lat.uy,
        altitudeAmslM: altitudeOnSegment(wps, seg, s),
        ux: lat.ux,
        uy: lat.uy,
        strip: leg.strip,
      });
    }
  }
  return out;
}

/**
 * Where a strip leg's photos fall: at s = s0 + k * triggerM from the leg start for
 * k = 0..n, except where `present[k]` is 0 (inside a no-photo interval). Null for
 * legs that take no photos (not a strip, zero length).
 */
export interface PhotoLattice {
  ux: number;
  uy: number;
  lengthM: number;
  s0: number;
  n: number;
  present: Uint8Array;
}

/**
 * The photo positions of one leg, the rule exposuresFromLegs places photos by.
 * @example const lat = photoLattice(leg, 8.8); lat && lat.s0 + lat.n * 8.8 <= lat.lengthM
 */
export function photoLattice(
  leg: Pick<AssessedLeg, "kind" | "from" | "to" | "photoPhaseM" | "noPhotoIntervals">,
  triggerM: number,
  opts: ExposureOptions = {},
): PhotoLattice | null {
  checkTrigger(triggerM);
  if (leg.kind !== "strip") return null;
  const ddx = leg.to[0] - leg.from[0];
  const ddy = leg.to[1] - leg.from[1];
  const len = Math.hypot(ddx, ddy);
  if (!(len > 0)) return null;
  const phase = opts.phase ?? "start";
  // Half a millimetre of slack keeps a photo that lands on the leg end despite rounding.
  const own = leg.photoPhaseM;
  const n = Math.floor((len - (own ?? 0)) / triggerM + 1e-9);
  const s0 = own !== undefined ? own : phase === "centred" ? (len - n * triggerM) / 2 : 0;
  const gaps = leg.noPhotoIntervals ?? [];
  const present = new Uint8Array(Math.max(0, n + 1));
  for (let k = 0; k <= n; k++) present[k] = inAnyInterval(s0 + k * triggerM, gaps) ? 0 : 1;
  return { ux: ddx / len, uy: ddy / len, lengthM: len, s0, n, present };
}

/**
 * Along-track distance of the first photo on a piece of a line starting `s0` metres along it,
 * when the line's photos fall at firstM + k x everyM (a line cut at a block seam keeps them).
 * @example photoPhaseOn({ firstM: 3, everyM: 10 }, 25) // 8: photos at 33, 43, ... along the line
 */
export function photoPhaseOn(grid: { firstM: number; everyM: number }, s0: number): number {
  const { firstM, everyM } = grid;
  return (((firstM - s0) % everyM) + everyM) % everyM;
}

function checkTrigger(triggerM: number): void {
  if (!(triggerM > 0) || !Number.isFinite(triggerM)) {
    throw new InputError("triggerM", triggerM, "a finite number of metres > 0", "trigger distance must be positive");
  }
}

function inAnyInterval(s: number, gaps: NoPhotoIntervals): boolean {
  for (const [a, b] of gaps) if (s >= Math.min(a, b) && s <= Math.max(a, b)) return true;
  return false;
}

/** Altitude at s on the straight segment from waypoint seg to seg + 1 (held flat beyond the ends). */
function altitudeOnSegment(wps: readonly Waypoint[], seg: number, s: number): number {
  const a = wps[seg];
  if (wps.length === 1 || s <= a.s) return a.altitudeAmslM;
  const b = wps[seg + 1];
  if (s >= b.s) return b.altitudeAmslM;
  const t = (s - a.s) / (b.s - a.s);
  return a.altitudeAmslM + t * (b.altitudeAmslM - a.altitudeAmslM);
}
