import { describe, it, expect } from "vitest";
import { makeGrid } from "../../src/dem/sample.js";
import { assessPlan } from "../../src/assess/assess.js";
import { FLAG_CEILING, FLAG_CLEARANCE, FLAG_COARSE, FLAG_FEW_IMAGES, FLAG_FINE, FLAG_NODATA, FLAG_RELIEF, FLAG_UNFLYABLE } from "../../src/assess/flags.js";
import { stationFlagBits } from "../../src/assess/flagRaster.js";
import { CAUSE_CEILING, CAUSE_CLEARANCE, CAUSE_CLIMB, CAUSE_NODATA, CAUSE_RELIEF, STATUS_DETAIL_LIMITED, STATUS_UNFLYABLE, type SolvedLeg } from "../../src/solve/types.js";
import { InputError } from "../../src/errors.js";
import { quantilesFloat32 } from "../../src/assess/quantiles.js";
import { genericCamera, handLeg } from "./helpers.js";

const camera = genericCamera();
const H0 = 120;
const AGL = 80;
const cellM = 0.5;
const W = 400; // 200 m x 150 m at 0.5 m
const H = 300;
const x0 = 0;
const y0 = 150;
const site = { type: "Polygon" as const, coordinates: [[[20.1, 20.1], [180.1, 20.1], [180.1, 130.1], [20.1, 130.1], [20.1, 20.1]]] };
const identity = (x: number, y: number): [number, number] => [x, y];

// Footprint at 80 m: 120 m across, 80 m along; 75 % front and 70 % side overlap.
const triggerM = 80 * (1 - 0.75);
const spacingM = 120 * (1 - 0.7);

/** East-west strips over the whole grid, all at one altitude, station causes from a callback. */
function plan(alt: number, cause?: (strip: number, s: number) => [number, number]): SolvedLeg[] {
  const legs: SolvedLeg[] = [];
  let j = 0;
  for (let y = -19.9; y <= 170; y += spacingM) {
    j++;
    const strip = j;
    legs.push(
      handLeg({
        from: [-40, y],
        to: [240, y],
        strip,
        waypoints: [{ s: 0, altitudeAmslM: alt }, { s: 280, altitudeAmslM: alt }],
        stationStepM: 0.5,
        status: cause ? (s) => cause(strip, s)[0] : undefined,
        cause: cause ? (s) => cause(strip, s)[1] : undefined,
      }),
    );
  }
  return legs;
}

describe("assessPlan on flat ground", () => {
  const gsdCm = AGL * camera.ifov * 100; // similar triangles: GSD = H p / f

  it("in band everywhere, stats agree with the rasters", () => {
    const grid = makeGrid({ width: W, height: H, x0, y0, cellM, heights: () => H0 });
    const band = { lowGsdM: (gsdCm / 100) * 0.9, highGsdM: (gsdCm / 100) * 1.1 };
    const a = assessPlan(grid, site, plan(H0 + AGL), camera, band, { triggerM, zoneHalfAcrossM: spacingM / 2, toWgs84: identity });
    const siteCells = 320 * 220;
    expect(a.stats.siteCells).toBe(siteCells);
    expect(a.stats.cellAreaM2).toBe(0.25);
    expect(a.stats.withinBandPct).toBe(100);
    expect(a.stats.flagged.cells).toBe(0);
    expect(Object.keys(a.polygons)).toHaveLength(0);
    for (const v of Object.values(a.stats.gsdCm)) expect(Math.abs(v - gsdCm) / gsdCm).toBeLessThan(1e-6);
    // 1 / (1 - 0.75) = 4 photos along exactly, 1 / (1 - 0.7) = 3.33 strips across: 12 or 16 (common practice).
    expect(a.stats.images.min).toBeGreaterThanOrEqual(12);
    expect(a.stats.images.min).toBeLessThanOrEqual(16);
    // Per strip: every site cell belongs to exactly one strip.
    expect(a.stats.perStrip.reduce((s, p) => s + p.cells, 0)).toBe(siteCells);
    expect(a.rasters.flags.every((f) => f === 0)).toBe(true);
  });

  it("GSD finer than the band: every site cell flagged fine, polygon covers the site", () => {
    const grid = makeGrid({ width: W, height: H, x0, y0, cellM, heights: () => H0 });
    const band = { lowGsdM: (gsdCm / 100) * 1.2, highGsdM: (gsdCm / 100) * 1.5 };
    const a = assessPlan(grid, site, plan(H0 + AGL), camera, band, { triggerM, zoneHalfAcrossM: spacingM / 2, toWgs84: identity });
    expect(a.stats.flagged.byKind.fine.pct).toBe(100);
    expect(a.stats.flagged.byKind.coarse.cells).toBe(0);
    // Every site cell carries the fine bit: all of them count as measured effects.
    expect(a.stats.flagged.effectCells).toBe(a.stats.siteCells);
    expect(a.stats.withinBandPct).toBe(0);
    expect(a.polygons.fine.properties.areaM2).toBe(160 * 110);
  });

  it("coarse flags, few images and nodata where the DEM has a hole", () => {
    // A 10 m x 10 m hole in the DEM at (100..110, 70..80).
    const grid = makeGrid({ width: W, height: H, x0, y0, cellM, heights: (x, y) => (x > 100 && x < 110 && y > 70 && y < 80 ? NaN : H0) });
    const band = { lowGsdM: (gsdCm / 100) * 0.5, highGsdM: (gsdCm / 100) * 0.8 };
    const a = assessPlan(grid, site, plan(H0 + AGL), camera, band, { triggerM, zoneHalfAcrossM: spacingM / 2, toWgs84: identity, minImages: 14 });
    const f = a.rasters.flags;
    let nodata = 0;
    let wrong = 0;
    let few = 0;
    let want = 0;
    for (let i = 0; i < f.length; i++) {
      if (!a.rasters.inSite[i]) {
        if (f[i] !== 0) wrong++;
        continue;
      }
      if (Number.isNaN(grid.heights[i])) {
        nodata++;
        if (f[i] !== FLAG_NODATA) wrong++;
        continue;
      }
      if ((f[i] & FLAG_COARSE) === 0) wrong++;
      if (f[i] & FLAG_FEW_IMAGES) few++;
      if (a.rasters.images[i] < 14) want++;
    }
    expect(wrong).toBe(0);
    expect(nodata).toBe(20 * 20);
    expect(few).toBe(want);
    expect(few).toBeGreaterThan(0);
    expect(a.stats.flagged.byKind.nodata.areaM2).toBe(100);
  });

  it("paints each station's cause onto its zone, and only there", () => {
    const grid = makeGrid({ width: W, height: H, x0, y0, cellM, heights: () => H0 });
    const band = { lowGsdM: (gsdCm / 100) * 0.9, highGsdM: (gsdCm / 100) * 1.1 };
    // Strip 4 is limited by the ceiling from s = 100 m to 130 m, unflyable from 150 m to 160 m.
    const legs = plan(H0 + AGL, (strip, s) => {
      if (strip !== 4) return [0, 0];
      if (s >= 100 && s <= 130) return [STATUS_DETAIL_LIMITED, CAUSE_CEILING];
      if (s >= 150 && s <= 160) return [STATUS_UNFLYABLE, CAUSE_CLEARANCE | CAUSE_CEILING];
      return [0, 0];
    });
    const half = spacingM / 2;
    const a = assessPlan(grid, site, legs, camera, band, { triggerM, zoneHalfAcrossM: half, toWgs84: identity });
    const yStrip = legs[3].from[1];
    let painted = 0;
    let wrong = 0;
    for (let r = 0; r < H; r++)
      for (let c = 0; c < W; c++) {
        const i = r * W + c;
        if (!a.rasters.inSite[i]) continue;
        const x = (c + 0.5) * cellM;
        const y = y0 - (r + 0.5) * cellM;
        const s = x + 40;
        const inAcross = Math.abs(y - yStrip) <= half;
        // Zone of a station: half the 0.5 m station step along, half the spacing across.
        const ceil = inAcross && s >= 100 - 0.25 && s <= 160 + 0.25 && !(s > 130 + 0.25 && s < 150 - 0.25);
        const unfly = inAcross && s >= 150 - 0.25 && s <= 160 + 0.25;
        if ((a.rasters.flags[i] & FLAG_CEILING) !== (ceil ? FLAG_CEILING : 0)) wrong++;
        if ((a.rasters.flags[i] & (FLAG_UNFLYABLE | FLAG_CLEARANCE)) !== (unfly ? FLAG_UNFLYABLE | FLAG_CLEARANCE : 0)) wrong++;
        if (ceil) painted++;
      }
    // Along: x in [59.75, 90.25] and [109.75, 120.25] (30 m and 10 m plus half a step each end):
    // 62 + 22 cell centres; across: 2 x 18 m = 72 cell centres of 0.5 m.
    expect(wrong).toBe(0);
    expect(painted).toBe(a.stats.flagged.byKind.ceiling.cells);
    expect(a.stats.flagged.byKind.ceiling.cells).toBe((62 + 22) * 72);
    // Per strip flagged shares add up to the site figure.
    const perStripCeiling = a.stats.perStrip.reduce((s, p) => s + (p.flagged?.ceiling.cells ?? 0), 0);
    expect(perStripCeiling).toBe(a.stats.flagged.byKind.ceiling.cells);
  });

  it("relief-limited stations get their own cause layer", () => {
    const grid = makeGrid({ width: W, height: H, x0, y0, cellM, heights: () => H0 });
    const band = { lowGsdM: (gsdCm / 100) * 0.9, highGsdM: (gsdCm / 100) * 1.1 };
    const legs = plan(H0 + AGL, (strip, s) => (strip === 2 && s >= 150 && s <= 170 ? [STATUS_DETAIL_LIMITED, CAUSE_RELIEF] : [0, 0]));
    const a = assessPlan(grid, site, legs, camera, band, { triggerM, zoneHalfAcrossM: spacingM / 2, toWgs84: identity });
    // Strip 2 at y = 16.1 m: its zone reaches y = 34.1 m, the site starts at y = 20.1 m, so
    // 14 m of the zone's width are in the site (cell centres y = 20.25 ... 33.75: 28) and the
    // stations s = 150 ... 170 m with half a step each side reach x = 109.75 ... 130.25 (42 centres).
    expect(a.stats.flagged.byKind.relief.cells).toBe(28 * 42);
    expect(a.polygons.relief.properties.bit).toBe(FLAG_RELIEF);
    expect(a.stats.flagged.byKind.ceiling.cells).toBe(0);
  });

  it("stats percentiles match a straightforward sort of the GSD raster", () => {
    // Tilted ground: GSD varies across the site.
    const grid = makeGrid({ width: W, height: H, x0, y0, cellM, heights: (x, y) => H0 + 0.1 * x + 0.05 * y });
    const band = { lowGsdM: (gsdCm / 100) * 0.9, highGsdM: (gsdCm / 100) * 1.1 };
    const a = assessPlan(grid, site, plan(H0 + AGL + 10), camera, band, { triggerM, zoneHalfAcrossM: spacingM / 2, toWgs84: identity, keepNadirStrip: true });
    const vals: number[] = [];
    let inBand = 0;
    for (let i = 0; i < a.rasters.gsdCm.length; i++) {
      if (!a.rasters.inSite[i]) continue;
      const g = a.rasters.gsdCm[i];
      vals.push(g);
      if (g >= band.lowGsdM * 100 * (1 - 1e-6) && g <= band.highGsdM * 100 * (1 + 1e-6)) inBand++;
    }
    vals.sort((p, q) => p - q);
    // Hyndman & Fan (1996) type 7: interpolate at h = (n - 1) p.
    const q = (p: number): number => {
      const h = (vals.length - 1) * p;
      const lo = Math.floor(h);
      return vals[lo] + (h - lo) * (vals[Math.min(vals.length - 1, lo + 1)] - vals[lo]);
    };
    const s = a.stats.gsdCm;
    expect([s.min, s.p5, s.median, s.p95, s.max]).toEqual([q(0), q(0.05), q(0.5), q(0.95), q(1)]);
    expect(s.max).toBeGreaterThan(s.min * 1.1);
    expect(a.stats.withinBandPct).toBeCloseTo((100 * inBand) / vals.length, 10);
    expect(a.stats.withinBandPct).toBeGreaterThan(0);
    expect(a.stats.withinBandPct).toBeLessThan(100);
    // Each strip's figures come from its own cells.
    for (const p of a.stats.perStrip) {
      const own = new Float32Array(p.cells);
      let k = 0;
      for (let i = 0; i < a.rasters.gsdCm.length; i++) if (a.rasters.inSite[i] && a.rasters.nadirStrip![i] === p.strip) own[k++] = a.rasters.gsdCm[i];
      expect(p.gsdCm.median).toBe(quantilesFloat32(own, [0.5])[0]);
    }
  });

  it("rejects a bad minimum image count", () => {
    const grid = makeGrid({ width: 10, height: 10, x0, y0, cellM, heights: () => H0 });
    expect(() => assessPlan(grid, site, [], camera, { lowGsdM: 0.01, highGsdM: 0.02 }, { triggerM, zoneHalfAcrossM: 1, toWgs84: identity, minImages: 0 })).toThrow(InputError);
  });
});

describe("station causes to flag bits", () => {
  it("maps the solver's cause bits onto the assessment's", () => {
    expect(stationFlagBits(0, CAUSE_CEILING)).toBe(FLAG_CEILING);
    expect(stationFlagBits(0, CAUSE_CLEARANCE)).toBe(FLAG_CLEARANCE);
    expect(stationFlagBits(0, CAUSE_CLIMB)).toBe(FLAG_CLEARANCE);
    expect(stationFlagBits(0, CAUSE_NODATA)).toBe(FLAG_NODATA);
    expect(stationFlagBits(STATUS_UNFLYABLE, 0)).toBe(FLAG_UNFLYABLE);
    expect(stationFlagBits(STATUS_DETAIL_LIMITED, CAUSE_RELIEF)).toBe(FLAG_RELIEF);
    expect(stationFlagBits(STATUS_DETAIL_LIMITED, 0)).toBe(0);
    expect(FLAG_FINE | FLAG_COARSE).toBe(3);
  });
});
