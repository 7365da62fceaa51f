/**
 * The highest ground within a horizontal radius of a point, exactly, on the
 * bilinear surface.
 *
 * Why exact this way: inside each quad the surface is bilinear, a saddle or a
 * plane, with no strict maximum inside; so the maximum over a disc lies at a
 * quad corner (a cell centre) inside the disc, or on the disc's rim. The rim is
 * cut at every grid line it crosses into arcs that each lie in one quad, where
 * the height along the rim is a0 + a1 cos θ + b1 sin θ + b2 sin 2θ
 * (trigMax.ts solves that exactly). An arc whose quad's four corners are no
 * higher than the best so far cannot win and is skipped: a bilinear patch
 * stays within its corners' range.
 *
 * In index space a disc of R metres is an ellipse with semi-axes R / sx columns
 * and R / sy rows (sx, sy: metres per column and per row), so geographic grids
 * (cells of different east and north size) take the same path.
 */
import { quadKnown, type Surface } from "./surface.js";
import { maxTrigArc } from "./trigMax.js";
import { grown } from "./grow.js";

let angles = new Float64Array(1024);

function pushAngle(n: number, a: number): number {
  angles = grown(angles, n + 1);
  angles[n] = a;
  return n + 1;
}

const TWO_PI = 2 * Math.PI;

/**
 * Max of the ground over the ellipse centred on index point (c0, r0) with
 * semi-axes ac (columns) and ar (rows); NaN when the ellipse touches a quad
 * without heights (nodata not assumed) or leaves the grid.
 * @example discMaxIndex(s, 120.3, 88.7, 15 / 1, 15 / 1) // highest ground within 15 m on a 1 m grid
 */
export function discMaxIndex(s: Surface, c0: number, r0: number, ac: number, ar: number): number {
  const { width: w, height: h, z } = s;
  let best = -Infinity;
  // 1. Centres inside the ellipse (closed).
  const jLo = Math.ceil(r0 - ar);
  const jHi = Math.floor(r0 + ar);
  for (let j = jLo; j <= jHi; j++) {
    const dv = (j - r0) / ar;
    const rem = 1 - dv * dv;
    if (rem < 0) continue;
    const hw = ac * Math.sqrt(rem);
    const iLo = Math.ceil(c0 - hw);
    const iHi = Math.floor(c0 + hw);
    if (iLo > iHi) continue;
    if (j < 0 || j >= h || iLo < 0 || iHi >= w) return NaN;
    const base = j * w;
    for (let i = iLo; i <= iHi; i++) {
      const v = z[base + i];
      if (v !== v) return NaN;
      if (v > best) best = v;
    }
  }
  // 2. The rim: angles where it crosses the grid lines col = i and row = j.
  let n = 0;
  for (let i = Math.ceil(c0 - ac); i <= Math.floor(c0 + ac); i++) {
    const a = Math.acos(Math.max(-1, Math.min(1, (i - c0) / ac)));
    n = pushAngle(n, a);
    n = pushAngle(n, TWO_PI - a);
  }
  for (let j = Math.ceil(r0 - ar); j <= Math.floor(r0 + ar); j++) {
    const a = Math.asin(Math.max(-1, Math.min(1, (j - r0) / ar)));
    n = pushAngle(n, a < 0 ? a + TWO_PI : a);
    n = pushAngle(n, Math.PI - a);
  }
  const sorted = angles.subarray(0, n).sort();
  const arcs = n === 0 ? 1 : n;
  for (let k = 0; k < arcs; k++) {
    const thA = n === 0 ? 0 : sorted[k];
    const thB = n === 0 ? TWO_PI : k + 1 < n ? sorted[k + 1] : sorted[0] + TWO_PI;
    if (!(thB - thA > 1e-12)) continue;
    const mid = 0.5 * (thA + thB);
    const pc = c0 + ac * Math.cos(mid);
    const pr = r0 + ar * Math.sin(mid);
    const i = Math.min(Math.floor(pc), w - 2);
    const j = Math.min(Math.floor(pr), h - 2);
    if (i < 0 || j < 0 || pc > w - 1 || pr > h - 1) return NaN;
    const q = j * w + i;
    const z00 = z[q];
    const z10 = z[q + 1];
    const z01 = z[q + w];
    const z11 = z[q + w + 1];
    if (z00 !== z00 || z10 !== z10 || z01 !== z01 || z11 !== z11) return NaN;
    if (Math.max(z00, z10, z01, z11) <= best) continue;
    // g = A + B u + C v + D u v with u = pu + ac cos θ, v = pv + ar sin θ.
    const B = z10 - z00;
    const C = z01 - z00;
    const D = z00 - z10 - z01 + z11;
    const pu = c0 - i;
    const pv = r0 - j;
    const a0 = z00 + B * pu + C * pv + D * pu * pv;
    const a1 = (B + D * pv) * ac;
    const b1 = (C + D * pu) * ar;
    const b2 = 0.5 * D * ac * ar;
    const v = maxTrigArc(a0, a1, b1, b2, thA, thB);
    if (v > best) best = v;
  }
  return best;
}

/**
 * True when the ellipse (as in discMaxIndex) touches ground the DEM does not
 * know: a centre inside it without data, a quad its rim crosses with a corner
 * without data, or the edge of the grid.
 * @example touchesUnknownIndex(s, 120.3, 88.7, 15, 15) // false away from nodata
 */
export function touchesUnknownIndex(s: Surface, c0: number, r0: number, ac: number, ar: number): boolean {
  const { width: w, height: h } = s;
  // Quads the ellipse meets lie in its bounding box of quads; a quad meets the ellipse when
  // its closest point to the centre (in the ellipse's scaled metric) is inside it.
  const i1 = Math.floor(c0 - ac);
  const i2 = Math.floor(c0 + ac);
  const j1 = Math.floor(r0 - ar);
  const j2 = Math.floor(r0 + ar);
  if (i1 < 0 || j1 < 0 || c0 + ac > w - 1 || r0 + ar > h - 1) return true;
  for (let j = j1; j <= Math.min(j2, h - 2); j++) {
    const dv = (r0 < j ? j - r0 : r0 > j + 1 ? r0 - j - 1 : 0) / ar;
    for (let i = i1; i <= Math.min(i2, w - 2); i++) {
      const du = (c0 < i ? i - c0 : c0 > i + 1 ? c0 - i - 1 : 0) / ac;
      if (du * du + dv * dv > 1) continue;
      if (!quadKnown(s, i, j)) return true;
    }
  }
  return false;
}
