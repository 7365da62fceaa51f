import { describe, it, expect } from "vitest";
import { extremaInRadius, makeGrid } from "../../src/dem/sample.js";
import { maxGroundInRadius } from "../../src/solve/clearance.js";

/*
 * Reference: extremaInRadius (src/dem/sample.ts), the plain scan of every cell
 * whose centre lies within the radius. The blocked search must return exactly
 * the same maximum (same cells, so equality, not a tolerance), NaN included.
 */
function rough(width: number, cellM: number, seed: number, holes: number) {
  let s = seed;
  const rnd = () => ((s = (s * 1103515245 + 12345) % 2147483648) / 2147483648);
  const grid = makeGrid({
    width, height: width, x0: 1000, y0: 5000 + width * cellM, cellM,
    heights: (x, y) => 40 * Math.sin(x / 23) * Math.cos(y / 17) + 15 * rnd() + 0.3 * x,
  });
  for (let i = 0; i < holes; i++) grid.heights[Math.floor(rnd() * grid.heights.length)] = NaN;
  return { grid, rnd };
}

describe("maxGroundInRadius: blocked branch-and-bound equals the full disc scan", () => {
  for (const [cellM, radiusM, holes] of [[0.5, 15, 0], [0.5, 15, 40], [1, 30, 0], [0.25, 9.3, 0], [2, 15, 0]] as const) {
    it(`cell ${cellM} m, radius ${radiusM} m, ${holes} nodata cells`, () => {
      const width = 240;
      const { grid, rnd } = rough(width, cellM, 7 + holes, holes);
      const n = 400;
      const xs = new Float64Array(n), ys = new Float64Array(n);
      const span = width * cellM;
      for (let i = 0; i < n; i++) {
        // a few points on cell centres and near the edges, the rest anywhere
        const snap = i % 7 === 0;
        const u = i % 11 === 0 ? rnd() * 0.15 : rnd();
        xs[i] = 1000 + (snap ? (Math.floor(u * width) + 0.5) * cellM : u * span);
        ys[i] = 5000 + (snap ? (Math.floor(rnd() * width) + 0.5) * cellM : rnd() * span);
      }
      const want = new Float64Array(n), got = new Float64Array(n);
      extremaInRadius(grid, xs, ys, radiusM, want);
      maxGroundInRadius(grid, xs, ys, radiusM, got);
      let nan = 0;
      for (let i = 0; i < n; i++) {
        if (Number.isNaN(want[i])) nan++;
        expect([i, got[i]]).toEqual([i, want[i]]);
      }
      // the edge points and holes must have exercised the NaN path
      if (holes > 0) expect(nan).toBeGreaterThan(0);
    });
  }
});
