/**
 * Clearance on the whole leg, not only at waypoints: at every point P(t) of the
 * straight leg, altitude z(t) >= (highest ground within R of P(t)) + floor.
 *
 * Method: branch and bound on t, decided to TOLERANCE_M.
 * - For a piece [ta, tb] of horizontal length δ, every disc centred on it lies
 *   within R + δ/2 of its midpoint, and z is linear, so the piece is clear when
 *   (highest ground within R + δ/2 of the midpoint) + floor <= min(z(ta), z(tb)).
 *   That bound is tried first from the block pyramid (cheap, looser), then
 *   exactly (discMax.ts) once the piece is short.
 * - When neither bound clears it, the exact disc maximum at the midpoint either
 *   shows a breach there, or the piece is halved. As δ shrinks the bound tends to
 *   the exact value at the midpoint, so halving ends; it stops at 1 mm.
 * So a reported breach is measured exactly at a point; a piece passes only when
 * it is proven clear to within the tolerance. The one gap is a 1 mm leaf that is
 * neither proven nor broken at its midpoint: there the deficit anywhere in it can
 * exceed the midpoint's by at most (ground slope + path gradient) x 0.5 mm (1.5 cm
 * beside a 30 m one-cell wall); `unresolved` counts such leaves.
 * Breached pieces are counted into the breached length at LENGTH_STEP_M (so it is
 * measured to that step) and halved further only while they could hold a deficit
 * more than the tolerance beyond the worst measured: the worst deficit reported
 * is the leg's largest to within the tolerance (a maximisation by the same bounds).
 */
import { discMaxIndex } from "./discMax.js";
import { pyramidBounds } from "./pyramid.js";
import type { Surface } from "./surface.js";
import { grown } from "./grow.js";

/** A deficit up to 1 cm is not a breach: waypoints.csv carries altitudes to the centimetre. */
export const TOLERANCE_M = 0.01;
const LEAF_M = 0.001;
export const LENGTH_STEP_M = 0.25;

/** One leg to check, in index space (see path.ts). */
export interface LegSpec {
  ca: number;
  ra: number;
  cb: number;
  rb: number;
  za: number;
  zb: number;
  /** Metres per column and per row; horizontal length in metres. */
  sx: number;
  sy: number;
  lengthM: number;
}

/** What a check found on one leg (reused: copy what you keep). */
export interface LegFinding {
  /** Largest deficit measured (metres); -Infinity when none. */
  worst: number;
  /** Leg parameter of the worst point. */
  worstT: number;
  /** Extra figure at the worst point (the highest ground in the disc, the ground, the distance). */
  worstRef: number;
  /** Breached length, metres. */
  lengthM: number;
  samples: number;
  unresolved: number;
}

/**
 * A finding with nothing found yet (checks reset it per leg).
 * @example const f = emptyFinding(); checkClearanceLeg(surface, leg, 30, 15, f)
 */
export function emptyFinding(): LegFinding {
  return { worst: -Infinity, worstT: 0, worstRef: NaN, lengthM: 0, samples: 0, unresolved: 0 };
}

/**
 * Clears a finding for the next leg.
 * @example resetFinding(finding)
 */
export function resetFinding(f: LegFinding): void {
  f.worst = -Infinity;
  f.worstT = 0;
  f.worstRef = NaN;
  f.lengthM = 0;
  f.samples = 0;
  f.unresolved = 0;
}

let stack = new Float64Array(256);
const bounds = new Float64Array(4);

/**
 * Checks one leg's clearance against `floorM` above the highest ground within
 * `radiusM`; fills `out` (deficits beyond TOLERANCE_M are breaches).
 * @example checkClearanceLeg(surface, leg, 30, 15, finding); if (finding.worst > TOLERANCE_M) report(finding)
 */
export function checkClearanceLeg(s: Surface, leg: LegSpec, floorM: number, radiusM: number, out: LegFinding): void {
  resetFinding(out);
  const { ca, ra, cb, rb, za, zb, sx, sy, lengthM } = leg;
  const dc = cb - ca;
  const dr = rb - ra;
  const dz = zb - za;
  const cellM = Math.max(sx, sy);
  // Pieces longer than this use the pyramid bound only (exact discs of radius up to 1.5 R).
  const exactFromM = Math.max(radiusM, 2 * cellM);
  // Stack entries: ta, tb, and 1 when the piece's breached length is already counted (it is
  // then halved further only to pin down the worst deficit).
  let sp = 0;
  sp = push(sp, 0, 1, 0);
  while (sp > 0) {
    const counted = stack[--sp];
    const tb = stack[--sp];
    const ta = stack[--sp];
    const delta = (tb - ta) * lengthM;
    const tm = 0.5 * (ta + tb);
    const cm = ca + dc * tm;
    const rm = ra + dr * tm;
    const zlo = za + dz * (dz >= 0 ? ta : tb);
    const reach = radiusM + 0.5 * delta;
    const ac = reach / sx;
    const ar = reach / sy;
    // Nothing in this piece can matter when its deficit bound is within the tolerance (or, once
    // its length is counted, within the tolerance of the worst already measured).
    const enough = counted ? out.worst + TOLERANCE_M : TOLERANCE_M;
    if (pyramidBounds(s.pyramid, cm - ac, rm - ar, cm + ac, rm + ar, bounds) && bounds[2] === 0 && bounds[0] + floorM - zlo <= enough) continue;
    if (delta > exactFromM) {
      sp = push(sp, ta, tm, counted);
      sp = push(sp, tm, tb, counted);
      continue;
    }
    let upperDeficit = Infinity;
    if (delta > 0) {
      const upper = discMaxIndex(s, cm, rm, ac, ar);
      out.samples++;
      if (upper === upper) upperDeficit = upper + floorM - zlo;
      if (upperDeficit <= enough) continue;
    }
    const atMid = discMaxIndex(s, cm, rm, radiusM / sx, radiusM / sy);
    out.samples++;
    let done = counted;
    if (atMid === atMid) {
      // A vertical move (delta 0) binds at its lower end.
      const tz = delta > 0 ? tm : dz >= 0 ? ta : tb;
      const deficit = atMid + floorM - (za + dz * tz);
      if (deficit > TOLERANCE_M) {
        if (deficit > out.worst) {
          out.worst = deficit;
          out.worstT = tz;
          out.worstRef = atMid;
        }
        if (!done && delta <= LENGTH_STEP_M) {
          out.lengthM += delta;
          done = 1;
        }
        if (done && upperDeficit <= out.worst + TOLERANCE_M) continue;
        if (delta <= LEAF_M) continue;
      } else if (delta <= LEAF_M) {
        if (!done) out.unresolved++;
        continue;
      }
    } else if (delta <= LENGTH_STEP_M) {
      // Unknown ground in the disc: the nodata check reports it; clearance cannot be measured.
      continue;
    }
    if (delta === 0) continue;
    sp = push(sp, ta, tm, done);
    sp = push(sp, tm, tb, done);
  }
}

function push(sp: number, ta: number, tb: number, counted: number): number {
  stack = grown(stack, sp + 3);
  stack[sp++] = ta;
  stack[sp++] = tb;
  stack[sp++] = counted;
  return sp;
}
