import { describe, it, expect } from "vitest";
import { makeGrid } from "../../src/dem/sample.js";
import { dataMask, hasNodata, nodataFilled } from "../../src/dem/dataMask.js";

describe("nodata of a DEM window", () => {
  it("masks and finds the cells without a height", () => {
    const h = Float32Array.of(1, NaN, 3, NaN);
    expect(Array.from(dataMask(h))).toEqual([1, 0, 1, 0]);
    expect(hasNodata(h)).toBe(true);
    expect(hasNodata(Float32Array.of(1, 2))).toBe(false);
  });

  it("finds a single NaN wherever it lies, whatever its bits; infinities and extremes are heights", () => {
    // Reference: the float compared with itself (IEEE 754: only NaN differs from itself).
    const n = 37;
    const quiet = new Float32Array(new Uint32Array([0x7fc00000]).buffer)[0];
    const negative = new Float32Array(new Uint32Array([0xffc00001]).buffer)[0];
    const signalling = new Float32Array(new Uint32Array([0x7f800001]).buffer)[0];
    for (const nan of [NaN, quiet, negative, signalling]) {
      for (let at = 0; at < n; at++) {
        const h = new Float32Array(n).fill(250.5);
        h[at] = nan;
        expect(h[at] !== h[at]).toBe(true);
        expect(hasNodata(h), `NaN at ${at}`).toBe(true);
        // A view starting past the NaN does not see it.
        expect(hasNodata(h.subarray(at + 1))).toBe(false);
      }
    }
    expect(hasNodata(Float32Array.of(Infinity, -Infinity, 3.4028234663852886e38, -0, 0, 1e-45, -1e-45))).toBe(false);
    expect(hasNodata(new Float32Array(0))).toBe(false);
  });

  it("fills nodata with an assumed ground once per grid and height, leaving the grid as it was", () => {
    const grid = makeGrid({ width: 3, height: 2, x0: 0, y0: 2, cellM: 1, heights: Float32Array.of(10, NaN, 12, NaN, 14, 15) });
    const a = nodataFilled(grid, 380);
    expect(Array.from(a.heights)).toEqual([10, 380, 12, 380, 14, 15]);
    expect(a.transform).toBe(grid.transform);
    expect(Array.from(grid.heights).filter((z) => z !== z).length).toBe(2);
    // The same grid and height give the same filled grid (its caches kept); another height another.
    expect(nodataFilled(grid, 380)).toBe(a);
    const b = nodataFilled(grid, 400);
    expect(Array.from(b.heights)).toEqual([10, 400, 12, 400, 14, 15]);
    // A grid with data everywhere is its own filling.
    const full = makeGrid({ width: 2, height: 1, x0: 0, y0: 1, cellM: 1, heights: Float32Array.of(5, 6) });
    expect(nodataFilled(full, 380)).toBe(full);
  });
});
