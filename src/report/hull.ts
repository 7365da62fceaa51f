/** The convex hull of points in the plane, for the outline of a block on the report map. */
import type { XY } from "../layout/types.js";

/** Twice the signed area of the triangle o, a, b: > 0 when a -> b turns left (counter-clockwise) about o. */
function cross(o: XY, a: XY, b: XY): number {
  return (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0]);
}

/**
 * Convex hull by the monotone chain algorithm (A. M. Andrew, "Another efficient algorithm
 * for convex hulls in two dimensions", Information Processing Letters 9(5), 1979): sort by
 * x then y, build the lower and upper chains, dropping every point that does not turn left.
 * Returns the hull's vertices counter-clockwise, without a closing repeat and without
 * collinear points; two points for collinear input, one for a single distinct point.
 *
 * @example convexHull([[0, 0], [2, 0], [1, 1], [2, 2], [0, 2]]) // [[0, 0], [2, 0], [2, 2], [0, 2]]
 */
export function convexHull(points: readonly XY[]): XY[] {
  const p = points
    .filter((q) => Number.isFinite(q[0]) && Number.isFinite(q[1]))
    .map((q) => [q[0], q[1]] as XY)
    .sort((a, b) => a[0] - b[0] || a[1] - b[1]);
  const u: XY[] = [];
  for (const q of p) if (!u.length || u[u.length - 1][0] !== q[0] || u[u.length - 1][1] !== q[1]) u.push(q);
  if (u.length < 3) return u;
  const lower: XY[] = [];
  for (const q of u) {
    while (lower.length >= 2 && cross(lower[lower.length - 2], lower[lower.length - 1], q) <= 0) lower.pop();
    lower.push(q);
  }
  const upper: XY[] = [];
  for (let i = u.length - 1; i >= 0; i--) {
    const q = u[i];
    while (upper.length >= 2 && cross(upper[upper.length - 2], upper[upper.length - 1], q) <= 0) upper.pop();
    upper.push(q);
  }
  lower.pop();
  upper.pop();
  return lower.concat(upper);
}
