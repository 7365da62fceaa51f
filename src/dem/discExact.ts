import type { DemGrid } from "./grid.js";
import { sampleBilinear } from "./sample.js";

/**
 * Exact extrema of the DEM's bilinear surface over a disc.
 *
 * Within one patch (the square between four cell centres) the surface is
 * bilinear, f = P + Q u + S v + T u v, whose second derivatives along both axes
 * vanish: it has no strict interior extremum, and along a patch edge it is
 * linear. So over a disc its maximum (and minimum) lies at a cell centre inside
 * the disc or on the disc's rim. The centres are what extremaInRadius scans;
 * this module adds the rim: for each patch the circle crosses, the extremum of
 * f along the arc inside the patch (endpoints and stationary points of f(theta)).
 * A wall that rises within one cell is the case that needs it: the rim can lie
 * tens of metres above every centre inside the disc.
 */

/** Arc pieces no wider than this (radians) when bracketing stationary points of f(theta). */
const PIECE_RAD = Math.PI / 32;

const thetas = new Float64Array(10);

/**
 * Max (wantMax) or min of the bilinear patch between centres (c, r)..(c+1, r+1)
 * along the circle of radius R around (px, py), over the arc inside the patch.
 * -Infinity (max) / +Infinity (min) when the circle misses the patch; NaN when
 * it crosses a patch with a nodata corner or off the grid.
 * @example rimExtremumInPatch(grid, x, y, 15, 10, 12, true)
 */
export function rimExtremumInPatch(grid: DemGrid, px: number, py: number, R: number, c: number, r: number, wantMax: boolean): number {
  const none = wantMax ? -Infinity : Infinity;
  const { width: w, height: h, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  // Patch coordinates: u = 0 at centre column c, 1 at c + 1; v likewise for rows.
  const u0 = (px - x0) / dx - 0.5 - c;
  const v0 = (py - y0) / dy - 0.5 - r;
  const a = R / dx;
  const b = R / dy;
  // Quick reject: the circle's box misses the patch, or the patch lies inside the circle.
  if (u0 + Math.abs(a) < 0 || u0 - Math.abs(a) > 1 || v0 + Math.abs(b) < 0 || v0 - Math.abs(b) > 1) return none;
  let n = 0;
  const addCos = (k: number) => {
    if (k < -1 || k > 1) return;
    const t = Math.acos(k);
    thetas[n++] = t;
    thetas[n++] = 2 * Math.PI - t;
  };
  const addSin = (k: number) => {
    if (k < -1 || k > 1) return;
    const t = Math.asin(k);
    thetas[n++] = t < 0 ? t + 2 * Math.PI : t;
    thetas[n++] = Math.PI - t;
  };
  addCos(-u0 / a);
  addCos((1 - u0) / a);
  addSin(-v0 / b);
  addSin((1 - v0) / b);
  // Sort the crossing angles (at most 8) in place, between 0 and 2 pi.
  thetas[n++] = 0;
  thetas[n++] = 2 * Math.PI;
  for (let i = 1; i < n; i++) {
    const t = thetas[i];
    let j = i - 1;
    while (j >= 0 && thetas[j] > t) { thetas[j + 1] = thetas[j]; j--; }
    thetas[j + 1] = t;
  }
  let best = none;
  let corners: [number, number, number, number] | null = null;
  for (let i = 0; i + 1 < n; i++) {
    const ta = thetas[i], tb = thetas[i + 1];
    if (!(tb - ta > 1e-15)) continue;
    const tm = (ta + tb) / 2;
    const um = u0 + a * Math.cos(tm), vm = v0 + b * Math.sin(tm);
    if (um < 0 || um > 1 || vm < 0 || vm > 1) continue;
    if (!corners) {
      if (c < 0 || r < 0 || c + 1 >= w || r + 1 >= h) return NaN;
      const z00 = heights[r * w + c], z01 = heights[r * w + c + 1], z10 = heights[(r + 1) * w + c], z11 = heights[(r + 1) * w + c + 1];
      if (z00 !== z00 || z01 !== z01 || z10 !== z10 || z11 !== z11) return NaN;
      corners = [z00, z01 - z00, z10 - z00, z00 - z01 - z10 + z11];
    }
    const e = arcExtremum(corners, u0, v0, a, b, ta, tb, wantMax);
    if (wantMax ? e > best : e < best) best = e;
  }
  return best;
}

/** Extremum of f(theta) = P + Q u + S v + T u v, u = u0 + a cos, v = v0 + b sin, on [ta, tb]. */
function arcExtremum(k: [number, number, number, number], u0: number, v0: number, a: number, b: number, ta: number, tb: number, wantMax: boolean): number {
  const [P, Q, S, T] = k;
  const f = (t: number) => {
    const u = u0 + a * Math.cos(t), v = v0 + b * Math.sin(t);
    return P + Q * u + S * v + T * u * v;
  };
  const df = (t: number) => {
    const ct = Math.cos(t), st = Math.sin(t);
    const u = u0 + a * ct, v = v0 + b * st;
    return -a * st * (Q + T * v) + b * ct * (S + T * u);
  };
  let best = f(ta);
  const fb = f(tb);
  if (wantMax ? fb > best : fb < best) best = fb;
  const pieces = Math.max(1, Math.ceil((tb - ta) / PIECE_RAD));
  const step = (tb - ta) / pieces;
  let t0 = ta, d0 = df(ta);
  for (let p = 1; p <= pieces; p++) {
    const t1 = p === pieces ? tb : ta + p * step;
    const d1 = df(t1);
    // A maximum where f' falls through zero, a minimum where it rises.
    if (wantMax ? d0 > 0 && d1 <= 0 : d0 < 0 && d1 >= 0) {
      let lo = t0, hi = t1;
      for (let it = 0; it < 60 && hi - lo > 1e-13; it++) {
        const m = (lo + hi) / 2;
        const dm = df(m);
        if (wantMax ? dm > 0 : dm < 0) lo = m;
        else hi = m;
      }
      const e = f((lo + hi) / 2);
      if (wantMax ? e > best : e < best) best = e;
    }
    t0 = t1;
    d0 = d1;
  }
  return best;
}

/** Candidate rim patches of one disc: bound, column, row (reused scratch). */
let candBound = new Float64Array(256);
let candCell = new Int32Array(512);

/**
 * Raises `best` (the maximum over the centres inside the disc) to the rim's
 * maximum, or lowers it to the rim's minimum. Branch and bound: each patch the
 * circle crosses is bounded by the bilinear's extremes over the bounding box of
 * the circle's part in it (a bilinear's extremes over a box lie at its corners),
 * and only patches whose bound beats the best value so far, taken best bound
 * first, get the exact arc search. NaN when the rim crosses nodata or leaves
 * the grid.
 * @example const top = rimExtend(grid, x, y, 15, centresMax, true)
 */
export function rimExtend(grid: DemGrid, px: number, py: number, R: number, best: number, wantMax: boolean): number {
  if (best !== best) return NaN;
  if (!(R > 0)) return best;
  const { width: w, height: h, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const adx = Math.abs(dx), ady = Math.abs(dy);
  const sign = wantMax ? 1 : -1;
  // Point in centre-index coordinates.
  const pc = (px - x0) / dx - 0.5;
  const pr = (py - y0) / dy - 0.5;
  const rA = Math.floor(pr - R / ady), rB = Math.floor(pr + R / ady);
  let nc = 0;
  for (let r = rA; r <= rB; r++) {
    // Patch row r spans centre rows r..r+1: the circle meets it where |x - pc| lies in [xi, xo].
    const xr = bandReach(pr, r, R, ady, adx);
    if (xr === null) continue;
    const [xi, xo] = xr;
    for (let side = -1; side <= 1; side += 2) {
      const ca = Math.floor(side < 0 ? pc - xo : pc + xi), cb = Math.floor(side < 0 ? pc - xi : pc + xo);
      for (let c = ca; c <= cb; c++) {
        if (side > 0 && c <= Math.floor(pc - xi) && c >= Math.floor(pc - xo)) continue; // seen from the left side
        if (c < 0 || r < 0 || c + 1 >= w || r + 1 >= h) return NaN;
        const z00 = heights[r * w + c], z01 = heights[r * w + c + 1], z10 = heights[(r + 1) * w + c], z11 = heights[(r + 1) * w + c + 1];
        if (z00 !== z00 || z01 !== z01 || z10 !== z10 || z11 !== z11) return NaN;
        const cornerBound = wantMax ? Math.max(z00, z01, z10, z11) : Math.min(z00, z01, z10, z11);
        if (sign * cornerBound <= sign * best) continue;
        // Box of the circle's part in this patch, in patch coordinates (u, v in [0, 1]).
        const yr = bandReach(pc, c, R, adx, ady);
        if (yr === null) continue;
        const u = hullIn(pc - c, xi, xo, hullU), v = hullIn(pr - r, yr[0], yr[1], hullV);
        if (u === null || v === null) continue;
        const Q = z01 - z00, S = z10 - z00, T = z00 - z01 - z10 + z11;
        const bl = (uu: number, vv: number) => sign * (z00 + Q * uu + S * vv + T * uu * vv);
        const bound = Math.max(bl(u[0], v[0]), bl(u[1], v[0]), bl(u[0], v[1]), bl(u[1], v[1]));
        if (bound <= sign * best) continue;
        if (nc === candBound.length) {
          const b2 = new Float64Array(2 * nc); b2.set(candBound); candBound = b2;
          const c2 = new Int32Array(4 * nc); c2.set(candCell); candCell = c2;
        }
        candBound[nc] = bound;
        candCell[2 * nc] = c;
        candCell[2 * nc + 1] = r;
        nc++;
      }
    }
  }
  // Best bound first: once a bound cannot beat the best value, no later one can.
  for (let k = 0; k < nc; k++) {
    let m = k;
    for (let j = k + 1; j < nc; j++) if (candBound[j] > candBound[m]) m = j;
    if (m !== k) {
      const tb = candBound[k]; candBound[k] = candBound[m]; candBound[m] = tb;
      const tc = candCell[2 * k], tr = candCell[2 * k + 1];
      candCell[2 * k] = candCell[2 * m]; candCell[2 * k + 1] = candCell[2 * m + 1];
      candCell[2 * m] = tc; candCell[2 * m + 1] = tr;
    }
    if (candBound[k] <= sign * best) break;
    const e = rimExtremumInPatch(grid, px, py, R, candCell[2 * k], candCell[2 * k + 1], wantMax);
    if (e !== e) return NaN;
    if (sign * e > sign * best) best = e;
  }
  return best;
}

const reach = [0, 0] as [number, number];

/**
 * Where the circle (radius R, centre at index p on one axis) meets the band
 * [k, k + 1] of that axis: the range [inner, outer] of |offset| along the other
 * axis, in that axis's cells; null when it misses the band. `along` and `across`
 * are the cell sizes of the band's axis and the other axis. Reuses one array.
 */
function bandReach(p: number, k: number, R: number, along: number, across: number): [number, number] | null {
  const dNear = (p < k ? k - p : p > k + 1 ? p - k - 1 : 0) * along;
  if (dNear > R) return null;
  const dFar = Math.max(Math.abs(k - p), Math.abs(k + 1 - p)) * along;
  reach[0] = dFar < R ? Math.sqrt(R * R - dFar * dFar) / across : 0;
  reach[1] = Math.sqrt(R * R - dNear * dNear) / across;
  return reach;
}

const hullU = [0, 0];
const hullV = [0, 0];

/**
 * Hull, within [0, 1], of the offsets o in [-outer, -inner] or [inner, outer]
 * around `centre` (patch coordinates), written to `out`; null when neither part meets [0, 1].
 */
function hullIn(centre: number, inner: number, outer: number, out: number[]): number[] | null {
  let lo = Infinity, hi = -Infinity;
  let l = Math.max(0, centre - outer), r = Math.min(1, centre - inner);
  if (l <= r) { lo = l; hi = r; }
  l = Math.max(0, centre + inner);
  r = Math.min(1, centre + outer);
  if (l <= r) { lo = Math.min(lo, l); hi = Math.max(hi, r); }
  if (!(lo <= hi)) return null;
  out[0] = lo;
  out[1] = hi;
  return out;
}

/**
 * Exact max and min of the bilinear surface over the disc of radius R around
 * each point: the cell centres inside the disc, extended by the rim (a disc of
 * radius 0 is the point itself). NaN where the disc touches nodata or leaves
 * the grid. For small discs (the ceiling's reach between stations) and for
 * checks; the solver's clearance on fine DEMs uses the pooled maxGroundInRadius.
 * @example discExtremaExact(grid, xs, ys, 0.5, maxOut, minOut)
 */
export function discExtremaExact(grid: DemGrid, xs: ArrayLike<number>, ys: ArrayLike<number>, R: number, outMax: Float64Array, outMin: Float64Array): void {
  const { width: w, height: h, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const one = new Float64Array(1);
  for (let i = 0; i < xs.length; i++) {
    const px = xs[i], py = ys[i];
    if (!(R > 0)) {
      outMax[i] = outMin[i] = sampleBilinear(grid, [px], [py], one)[0];
      continue;
    }
    let mx = -Infinity, mn = Infinity, bad = false;
    // Centres inside the disc (rows whose centres lie within R, then the chord of each).
    const rLo = Math.ceil((py + R - y0) / dy - 0.5), rHi = Math.floor((py - R - y0) / dy - 0.5);
    for (let r = rLo; r <= rHi && !bad; r++) {
      const ddy = y0 + (r + 0.5) * dy - py;
      const rem = R * R - ddy * ddy;
      if (rem < 0) continue;
      const half = Math.sqrt(rem);
      const ca = Math.ceil((px - half - x0) / dx - 0.5), cb = Math.floor((px + half - x0) / dx - 0.5);
      if (ca > cb) continue;
      if (r < 0 || r >= h || ca < 0 || cb >= w) { bad = true; break; }
      for (let c = ca; c <= cb; c++) {
        const z = heights[r * w + c];
        if (z !== z) { bad = true; break; }
        if (z > mx) mx = z;
        if (z < mn) mn = z;
      }
    }
    outMax[i] = bad ? NaN : rimExtend(grid, px, py, R, mx, true);
    outMin[i] = bad ? NaN : rimExtend(grid, px, py, R, mn, false);
  }
}
