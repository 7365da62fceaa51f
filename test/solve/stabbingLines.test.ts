import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { StabbingLines } from "../../src/solve/stabbingLines.js";

/*
 * Reference: the lowest and highest height at offset D of lines z0 + g d through
 * every window is a two-variable linear programme in (z0, g); a bounded LP
 * attains its optimum at a vertex of the feasible polygon (textbook fact), so
 * enumerate all pairwise intersections of the constraint lines and keep the
 * feasible ones. No code is shared with StabbingLines.
 */
type Con = [number, number, number]; // a*z0 + b*g <= c

function bruteRange(wins: [number, number, number][], a: number, b: number, gMin: number, gMax: number, D: number): [number, number] | null {
  const cons: Con[] = [[1, 0, b], [-1, 0, -a], [0, 1, gMax], [0, -1, -gMin]];
  for (const [d, lo, hi] of wins) {
    cons.push([1, d, hi]);
    cons.push([-1, -d, -lo]);
  }
  let zMin = Infinity, zMax = -Infinity;
  for (let p = 0; p < cons.length; p++) for (let q = p + 1; q < cons.length; q++) {
    const [a1, b1, c1] = cons[p], [a2, b2, c2] = cons[q];
    const det = a1 * b2 - a2 * b1;
    if (Math.abs(det) < 1e-12) continue;
    const z0 = (c1 * b2 - c2 * b1) / det, g = (a1 * c2 - a2 * c1) / det;
    if (cons.every(([x, y, c]) => x * z0 + y * g <= c + 1e-7)) {
      zMin = Math.min(zMin, z0 + g * D);
      zMax = Math.max(zMax, z0 + g * D);
    }
  }
  return zMin <= zMax ? [zMin, zMax] : null;
}

describe("StabbingLines: heights reached by lines through vertical windows", () => {
  it("lines from [0, 1] at gradients within +-0.2 reach [-2, 3] ten metres on, until windows cut them", () => {
    const w = new StabbingLines(4);
    expect(w.reset(0, 1, -0.2, 0.2)).toBe(true);
    expect(w.minAt(10)).toBeCloseTo(-2, 12);
    expect(w.maxAt(10)).toBeCloseTo(3, 12);
    // Window [0.5, 0.6] at d = 5. Highest at d = 10: z = (z0 + 5g) + 5g <= 0.6 + 5g,
    // and z0 >= 0 caps g at 0.12 (line (0, 0) -> (5, 0.6)): 1.2. Lowest:
    // >= 0.5 + 5g with z0 <= 1 bounding g >= -0.1 (line (0, 1) -> (5, 0.5)): 0.
    expect(w.cut(5, 0.5, 0.6)).toBe(true);
    expect(w.maxAt(10)).toBeCloseTo(1.2, 12);
    expect(w.minAt(10)).toBeCloseTo(0, 12);
    // at d = 6 nothing kept reaches above 0.72, so a window [10, 11] there empties the set
    expect(w.cut(6, 10, 11)).toBe(false);
  });

  it("equals the LP optimum on random window sequences (property)", () => {
    const arb = fc.record({
      a: fc.integer({ min: -5, max: 5 }),
      w0: fc.integer({ min: 0, max: 6 }),
      g: fc.constantFrom(0.3, 1, 3),
      wins: fc.array(fc.tuple(fc.integer({ min: 1, max: 3 }), fc.integer({ min: -8, max: 8 }), fc.integer({ min: 0, max: 6 })), { minLength: 1, maxLength: 9 }),
    });
    fc.assert(
      fc.property(arb, ({ a, w0, g, wins }) => {
        const sl = new StabbingLines(wins.length);
        const b = a + w0;
        sl.reset(a, b, -g, g);
        let d = 0;
        const seen: [number, number, number][] = [];
        for (const [step, lo, width] of wins) {
          d += step;
          seen.push([d, lo, lo + width]);
          const alive = sl.cut(d, lo, lo + width);
          const want = bruteRange(seen, a, b, -g, g, d);
          if (want === null) return !alive;
          if (!alive) return false;
          expect(sl.minAt(d)).toBeCloseTo(want[0], 6);
          expect(sl.maxAt(d)).toBeCloseTo(want[1], 6);
          // one step further the kept lines reach the LP range there as well
          const further = bruteRange(seen, a, b, -g, g, d + 2);
          expect(sl.minAt(d + 2)).toBeCloseTo(further![0], 6);
          expect(sl.maxAt(d + 2)).toBeCloseTo(further![1], 6);
        }
        return true;
      }),
      { numRuns: 500, seed: 3 },
    );
  });
});
