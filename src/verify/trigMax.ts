/**
 * The largest value of f(θ) = a0 + a1 cos θ + b1 sin θ + b2 sin 2θ on an arc
 * [θa, θb]: the form a bilinear surface takes along a circle or an ellipse
 * x = c + A cos θ, y = r + B sin θ (substitute into a + bx + cy + dxy; the
 * product term gives sin θ cos θ = sin 2θ / 2).
 *
 * Method: the maximum is at an end of the arc or where f'(θ) = 0. The arc is cut
 * into pieces of at most π/2; on each piece, around its centre θc, φ = θ - θc and
 * t = tan(φ/2) turn f'(φ) (1 + t²)² into a quartic in t (Weierstrass
 * substitution), whose real roots in |t| <= tan(π/8) are all found
 * (roots.ts). Small pieces keep t well away from the substitution's pole.
 */
import { rootsInInterval } from "./roots.js";

const quartic = new Float64Array(5);
const roots = new Float64Array(6);
const HALF_PI = Math.PI / 2;

function f(a0: number, a1: number, b1: number, b2: number, th: number): number {
  return a0 + a1 * Math.cos(th) + b1 * Math.sin(th) + b2 * Math.sin(2 * th);
}

/**
 * Max of a0 + a1 cos θ + b1 sin θ + b2 sin 2θ over θ in [thA, thB] (thB >= thA).
 * @example maxTrigArc(0, 1, 0, 0, -1, 1) // 1 (cos θ peaks at θ = 0)
 */
export function maxTrigArc(a0: number, a1: number, b1: number, b2: number, thA: number, thB: number): number {
  let best = Math.max(f(a0, a1, b1, b2, thA), f(a0, a1, b1, b2, thB));
  const span = thB - thA;
  // |f'| <= |a1| + |b1| + 2|b2|: on an arc so short that f cannot rise 1e-7 m above its
  // ends there is nothing to solve (most rim pieces of a disc on a fine DEM).
  if ((Math.abs(a1) + Math.abs(b1) + 2 * Math.abs(b2)) * span <= 2e-7) return best;
  const pieces = Math.max(1, Math.ceil(span / HALF_PI));
  const step = span / pieces;
  for (let k = 0; k < pieces; k++) {
    const p = thA + k * step;
    const thC = p + step / 2;
    if (k > 0) best = Math.max(best, f(a0, a1, b1, b2, p));
    // f around thC: A1 cos φ + B1 sin φ + A2 cos 2φ + B2 sin 2φ (+ a0).
    const cc = Math.cos(thC);
    const sc = Math.sin(thC);
    const A1 = a1 * cc + b1 * sc;
    const B1 = -a1 * sc + b1 * cc;
    const A2 = b2 * Math.sin(2 * thC);
    const B2 = b2 * Math.cos(2 * thC);
    // f'(φ) (1 + t²)² with t = tan(φ/2), coefficients of t^0..t^4.
    quartic[0] = B1 + 2 * B2;
    quartic[1] = -2 * A1 - 8 * A2;
    quartic[2] = -12 * B2;
    quartic[3] = -2 * A1 + 8 * A2;
    quartic[4] = -B1 + 2 * B2;
    const tMax = Math.tan(step / 4);
    const n = rootsInInterval(quartic, 4, -tMax, tMax, roots);
    for (let i = 0; i < n; i++) {
      const th = thC + 2 * Math.atan(roots[i]);
      const v = f(a0, a1, b1, b2, th);
      if (v > best) best = v;
    }
  }
  return best;
}
