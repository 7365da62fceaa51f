import { describe, it, expect } from "vitest";
import { extremaInRadius, makeGrid } from "../../src/dem/sample.js";
import { maxGroundInRadius } from "../../src/solve/clearance.js";
import { maxKnownInRadius } from "../../src/solve/corridor.js";

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

describe("maxGroundInRadius near and past the grid's edges", () => {
  // Same reference as above: the full disc scan of extremaInRadius decides NaN (a disc
  // leaving the grid or touching nodata) and the maximum; stations here lie within two
  // radii of every edge, and past it, where the blocked search clips its blocks.
  for (const [cellM, radiusM, holes] of [[0.5, 15, 0], [0.5, 16.2, 6], [1, 30, 20]] as const) {
    it(`cell ${cellM} m, radius ${radiusM} m, ${holes} nodata cells`, () => {
      const width = 240;
      const { grid, rnd } = rough(width, cellM, 11 + holes, holes);
      // a block of nodata by the east edge, as where a site runs off the DEM
      for (let r = 60; r < 120; r++) for (let c = 200; c < width; c++) grid.heights[r * width + c] = NaN;
      const n = 3000;
      const xs = new Float64Array(n), ys = new Float64Array(n);
      const span = width * cellM;
      const nearEdge = () => (rnd() < 0.5 ? -1.2 * radiusM + rnd() * 3.4 * radiusM : span + 1.2 * radiusM - rnd() * 3.4 * radiusM);
      for (let i = 0; i < n; i++) {
        const side = i % 3;
        xs[i] = 1000 + (side === 0 ? rnd() * span : nearEdge());
        ys[i] = 5000 + (side === 1 ? rnd() * span : nearEdge());
      }
      const want = new Float64Array(n), got = new Float64Array(n);
      extremaInRadius(grid, xs, ys, radiusM, want);
      maxGroundInRadius(grid, xs, ys, radiusM, got);
      let nan = 0, known = 0;
      for (let i = 0; i < n; i++) {
        if (Number.isNaN(want[i])) nan++;
        else known++;
        expect([i, got[i]]).toEqual([i, want[i]]);
      }
      // both answers must have been exercised near the edges
      expect(nan).toBeGreaterThan(100);
      expect(known).toBeGreaterThan(100);
    });
  }
});

describe("maxKnownInRadius: blocked search equals the plain scan over the cells with data", () => {
  // Reference: the definition itself, scanned cell by cell here: the highest cell with
  // data whose centre lies within the radius (ddx^2 + ddy^2 <= r^2), NaN when none has data.
  const plain = (grid: ReturnType<typeof makeGrid>, px: number, py: number, r: number): number => {
    const { x0, y0, dx, dy } = grid.transform;
    let best = NaN;
    for (let row = 0; row < grid.height; row++) {
      for (let c = 0; c < grid.width; c++) {
        const ddx = x0 + (c + 0.5) * dx - px, ddy = y0 + (row + 0.5) * dy - py;
        if (ddx * ddx + ddy * ddy > r * r) continue;
        const z = grid.heights[row * grid.width + c];
        if (z === z && !(z <= best)) best = z;
      }
    }
    return best;
  };
  for (const [cellM, radiusM] of [[0.5, 16.2], [1, 30], [2, 15]] as const) {
    it(`cell ${cellM} m, radius ${radiusM} m, a nodata block and scattered nodata`, () => {
      const width = 120;
      const { grid, rnd } = rough(width, cellM, 5, 200);
      for (let r = 30; r < 80; r++) for (let c = 20; c < 75; c++) grid.heights[r * width + c] = NaN;
      const span = width * cellM;
      let nan = 0;
      for (let i = 0; i < 300; i++) {
        const px = 1000 - 0.3 * span + rnd() * 1.6 * span, py = 5000 - 0.3 * span + rnd() * 1.6 * span;
        const want = plain(grid, px, py, radiusM);
        if (Number.isNaN(want)) nan++;
        expect([i, maxKnownInRadius(grid, px, py, radiusM)]).toEqual([i, want]);
      }
      expect(nan).toBeGreaterThan(5);
    });
  }
});
