/**
 * Where along a strip the site lies within the strip's band (its zone, half
 * a spacing to each side of the strip line). Works in strip coordinates:
 * a along the heading, c across it.
 *
 * Written by hand rather than with a polygon-clipping library because the
 * question is one-dimensional: the band's slice of the polygon, projected
 * onto the strip line. Between consecutive vertex across-coordinates the
 * slice is a stack of trapezoids bounded by the same edges (a simple
 * polygon's edges do not cross), so its projection is exact from the edge
 * positions at the slab's two sides — the slab decomposition of
 * computational geometry (de Berg et al., Computational Geometry, ch. 6).
 */
import { mergeIntervals, type Interval } from "./intervals.js";

const SLIVER_M = 1e-6;

/** Polygon edges in strip coordinates, one entry per edge. */
export interface StripFrameEdges {
  a0: Float64Array;
  c0: Float64Array;
  a1: Float64Array;
  c1: Float64Array;
  /** Smallest and largest across coordinate of any vertex. */
  cMin: number;
  cMax: number;
}

/**
 * Edges of closed rings (first point repeated last, or not) in strip
 * coordinates: a = x ux + y uy, c = x uy - y ux (c grows to the right of
 * the direction of travel).
 * @example edgesInStripFrame([[[0, 0], [10, 0], [10, 5], [0, 5]]], 0, 1)
 */
export function edgesInStripFrame(rings: readonly (readonly number[][])[], ux: number, uy: number): StripFrameEdges {
  let count = 0;
  const open = rings.map((r) => (r.length > 1 && r[0][0] === r[r.length - 1][0] && r[0][1] === r[r.length - 1][1] ? r.slice(0, -1) : r));
  for (const r of open) count += r.length;
  const a0 = new Float64Array(count);
  const c0 = new Float64Array(count);
  const a1 = new Float64Array(count);
  const c1 = new Float64Array(count);
  let cMin = Infinity;
  let cMax = -Infinity;
  let k = 0;
  for (const r of open) {
    const n = r.length;
    for (let i = 0; i < n; i++) {
      const p = r[i];
      const q = r[(i + 1) % n];
      a0[k] = p[0] * ux + p[1] * uy;
      c0[k] = p[0] * uy - p[1] * ux;
      a1[k] = q[0] * ux + q[1] * uy;
      c1[k] = q[0] * uy - q[1] * ux;
      if (c0[k] < cMin) cMin = c0[k];
      if (c0[k] > cMax) cMax = c0[k];
      k++;
    }
  }
  return { a0, c0, a1, c1, cMin, cMax };
}

/**
 * Along-track intervals where some point of the polygon (even-odd rule over
 * all the given edges, so holes count as outside) has an across coordinate
 * in [cLo, cHi]. Sorted and disjoint.
 * @example bandProjection(edgesInStripFrame([square], 0, 1), -1, 1)
 */
export function bandProjection(edges: StripFrameEdges, cLo: number, cHi: number): Interval[] {
  const { a0, c0, a1, c1 } = edges;
  const n = a0.length;
  const lo = Math.max(cLo, edges.cMin);
  const hi = Math.min(cHi, edges.cMax);
  if (!(hi > lo)) return [];
  // Double elements whatever lo and hi: [lo, hi] of two whole numbers had small-integer ones,
  // another hidden class, and the code compiled for one went back to the interpreter on the
  // other at cuts.sort (node --trace-deopt: "wrong map"; compiled three times, ~35 ms each).
  // The literal's constants set the kind, the values stored over them keep it.
  const cuts: number[] = [0.5, 0.5];
  cuts[0] = lo;
  cuts[1] = hi;
  for (let i = 0; i < n; i++) if (c0[i] > lo && c0[i] < hi) cuts.push(c0[i]);
  cuts.sort((p, q) => p - q);

  const out: Interval[] = [];
  const atLo: number[] = [];
  const atHi: number[] = [];
  const order: number[] = [];
  for (let j = 0; j + 1 < cuts.length; j++) {
    const s0 = cuts[j];
    const s1 = cuts[j + 1];
    // Slivers thinner than a micrometre are rounding (a lon/lat round trip), not ground.
    if (!(s1 - s0 > SLIVER_M)) continue;
    atLo.length = 0;
    atHi.length = 0;
    for (let i = 0; i < n; i++) {
      const cmin = Math.min(c0[i], c1[i]);
      const cmax = Math.max(c0[i], c1[i]);
      if (cmin > s0 || cmax < s1) continue;
      const slope = (a1[i] - a0[i]) / (c1[i] - c0[i]);
      atLo.push(a0[i] + slope * (s0 - c0[i]));
      atHi.push(a0[i] + slope * (s1 - c0[i]));
    }
    order.length = 0;
    for (let i = 0; i < atLo.length; i++) order.push(i);
    order.sort((p, q) => atLo[p] + atHi[p] - (atLo[q] + atHi[q]));
    for (let i = 0; i + 1 < order.length; i += 2) {
      const l = order[i];
      const r = order[i + 1];
      out.push([Math.min(atLo[l], atHi[l], atLo[r], atHi[r]), Math.max(atLo[l], atHi[l], atLo[r], atHi[r])]);
    }
  }
  return mergeIntervals(out);
}
