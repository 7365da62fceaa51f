/**
 * Exact extrema of the DEM's bilinear surface over a disc (src/dem/discExact.ts) against a
 * brute-force reference written here: the textbook bilinear interpolation between cell
 * centres (as GDAL's bilinear resampling defines it) sampled on a fine polar grid over the
 * disc. The exact maximum must be at least every sampled value, and the sampling must come
 * within its own resolution of it. The terrain has a one-cell wall (30 m within one 1 m cell),
 * a mast (two cells, 80 m) and a pit: the cases where the rim of the disc lies far above every
 * cell centre inside it.
 */
import { describe, it, expect } from "vitest";
import { makeGrid, extremaInRadius } from "../../src/dem/sample.js";
import { discExtremaExact, rimExtend } from "../../src/dem/discExact.js";
import type { DemGrid } from "../../src/dem/grid.js";

const W = 80, H = 70, X0 = 500000, Y0 = 5200070;

function terrain(x: number, y: number): number {
  const dx = x - X0, dy = Y0 - y;
  let z = 400 + 0.05 * dx - 0.03 * dy + 4 * Math.sin(dx / 7) * Math.cos(dy / 9);
  if (dx > 40.5) z += 30; // a one-cell wall between centre columns 40 and 41
  if (Math.abs(dx - 20.5) < 1 && Math.abs(dy - 50.5) < 0.6) z += 80; // a mast two cells wide
  if (Math.abs(dx - 60.5) < 0.6 && Math.abs(dy - 20.5) < 0.6) z -= 25; // a pit
  return z;
}

const grid = makeGrid({ width: W, height: H, x0: X0, y0: Y0, cellM: 1, heights: terrain });

/** Textbook bilinear between cell centres (cell (c, r) centred at x0 + (c + 0.5) dx, y0 + (r + 0.5) dy). */
function bilinearRef(g: DemGrid, x: number, y: number): number {
  const { x0, y0, dx, dy } = g.transform;
  const c = (x - x0) / dx - 0.5, r = (y - y0) / dy - 0.5;
  const c0 = Math.floor(c), r0 = Math.floor(r);
  const fx = c - c0, fy = r - r0;
  const z = (cc: number, rr: number) => g.heights[rr * g.width + cc];
  return (z(c0, r0) * (1 - fx) + z(c0 + 1, r0) * fx) * (1 - fy) + (z(c0, r0 + 1) * (1 - fx) + z(c0 + 1, r0 + 1) * fx) * fy;
}

/** Max and min of the reference surface over the disc, on a polar grid (rings 1 cm apart, points 1 cm apart on the rim). */
function bruteDisc(g: DemGrid, px: number, py: number, R: number): [number, number] {
  let mx = -Infinity, mn = Infinity;
  const rings = Math.ceil(R / 0.01);
  for (let i = 0; i <= rings; i++) {
    const rad = (R * i) / rings;
    const m = Math.max(1, Math.ceil((2 * Math.PI * rad) / 0.01));
    for (let k = 0; k < m; k++) {
      const t = (2 * Math.PI * k) / m;
      const z = bilinearRef(g, px + rad * Math.cos(t), py + rad * Math.sin(t));
      if (z > mx) mx = z;
      if (z < mn) mn = z;
    }
  }
  return [mx, mn];
}

describe("exact disc extrema of the bilinear surface: centres inside and the rim", () => {
  // Points where the rim matters: just short of the wall, beside the mast, over the pit's edge.
  const cases: [string, number, number, number][] = [
    ["disc reaching 0.4 m into the wall's cell", X0 + 37.8, Y0 - 30.2, 3.1],
    ["disc cutting the mast's edge", X0 + 17.6, Y0 - 50.7, 1.7],
    ["disc rim inside the pit's cell", X0 + 62.05, Y0 - 20.3, 1.2],
    ["larger disc on the plain with the wall at its rim", X0 + 25.3, Y0 - 35.0, 15.45],
  ];
  it.each(cases)("%s: equals the fine brute-force search within its 1 cm resolution", (_name, px, py, R) => {
    const mx = new Float64Array(1), mn = new Float64Array(1);
    discExtremaExact(grid, [px], [py], R, mx, mn);
    const [bmx, bmn] = bruteDisc(grid, px, py, R);
    // Exact is never below any sample (the reference can only fall short), and the
    // samples come within slope x resolution (<= 30 m per 1 m cell x 1 cm = 0.3 m) of it.
    expect(mx[0]).toBeGreaterThanOrEqual(bmx - 1e-9);
    expect(mx[0] - bmx).toBeLessThan(0.3);
    expect(mn[0]).toBeLessThanOrEqual(bmn + 1e-9);
    expect(bmn - mn[0]).toBeLessThan(0.3);
  });

  it("the one-cell wall: centres inside the disc miss the rim by metres; the exact maximum does not", () => {
    const px = X0 + 37.9, py = Y0 - 30.2, R = 3.1;
    const centres = new Float64Array(1);
    extremaInRadius(grid, [px], [py], R, centres);
    const exact = rimExtend(grid, px, py, R, centres[0], true);
    // The wall rises between centre columns 40 and 41 (x = 40.5 and 41.5 from the origin);
    // the rim reaches x = 41.0, halfway up it: about 15 m above every centre inside the disc.
    const rimTop = bilinearRef(grid, px + R, py);
    expect(exact).toBeGreaterThanOrEqual(rimTop - 1e-9);
    expect(exact - centres[0]).toBeGreaterThan(12);
  });

  it("nodata on the rim makes the disc unknown (NaN), as nodata inside does", () => {
    const g = makeGrid({ width: 20, height: 20, x0: 0, y0: 20, cellM: 1, heights: (x, y) => (x > 14 && y > 9 && y < 11 ? NaN : 100) });
    const mx = new Float64Array(1), mn = new Float64Array(1);
    // Centre (10, 10), radius 4.2: no nodata centre inside (x <= 14.2 reaches centre 14.5? no), the rim crosses the patch beside it.
    discExtremaExact(g, [10], [10], 4.2, mx, mn);
    expect(Number.isNaN(mx[0])).toBe(true);
    discExtremaExact(g, [6], [10], 4.2, mx, mn);
    expect(mx[0]).toBe(100);
  });
});
