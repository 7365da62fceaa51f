import { describe, it, expect } from "vitest";
import { BLOCK, siteGroundBlocks } from "../../src/assess/coverageKernel.js";

/**
 * The block minima bound the footprints: each block's value must be the lowest site ground
 * in it, exactly (a higher one would let a footprint miss cells it covers). Checked against
 * the definition, cell by cell, on a grid whose width and height are not multiples of the
 * block, with nodata (NaN) and cells outside the site.
 */
describe("siteGroundBlocks", () => {
  it("gives each block the lowest site ground with data in it, and the site's lowest overall", () => {
    const width = 2 * BLOCK + 7;
    const height = BLOCK + 19;
    const heights = new Float32Array(width * height);
    const inSite = new Uint8Array(width * height);
    // A deterministic scramble: heights 100..199.9, every 13th cell nodata, a third outside the site.
    for (let i = 0; i < heights.length; i++) {
      heights[i] = i % 13 === 5 ? NaN : 100 + ((i * 7919) % 1000) / 10;
      inSite[i] = (i * 31) % 3 === 0 ? 0 : 1;
    }
    // The lowest value outside the site, and a nodata cell, must not count.
    heights[3 * width + 4] = -50;
    inSite[3 * width + 4] = 0;
    // One block (block row 1, column 2: a partial block) with no site cell at all.
    for (let r = BLOCK; r < height; r++) for (let c = 2 * BLOCK; c < width; c++) inSite[r * width + c] = 0;
    const b = siteGroundBlocks(heights, inSite, width, height);
    expect([b.bw, b.bh]).toEqual([3, 2]);
    const want = new Array<number>(b.bw * b.bh).fill(Infinity);
    for (let r = 0; r < height; r++) {
      for (let c = 0; c < width; c++) {
        const g = heights[r * width + c];
        const k = Math.floor(r / BLOCK) * b.bw + Math.floor(c / BLOCK);
        if (inSite[r * width + c] === 1 && !Number.isNaN(g)) want[k] = Math.min(want[k], g);
      }
    }
    expect(Array.from(b.mins)).toEqual(want);
    expect(want[1 * b.bw + 2]).toBe(Infinity);
    expect(b.globalMin).toBe(Math.min(...want));
    expect(b.globalMin).toBeGreaterThan(0);
  });

  it("is Infinity everywhere without site ground", () => {
    const b = siteGroundBlocks(new Float32Array(40).fill(NaN), new Uint8Array(40).fill(1), 8, 5);
    expect(Array.from(b.mins)).toEqual([Infinity]);
    expect(b.globalMin).toBe(Infinity);
  });
});
