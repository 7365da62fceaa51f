/**
 * Cross strips on a plane: the image count per cell of one family follows from the overlaps
 * alone — a footprint of A x B repeated every (1 - front) B along and (1 - side) A across covers
 * each point 1 / ((1 - front)(1 - side)) times (common practice; 16.7 for 80 % / 70 %) — and a
 * second family at heading + 90 about doubles it. The DEM is a flat plane written by GDAL
 * (test/hardening/helpers.ts smallScenario).
 */
import { describe, it, expect } from "vitest";
import { smallScenario, planFromFile, tempDir } from "../hardening/helpers.js";

describe("cross strips on a plane", () => {
  it("one family images each cell about 1/((1-f)(1-s)) times; both families at least 1.8x that (median)", async () => {
    const one = smallScenario(tempDir("cross-one"), () => 250, { cells: 200, cellM: 4, siteM: 320, plan: (p) => { p.headingDeg = 0; } });
    const two = smallScenario(tempDir("cross-two"), () => 250, { cells: 200, cellM: 4, siteM: 320, plan: (p) => { p.headingDeg = 0; p.crossStrips = true; } });
    const [a, b] = [await planFromFile(one.planFile), await planFromFile(two.planFile)];
    const f = a.options.overlap.frontPct / 100, s = a.options.overlap.sidePct / 100;
    const expected = 1 / ((1 - f) * (1 - s));
    const m1 = a.assessment.stats.images.median, m2 = b.assessment.stats.images.median;
    // Whole photos only, and the strips' layout rounds the spacing: within 20 % of the formula.
    expect(Math.abs(m1 / expected - 1)).toBeLessThanOrEqual(0.2);
    expect(m2 / m1).toBeGreaterThanOrEqual(1.8);
    expect(m2 / m1).toBeLessThanOrEqual(2.3);
  }, 120_000);
});
