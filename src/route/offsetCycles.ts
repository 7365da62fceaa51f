import type { XY } from "../layout/types.js";
import { openRing } from "./rings.js";
import type { ArcOptions } from "./types.js";

/**
 * The raw outline of a polygon grown by a disc: its rings offset outwards with
 * circumscribed arcs at convex corners.
 *
 * Why the raw outline already describes the buffer. Let P be the polygon (rings
 * with P on their left) and r the radius. A point within r of P has a nearest
 * point of P that is either inside a side (then it lies in the rectangle of
 * width r on that side's outer flank) or a convex corner (then it lies in the
 * disc sector between the normals of the two sides there); a reflex corner is
 * never nearest to a point outside P. So the buffer is the union of P, one
 * rectangle per side and one sector per convex corner. Adding the boundaries of
 * these pieces as cycles, the sides of P cancel against the rectangles' inner
 * sides and the rectangles' ends against the sectors' radii; what is left is the
 * cycle built here: each side moved out by r, joined at a convex corner by the
 * arc and at a reflex corner by the two radii through the corner itself (the
 * "through the vertex" join). Its winding number at a point therefore counts the
 * pieces holding the point: never negative, positive exactly on the buffer.
 * This is the convolution view of Minkowski sums (Guibas, Ramshaw and Stolfi,
 * "A kinetic framework for computational geometry", FOCS 1983; Wein, "Exact and
 * efficient construction of planar Minkowski sums using the convolution method",
 * ESA 2006; both from memory). Holes need nothing special: a hole of a zone
 * offsets inwards, and where it is narrower than twice the buffer its pieces
 * cover it, so the hole is filled exactly where no ground farther than r from
 * the zone is left.
 *
 * Arcs are cut on circumscribed polygons: a sector of angle Δ is split into m
 * equal parts of half-angle h = Δ / 2m and the vertices sit at r / cos h on the
 * part bisectors, so every side is tangent to the circle and the arc lies
 * inside. The side's farthest excess over r is r (1 / cos h - 1), kept at or
 * below the deviation asked for. The tangent points themselves lie on the
 * offset sides and are left out.
 */

/** Default largest excess of an outline over the true buffer, metres. */
export const DEFAULT_MAX_DEVIATION_M = 0.5;
/** Default largest excess as a share of the buffer distance. */
export const DEFAULT_MAX_DEVIATION_SHARE = 0.02;
/** Coarsest arc step, whatever the tolerance: a quarter turn in four sides. */
const MAX_HALF_STEP_RAD = Math.PI / 8;

/**
 * The largest excess over a buffer of `radiusM` the options allow, metres.
 * @example arcDeviationM(100) // 0.5 (2 % of 100 m is 2 m; 0.5 m is smaller)
 */
export function arcDeviationM(radiusM: number, options: ArcOptions = {}): number {
  const maxM = options.maxDeviationM ?? DEFAULT_MAX_DEVIATION_M;
  const share = options.maxDeviationShare ?? DEFAULT_MAX_DEVIATION_SHARE;
  return Math.min(maxM, share * radiusM);
}

/**
 * Half-angle of one arc side so that r (1 / cos h - 1) <= deviation, radians.
 * @example arcHalfStepRad(100, 0.5) // acos(100 / 100.5) ≈ 0.0998
 */
export function arcHalfStepRad(radiusM: number, deviationM: number): number {
  if (!(radiusM > 0) || !(deviationM > 0)) return MAX_HALF_STEP_RAD;
  return Math.min(MAX_HALF_STEP_RAD, Math.acos(radiusM / (radiusM + deviationM)));
}

/**
 * Raw offset cycles of rings that have their polygon on the left (outer
 * counter-clockwise, holes clockwise, open). The cycles may cross themselves
 * and each other; the buffer is where their winding number is positive.
 * @example
 * offsetCycles([[[0, 0], [10, 0], [10, 10], [0, 10]]], 1, Math.PI / 4)
 * // [[[-1, -1], [11, -1], [11, 11], [-1, 11]]]: one arc side per corner (h = 45°)
 */
export function offsetCycles(rings: readonly XY[][], radiusM: number, halfStepRad: number): XY[][] {
  if (!(radiusM > 0)) return rings.map((r) => r.map((p): XY => [p[0], p[1]]));
  // Arcs of neighbouring corners can end on the same point: drop the repeat.
  return rings.map((ring) => openRing(offsetRing(ring, radiusM, halfStepRad)));
}

function offsetRing(ring: readonly XY[], r: number, halfStep: number): XY[] {
  const n = ring.length;
  const out: XY[] = [];
  for (let i = 0; i < n; i++) {
    const [px, py] = ring[(i + n - 1) % n];
    const [vx, vy] = ring[i];
    const [qx, qy] = ring[(i + 1) % n];
    // Outward (right-hand) unit normals of the side in and the side out.
    const l0 = Math.hypot(vx - px, vy - py);
    const l1 = Math.hypot(qx - vx, qy - vy);
    const n0x = (vy - py) / l0;
    const n0y = -(vx - px) / l0;
    const n1x = (qy - vy) / l1;
    const n1y = -(qx - vx) / l1;
    const sweep = Math.atan2(n0x * n1y - n0y * n1x, n0x * n1x + n0y * n1y);
    if (sweep > 1e-12) {
      const m = Math.ceil(sweep / (2 * halfStep));
      const h = sweep / (2 * m);
      const rc = r / Math.cos(h);
      const phi0 = Math.atan2(n0y, n0x);
      for (let k = 0; k < m; k++) {
        const phi = phi0 + (2 * k + 1) * h;
        out.push([vx + rc * Math.cos(phi), vy + rc * Math.sin(phi)]);
      }
    } else if (sweep < -1e-12) {
      out.push([vx + r * n0x, vy + r * n0y], [vx, vy], [vx + r * n1x, vy + r * n1y]);
    } else {
      out.push([vx + r * n0x, vy + r * n0y]);
    }
  }
  return out;
}
