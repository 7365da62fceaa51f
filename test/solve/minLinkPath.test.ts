import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { minLinkPath, minLinkPathOnLattice, vertexLattice, GATE_EPS_M } from "../../src/solve/minLinkPath.js";

/*
 * Exhaustive reference under the same model as minLinkPath (vertices at
 * stations, heights free in the gates, every station's gate checked, gradients
 * in [gMin, gMax]): enumerate every set of interior vertex stations, fewest
 * first, and test feasibility exactly. For a fixed vertex sequence the heights
 * reachable at each vertex form an interval; the next interval's ends are the
 * min and max of z_b over a two-variable linear programme (z_a, z_b), solved by
 * enumerating the vertices of its feasible polygon (all pairwise intersections
 * of constraint lines): the textbook fact that a bounded LP attains its optimum
 * at a vertex. No code is shared with the solver.
 */
type Con = [number, number, number]; // a*za + b*zb <= c

function segmentCons(s: number[], lo: number[], hi: number[], i: number, j: number, gMin: number, gMax: number, eps: number): Con[] {
  const D = s[j] - s[i];
  const cons: Con[] = [];
  for (let t = i; t <= j; t++) {
    const tau = (s[t] - s[i]) / D;
    cons.push([1 - tau, tau, hi[t] + eps]);
    cons.push([-(1 - tau), -tau, -(lo[t] - eps)]);
  }
  cons.push([-1 / D, 1 / D, gMax]);
  cons.push([1 / D, -1 / D, -gMin]);
  return cons;
}

function nextInterval(cons: Con[], a: number, b: number): [number, number] | null {
  const all: Con[] = [...cons, [1, 0, b], [-1, 0, -a]];
  let zMin = Infinity, zMax = -Infinity;
  for (let p = 0; p < all.length; p++) for (let q = p + 1; q < all.length; q++) {
    const [a1, b1, c1] = all[p], [a2, b2, c2] = all[q];
    const det = a1 * b2 - a2 * b1;
    if (Math.abs(det) < 1e-12) continue;
    const za = (c1 * b2 - c2 * b1) / det, zb = (a1 * c2 - a2 * c1) / det;
    if (all.every(([x, y, c]) => x * za + y * zb <= c + 1e-7)) { zMin = Math.min(zMin, zb); zMax = Math.max(zMax, zb); }
  }
  return zMin <= zMax ? [zMin, zMax] : null;
}

function feasible(seq: number[], s: number[], lo: number[], hi: number[], gMin: number, gMax: number): boolean {
  let iv: [number, number] | null = [lo[seq[0]], hi[seq[0]]];
  for (let k = 0; k + 1 < seq.length && iv; k++) iv = nextInterval(segmentCons(s, lo, hi, seq[k], seq[k + 1], gMin, gMax, GATE_EPS_M), iv[0], iv[1]);
  return iv !== null;
}

function exhaustiveMinSegments(s: number[], lo: number[], hi: number[], gMin: number, gMax: number, mask?: number[]): number | null {
  const n = s.length;
  const interior = n - 2;
  for (let k = 0; k <= interior; k++) {
    // all subsets of size k of 1..n-2
    const pick = (start: number, left: number, acc: number[]): boolean => {
      if (left === 0) return feasible([0, ...acc, n - 1], s, lo, hi, gMin, gMax);
      for (let v = start; v <= n - 2; v++) if ((!mask || mask[v]) && pick(v + 1, left - 1, [...acc, v])) return true;
      return false;
    };
    if (pick(1, k, [])) return k + 1;
  }
  return null;
}

function checkPath(p: NonNullable<ReturnType<typeof minLinkPath>>, s: number[], lo: number[], hi: number[], gMin: number, gMax: number) {
  const vs = p.vertexStation, vz = p.vertexHeightM;
  expect(vs[0]).toBe(0);
  expect(vs[vs.length - 1]).toBe(s.length - 1);
  for (let v = 0; v + 1 < vs.length; v++) {
    const a = vs[v], b = vs[v + 1];
    const g = (vz[v + 1] - vz[v]) / (s[b] - s[a]);
    expect(g).toBeGreaterThanOrEqual(gMin - 1e-6);
    expect(g).toBeLessThanOrEqual(gMax + 1e-6);
    for (let t = a; t <= b; t++) {
      const z = vz[v] + (g * (s[t] - s[a]));
      expect(z).toBeGreaterThanOrEqual(lo[t] - 1e-5);
      expect(z).toBeLessThanOrEqual(hi[t] + 1e-5);
    }
  }
}

const corridorArb = fc.record({
  n: fc.integer({ min: 3, max: 8 }),
  seed: fc.array(fc.tuple(fc.integer({ min: -6, max: 6 }), fc.integer({ min: 0, max: 4 })), { minLength: 8, maxLength: 8 }),
  g: fc.constantFrom(0.5, 1, 2, 4),
});

function build(c: { n: number; seed: [number, number][]; g: number }) {
  const s: number[] = [], lo: number[] = [], hi: number[] = [];
  for (let i = 0; i < c.n; i++) {
    s.push(i);
    lo.push(c.seed[i][0]);
    hi.push(c.seed[i][0] + c.seed[i][1]);
  }
  return { s, lo, hi, gMin: -c.g, gMax: c.g };
}

describe("minLinkPath: fewest segments under the station-vertex model", () => {
  it("one segment for a straight, wide corridor", () => {
    const p = minLinkPath(Float64Array.of(0, 10, 20, 30), Float64Array.of(0, 1, 2, 3), Float64Array.of(1, 2, 3, 4), -1, 1)!;
    expect(p.segments).toBe(1);
  });

  it("the counterexample to restarting only from the furthest station: 2 segments", () => {
    // Gates 0..10 admit a steep line to (5, 10) but only near-flat lines to 10;
    // from (5, 10) one line descends at -2 through stations 8..14.
    const s = [0, 3, 5, 8, 10, 11, 12, 13, 14];
    const lo = [0, 4, 5, 4, 0, -2.05, -4.05, -6.05, -8.05];
    const hi = [5, 6, 10, 6, 20, -1.95, -3.95, -5.95, -7.95];
    const p = minLinkPath(Float64Array.from(s), Float64Array.from(lo), Float64Array.from(hi), -10, 10)!;
    expect(exhaustiveMinSegments(s, lo, hi, -10, 10)).toBe(2);
    expect(p.segments).toBe(2);
    checkPath(p, s, lo, hi, -10, 10);
  });

  it("equals the exhaustive minimum on many random small corridors", () => {
    // Optimality check: the exhaustive search above, same model.
    fc.assert(
      fc.property(corridorArb, (c) => {
        const { s, lo, hi, gMin, gMax } = build(c);
        const want = exhaustiveMinSegments(s, lo, hi, gMin, gMax);
        const got = minLinkPath(Float64Array.from(s), Float64Array.from(lo), Float64Array.from(hi), gMin, gMax);
        if (want === null) return got === null;
        return got !== null && got.segments === want;
      }),
      { numRuns: 300, seed: 4 },
    );
  });

  it("never leaves the corridor and never exceeds the gradient limits (property)", () => {
    fc.assert(
      fc.property(corridorArb, (c) => {
        const { s, lo, hi, gMin, gMax } = build(c);
        const got = minLinkPath(Float64Array.from(s), Float64Array.from(lo), Float64Array.from(hi), gMin, gMax);
        if (got) checkPath(got, s, lo, hi, gMin, gMax);
      }),
      { numRuns: 300, seed: 7 },
    );
  });

  it("with a vertex lattice: equals the exhaustive minimum over paths whose interior vertices sit on the lattice", () => {
    // Same exhaustive reference, interior vertices drawn only from the mask;
    // every station's gate is still checked.
    const arb = fc.record({ c: corridorArb, mask: fc.array(fc.integer({ min: 0, max: 1 }), { minLength: 8, maxLength: 8 }) });
    fc.assert(
      fc.property(arb, ({ c, mask }) => {
        const { s, lo, hi, gMin, gMax } = build(c);
        const m = mask.slice(0, c.n);
        const want = exhaustiveMinSegments(s, lo, hi, gMin, gMax, m);
        const got = minLinkPath(Float64Array.from(s), Float64Array.from(lo), Float64Array.from(hi), gMin, gMax, undefined, Uint8Array.from(m));
        if (want === null) return got === null;
        if (got === null || got.segments !== want) return false;
        checkPath(got, s, lo, hi, gMin, gMax);
        for (let v = 1; v + 1 < got.vertexStation.length; v++) if (!m[got.vertexStation[v]]) return false;
        return true;
      }),
      { numRuns: 300, seed: 11 },
    );
  });
});

describe("minLinkPathOnLattice: a coarse lattice, refined where it admits no path", () => {
  it("finds a path whenever the every-station model has one, never fewer segments, and stays in the corridor (property)", () => {
    // Corridors of 8 stations 1 m apart with a 3 m lattice (stations 0, 3, 6, 7):
    // the lattice alone often admits no path through them.
    let refined = 0;
    fc.assert(
      fc.property(corridorArb, (c) => {
        const { s, lo, hi, gMin, gMax } = build({ ...c, n: 8 });
        const every = minLinkPath(Float64Array.from(s), Float64Array.from(lo), Float64Array.from(hi), gMin, gMax);
        const lat = minLinkPathOnLattice(Float64Array.from(s), Float64Array.from(lo), Float64Array.from(hi), gMin, gMax, 3);
        if (every === null) return lat === null;
        if (lat === null || lat.segments < every.segments) return false;
        checkPath(lat, s, lo, hi, gMin, gMax);
        const bare = minLinkPath(Float64Array.from(s), Float64Array.from(lo), Float64Array.from(hi), gMin, gMax, undefined, vertexLattice(Float64Array.from(s), 3));
        if (bare === null) refined++;
        return true;
      }),
      { numRuns: 300, seed: 5 },
    );
    // the refinement itself was exercised
    expect(refined).toBeGreaterThan(0);
  });
});

describe("vertexLattice", () => {
  it("marks the first station at or past each multiple of the step, both ends, and both ends of forced runs", () => {
    const s = Float64Array.from({ length: 13 }, (_, i) => i * 0.5); // 0 .. 6 m
    expect(Array.from(vertexLattice(s, 2)!)).toEqual([1, 0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 0, 1]);
    // Gates [0, 10] except stations 3..5, squeezed onto the line z = 2 + 1 * (s - 1)
    // (gradient limit 1): the upper bounds 3..5 follow station 2's at the climb
    // limit (a forward run from 2 to 5), and the lower bounds 3..4 are station
    // 5's less the climb limit (a backward run from 5 to 3): stations 2, 3, 5.
    const lo = new Float64Array(13), hi = new Float64Array(13).fill(10);
    for (const k of [3, 4, 5]) lo[k] = hi[k] = 2 + (s[k] - 1);
    hi[2] = 2;
    expect(Array.from(vertexLattice(s, 2, { lo, hi, gMin: -1, gMax: 1 })!)).toEqual([1, 0, 1, 1, 1, 1, 0, 0, 1, 0, 0, 0, 1]);
    // a step no coarser than the stations: every station, no mask needed
    expect(vertexLattice(s, 0.5)).toBeUndefined();
  });
});
