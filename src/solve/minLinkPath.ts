/**
 * Fewest-vertex altitude profile through a corridor of vertical gates.
 *
 * The model (stated once, used by the solver and by the exhaustive search in
 * the tests):
 * - stations s_0 < s_1 < ... < s_{n-1} along a leg, each with a gate [lo_k, hi_k];
 * - the path is piecewise linear in (s, z) with vertices only at stations,
 *   starting at station 0 and ending at station n-1; vertex heights are free;
 * - at every station the path height lies in the gate (checked with a
 *   tolerance of GATE_EPS_M, far below DEM accuracy);
 * - every segment's gradient dz/ds lies in [gMin, gMax] (gMin < 0 < gMax).
 * The answer minimises the number of segments (vertices - 1).
 *
 * This is the fewest-segments approximation within a variable tolerance
 * (D. G. Wilson; H. Imai and M. Iri, "An optimal algorithm for approximating a
 * piecewise linear function", J. Information Processing 9(3), 1986) in its
 * variant with joints at the data abscissae and a bounded slope.
 *
 * Why not plain greedy "furthest reach from a vertical window": with joints
 * restricted to stations, the greedy that restarts only from the heights
 * reachable at the furthest station J_k is NOT optimal. A second segment may
 * start at an earlier station m < J_k, at a height that no k-segment path
 * reaches at J_k, and still cross J_k inside the gate (gates 0..10 can admit
 * a steep line up to (5, 10) and only near-flat lines to station 10; a line
 * from (5, 10) down through station 10 at a height outside the one-segment set
 * can then follow a steep descent that no line from station 10's set can).
 *
 * So the search propagates the whole reachable set, level by level (a
 * breadth-first search over segment counts):
 *   S_0 = gate 0 at station 0;
 *   S_{k+1}(m) = S_k(m) ∪ { heights at m of feasible segments starting in S_k }.
 * A point on a k-segment path at any station can become a vertex, so S_k(m) is
 * exactly the set of heights at m on paths of <= k segments, and the first k
 * with S_k(n-1) non-empty is the minimum. Each S_k(m) is kept as a union of
 * intervals ("pieces"), and the segments leaving one piece form a convex
 * polygon in (start height, gradient) space, clipped by two half-planes per
 * station, so the heights they reach at each later station form an interval.
 *
 * Exact pruning keeps it near-linear: a level only sweeps from the pieces that
 * are new at the previous level (older pieces were swept already), and a
 * sweep stops at the first station where every height it reaches is already
 * in S_k: any continuation through such a point is a segment from a point of
 * S_k, which another sweep of the same level covers.
 */

/** Gate tolerance in metres (floating-point slack, not a safety margin). */
export const GATE_EPS_M = 1e-6;

export interface MinLinkPath {
  /** Station index of each vertex, increasing, first 0 and last n-1. */
  vertexStation: Int32Array;
  /** Height of each vertex, metres. */
  vertexHeightM: Float64Array;
  /** Number of segments (vertices - 1): the minimum under the model above. */
  segments: number;
}

class Growable {
  station = new Int32Array(256);
  from = new Int32Array(256);
  lo = new Float64Array(256);
  hi = new Float64Array(256);
  length = 0;
  push(station: number, lo: number, hi: number, from: number): number {
    if (this.length === this.station.length) {
      const n = this.length * 2;
      const st = new Int32Array(n); st.set(this.station); this.station = st;
      const fr = new Int32Array(n); fr.set(this.from); this.from = fr;
      const l = new Float64Array(n); l.set(this.lo); this.lo = l;
      const h = new Float64Array(n); h.set(this.hi); this.hi = h;
    }
    const i = this.length++;
    this.station[i] = station;
    this.lo[i] = lo;
    this.hi[i] = hi;
    this.from[i] = from;
    return i;
  }
}

/**
 * Fewest-segment profile through gates [lo, hi] at stations s with gradients
 * in [gMin, gMax]. `prefM` (optional) picks, among the optimal paths the
 * back-tracking meets, vertex heights closest to a preferred height.
 * Returns null when no path exists.
 * @example
 * minLinkPath(Float64Array.of(0, 10, 20), Float64Array.of(0, 0, 0), Float64Array.of(1, 1, 1), -0.5, 0.5)
 * // { vertexStation: [0, 2], vertexHeightM: [..], segments: 1 }
 */
export function minLinkPath(
  s: Float64Array,
  lo: Float64Array,
  hi: Float64Array,
  gMin: number,
  gMax: number,
  prefM?: Float64Array,
): MinLinkPath | null {
  const n = s.length;
  if (n === 0) return null;
  for (let i = 0; i < n; i++) if (!(lo[i] <= hi[i] + GATE_EPS_M)) return null;
  if (n === 1) {
    const z = clamp(prefM ? prefM[0] : (lo[0] + hi[0]) / 2, lo[0], hi[0]);
    return { vertexStation: Int32Array.of(0), vertexHeightM: Float64Array.of(z), segments: 0 };
  }
  const eps = GATE_EPS_M;
  const pieces = new Growable();
  // Union of pieces of levels <= k at each station, flat [lo, hi, lo, hi, ...] sorted.
  const union: (number[] | null)[] = new Array(n).fill(null);
  // Provenance: piece p (other than the first) was reached from the pieces
  // provFrom[pieces.from[p] .. provEnd[p]) of the previous level.
  const provFrom: number[] = [];
  const provEnd: number[] = [0];
  pieces.push(0, lo[0], hi[0], -1);
  union[0] = [lo[0], hi[0]];
  let frontier: number[] = [0];

  const cand = new Growable();
  const candHead = new Int32Array(n).fill(-1);
  let candNext = new Int32Array(256);
  const touched: number[] = [];
  // Polygon buffers in (z0, g) space.
  let ax = new Float64Array(32), ay = new Float64Array(32);
  let bx = new Float64Array(32), by = new Float64Array(32);

  const swap = () => {
    const tx = ax, ty = ay;
    ax = bx; ay = by; bx = tx; by = ty;
  };

  let level = 0;
  while (union[n - 1] === null) {
    if (frontier.length === 0) return null;
    level++;
    cand.length = 0;
    for (const p of frontier) {
      const j = pieces.station[p];
      const sj = s[j];
      // Start: all segments from heights [a, b] at station j with gradient in [gMin, gMax].
      let cnt = 4;
      ax[0] = pieces.lo[p]; ay[0] = gMin;
      ax[1] = pieces.hi[p]; ay[1] = gMin;
      ax[2] = pieces.hi[p]; ay[2] = gMax;
      ax[3] = pieces.lo[p]; ay[3] = gMax;
      for (let m = j + 1; m < n; m++) {
        const d = s[m] - sj;
        // Keep z0 + g d >= lo - eps, then z0 + g d <= hi + eps (Sutherland-Hodgman on a convex polygon).
        if (bx.length < cnt + 2) { bx = new Float64Array(2 * cnt + 4); by = new Float64Array(2 * cnt + 4); }
        cnt = clipHalfPlane(ax, ay, cnt, bx, by, d, lo[m] - eps, 1);
        if (cnt === 0) break;
        if (ax.length < cnt + 2) { ax = new Float64Array(2 * cnt + 4); ay = new Float64Array(2 * cnt + 4); }
        cnt = clipHalfPlane(bx, by, cnt, ax, ay, d, hi[m] + eps, -1);
        if (cnt === 0) break;
        let zMin = Infinity, zMax = -Infinity;
        for (let v = 0; v < cnt; v++) {
          const z = ax[v] + ay[v] * d;
          if (z < zMin) zMin = z;
          if (z > zMax) zMax = z;
        }
        const u = union[m];
        if (u !== null) {
          // Exact pruning (see the header): segments through heights already in
          // S_k here are continued by other sweeps, so drop them. When S_k covers
          // one end of the reached range, dropping them is one more half-plane.
          if (covers(u, Math.max(zMin, lo[m]), Math.min(zMax, hi[m]))) break;
          for (let i = 0; i < u.length; i += 2) {
            const u0 = u[i], u1 = u[i + 1];
            if (u0 <= zMin + 1e-9 && u1 > zMin && u1 < zMax) {
              if (bx.length < cnt + 2) { bx = new Float64Array(2 * cnt + 4); by = new Float64Array(2 * cnt + 4); }
              cnt = clipHalfPlane(ax, ay, cnt, bx, by, d, u1, 1);
              swap();
            } else if (u1 >= zMax - 1e-9 && u0 < zMax && u0 > zMin) {
              if (bx.length < cnt + 2) { bx = new Float64Array(2 * cnt + 4); by = new Float64Array(2 * cnt + 4); }
              cnt = clipHalfPlane(ax, ay, cnt, bx, by, d, u0, -1);
              swap();
            } else continue;
            if (cnt === 0) break;
            zMin = Infinity; zMax = -Infinity;
            for (let v = 0; v < cnt; v++) {
              const z = ax[v] + ay[v] * d;
              if (z < zMin) zMin = z;
              if (z > zMax) zMax = z;
            }
          }
          if (cnt === 0) break;
        }
        zMin = Math.max(zMin, lo[m]);
        zMax = Math.min(zMax, hi[m]);
        if (zMin > zMax) { const c = (zMin + zMax) / 2; zMin = zMax = c; }
        const ci = cand.push(m, zMin, zMax, p);
        if (candNext.length < cand.station.length) { const nn = new Int32Array(cand.station.length); nn.set(candNext); candNext = nn; }
        if (candHead[m] === -1) touched.push(m);
        candNext[ci] = candHead[m];
        candHead[m] = ci;
      }
    }
    // Merge this level's candidates into the union; what is new becomes the next
    // frontier as maximal intervals (one piece per new stretch, not per sweep),
    // each remembering the sweeps that reached it for the back-tracking.
    const next: number[] = [];
    for (const m of touched) {
      const list: number[] = [];
      for (let c = candHead[m]; c !== -1; c = candNext[c]) list.push(c);
      candHead[m] = -1;
      list.sort((a, b) => cand.lo[a] - cand.lo[b]);
      const old = union[m] ?? [];
      let u = old;
      for (let i = 0; i < list.length; ) {
        const a = cand.lo[list[i]];
        let b = cand.hi[list[i]];
        let k = i + 1;
        while (k < list.length && cand.lo[list[k]] <= b) { b = Math.max(b, cand.hi[list[k]]); k++; }
        const rest = subtract(old, a, b);
        for (let r = 0; r < rest.length; r += 2) {
          const pi = pieces.push(m, rest[r], rest[r + 1], provFrom.length);
          for (let q = i; q < k; q++) {
            const c = list[q];
            if (cand.hi[c] >= rest[r] - 1e-9 && cand.lo[c] <= rest[r + 1] + 1e-9) provFrom.push(cand.from[c]);
          }
          provEnd.push(provFrom.length);
          next.push(pi);
          u = addInterval(u, rest[r], rest[r + 1]);
        }
        i = k;

      }
      union[m] = u.length ? u : union[m];
    }
    touched.length = 0;
    frontier = next;
  }

  // Back-track from the last station: vertex heights closest to the preference.
  const vStation: number[] = [];
  const vHeight: number[] = [];
  let m = n - 1;
  let z = pickInUnion(union[m]!, prefM ? prefM[m] : NaN);
  let p = findPiece(pieces, m, z);
  vStation.push(m);
  vHeight.push(z);
  while (pieces.from[p] !== -1) {
    // Among the sweeps that reached this piece, one reaches (m, z); take its start heights.
    let bestJ = -1, bestZ = NaN, bestQ = -1, bestD = Infinity;
    for (let f = pieces.from[p]; f < provEnd[p]; f++) {
      const q = provFrom[f];
      const j = pieces.station[q];
      const [a, b] = startInterval(s, lo, hi, gMin, gMax, j, m, z, pieces.lo[q], pieces.hi[q]);
      const gap = a <= b ? 0 : a - b;
      const zj = a <= b ? clamp(prefM ? prefM[j] : (a + b) / 2, a, b) : (a + b) / 2;
      // prefer a feasible start, then the one nearest the preference
      const score = gap > 1e-7 ? 1e9 + gap : prefM ? Math.abs(zj - prefM[j]) : 0;
      if (score < bestD) { bestD = score; bestJ = j; bestZ = zj; bestQ = q; }
    }

    vStation.push(bestJ);
    vHeight.push(bestZ);
    m = bestJ;
    z = bestZ;
    p = bestQ;
  }
  vStation.reverse();
  vHeight.reverse();
  return { vertexStation: Int32Array.from(vStation), vertexHeightM: Float64Array.from(vHeight), segments: vStation.length - 1 };
}

/** Start heights in [pLo, pHi] at station j of feasible segments ending at (m, z). */
function startInterval(s: Float64Array, lo: Float64Array, hi: Float64Array, gMin: number, gMax: number, j: number, m: number, z: number, pLo: number, pHi: number): [number, number] {
  const eps = GATE_EPS_M;
  const D = s[m] - s[j];
  let a = Math.max(pLo, z - gMax * D);
  let b = Math.min(pHi, z - gMin * D);
  for (let t = j + 1; t < m && a <= b; t++) {
    const tau = (s[t] - s[j]) / D;
    const w = 1 - tau;
    a = Math.max(a, (lo[t] - eps - z * tau) / w);
    b = Math.min(b, (hi[t] + eps - z * tau) / w);
  }
  return [a, b];
}

/** Clip polygon (px, py) by sign * (z0 + g d - c) >= 0 into (qx, qy); returns the new vertex count. */
function clipHalfPlane(px: Float64Array, py: Float64Array, cnt: number, qx: Float64Array, qy: Float64Array, d: number, c: number, sign: number): number {
  let out = 0;
  for (let i = 0; i < cnt; i++) {
    const k = i + 1 === cnt ? 0 : i + 1;
    const fi = sign * (px[i] + py[i] * d - c);
    const fk = sign * (px[k] + py[k] * d - c);
    if (fi >= 0) { qx[out] = px[i]; qy[out] = py[i]; out++; }
    if ((fi >= 0) !== (fk >= 0)) {
      const t = fi / (fi - fk);
      qx[out] = px[i] + t * (px[k] - px[i]);
      qy[out] = py[i] + t * (py[k] - py[i]);
      out++;
    }
  }
  return out;
}

function covers(u: number[], a: number, b: number): boolean {
  for (let i = 0; i < u.length; i += 2) if (u[i] <= a + 1e-9 && b <= u[i + 1] + 1e-9) return true;
  return false;
}

/** [a, b] minus the union u; slivers under 1e-9 m left by the cut are dropped. */
function subtract(u: number[], a: number, b: number): number[] {
  const out: number[] = [];
  let cur = a;
  let cut = false;
  for (let i = 0; i < u.length && cur <= b; i += 2) {
    const ul = u[i], uh = u[i + 1];
    if (uh < cur) continue;
    if (ul > b) break;
    if (ul > cur) out.push(cur, ul);
    cur = Math.max(cur, uh);
    cut = true;
  }
  if (cur <= b) out.push(cur, b);
  if (!cut) return out;
  const kept: number[] = [];
  for (let i = 0; i < out.length; i += 2) if (out[i + 1] - out[i] > 1e-9) kept.push(out[i], out[i + 1]);
  return kept;
}

function addInterval(u: number[], a: number, b: number): number[] {
  const out: number[] = [];
  let placed = false;
  for (let i = 0; i < u.length; i += 2) {
    if (!placed && u[i] > b) { out.push(a, b); placed = true; }
    out.push(u[i], u[i + 1]);
  }
  if (!placed) out.push(a, b);
  // merge touching intervals
  const merged: number[] = [];
  for (let i = 0; i < out.length; i += 2) {
    const k = merged.length;
    if (k && out[i] <= merged[k - 1]) merged[k - 1] = Math.max(merged[k - 1], out[i + 1]);
    else merged.push(out[i], out[i + 1]);
  }
  return merged;
}

function pickInUnion(u: number[], pref: number): number {
  if (pref !== pref) return (u[0] + u[1]) / 2;
  let best = u[0], bestD = Infinity;
  for (let i = 0; i < u.length; i += 2) {
    const z = clamp(pref, u[i], u[i + 1]);
    const dd = Math.abs(z - pref);
    if (dd < bestD) { bestD = dd; best = z; }
  }
  return best;
}

function findPiece(pieces: Growable, m: number, z: number): number {
  let best = -1, bestD = Infinity;
  for (let i = 0; i < pieces.length; i++) {
    if (pieces.station[i] !== m) continue;
    const dd = z < pieces.lo[i] ? pieces.lo[i] - z : z > pieces.hi[i] ? z - pieces.hi[i] : 0;
    if (dd < bestD) { bestD = dd; best = i; }
  }
  return best;
}

function clamp(v: number, a: number, b: number): number {
  return v < a ? a : v > b ? b : v;
}
