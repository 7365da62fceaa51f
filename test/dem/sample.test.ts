import { describe, expect, it } from "vitest";
import { extremaInOrientedRect, extremaInRadius, inverseOfPowerOfTwo, makeGrid, sampleBilinear, cellCentre, toColRow } from "../../src/dem/sample.js";

// A bilinear interpolant reproduces any function of the form a + bx + cy + dxy
// exactly (definition of bilinear interpolation, any numerical-analysis text).
const plane = (x: number, y: number) => 100 + 0.25 * (x - 500000) - 0.5 * (y - 4600000) + 0.001 * (x - 500000) * (y - 4600000);

describe("sampleBilinear", () => {
  const grid = makeGrid({ width: 50, height: 40, x0: 500000, y0: 4600040, cellM: 1, heights: plane });

  it("reproduces a bilinear surface exactly between cell centres", () => {
    const xs: number[] = [];
    const ys: number[] = [];
    for (let i = 0; i < 200; i++) {
      xs.push(500000.5 + ((i * 7.31) % 48.9));
      ys.push(4600039.5 - ((i * 3.77) % 38.9));
    }
    const z = sampleBilinear(grid, xs, ys);
    for (let i = 0; i < xs.length; i++) expect(z[i]).toBeCloseTo(plane(xs[i], ys[i]), 3);
  });

  it("is NaN outside the grid and wherever a neighbour is nodata", () => {
    const g = makeGrid({ width: 10, height: 10, x0: 0, y0: 10, cellM: 1, heights: () => 5 });
    g.heights[5 * 10 + 5] = NaN;
    const [x, y] = cellCentre(g, 5, 5);
    const z = sampleBilinear(g, [x + 0.3, x - 1.5, -3, 2.5], [y - 0.2, y, 5, 7.5]);
    expect(Number.isNaN(z[0])).toBe(true);
    expect(Number.isNaN(z[1])).toBe(false);
    expect(Number.isNaN(z[2])).toBe(true);
    expect(z[3]).toBe(5);
    expect(toColRow(g, x, y)).toEqual([5, 5]);
  });
});

// Brute force over every cell: the obvious definition the fast scans must match.
function bruteExtrema(g: ReturnType<typeof makeGrid>, inside: (cx: number, cy: number) => boolean, px: number, py: number) {
  let mx = -Infinity;
  let mn = Infinity;
  const t = g.transform;
  const pc = Math.floor((px - t.x0) / t.dx);
  const pr = Math.floor((py - t.y0) / t.dy);
  for (let r = 0; r < g.height; r++)
    for (let c = 0; c < g.width; c++) {
      const [cx, cy] = cellCentre(g, c, r);
      if (inside(cx, cy) || (c === pc && r === pr)) {
        mx = Math.max(mx, g.heights[r * g.width + c]);
        mn = Math.min(mn, g.heights[r * g.width + c]);
      }
    }
  return [mx, mn];
}

describe("extrema", () => {
  const rough = (x: number, y: number) => Math.sin(x * 0.37) * 20 + Math.cos(y * 0.23) * 15 + ((x * 13 + y * 7) % 5);
  const g = makeGrid({ width: 60, height: 60, x0: 0, y0: 60, cellM: 0.5, heights: rough });

  it("over a disc match a brute-force scan", () => {
    const xs = [12.3, 15, 17.77, 20.01];
    const ys = [40.2, 45, 38.1, 44.4];
    const mx = new Float64Array(4);
    const mn = new Float64Array(4);
    extremaInRadius(g, xs, ys, 4.2, mx, mn);
    for (let i = 0; i < 4; i++) {
      const [bx, bn] = bruteExtrema(g, (cx, cy) => Math.hypot(cx - xs[i], cy - ys[i]) <= 4.2, xs[i], ys[i]);
      expect(mx[i]).toBe(bx);
      expect(mn[i]).toBe(bn);
    }
  });

  it("over an oriented rectangle match a brute-force scan", () => {
    const ang = (30 * Math.PI) / 180;
    const ux = Math.sin(ang);
    const uy = Math.cos(ang);
    const xs = [14.2, 15.9];
    const ys = [45.1, 46.6];
    const mx = new Float64Array(2);
    const mn = new Float64Array(2);
    extremaInOrientedRect(g, xs, ys, ux, uy, 1.3, 6.1, mx, mn);
    for (let i = 0; i < 2; i++) {
      const [bx, bn] = bruteExtrema(
        g,
        (cx, cy) => {
          const rx = cx - xs[i];
          const ry = cy - ys[i];
          return Math.abs(rx * ux + ry * uy) <= 1.3 && Math.abs(-rx * uy + ry * ux) <= 6.1;
        },
        xs[i],
        ys[i],
      );
      expect(mx[i]).toBe(bx);
      expect(mn[i]).toBe(bn);
    }
  });

  it("are NaN when the neighbourhood touches nodata or leaves the grid", () => {
    const h = makeGrid({ width: 20, height: 20, x0: 0, y0: 20, cellM: 1, heights: () => 1 });
    h.heights[10 * 20 + 10] = NaN;
    const mx = new Float64Array(3);
    const mn = new Float64Array(3);
    extremaInRadius(h, [12.5, 5.5, 0.5], [9.5, 15.5, 10.5], 3, mx, mn);
    expect(Number.isNaN(mx[0])).toBe(true);
    expect(mx[1]).toBe(1);
    expect(Number.isNaN(mx[2])).toBe(true);
  });
});

describe("sampleBilinear's cell scale", () => {
  // IEEE 754 binary64: a power of two and its inverse are exact, so x / d and x * (1 / d) are
  // both the exact quotient rounded once; for other d they may differ in the last bit.
  it("takes the inverse of powers of two only", () => {
    for (const [d, inv] of [[0.5, 2], [1, 1], [2, 0.5], [-0.5, -2], [0.25, 4], [1024, 1 / 1024], [2 ** -1000, 2 ** 1000]] as const) expect(inverseOfPowerOfTwo(d), String(d)).toBe(inv);
    for (const d of [0.3, 3, -1.5, 0, NaN, Infinity, 2 ** -1070, 2 ** 1023, 0.1]) expect(inverseOfPowerOfTwo(d), String(d)).toBe(0);
  });

  // Against the definition dividing by the cell, bit for bit: cells of a power of two (the
  // scaled path) and not (the dividing one), north-up and south-up rows.
  for (const [dx, dy] of [[0.5, -0.5], [2, 2], [0.3, -0.3], [1, -0.7]] as const) {
    it(`dx ${dx}, dy ${dy}`, () => {
      const w = 37, h = 29, x0 = 500123.25, y0 = 5200456.75;
      const heights = Float32Array.from({ length: w * h }, (_, i) => (i % 53 === 0 ? NaN : 300 + Math.sin(i / 7) * 40 + i / 1000));
      const grid = { width: w, height: h, heights, transform: { x0, y0, dx, dy } };
      const xs: number[] = [], ys: number[] = [];
      let seed = 3;
      const rnd = () => ((seed = (seed * 16807) % 2147483647) / 2147483647);
      for (let k = 0; k < 4000; k++) {
        xs.push(x0 + (rnd() * (w + 2) - 1) * dx);
        ys.push(y0 + (rnd() * (h + 2) - 1) * dy);
      }
      const got = sampleBilinear(grid, xs, ys);
      let compared = 0;
      for (let k = 0; k < xs.length; k++) {
        // The definition: fractional column and row by division, snapped within the outer half cell.
        let c = (xs[k] - x0) / dx - 0.5, r = (ys[k] - y0) / dy - 0.5;
        if (c < 0 && c >= -0.5) c = 0;
        if (r < 0 && r >= -0.5) r = 0;
        if (c > w - 1 && c <= w - 0.5) c = w - 1;
        if (r > h - 1 && r <= h - 0.5) r = h - 1;
        let want = NaN;
        if (c >= 0 && r >= 0 && c <= w - 1 && r <= h - 1) {
          const c0 = Math.min(Math.floor(c), w - 2), r0 = Math.min(Math.floor(r), h - 2);
          const fc = c - c0, fr = r - r0;
          const z = (i: number, j: number) => heights[j * w + i];
          want = (z(c0, r0) * (1 - fc) + z(c0 + 1, r0) * fc) * (1 - fr) + (z(c0, r0 + 1) * (1 - fc) + z(c0 + 1, r0 + 1) * fc) * fr;
          compared++;
        }
        expect(Object.is(got[k], want), `point ${k}`).toBe(true);
      }
      expect(compared).toBeGreaterThan(3000);
    });
  }
});
