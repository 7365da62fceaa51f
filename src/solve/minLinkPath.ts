/**
 * Fewest-vertex altitude profile through a corridor of vertical gates.
 *
 * The model (stated once, used by the solver and by the exhaustive search in
 * the tests):
 * - stations s_0 < s_1 < ... < s_{n-1} along a leg, each with a gate [lo_k, hi_k];
 * - the path is piecewise linear in (s, z) with vertices only at stations,
 *   starting at station 0 and ending at station n-1; vertex heights are free;
 * - with a `vertexMask`, interior vertices only at stations whose mask is 1
 *   (a vertex lattice, see vertexLattice); every gate is still checked;
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
 * The work is about (sweeps per level) x (stations per segment), so a vertex
 * lattice of q stations cuts it roughly q^2-fold.
 *
 * One sweep keeps the set of segments leaving its piece as two envelopes in
 * the dual plane (StabbingLines: amortised O(1) per station) and records
 * reached heights only at stations that may hold a vertex.
 *
 * Exact pruning keeps it near-linear: a level only sweeps from the pieces that
 * are new at the previous level (older pieces were swept already), and a
 * sweep stops at the first station where every height it reaches is already
 * in S_k: any continuation through such a point is a segment from a point of
 * S_k, which another sweep of the same level covers.
 */

import { StabbingLines } from "./stabbingLines.js";

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
 * Returns null when no path exists; `failure.furthestStation` then tells the
 * furthest station any segment reached (where a vertex lattice fell short).
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
  vertexMask?: Uint8Array,
  failure?: { furthestStation: number },
): MinLinkPath | null {
  const n = s.length;
  if (n === 0) return null;
  for (let i = 0; i < n; i++) if (!(lo[i] <= hi[i] + GATE_EPS_M)) return null;
  if (n === 1) {
    const z = clamp(prefM ? prefM[0] : (lo[0] + hi[0]) / 2, lo[0], hi[0]);
    return { vertexStation: Int32Array.of(0), vertexHeightM: Float64Array.of(z), segments: 0 };
  }
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

  const level: Level = { cand: new Growable(), candHead: new Int32Array(n).fill(-1), candNext: new Int32Array(256), touched: [], sweep: new StabbingLines(n), furthest: 0 };
  while (union[n - 1] === null) {
    if (frontier.length === 0) {
      // Furthest station any segment reached: where a lattice search got stuck.
      if (failure) failure.furthestStation = level.furthest;
      return null;
    }
    level.cand.length = 0;
    for (const p of frontier) sweepFromPiece(p, pieces, s, lo, hi, gMin, gMax, union, vertexMask, level);
    frontier = mergeLevel(level, pieces, union, provFrom, provEnd);
  }

  return backTrack(s, lo, hi, gMin, gMax, prefM, pieces, union[n - 1]!, provFrom, provEnd);
}

/**
 * One level's candidates of minLinkPath, and what its sweeps share. The search's two parts
 * (the sweeps from each piece of the frontier, the merge of what they reached) are functions
 * of their own: as one function the search was compiled twice (while its first call ran,
 * then for the calls after), ~90 ms of compiler time each at 4 km2 (node --trace-opt).
 */
interface Level {
  cand: Growable;
  /** Per station, the last candidate reaching it (a list through candNext), -1 for none. */
  candHead: Int32Array;
  candNext: Int32Array;
  /** Stations some candidate of this level reached. */
  touched: number[];
  sweep: StabbingLines;
  /** Furthest station any segment reached. */
  furthest: number;
}

/** All segments from piece p's heights at its station, as far as the gates let them: one candidate per station reached, added to `level`. */
function sweepFromPiece(
  p: number,
  pieces: Growable,
  s: Float64Array,
  lo: Float64Array,
  hi: Float64Array,
  gMin: number,
  gMax: number,
  union: (number[] | null)[],
  vertexMask: Uint8Array | undefined,
  level: Level,
): void {
  const n = s.length;
  const eps = GATE_EPS_M;
  const { cand, candHead, touched, sweep } = level;
  const j = pieces.station[p];
  const sj = s[j];
  // Start: all segments from heights [a, b] at station j with gradient in [gMin, gMax].
  if (!sweep.reset(pieces.lo[p], pieces.hi[p], gMin, gMax)) return;
  for (let m = j + 1; m < n; m++) {
    const d = s[m] - sj;
    if (!sweep.cut(d, lo[m] - eps, hi[m] + eps)) break;
    if (m > level.furthest) level.furthest = m;
    // Off the vertex lattice the gate is checked but no vertex may sit here.
    if (vertexMask !== undefined && m !== n - 1 && vertexMask[m] === 0) continue;
    let zMin = sweep.minAt(d), zMax = sweep.maxAt(d);
    const u = union[m];
    if (u !== null) {
      // Exact pruning (see the header): segments through heights already in
      // S_k here are continued by other sweeps, so drop them. When S_k covers
      // one end of the reached range, dropping them is one more cut.
      if (covers(u, Math.max(zMin, lo[m]), Math.min(zMax, hi[m]))) break;
      let alive = true;
      for (let i = 0; i < u.length; i += 2) {
        const u0 = u[i], u1 = u[i + 1];
        if (u0 <= zMin + 1e-9 && u1 > zMin && u1 < zMax) alive = sweep.cut(d, u1, Infinity);
        else if (u1 >= zMax - 1e-9 && u0 < zMax && u0 > zMin) alive = sweep.cut(d, -Infinity, u0);
        else continue;
        if (!alive) break;
        zMin = sweep.minAt(d);
        zMax = sweep.maxAt(d);
      }
      if (!alive) break;
    }
    zMin = Math.max(zMin, lo[m]);
    zMax = Math.min(zMax, hi[m]);
    if (zMin > zMax) { const c = (zMin + zMax) / 2; zMin = zMax = c; }
    const ci = cand.push(m, zMin, zMax, p);
    if (level.candNext.length < cand.station.length) { const nn = new Int32Array(cand.station.length); nn.set(level.candNext); level.candNext = nn; }
    if (candHead[m] === -1) touched.push(m);
    level.candNext[ci] = candHead[m];
    candHead[m] = ci;
  }
}

/**
 * Merges a level's candidates into the union; what is new becomes the next frontier (returned)
 * as maximal intervals (one piece per new stretch, not per sweep), each remembering the
 * sweeps that reached it for the back-tracking.
 */
function mergeLevel(level: Level, pieces: Growable, union: (number[] | null)[], provFrom: number[], provEnd: number[]): number[] {
  const { cand, candHead, candNext, touched } = level;
  const next: number[] = [];
  for (const m of touched) {
    const c0 = candHead[m];
    const had = union[m];
    if (candNext[c0] === -1 && (had === null || had === undefined || had.length === 0)) {
      // One candidate at a station no level reached before (~96 % of them at 4 km2): its
      // interval is all new, as the general way below finds (subtract from nothing, one
      // provenance, a union of one interval), without its arrays.
      candHead[m] = -1;
      const a = cand.lo[c0], b = cand.hi[c0];
      if (a <= b) {
        const pi = pieces.push(m, a, b, provFrom.length);
        provFrom.push(cand.from[c0]);
        provEnd.push(provFrom.length);
        next.push(pi);
        union[m] = [a, b];
      }
      continue;
    }
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
  return next;
}

/**
 * From the last station back to the first through the pieces' provenance: vertex heights
 * closest to the preference. Apart from minLinkPath's search, so the engine compiles each
 * on its own feedback: compiled as one function while the search ran, the back-tracking's
 * untried arithmetic sent the search's optimised code back to the interpreter once the
 * search ended, and the whole function was compiled twice more (~250 ms of compiler time
 * at 4 km2, node --trace-opt / --trace-deopt).
 */
function backTrack(
  s: Float64Array, lo: Float64Array, hi: Float64Array, gMin: number, gMax: number, prefM: Float64Array | undefined,
  pieces: Growable, lastUnion: number[], provFrom: number[], provEnd: number[],
): MinLinkPath {
  const n = s.length;
  const vStation: number[] = [];
  const vHeight: number[] = [];
  let m = n - 1;
  let z = pickInUnion(lastUnion, prefM ? prefM[m] : NaN);
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

/**
 * Vertex mask for minLinkPath: 1 at the first station at or past each
 * multiple of `stepM` along the leg, at both ends, and, given the gates and
 * gradient limits, at both ends of every run where a gate bound is forced by
 * its neighbour at a limit gradient (hi_j = hi_{j-1} + gMax d, lo_j = lo_{j-1}
 * + gMin d, or the same backwards): there the only heights that pass are on
 * one limit-gradient line, and a path can only follow it with a vertex where
 * the line starts and ends. Returns undefined when every station qualifies.
 * @example vertexLattice(Float64Array.of(0, 0.5, 1, 1.5, 2, 2.5), 1) // [1, 0, 1, 0, 1, 1]
 */
export function vertexLattice(
  s: Float64Array, stepM: number, gates?: { lo: Float64Array; hi: Float64Array; gMin: number; gMax: number },
): Uint8Array | undefined {
  const n = s.length;
  if (!(stepM > 0) || n < 3) return undefined;
  const mask = new Uint8Array(n);
  let next = 0;
  for (let k = 0; k < n; k++) {
    if (s[k] >= next - 1e-9 * stepM) {
      mask[k] = 1;
      next = (Math.floor(s[k] / stepM + 1e-9) + 1) * stepM;
    }
  }
  mask[n - 1] = 1;
  if (gates) {
    const { lo, hi, gMin, gMax } = gates;
    // forced[j] bit 1..4: bound at j forced from j-1 (hi, lo) or from j+1 (hi, lo).
    const forced = new Uint8Array(n);
    const tol = 1e-9;
    for (let j = 1; j < n; j++) {
      const d = s[j] - s[j - 1];
      if (Math.abs(hi[j] - (hi[j - 1] + gMax * d)) <= tol) forced[j] |= 1;
      if (Math.abs(lo[j] - (lo[j - 1] + gMin * d)) <= tol) forced[j] |= 2;
      if (Math.abs(hi[j - 1] - (hi[j] - gMin * d)) <= tol) forced[j - 1] |= 4;
      if (Math.abs(lo[j - 1] - (lo[j] - gMax * d)) <= tol) forced[j - 1] |= 8;
    }
    for (let j = 0; j < n; j++) {
      const f = forced[j];
      if (!f) continue;
      // forward chains start at the station before their first forced one and end at their last
      if (j > 0 && f & ~forced[j - 1] & 3) mask[j - 1] = 1;
      if (j + 1 < n && f & ~forced[j + 1] & 3) mask[j] = 1;
      // backward chains start at the station after their last forced one and end at their first
      if (j + 1 < n && f & ~forced[j + 1] & 12) mask[j + 1] = 1;
      if (j > 0 && f & ~forced[j - 1] & 12) mask[j] = 1;
    }
  }
  for (let k = 0; k < n; k++) if (!mask[k]) return mask;
  return undefined;
}

/**
 * minLinkPath with waypoints on a vertex lattice of `stepM` (vertexLattice,
 * with the forced-run ends of these gates), refined where it admits no path.
 * Where the corridor pinches (a rising floor under a convex ceiling) the only
 * lines through it may start within a metre or two, between lattice
 * stations: every station is opened over a stretch around the place the
 * search got stuck (mostly before it), doubling the stretch until a path is
 * found (at worst every station is open after log2(length / stepM) tries). With every
 * station open this is minLinkPath itself, so a path is found whenever one
 * exists under the every-station model. The result is the fewest segments
 * with interior vertices on the final (refined) lattice.
 * @example minLinkPathOnLattice(s, lo, hi, -0.3, 0.3, 5).segments
 */
export function minLinkPathOnLattice(
  s: Float64Array, lo: Float64Array, hi: Float64Array, gMin: number, gMax: number, stepM: number, prefM?: Float64Array,
): MinLinkPath | null {
  const n = s.length;
  let mask = vertexLattice(s, stepM, { lo, hi, gMin, gMax });
  const failure = { furthestStation: 0 };
  let path = minLinkPath(s, lo, hi, gMin, gMax, prefM, mask, failure);
  for (let widenM = 4 * stepM; !path && mask; widenM *= 2) {
    const f = failure.furthestStation;
    let all = true;
    for (let k = 0; k < n; k++) {
      if (s[k] >= s[f] - widenM && s[k] <= s[f] + widenM / 4) mask[k] = 1;
      if (!mask[k]) all = false;
    }
    if (all) mask = undefined;
    path = minLinkPath(s, lo, hi, gMin, gMax, prefM, mask, failure);
  }
  return path;
}
