import { describe, it, expect } from "vitest";
import { extremaInOrientedRect, makeGrid } from "../../src/dem/sample.js";
import { zoneExtremaAlongLine } from "../../src/solve/zoneExtrema.js";
import { zoneExtremaOnAxis } from "../../src/solve/zoneExtremaAxis.js";
import { stationsAlongLeg } from "../../src/solve/stations.js";

/*
 * Reference: extremaInOrientedRect (src/dem/sample.ts), which tests every cell
 * of each zone's bounding box. The sliding version must give the same maxima
 * and minima (same cells: equality, not a tolerance), NaN included.
 */
describe("zoneExtremaAlongLine equals the per-station rectangle scan", () => {
  const cases: [string, [number, number], [number, number], number, number, number][] = [
    // name, from, to, station step, half along, half across
    ["north-south on cell centres, default zone", [100.25, 20.25], [100.25, 180.25], 0.5, 0.25, 20],
    // zone edges exactly on cell centres, along (rows at +-0.25 m) and across (columns at +-20 m)
    ["north-south between cell centres, edges on cell centres", [100.25, 20], [100.25, 180], 0.5, 0.25, 20],
    ["east-west, edges on cell centres, long zone", [20, 100.25], [180, 100.25], 0.5, 10.25, 15],
    ["east-west, half a photo spacing along", [15.1, 99.7], [185.3, 99.7], 0.5, 11.9, 24],
    ["oblique 30 degrees", [30, 30], [30 + 140 * Math.cos(Math.PI / 6), 30 + 140 * Math.sin(Math.PI / 6)], 0.5, 6.3, 17.5],
    ["oblique 135 degrees, leaving the grid", [190, 10], [40, 160], 0.7, 9, 30],
    ["diagonal, integer offsets", [20, 20], [180, 180], 0.5, 12, 20],
    // axis legs the other way (negative ux / uy), one leaving the grid
    ["west-going, leaving the grid", [199, 60.25], [20, 60.25], 0.5, 11.9, 24],
    ["south-going, edges on cell centres", [60, 190], [60, 15], 0.5, 8.25, 20],
  ];
  for (const [name, from, to, step, ha, hc] of cases) {
    it(name, () => {
      let seed = 99;
      const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
      const grid = makeGrid({ width: 400, height: 400, x0: 0, y0: 200, cellM: 0.5, heights: (x, y) => 30 * Math.sin(x / 13) * Math.cos(y / 9) + 5 * rnd() });
      for (let k = 0; k < 30; k++) grid.heights[Math.floor(rnd() * grid.heights.length)] = NaN;
      const len = Math.hypot(to[0] - from[0], to[1] - from[1]);
      const st = stationsAlongLeg({ kind: "strip", strip: 1, from, to, lengthM: len }, step, hc, ha);
      const n = st.s.length;
      const wMax = new Float64Array(n), wMin = new Float64Array(n), gMax = new Float64Array(n), gMin = new Float64Array(n);
      extremaInOrientedRect(grid, st.x, st.y, st.ux, st.uy, ha, hc, wMax, wMin);
      zoneExtremaAlongLine(grid, st.x, st.y, st.ux, st.uy, ha, hc, gMax, gMin);
      let nan = 0;
      for (let i = 0; i < n; i++) {
        if (Number.isNaN(wMax[i])) nan++;
        expect([i, gMax[i], gMin[i]]).toEqual([i, wMax[i], wMin[i]]);
      }
      expect(nan).toBeLessThan(n); // the comparison is not all NaN
    });
  }
});

describe("zoneExtremaOnAxis (the axis-leg path) equals the per-station rectangle scan", () => {
  // Reference as above: extremaInOrientedRect. Cases on and off cell centres, both directions.
  const cases: [string, [number, number], [number, number], number, number][] = [
    ["east-going", [10.1, 80.25], [190.3, 80.25], 11.9, 24],
    ["north-going, across edges on cell centres", [80, 5], [80, 195], 12.25, 20],
    ["west-going, along edges on cell centres", [190.25, 99.7], [9.75, 99.7], 10.25, 15.3],
    // Short zones (a few cells along), as corridorAlong gives it on axis legs too.
    ["east-going, half a cell along", [10.1, 80.25], [190.3, 80.25], 0.25, 20],
    ["north-going, a cell along, edges on cell centres", [80.25, 5], [80.25, 195], 0.5, 12.25],
    ["south-going, a few cells along", [60.6, 190.1], [60.6, 8.3], 1.3, 9.7],
    ["east-going, under 16 cells along", [5.5, 120.2], [195.2, 120.2], 7.75, 3.1],
  ];
  // Each with an east-west leg's columns folded in JavaScript and in WebAssembly (foldColumns.as.ts, where built).
  for (const [name, from, to, ha, hc] of cases) for (const foldIn of ["js", "wasm"] as const) {
    it(`${name} (folded in ${foldIn})`, () => {
      let seed = 7;
      const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
      const grid = makeGrid({ width: 400, height: 400, x0: 0, y0: 200, cellM: 0.5, heights: (x, y) => 25 * Math.sin(x / 11) * Math.cos(y / 7) + 5 * rnd() });
      for (let k = 0; k < 20; k++) grid.heights[Math.floor(rnd() * grid.heights.length)] = NaN;
      const len = Math.hypot(to[0] - from[0], to[1] - from[1]);
      const st = stationsAlongLeg({ kind: "strip", strip: 1, from, to, lengthM: len }, 0.5, hc, ha);
      const n = st.s.length;
      const wMax = new Float64Array(n), wMin = new Float64Array(n), gMax = new Float64Array(n), gMin = new Float64Array(n);
      extremaInOrientedRect(grid, st.x, st.y, st.ux, st.uy, ha, hc, wMax, wMin);
      expect(zoneExtremaOnAxis(grid, st.x, st.y, st.ux, st.uy, ha, hc, gMax, gMin, foldIn)).toBe(true);
      let nan = 0;
      for (let i = 0; i < n; i++) {
        if (Number.isNaN(wMax[i])) nan++;
        expect([i, gMax[i], gMin[i]]).toEqual([i, wMax[i], wMin[i]]);
      }
      expect(nan).toBeLessThan(n);
      expect(nan).toBeGreaterThan(0); // some zones meet nodata
    });
  }
  // Sea-level ground of signed zeros (and a nodata cell): the two folds give the same zero
  // signs too (each column keeps the first of equal heights, row after row). The rectangle
  // scan itself takes the cells in another order, so its signs of zero are not compared.
  it("folds signed zeros alike in JavaScript and in WebAssembly", () => {
    const grid = makeGrid({ width: 200, height: 120, x0: 0, y0: 60, cellM: 0.5, heights: (x, y) => (Math.floor(x * 3 + y * 7) % 4 === 0 ? 0 : -0) });
    grid.heights[61 * 200 + 77] = NaN;
    const st = stationsAlongLeg({ kind: "strip", strip: 1, from: [5.1, 30.25], to: [94.9, 30.25], lengthM: 89.8 }, 0.5, 9, 4);
    const n = st.s.length;
    const out = (foldIn: "js" | "wasm") => {
      const mx = new Float64Array(n), mn = new Float64Array(n);
      expect(zoneExtremaOnAxis(grid, st.x, st.y, st.ux, st.uy, 4, 9, mx, mn, foldIn)).toBe(true);
      return [...mx, ...mn];
    };
    const js = out("js"), wasm = out("wasm");
    for (let i = 0; i < js.length; i++) expect(Object.is(wasm[i], js[i]), `value ${i}: ${wasm[i]} against ${js[i]}`).toBe(true);
    expect(js.some((v) => Object.is(v, -0)) && js.some((v) => Object.is(v, 0))).toBe(true);
  });

  it("declines an oblique leg", () => {
    const grid = makeGrid({ width: 40, height: 40, x0: 0, y0: 20, cellM: 0.5, heights: () => 1 });
    const xs = Float64Array.from({ length: 10 }, (_, i) => 5 + i), ys = Float64Array.from({ length: 10 }, (_, i) => 5 + i);
    expect(zoneExtremaOnAxis(grid, xs, ys, Math.SQRT1_2, Math.SQRT1_2, 1, 1, new Float64Array(10), new Float64Array(10))).toBe(false);
  });
});
