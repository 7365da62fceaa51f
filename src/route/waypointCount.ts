/**
 * How many waypoints (rows) a run of solved legs gives: where one leg ends at
 * the point and height the next starts, the two share one row.
 */
import type { SolvedLeg } from "../solve/types.js";

/** Legs join when the end and start differ by at most this, metres, in place and height. */
const JOIN_TOLERANCE_M = 0.01;

/** True when `b`'s first waypoint is the same point as `a`'s last (one row for both). */
export function legsJoin(a: SolvedLeg, b: SolvedLeg): boolean {
  const p = a.waypoints[a.waypoints.length - 1];
  const q = b.waypoints[0];
  if (!p || !q) return false;
  return (
    Math.hypot(p.x - q.x, p.y - q.y) <= JOIN_TOLERANCE_M && Math.abs(p.altitudeAmslM - q.altitudeAmslM) <= JOIN_TOLERANCE_M
  );
}

/** Number of rows a flight's legs give (the autopilot's waypoint count). */
export function countRows(legs: readonly SolvedLeg[]): number {
  let n = 0;
  for (let i = 0; i < legs.length; i++) {
    n += legs[i].waypoints.length;
    if (i > 0 && legsJoin(legs[i - 1], legs[i])) n -= 1;
  }
  return n;
}
