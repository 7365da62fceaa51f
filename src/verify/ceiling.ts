/**
 * The legal ceiling on the whole leg, by its reference:
 * - ground: z(t) <= ground straight below + H. Per piece of the leg inside one
 *   quad the excess z - ground - H is a quadratic in t (walk.ts), so its maximum
 *   (ends or vertex) and the length above the limit are exact.
 * - takeoff: z(t) <= take-off ground + H; z is linear, so the leg's ends decide.
 * - surface: distance to the closest terrain point <= H. That distance D is
 *   1-Lipschitz in the aircraft's position, so on a piece whose ends are at
 *   distances Da, Db and whose 3-D length is l, D <= (Da + Db + l) / 2; pieces
 *   are halved until that bound is under the limit or a midpoint is proven over
 *   it (surfaceDistance.ts gives each distance within 5 mm, and stops early once
 *   a terrain point near enough to decide is found, usually the one straight below).
 */
import { LENGTH_STEP_M, TOLERANCE_M, resetFinding, type LegFinding, type LegSpec } from "./clearance.js";
import { quadColumn, quadRow, quadUsable, type Surface } from "./surface.js";
import { distanceOut, surfaceDistance } from "./surfaceDistance.js";
import { lengthAbove, legBreaks } from "./walk.js";
import { grown } from "./grow.js";

/**
 * Checks z <= ground below + H along a leg; `out.worst` is the largest excess,
 * `worstRef` the ground at that point, `lengthM` the length above the ceiling.
 * @example checkGroundCeilingLeg(surface, leg, 120, finding)
 */
export function checkGroundCeilingLeg(s: Surface, leg: LegSpec, ceilingM: number, out: LegFinding): void {
  resetFinding(out);
  const { ca, ra, cb, rb, za, zb, lengthM } = leg;
  const dc = cb - ca;
  const dr = rb - ra;
  const dzl = zb - za;
  const w = s.width;
  const z = s.z;
  const { t, n } = legBreaks(ca, ra, cb, rb);
  for (let k = 0; k + 1 < n; k++) {
    const t1 = t[k];
    const t2 = t[k + 1];
    const tm = 0.5 * (t1 + t2);
    const i = quadColumn(s, ca + dc * tm), j = quadRow(s, ra + dr * tm);
    if (!quadUsable(s, i, j)) continue; // unknown ground: the nodata check reports it
    const q = j * w + i;
    const A = z[q];
    const B = z[q + 1] - A;
    const C = z[q + w] - A;
    const D = A - z[q + 1] - z[q + w] + z[q + w + 1];
    const u0 = ca - i;
    const v0 = ra - j;
    // e(t) = z(t) - g(t) - H = e0 + e1 t + e2 t^2
    const e0 = za - ceilingM - (A + B * u0 + C * v0 + D * u0 * v0);
    const e1 = dzl - (B * dc + C * dr + D * (u0 * dr + v0 * dc));
    const e2 = -D * dc * dr;
    let tBest = e0 + e1 * t1 + e2 * t1 * t1 >= e0 + e1 * t2 + e2 * t2 * t2 ? t1 : t2;
    if (e2 < 0) {
      const tv = -e1 / (2 * e2);
      if (tv > t1 && tv < t2) tBest = tv;
    }
    const eBest = e0 + e1 * tBest + e2 * tBest * tBest;
    out.samples++;
    if (eBest > TOLERANCE_M) {
      if (eBest > out.worst) {
        out.worst = eBest;
        out.worstT = tBest;
        out.worstRef = za + dzl * tBest - ceilingM - eBest;
      }
      out.lengthM += lengthAbove(e0 - TOLERANCE_M, e1, e2, t1, t2) * lengthM;
    }
  }
}

/**
 * Checks z <= take-off ground + H at the leg's ends (z is linear along it).
 * @example checkTakeoffCeilingLeg(leg, 412.3, 120, finding)
 */
export function checkTakeoffCeilingLeg(leg: LegSpec, takeoffGroundM: number, ceilingM: number, out: LegFinding): void {
  resetFinding(out);
  const limit = takeoffGroundM + ceilingM;
  const ea = leg.za - limit;
  const eb = leg.zb - limit;
  out.samples = 2;
  const worst = Math.max(ea, eb);
  if (worst > TOLERANCE_M) {
    out.worst = worst;
    out.worstT = ea >= eb ? 0 : 1;
    out.worstRef = takeoffGroundM;
    // z is linear: the part above the limit is one end's share.
    const dz = leg.zb - leg.za;
    const share = dz === 0 ? 1 : ea > TOLERANCE_M && eb > TOLERANCE_M ? 1 : Math.abs((worst - TOLERANCE_M) / dz);
    out.lengthM = Math.min(1, share) * leg.lengthM;
  }
}

let stack = new Float64Array(256);
const LEAF_M = 0.001;

/**
 * Checks the distance to the closest terrain point <= H along a leg.
 * `worstRef` is the distance at the worst point.
 * @example checkSurfaceCeilingLeg(surface, leg, 120, finding)
 */
export function checkSurfaceCeilingLeg(s: Surface, leg: LegSpec, ceilingM: number, out: LegFinding): void {
  resetFinding(out);
  const { ca, ra, cb, rb, za, zb, sx, sy, lengthM } = leg;
  const dc = cb - ca;
  const dr = rb - ra;
  const dz = zb - za;
  const len3 = Math.hypot(lengthM, dz);
  // Searching beyond H + 50 m is not needed: past it the breach is certain and at least that big.
  const limitM = ceilingM + 50;
  const tol = 0.005;
  const dist = (tq: number, enough: number): number => {
    out.samples += surfaceDistance(s, ca + dc * tq, ra + dr * tq, za + dz * tq, sx, sy, limitM, tol, enough);
    return distanceOut[1];
  };
  const H = ceilingM + TOLERANCE_M;
  let sp = 0;
  stack[sp++] = 0;
  stack[sp++] = 1;
  stack[sp++] = dist(0, H);
  stack[sp++] = dist(1, H);
  while (sp > 0) {
    const db = stack[--sp];
    const da = stack[--sp];
    const tb = stack[--sp];
    const ta = stack[--sp];
    const l3 = (tb - ta) * len3;
    if ((da + db + l3) / 2 <= H) continue;
    const tm = 0.5 * (ta + tb);
    // Both halves pass if the midpoint is this close (their bound (da + dm + l3/2) / 2 <= H):
    // a point that close ends the search at once (usually the ground straight below).
    const target = 2 * H - Math.max(da, db) - l3 / 2;
    let dm = dist(tm, target);
    if (dm <= target) continue;
    dm = dist(tm, -Infinity);
    const lower = distanceOut[0];
    const delta = (tb - ta) * lengthM;
    if (lower > H) {
      if (lower - ceilingM > out.worst) {
        out.worst = lower - ceilingM;
        out.worstT = tm;
        out.worstRef = dm;
      }
      if (delta <= LENGTH_STEP_M || l3 <= LEAF_M) {
        out.lengthM += delta;
        continue;
      }
    } else if (l3 <= LEAF_M) {
      out.unresolved++;
      continue;
    }
    stack = grown(stack, sp + 8);
    stack[sp++] = tm;
    stack[sp++] = tb;
    stack[sp++] = dm;
    stack[sp++] = db;
    stack[sp++] = ta;
    stack[sp++] = tm;
    stack[sp++] = da;
    stack[sp++] = dm;
  }
  // A vertical move: both ends are the same point in plan; the B&B above measured them.
}
