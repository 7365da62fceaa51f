/**
 * Unknown ground along a leg: where the DEM has no data (or ends), nothing may
 * be flown on a guess. Two lengths per leg:
 * - straight below: pieces of the leg (walk.ts) over a quad with a corner
 *   without data, exact;
 * - within the safety radius: the length along which the clearance disc touches
 *   such a quad, found by halving the leg (block pyramid first, then the exact
 *   test of discMax.ts) down to LENGTH_STEP_M, so it is measured to 0.25 m and
 *   errs long.
 */
import { LENGTH_STEP_M, type LegSpec } from "./clearance.js";
import { touchesUnknownIndex } from "./discMax.js";
import { pyramidBounds } from "./pyramid.js";
import { quadKnown, quadColumn, quadRow, type Surface } from "./surface.js";
import { legBreaks } from "./walk.js";
import { grown } from "./grow.js";

export interface UnknownFinding {
  /** Metres of the leg straight over unknown ground. */
  belowM: number;
  /** Metres of the leg whose safety disc touches unknown ground. */
  nearM: number;
  /** Leg parameter of the first such point (NaN when none). */
  firstT: number;
}

let stack = new Float64Array(256);
const bounds = new Float64Array(4);

/**
 * Measures a leg's unknown ground; `discCheck` false skips the safety disc (the
 * take-off's vertical moves, outside the clearance promise).
 * @example const f = { belowM: 0, nearM: 0, firstT: NaN }; checkUnknownLeg(surface, leg, 15, true, f)
 */
export function checkUnknownLeg(s: Surface, leg: LegSpec, radiusM: number, discCheck: boolean, out: UnknownFinding): void {
  out.belowM = 0;
  out.nearM = 0;
  out.firstT = NaN;
  const { ca, ra, cb, rb, sx, sy, lengthM } = leg;
  const dc = cb - ca;
  const dr = rb - ra;
  const { t, n } = legBreaks(ca, ra, cb, rb);
  for (let k = 0; k + 1 < n; k++) {
    const tm = 0.5 * (t[k] + t[k + 1]);
    const i = quadColumn(s, ca + dc * tm), j = quadRow(s, ra + dr * tm);
    if (!quadKnown(s, i, j)) {
      out.belowM += (t[k + 1] - t[k]) * lengthM;
      if (!(out.firstT <= tm)) out.firstT = tm;
    }
  }
  if (lengthM === 0) {
    const i = quadColumn(s, ca), j = quadRow(s, ra);
    if (!quadKnown(s, i, j)) out.firstT = 0;
  }
  if (!discCheck) return;
  let sp = 0;
  stack[sp++] = 0;
  stack[sp++] = 1;
  while (sp > 0) {
    const tb = stack[--sp];
    const ta = stack[--sp];
    const delta = (tb - ta) * lengthM;
    const tm = 0.5 * (ta + tb);
    const cm = ca + dc * tm;
    const rm = ra + dr * tm;
    const ac = (radiusM + 0.5 * delta) / sx;
    const ar = (radiusM + 0.5 * delta) / sy;
    if (pyramidBounds(s.pyramid, cm - ac, rm - ar, cm + ac, rm + ar, bounds) && bounds[3] === 0) continue;
    if (delta > LENGTH_STEP_M) {
      stack = grown(stack, sp + 4);
      stack[sp++] = tm;
      stack[sp++] = tb;
      stack[sp++] = ta;
      stack[sp++] = tm;
      continue;
    }
    if (touchesUnknownIndex(s, cm, rm, ac, ar)) {
      out.nearM += delta;
      if (!(out.firstT <= tm)) out.firstT = tm;
      if (lengthM === 0) out.nearM = 0; // a vertical move has no length, but the point counts
    }
  }
}
