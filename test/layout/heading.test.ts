import { describe, it, expect } from "vitest";
import { readSite } from "../../src/layout/site.js";
import { layoutStrips, type LayoutOptions } from "../../src/layout/strips.js";
import { terrainAltitudeChangeM } from "../../src/layout/heading.js";
import { makeGrid } from "../../src/dem/sample.js";
import type { LayoutLeg } from "../../src/layout/types.js";
import { UTM33, E0, N0, polygonText } from "./frame-helper.js";

const BASE: Omit<LayoutOptions, "headingDeg"> = {
  spacingM: 40,
  triggerM: 20,
  footprintAcrossM: 100,
  footprintAlongM: 60,
  photoSpeedMps: 8,
  transitSpeedMps: 12,
};

/** Smallest difference between two strip headings, degrees (strips are undirected: 0 == 180). */
function headingDiff(a: number, b: number): number {
  const d = Math.abs(a - b) % 180;
  return Math.min(d, 180 - d);
}

// A disc of radius 300 m centred at (+500, +500): flight time barely depends
// on the heading, so the terrain term decides.
const disc = Array.from({ length: 73 }, (_, i) => {
  const t = ((i % 72) / 72) * 2 * Math.PI;
  return [500 + 300 * Math.cos(t), 500 + 300 * Math.sin(t)];
});
const discSite = readSite(polygonText([disc]), UTM33);

/** Plane rising `slope` metres per metre towards azimuth `uphillDeg`. */
function planeGrid(slope: number, uphillDeg: number) {
  const a = (uphillDeg * Math.PI) / 180;
  return makeGrid({
    width: 200,
    height: 200,
    x0: E0,
    y0: N0 + 1000,
    cellM: 5,
    heights: (x, y) => 400 + slope * ((x - E0) * Math.sin(a) + (y - N0) * Math.cos(a)),
  });
}

describe("terrain altitude change along a strip", () => {
  it("on a plane, the ground change along a leg is slope x length x cos(angle to the fall line) (plane geometry)", () => {
    const grid = planeGrid(0.3, 30);
    const a = (30 * Math.PI) / 180;
    const from: [number, number] = [E0 + 300, N0 + 300];
    const up: LayoutLeg = { kind: "strip", strip: 1, from, to: [from[0] + 400 * Math.sin(a), from[1] + 400 * Math.cos(a)], lengthM: 400 };
    // Bilinear interpolation reproduces a plane exactly, so only float rounding remains.
    expect(terrainAltitudeChangeM([up], grid, 5)).toBeCloseTo(0.3 * 400, 2);
    const b = (90 * Math.PI) / 180;
    const slant: LayoutLeg = { kind: "strip", strip: 1, from, to: [from[0] + 400 * Math.sin(b), from[1] + 400 * Math.cos(b)], lengthM: 400 };
    expect(terrainAltitudeChangeM([slant], grid, 5)).toBeCloseTo(0.3 * 400 * Math.cos((60 * Math.PI) / 180), 2);
  });
});

describe("auto heading", () => {
  it("on a planar slope picks the heading along the contours (within 5 degrees)", () => {
    // Uphill towards azimuth 30: the contours run at 30 + 90 = 120 degrees.
    const grid = planeGrid(0.3, 30);
    const layout = layoutStrips(discSite, { ...BASE, headingDeg: "auto", grid });
    expect(headingDiff(layout.headingDeg, 120)).toBeLessThanOrEqual(5);
    expect(layout.headingCandidates.length).toBe(36);
    for (let i = 0; i + 1 < layout.headingCandidates.length; i++) {
      expect(layout.headingCandidates[i].score).toBeLessThanOrEqual(layout.headingCandidates[i + 1].score);
    }
    expect(layout.headingReason).toMatch(/^heading \d+: .*% less forced altitude change/);
    // The fall line (30 degrees) forces the most altitude change.
    const worst = layout.headingCandidates.reduce((p, q) => (q.altitudeChangeM > p.altitudeChangeM ? q : p));
    expect(headingDiff(worst.headingDeg, 30)).toBeLessThanOrEqual(5);
  });

  it("a different slope direction moves the choice with it (uphill 160: contours at 70)", () => {
    const layout = layoutStrips(discSite, { ...BASE, headingDeg: "auto", grid: planeGrid(0.2, 160) });
    expect(headingDiff(layout.headingDeg, 70)).toBeLessThanOrEqual(5);
  });

  // A 1000 x 100 m rectangle whose long side runs at azimuth 60.
  const u = [Math.sin(Math.PI / 3), Math.cos(Math.PI / 3)];
  const v = [u[1], -u[0]];
  const thin = [[0, 0], [1000, 0], [1000, 100], [0, 100], [0, 0]].map(([a, c]) => [200 + a * u[0] + c * v[0], 700 + a * u[1] + c * v[1]]);
  const thinSite = readSite(polygonText([thin]), UTM33);

  it("on a long thin rectangle over flat ground picks the long side (fewest turns)", () => {
    const flat = makeGrid({ width: 300, height: 300, x0: E0, y0: N0 + 1500, cellM: 5, heights: () => 250 });
    const layout = layoutStrips(thinSite, { ...BASE, headingDeg: "auto", grid: flat });
    expect(headingDiff(layout.headingDeg, 60)).toBeLessThanOrEqual(5);
    expect(layout.headingCandidates[0].altitudeChangeM).toBe(0);
    expect(layout.headingReason).toMatch(/% less flight time/);
  });

  it("without a DEM only flight time counts, and the reason says so", () => {
    const layout = layoutStrips(thinSite, { ...BASE, headingDeg: "auto" });
    expect(headingDiff(layout.headingDeg, 60)).toBeLessThanOrEqual(5);
    expect(layout.headingReason).toMatch(/only flight time/);
  });

  it("a given heading is kept (normalised into [0, 180))", () => {
    const layout = layoutStrips(thinSite, { ...BASE, headingDeg: 250 });
    expect(layout.headingDeg).toBe(70);
    expect(layout.headingCandidates.length).toBe(1);
  });
});
