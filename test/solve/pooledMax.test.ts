import { describe, it, expect } from "vitest";
import { makeGrid } from "../../src/dem/sample.js";
import { pooledMax } from "../../src/solve/clearance.js";

/*
 * Reference: the definition of k x k max pooling, block by block: a block's value is the
 * highest height of its cells (the blocks at the right and bottom edges hold fewer), NaN
 * when any of them is nodata. Exact equality (the same Float32 values).
 */
function definition(heights: Float32Array, width: number, height: number, k: number): Float32Array {
  const w = Math.ceil(width / k), h = Math.ceil(height / k);
  const out = new Float32Array(w * h);
  for (let br = 0; br < h; br++) {
    for (let bc = 0; bc < w; bc++) {
      let m = -Infinity;
      for (let r = br * k; r < Math.min(height, br * k + k); r++) {
        for (let c = bc * k; c < Math.min(width, bc * k + k); c++) {
          const z = heights[r * width + c];
          m = Number.isNaN(z) || Number.isNaN(m) ? NaN : Math.max(m, z);
        }
      }
      out[br * w + bc] = m;
    }
  }
  return out;
}

describe("pooledMax equals k x k max pooling by its definition", () => {
  for (const [width, height, k, holes] of [[37, 29, 2, 0], [37, 29, 3, 5], [61, 47, 6, 12], [48, 36, 6, 3], [50, 53, 8, 30], [7, 5, 6, 1]] as const) {
    it(`${width} x ${height} cells, k ${k}, ${holes} nodata cells`, () => {
      let s = 11 + width + k;
      const rnd = () => ((s = (s * 1103515245 + 12345) % 2147483648) / 2147483648);
      const grid = makeGrid({ width, height, x0: 0, y0: height, cellM: 1, heights: () => Math.round(200 * rnd()) / 4 - 20 });
      for (let i = 0; i < holes; i++) grid.heights[Math.floor(rnd() * grid.heights.length)] = NaN;
      const got = pooledMax(grid, k);
      expect([got.width, got.height]).toEqual([Math.ceil(width / k), Math.ceil(height / k)]);
      expect(got.transform).toEqual({ x0: 0, y0: height, dx: k, dy: -k });
      const want = definition(grid.heights, width, height, k);
      let nan = 0;
      for (let i = 0; i < want.length; i++) {
        expect([i, got.heights[i]]).toEqual([i, want[i]]);
        if (Number.isNaN(want[i])) nan++;
      }
      if (holes > 0) expect(nan).toBeGreaterThan(0);
      // Cached per grid and k: asked again, the same pooled grid.
      expect(pooledMax(grid, k)).toBe(got);
    });
  }
});
