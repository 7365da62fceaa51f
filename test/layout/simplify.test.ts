/**
 * Douglas-Peucker on closed rings (Douglas and Peucker, The Canadian
 * Cartographer 10(2), 1973). turf's `simplify` (simplify-js, the same
 * algorithm written recursively) is the outside reference on each half of
 * the ring; the tolerance guarantee is checked by plain geometry.
 */
import { describe, it, expect } from "vitest";
import { simplify as turfSimplify, lineString } from "@turf/turf";
import { simplifyRingIndices } from "../../src/layout/simplify.js";
import { ringProblem } from "../../src/layout/ring-check.js";

/** A wobbly ring of n vertices (radius varies with angle, so it is simple), metres. */
function wobbly(n: number, seed = 7): { xs: Float64Array; ys: Float64Array } {
  const xs = new Float64Array(n), ys = new Float64Array(n);
  let s = seed;
  const rnd = () => ((s = (s * 16807) % 2147483647) / 2147483647 - 0.5);
  for (let i = 0; i < n; i++) {
    const t = (2 * Math.PI * i) / n;
    const r = 200 * (1 + 0.1 * Math.sin(4 * t)) + 2 * Math.sin(60 * t) + 0.2 * rnd();
    xs[i] = r * Math.cos(t);
    ys[i] = r * Math.sin(t);
  }
  return { xs, ys };
}

function distToSegment(x: number, y: number, ax: number, ay: number, bx: number, by: number): number {
  const dx = bx - ax, dy = by - ay;
  const len2 = dx * dx + dy * dy;
  const t = len2 > 0 ? Math.max(0, Math.min(1, ((x - ax) * dx + (y - ay) * dy) / len2)) : 0;
  return Math.hypot(x - ax - t * dx, y - ay - t * dy);
}

describe("simplifyRingIndices", () => {
  it("the documented example: a 1 cm bend goes at 5 cm, the square's corners stay", () => {
    expect(Array.from(simplifyRingIndices(Float64Array.of(0, 5, 10, 10, 0), Float64Array.of(0, 0.01, 0, 10, 10), 0.05))).toEqual([0, 2, 3, 4]);
  });

  it("keeps what turf's simplify (highQuality, i.e. Douglas-Peucker alone) keeps on each half of the ring", () => {
    const { xs, ys } = wobbly(5000);
    const tol = 0.5;
    const ours = Array.from(simplifyRingIndices(xs, ys, tol));
    // Our split: vertex 0 and the vertex farthest from it.
    let far = 0;
    for (let i = 1; i < xs.length; i++) if (Math.hypot(xs[i] - xs[0], ys[i] - ys[0]) > Math.hypot(xs[far] - xs[0], ys[far] - ys[0])) far = i;
    expect(ours).toContain(far);
    const half = (from: number, to: number) => {
      const idx = Array.from({ length: to - from + 1 }, (_, k) => (from + k) % xs.length);
      const kept = turfSimplify(lineString(idx.map((i) => [xs[i], ys[i]])), { tolerance: tol, highQuality: true }).geometry.coordinates;
      // Map turf's kept coordinates back to vertex numbers.
      const key = new Map(idx.map((i) => [`${xs[i]},${ys[i]}`, i]));
      return kept.map(([x, y]) => key.get(`${x},${y}`)!);
    };
    const ref = [...new Set([...half(0, far), ...half(far, xs.length)])].sort((a, b) => a - b);
    expect(ours).toEqual(ref);
    expect(ours.length).toBeLessThan(5000 / 4);
  });

  it("every dropped vertex lies within the tolerance of the kept ring; the kept ring stays simple", () => {
    const { xs, ys } = wobbly(20_000, 3);
    for (const tol of [0.05, 0.3, 2]) {
      const kept = simplifyRingIndices(xs, ys, tol);
      let worst = 0;
      for (let k = 0; k < kept.length; k++) {
        const a = kept[k], b = kept[(k + 1) % kept.length];
        const end = b > a ? b : xs.length;
        for (let i = a + 1; i < end; i++) worst = Math.max(worst, distToSegment(xs[i], ys[i], xs[a], ys[a], xs[b], ys[b]));
      }
      expect(worst).toBeLessThanOrEqual(tol);
      expect(worst).toBeGreaterThan(tol / 4); // it did drop vertices near the limit
      expect(ringProblem([Array.from(kept, (i) => [xs[i], ys[i]])])).toBeNull();
    }
  });

  it("a ring thinner than the tolerance still comes back as a triangle, not a segment", () => {
    const xs = Float64Array.of(0, 50, 100, 50), ys = Float64Array.of(0, -0.01, 0, 0.01);
    expect(simplifyRingIndices(xs, ys, 1).length).toBe(4);
    const thin = Float64Array.of(0, 25, 50, 75, 100, 75, 50, 25), thy = Float64Array.of(0, -0.01, -0.01, -0.01, 0, 0.01, 0.01, 0.01);
    expect(simplifyRingIndices(thin, thy, 1).length).toBeGreaterThanOrEqual(3);
  });

  it("a million vertices: no stack overflow (explicit stack)", () => {
    const { xs, ys } = wobbly(1_000_000, 11);
    expect(simplifyRingIndices(xs, ys, 0.01).length).toBeGreaterThan(1000);
  });
});
