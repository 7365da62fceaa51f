import { describe, it, expect } from "vitest";
import { builtModule } from "../helpers/dist.js";
import { makeGrid } from "../../src/dem/sample.js";
import { assessPlan } from "../../src/assess/assess.js";
import { rasteriseSite } from "../../src/assess/siteMask.js";
import { latticeCountsByBand } from "../../src/assess/latticeCoverage.js";
import { photoLattice, type AssessedLeg } from "../../src/assess/exposures.js";
import { baselineFigures, baselineJob, constantAltitudeBaseline } from "../../src/plan/baseline.js";
import { straightTransitLeg } from "../../src/route/flights.js";
import type { Layout, LayoutLeg, XY } from "../../src/layout/types.js";
import type { Requirement } from "../../src/camera/types.js";
import { genericCamera } from "../assess/helpers.js";
import { gsdBinEdges, histogram } from "../../src/report/histogram.js";
import { ceilingBreaches, ceilingBreachGsdCm } from "../../src/plan/baseline.js";
import { constantAltitudeBaselineInBackground, sameBaselineJob, type baselineBeforeSolve as BeforeSolve, type earlyBaselineAllowed as EarlyAllowed, type constantAltitudeBaselineInBackground as Background } from "../../src/plan/baselineBackground.js";

/**
 * The constant-altitude comparison is computed directly (GSD from each cell's own ground,
 * image counts from the photo lattices strip by strip). Checked here against the footprint
 * sweep of the assessment run on the same photos, cell by cell, and on flat ground
 * against the pinhole relation GSD = H p / f (common practice).
 */

const camera = genericCamera(); // 20 MP, 1-inch sensor, 8.8 mm lens
const cellM = 0.5;
const W = 900; // 450 m x 400 m
const H = 800;
const x0 = 1000;
const y0 = 5400;
const hills = (x: number, y: number) => 300 + 22 * Math.sin(x / 61) * Math.cos(y / 47) + 9 * Math.sin((x + 2 * y) / 23);
const site = {
  type: "Polygon" as const,
  coordinates: [[[1040, 5040], [1410, 5060], [1390, 5360], [1200, 5330], [1060, 5370], [1040, 5040]]],
};
const targetHeightM = 90;
const gsdTargetCm = targetHeightM * camera.ifov * 100;
const requirement = { lowGsdM: (gsdTargetCm * 0.9) / 100, highGsdM: (gsdTargetCm * 1.1) / 100 } as Requirement;
const triggerM = 90 * camera.ifov * 3648 * 0.25;
const spacingM = 90 * camera.ifov * 5472 * 0.35;

/** Parallel strips at `headingDeg` over the site's box, with a hole (no photos) on one and a block seam's photo grid on another. */
function layoutAt(headingDeg: number): Layout {
  const h = (headingDeg * Math.PI) / 180;
  const u: XY = [Math.sin(h), Math.cos(h)];
  const v: XY = [u[1], -u[0]];
  const c: XY = [1225, 5200];
  const legs: LayoutLeg[] = [];
  let strip = 0;
  for (let off = -260; off <= 260; off += spacingM) {
    strip++;
    const sign = strip % 2 ? 1 : -1;
    const from: XY = [c[0] + v[0] * off - sign * u[0] * 280, c[1] + v[1] * off - sign * u[1] * 280];
    const to: XY = [c[0] + v[0] * off + sign * u[0] * 280, c[1] + v[1] * off + sign * u[1] * 280];
    const leg: LayoutLeg = { kind: "strip", strip, from, to, lengthM: 560 };
    if (strip === 3) leg.noPhotoIntervals = [[120, 210.5], [400, 430]];
    if (strip === 5) leg.photoGrid = { firstM: 3.25, everyM: triggerM };
    legs.push(leg);
  }
  return {
    headingDeg, spacingM, triggerM, footprintAcrossM: 0, footprintAlongM: 0, legs, takeoff: legs[0].from,
    headingCandidates: [], headingReason: "test",
  };
}

/** The same photos as assessed legs: straight, at one altitude, as the assessment places them. */
function assessedLegs(layout: Layout, altitudeAmslM: number): AssessedLeg[] {
  return layout.legs.map((l) => ({
    ...straightTransitLeg(l.from, l.to, l.strip, { altitudeAmslM, speedMps: 1 }),
    kind: "strip" as const,
    ...(l.noPhotoIntervals ? { noPhotoIntervals: l.noPhotoIntervals } : {}),
    ...(l.photoGrid ? { photoPhaseM: l.photoGrid.firstM } : {}),
  }));
}

/** latticeCountsByBand's counts of the whole grid, band after band. */
function latticeCountsWhole(...args: Parameters<typeof latticeCountsByBand>): Uint16Array {
  const l = latticeCountsByBand(...args);
  const whole = new Uint16Array(args[0].width * args[0].height);
  for (let b = 0; b < l.bands; b++) {
    const [i0, i1] = l.count(b);
    whole.set(l.images.subarray(0, i1 - i0), i0);
  }
  return whole;
}

describe("constant-altitude baseline computed directly", () => {
  for (const headingDeg of [0, 33, 90]) {
    it(`matches the footprint sweep cell by cell over hills (heading ${headingDeg})`, () => {
      const grid = makeGrid({ width: W, height: H, x0, y0, cellM, heights: hills });
      const layout = layoutAt(headingDeg);
      const inSite = rasteriseSite(site, W, H, grid.transform);
      const plan = { width: W, height: H, transform: grid.transform, gsdCm: new Float32Array(W * H).fill(NaN), images: new Uint16Array(W * H), flags: new Uint16Array(W * H), inSite };
      const opts = { targetHeightM, triggerM, minImages: 3, ceiling: { heightM: 95, reference: "ground" as const }, takeoffGroundM: 0, clearanceM: 80 };
      const b = constantAltitudeBaseline(grid, layout, camera, requirement, { ...opts, planRasters: plan });
      // Clearance shortfall: site cells whose ground lies less than 80 m below the one
      // altitude, counted here from the DEM heights, and the highest site ground.
      let short = 0;
      let top = -Infinity;
      for (let i = 0; i < W * H; i++) {
        if (!inSite[i]) continue;
        top = Math.max(top, grid.heights[i]);
        if (b.altitudeAmslM - grid.heights[i] < 80) short++;
      }
      expect(short).toBeGreaterThan(1000);
      expect(b.clearanceShortfall).toEqual({ clearanceM: 80, cells: short, areaM2: short * cellM * cellM, maxGroundM: top });
      const swept = assessPlan(grid, site, assessedLegs(layout, b.altitudeAmslM), camera, requirement, {
        triggerM, minImages: 3, zoneHalfAcrossM: spacingM / 2, toWgs84: (x, y) => [x, y], nadirBy: "distance", polygons: false, threads: 1,
      });
      // Given the swept constant-altitude plan as "the plan", its breaches (counted in the
      // baseline's own pass) are ceilingBreaches' count of its rasters, and the baseline's own.
      const again = constantAltitudeBaseline(grid, layout, camera, requirement, { ...opts, planRasters: swept.rasters });
      expect(again.planCeilingBreaches).toEqual(ceilingBreaches(grid, swept.rasters, camera, opts));
      expect(again.planCeilingBreaches).toEqual(b.stats.ceilingBreaches);
      expect(b.planCeilingBreaches.cells).toBe(0);
      // Image counts: the same for every cell.
      const strips = layout.legs.map((l) => ({ from: l.from, lattice: photoLattice(assessedLegs(layout, 0)[l.strip - 1], triggerM)! }));
      const images = latticeCountsWhole(grid, inSite, strips, b.altitudeAmslM, triggerM, (camera.ifov * 3648) / 2, (camera.ifov * 5472) / 2);
      let differ = 0;
      for (let i = 0; i < W * H; i++) if (inSite[i] && images[i] !== swept.rasters.images[i]) differ++;
      expect(differ).toBe(0);
      // Every figure the report and summary show.
      const s = swept.stats;
      expect(b.stats.gsdCm).toEqual(s.gsdCm);
      expect(b.stats.withinBandPct).toBeCloseTo(s.withinBandPct, 10);
      expect(b.stats.images).toEqual(s.images);
      expect(b.stats.flaggedAreaM2).toBe(s.flagged.areaM2);
      for (const [k, v] of Object.entries(s.flagged.byKind)) expect(b.stats.flaggedByKind[k].cells, k).toBe(v.cells);
      const seen = swept.rasters.gsdCm.filter((g, i) => inSite[i] && g === g);
      expect(b.gsdValuesCm().length).toBe(seen.length);
      expect(Array.from(b.gsdValuesCm())).toEqual(Array.from(seen));
      // The report's histogram of them, made without the array: the same counts as binning the values.
      const edges = gsdBinEdges(requirement.lowGsdM * 100, requirement.highGsdM * 100, b.stats.gsdCm.min, b.stats.gsdCm.max, 60);
      expect(b.gsdHistogram(edges)).toEqual(histogram(seen, null, edges));
      // The relief (about 60 m) under a 90 m flight puts some ground out of the band both ways.
      expect(s.flagged.byKind.coarse.cells).toBeGreaterThan(1000);
      expect(s.flagged.byKind.fine.cells).toBeGreaterThan(1000);
      expect(b.stats.ceilingBreaches.cells).toBeGreaterThan(0);
    });
  }

  it("gives GSD = H p / f on flat ground and the count of photos whose footprint reaches each cell", () => {
    const ground = 250;
    const grid = makeGrid({ width: W, height: H, x0, y0, cellM, heights: () => ground });
    const layout = layoutAt(0);
    const inSite = rasteriseSite(site, W, H, grid.transform);
    const plan = { width: W, height: H, transform: grid.transform, gsdCm: new Float32Array(W * H).fill(NaN), images: new Uint16Array(W * H), flags: new Uint16Array(W * H), inSite };
    const b = constantAltitudeBaseline(grid, layout, camera, requirement, {
      targetHeightM, triggerM, minImages: 3, ceiling: { heightM: 120, reference: "ground" }, takeoffGroundM: 0, clearanceM: 30, planRasters: plan,
    });
    // 90 m above flat ground clears 30 m everywhere.
    expect(b.clearanceShortfall).toEqual({ clearanceM: 30, cells: 0, areaM2: 0, maxGroundM: ground });
    expect(b.altitudeAmslM).toBe(ground + targetHeightM);
    // Pinhole camera: GSD = H * pixel pitch / focal length = 90 m * (13.2 mm / 5472) / 8.8 mm.
    const expected = (90 * (13.2 / 5472)) / 8.8 * 100;
    expect(b.stats.gsdCm.min).toBeCloseTo(expected, 5);
    expect(b.stats.gsdCm.max).toBeCloseTo(expected, 5);
    expect(b.stats.withinBandPct).toBeCloseTo(100, 10);
    // Along a north-going strip at 75 % front overlap every point is in 4 photos (footprint /
    // trigger = 4), 3 or 5 at exact edges; across, 65 % side overlap puts it in 2 or 3 strips.
    // The site's interior therefore sees 8 to 15 photos, never fewer than 8.
    const strips = layout.legs.map((l) => ({ from: l.from, lattice: photoLattice(assessedLegs(layout, 0)[l.strip - 1], triggerM)! }));
    const images = latticeCountsWhole(grid, inSite, strips, b.altitudeAmslM, triggerM, (camera.ifov * 3648) / 2, (camera.ifov * 5472) / 2);
    // Brute force at a few cells: count photos whose footprint (half 90 m * ifov * px / 2) holds the cell centre.
    const halfAlong = (90 * camera.ifov * 3648) / 2;
    const halfAcross = (90 * camera.ifov * 5472) / 2;
    for (const [col, row] of [[300, 300], [451, 402], [620, 555], [200, 700]]) {
      const cx = x0 + (col + 0.5) * cellM;
      const cy = y0 - (row + 0.5) * cellM;
      let count = 0;
      for (const l of layout.legs) {
        const ux = (l.to[0] - l.from[0]) / l.lengthM, uy = (l.to[1] - l.from[1]) / l.lengthM;
        const lat = photoLattice(assessedLegs(layout, 0)[l.strip - 1], triggerM)!;
        for (let k = 0; k <= lat.n; k++) {
          if (!lat.present[k]) continue;
          const s = lat.s0 + k * triggerM;
          const px = l.from[0] + s * ux, py = l.from[1] + s * uy;
          const a = (cx - px) * ux + (cy - py) * uy, q = (cx - px) * uy - (cy - py) * ux;
          if (Math.abs(a) <= halfAlong && Math.abs(q) <= halfAcross) count++;
        }
      }
      expect(images[row * W + col], `cell ${col},${row}`).toBe(count);
      if (inSite[row * W + col]) expect(count).toBeGreaterThanOrEqual(8);
    }
    // The image counts' figures: the least and the median (type 7) of the site cells' counts,
    // sorted here; also for a site three cells wide, whose rows are a run or two of one count.
    const countStats = (mask: Uint8Array) => {
      const sorted = Array.from(images).filter((_, i) => mask[i]).sort((p, q) => p - q);
      const mid = (sorted.length - 1) / 2;
      return { min: sorted[0], median: (sorted[Math.floor(mid)] + sorted[Math.ceil(mid)]) / 2 };
    };
    expect(b.stats.images).toEqual(countStats(inSite));
    const narrow = new Uint8Array(W * H);
    for (let row = 150; row < 650; row++) narrow.fill(1, row * W + 450, row * W + 453);
    expect(narrow.every((v, i) => !v || inSite[i])).toBe(true);
    const nb = constantAltitudeBaseline(grid, layout, camera, requirement, {
      targetHeightM, triggerM, minImages: 3, ceiling: { heightM: 120, reference: "ground" }, takeoffGroundM: 0, clearanceM: 30, planRasters: { ...plan, inSite: narrow },
    });
    expect(nb.stats.images).toEqual(countStats(narrow));
  });
});

describe("image counts a band of rows at a time (latticeCountsByBand)", () => {
  it("are the footprint sweep's counts, band after band, every cell of the grid once", () => {
    const grid = makeGrid({ width: W, height: H, x0, y0, cellM, heights: hills });
    const layout = layoutAt(33);
    const inSite = rasteriseSite(site, W, H, grid.transform);
    const strips = layout.legs.map((l) => ({ from: l.from, lattice: photoLattice(assessedLegs(layout, 0)[l.strip - 1], triggerM)! }));
    const A = 400;
    const kAlong = (camera.ifov * 3648) / 2, kAcross = (camera.ifov * 5472) / 2;
    // The assessment's footprint sweep of the same photos at altitude A: every photo tested per cell.
    const whole = assessPlan(grid, site, assessedLegs(layout, A), camera, requirement, {
      triggerM, minImages: 3, zoneHalfAcrossM: spacingM / 2, toWgs84: (x, y) => [x, y], nadirBy: "distance", polygons: false, threads: 1,
    }).rasters.images;
    const byBand = latticeCountsByBand(grid, inSite, strips, A, triggerM, kAlong, kAcross);
    // 800 rows: several bands, the last one part filled.
    expect(byBand.bands).toBeGreaterThan(2);
    let next = 0;
    let differ = 0;
    let seen = 0;
    for (let b = 0; b < byBand.bands; b++) {
      const [i0, i1] = byBand.count(b);
      expect(i0).toBe(next);
      for (let i = i0; i < i1; i++) {
        if (byBand.images[i - i0] !== whole[i]) differ++;
        if (whole[i] > 0) seen++;
      }
      next = i1;
    }
    expect(next).toBe(W * H);
    expect(differ).toBe(0);
    expect(seen).toBeGreaterThan(100_000);
  });
});

describe("the plan's ceiling breaches as a GSD threshold", () => {
  // ceilingBreaches takes a cell's camera height from its GSD (H = GSD / ifov): under the
  // ground and surface rules the breach depends on the GSD alone, so the cells it counts are
  // those at or above one Float32 GSD. Checked on the 2001 Float32 values around it.
  for (const [heightM, reference] of [[120, "ground"], [121.92, "surface"], [95, "ground"], [30.5, "surface"]] as const) {
    it(`${heightM} m, ${reference} rule: GSD >= the threshold counts exactly ceilingBreaches' cells`, () => {
      const o = { ceiling: { heightM, reference }, takeoffGroundM: 0 };
      const t = ceilingBreachGsdCm(camera.ifov, o)!;
      // Near the GSD of a photo at the ceiling: H p / f (pinhole camera).
      expect(t).toBeCloseTo(((heightM + 0.01) * 100 * 13.2) / 5472 / 8.8, 4);
      const n = 2001;
      const g = new Float32Array(n);
      const bits = new Uint32Array(g.buffer);
      g[1000] = t;
      for (let k = 0; k < n; k++) bits[k] = bits[1000] + (k - 1000);
      const grid = makeGrid({ width: n, height: 1, x0: 0, y0: 1, cellM: 1, heights: () => 100 });
      const rasters = { width: n, height: 1, transform: grid.transform, gsdCm: g, images: new Uint16Array(n), flags: new Uint16Array(n), inSite: new Uint8Array(n).fill(1) };
      expect(ceilingBreaches(grid, rasters, camera, o).cells).toBe(1001);
      let atLeast = 0;
      for (let k = 0; k < n; k++) if (g[k] >= t) atLeast++;
      expect(atLeast).toBe(1001);
      // The cell just below the threshold is not a breach, the threshold itself is.
      expect(ceilingBreaches(grid, { ...rasters, inSite: Uint8Array.from({ length: n }, (_, k) => (k === 999 ? 1 : 0)) }, camera, o).cells).toBe(0);
      expect(ceilingBreaches(grid, { ...rasters, inSite: Uint8Array.from({ length: n }, (_, k) => (k === 1000 ? 1 : 0)) }, camera, o).cells).toBe(1);
    });
  }
  it("none under the take-off rule, where the ground below matters too", () => {
    expect(ceilingBreachGsdCm(camera.ifov, { ceiling: { heightM: 120, reference: "takeoff" }, takeoffGroundM: 300 })).toBeUndefined();
  });
});

const built = builtModule("plan/baselineBackground.js", ["baselineWorker.js"]);

describe.skipIf(!built.available)("constant-altitude baseline made in a worker thread", () => {
  it("gives the figures made on this thread, and the plan's breaches from the plan's rasters", async () => {
    const { constantAltitudeBaselineInBackground } = (await import(built.href)) as { constantAltitudeBaselineInBackground: typeof Background };
    const grid = makeGrid({ width: W, height: H, x0, y0, cellM, heights: hills });
    const layout = layoutAt(33);
    const inSite = rasteriseSite(site, W, H, grid.transform);
    const opts = { targetHeightM, triggerM, minImages: 3, ceiling: { heightM: 95, reference: "ground" as const }, takeoffGroundM: 0, clearanceM: 80 };
    const here = constantAltitudeBaseline(grid, layout, camera, requirement, { ...opts, planRasters: { width: W, height: H, transform: grid.transform, gsdCm: new Float32Array(W * H).fill(NaN), images: new Uint16Array(W * H), flags: new Uint16Array(W * H), inSite }, threads: 1 });
    // The plan given to finish: the swept constant-altitude plan, so its breaches are the baseline's own.
    const swept = assessPlan(grid, site, assessedLegs(layout, here.altitudeAmslM), camera, requirement, {
      triggerM, minImages: 3, zoneHalfAcrossM: spacingM / 2, toWgs84: (x, y) => [x, y], nadirBy: "distance", polygons: false, threads: 1,
    });
    const run = constantAltitudeBaselineInBackground(grid, layout, camera, requirement, opts, inSite);
    expect(run.madeIn()).toBe("pending");
    const b = await run.finish(swept.rasters);
    expect(run.madeIn()).toBe("worker");
    expect(b.altitudeAmslM).toBe(here.altitudeAmslM);
    expect(b.medianGroundM).toBe(here.medianGroundM);
    expect(b.stats).toEqual(here.stats);
    expect(b.clearanceShortfall).toEqual(here.clearanceShortfall);
    expect(b.clearanceShortfall!.cells).toBeGreaterThan(0);
    expect(Array.from(b.gsdValuesCm())).toEqual(Array.from(here.gsdValuesCm()));
    expect(b.planCeilingBreaches).toEqual(here.stats.ceilingBreaches);
    expect(b.planCeilingBreaches.cells).toBeGreaterThan(0);
  });

  it("started before the solve on the strips as laid out, gives the same figures", async () => {
    const mod = (await import(built.href)) as { constantAltitudeBaselineInBackground: typeof Background; baselineBeforeSolve: typeof BeforeSolve; earlyBaselineAllowed: typeof EarlyAllowed };
    const grid = makeGrid({ width: W, height: H, x0, y0, cellM, heights: hills });
    const layout = layoutAt(33);
    const inSite = rasteriseSite(site, W, H, grid.transform);
    const opts = { targetHeightM, triggerM, minImages: 3, ceiling: { heightM: 95, reference: "ground" as const }, takeoffGroundM: 0, clearanceM: 80 };
    const planRasters = { width: W, height: H, transform: grid.transform, gsdCm: new Float32Array(W * H).fill(NaN), images: new Uint16Array(W * H), flags: new Uint16Array(W * H), inSite };
    const here = constantAltitudeBaseline(grid, layout, camera, requirement, { ...opts, planRasters, threads: 1 });
    // Two threads asked for: by default a grid this small starts no comparison before the solve.
    expect(mod.earlyBaselineAllowed(W * H)).toBe(false);
    expect(mod.earlyBaselineAllowed(W * H, 2)).toBe(true);
    const early = mod.baselineBeforeSolve(baselineJob(grid, layout, camera, requirement, opts, inSite));
    const run = mod.constantAltitudeBaselineInBackground(grid, { ...layout, legs: [...layout.legs].reverse() }, camera, requirement, { ...opts, threads: 2 }, inSite, early);
    expect(run.startedBeforeSolve).toBe(true);
    const b = await run.finish(planRasters);
    expect(run.madeIn()).toBe("worker");
    expect(b.stats).toEqual(here.stats);
    expect(Array.from(b.gsdValuesCm())).toEqual(Array.from(here.gsdValuesCm()));
  });
});

describe("constant-altitude baseline started before the solve", () => {
  const grid = makeGrid({ width: W, height: H, x0, y0, cellM, heights: hills });
  const inSite = rasteriseSite(site, W, H, grid.transform);
  const opts = { targetHeightM, triggerM, minImages: 3, ceiling: { heightM: 95, reference: "ground" as const }, takeoffGroundM: 0, clearanceM: 80 };
  const planRasters = { width: W, height: H, transform: grid.transform, gsdCm: new Float32Array(W * H).fill(NaN), images: new Uint16Array(W * H), flags: new Uint16Array(W * H), inSite };
  const laidOut = layoutAt(33);
  /** The strips flown the other way: each from its other end (its photos then fall elsewhere along it). */
  const flipped: Layout = { ...laidOut, legs: laidOut.legs.map((l) => ({ ...l, from: l.to, to: l.from })) };
  /** An early start whose figures are a sentinel, so which figures finish used shows. */
  const sentinel = (layout: Layout) => {
    const job = baselineJob(grid, layout, camera, requirement, opts, inSite);
    const figures = { ...baselineFigures(job), altitudeAmslM: -12345 };
    let cancelled = 0;
    return { early: { job, figures: { result: async () => figures, cancel: () => void cancelled++ } }, cancelled: () => cancelled };
  };

  it("uses the early figures when the solve kept the strips (in any order)", async () => {
    const s = sentinel(laidOut);
    const solved: Layout = { ...laidOut, legs: [...laidOut.legs].reverse() };
    const run = constantAltitudeBaselineInBackground(grid, solved, camera, requirement, opts, inSite, s.early);
    expect(run.startedBeforeSolve).toBe(true);
    expect((await run.finish(planRasters)).altitudeAmslM).toBe(-12345);
    expect(s.cancelled()).toBe(0);
  });

  it("stops them and makes the final strips' figures when the solve flew the strips the other way", async () => {
    const here = constantAltitudeBaseline(grid, flipped, camera, requirement, { ...opts, planRasters, threads: 1 });
    const s = sentinel(laidOut);
    const run = constantAltitudeBaselineInBackground(grid, flipped, camera, requirement, { ...opts, threads: 1 }, inSite, s.early);
    expect(run.startedBeforeSolve).toBe(false);
    expect(s.cancelled()).toBe(1);
    const b = await run.finish(planRasters);
    // Not the early figures (the sentinel): those of the strips flown, as made directly.
    expect(b.altitudeAmslM).toBe(here.altitudeAmslM);
    expect(b.stats).toEqual(here.stats);
    expect(Array.from(b.gsdValuesCm())).toEqual(Array.from(here.gsdValuesCm()));
  });

  it("takes a job for another only when every input that makes the figures is the same", () => {
    const a = baselineJob(grid, laidOut, camera, requirement, opts, inSite);
    expect(sameBaselineJob(a, baselineJob(grid, laidOut, camera, requirement, opts, inSite))).toBe(true);
    // A stretch without photos found by the solve.
    const gap: Layout = { ...laidOut, legs: laidOut.legs.map((l) => (l.strip === 2 ? { ...l, noPhotoIntervals: [[10, 40]] as [number, number][] } : l)) };
    expect(sameBaselineJob(a, baselineJob(grid, gap, camera, requirement, opts, inSite))).toBe(false);
    expect(sameBaselineJob(a, baselineJob(grid, flipped, camera, requirement, opts, inSite))).toBe(false);
    expect(sameBaselineJob(a, baselineJob(grid, laidOut, camera, requirement, { ...opts, clearanceM: 81 }, inSite))).toBe(false);
    expect(sameBaselineJob(a, baselineJob(grid, laidOut, camera, requirement, { ...opts, takeoffGroundM: 1 }, inSite))).toBe(false);
    expect(sameBaselineJob(a, baselineJob(grid, laidOut, camera, requirement, opts, inSite.slice()))).toBe(false);
    expect(sameBaselineJob(a, baselineJob(grid, { ...laidOut, legs: laidOut.legs.slice(1) }, camera, requirement, opts, inSite))).toBe(false);
  });
});

describe("the comparison's pass in WebAssembly (latticeRows.as.ts tallyBand) against its JavaScript twin (tallyRow)", () => {
  // Both make every figure from the same counts; here on hills with a hole of nodata, under
  // the ground rule (a breach is a GSD threshold) and the take-off rule (the ground below
  // counts too), with and without the report's GSD tally.
  const grid = makeGrid({ width: W, height: H, x0, y0, cellM, heights: (x, y) => (Math.hypot(x - 1200, y - 5200) < 25 ? NaN : hills(x, y)) });
  const inSite = rasteriseSite(site, W, H, grid.transform);
  const gsdTally = { first: 150, stepCm: 0.01, bins: 300 };
  const cases = [
    { headingDeg: 0, ceiling: { heightM: 95, reference: "ground" as const }, takeoffGroundM: 0, gsdTally },
    { headingDeg: 33, ceiling: { heightM: 95, reference: "takeoff" as const }, takeoffGroundM: 290, gsdTally },
    { headingDeg: 90, ceiling: { heightM: 120, reference: "surface" as const }, takeoffGroundM: 0 },
  ];
  for (const c of cases) {
    it(`gives the same figures, heading ${c.headingDeg}, ${c.ceiling.reference} rule${c.gsdTally ? ", GSD tally" : ""}`, () => {
      const job = baselineJob(grid, layoutAt(c.headingDeg), camera, requirement, { targetHeightM, triggerM, minImages: 9, ceiling: c.ceiling, takeoffGroundM: c.takeoffGroundM, clearanceM: 80, ...(c.gsdTally ? { gsdTally: c.gsdTally } : {}) }, inSite);
      const wasm = baselineFigures(job);
      const js = baselineFigures({ ...job, rowsIn: "js" });
      expect(Buffer.from(wasm.seenBits).equals(Buffer.from(js.seenBits))).toBe(true);
      expect({ ...wasm, seenBits: undefined }).toEqual({ ...js, seenBits: undefined });
      // Each branch of the pass taken: nodata, too few images, both sides of the band, breaches.
      expect(js.stats.flaggedByKind.nodata.cells).toBeGreaterThan(100);
      expect(js.stats.flaggedByKind.fewImages.cells).toBeGreaterThan(100);
      expect(js.stats.flaggedByKind.coarse.cells).toBeGreaterThan(100);
      expect(js.stats.flaggedByKind.fine.cells).toBeGreaterThan(100);
      expect(js.stats.ceilingBreaches.cells).toBeGreaterThan(100);
      if (c.gsdTally) expect(js.gsdTally!.counts.reduce((a, b) => a + b, 0)).toBeGreaterThan(1000);
    });
  }
});

describe("the comparison's pass in WebAssembly on exact boundaries", () => {
  it("counts a GSD exactly at the breach threshold or at a tally edge, and ground exactly at the clearance, as its JavaScript twin does", () => {
    // Flat ground at 300 m (the median) and three patches: at 305 m, the height above it set
    // so the GSD there is exactly 2.5 cm/px, a tally edge; at 296 m, the ceiling set so that
    // patch's GSD is exactly the breach threshold; at 302 m, the clearance exactly its depth
    // under the one altitude.
    const gsdPerM = camera.ifov * 100;
    const height = 5 + 2.5 / gsdPerM;
    const A = 300 + height;
    expect(Math.fround((A - 305) * gsdPerM)).toBe(2.5);
    const g0 = Math.fround((A - 296) * gsdPerM);
    const below = new Float32Array([g0]);
    new Uint32Array(below.buffer)[0]--;
    const ceiling = { heightM: ((g0 + below[0]) / 2 / 100 / camera.ifov) - 0.01, reference: "ground" as const };
    expect(ceilingBreachGsdCm(camera.ifov, { ceiling, takeoffGroundM: 0 })).toBe(g0);
    const patch = (x: number, y: number, cx: number) => Math.abs(x - cx) < 10 && Math.abs(y - 5200) < 10;
    const grid = makeGrid({ width: W, height: H, x0, y0, cellM, heights: (x, y) => (patch(x, y, 1150) ? 296 : patch(x, y, 1200) ? 305 : patch(x, y, 1250) ? 302 : 300) });
    const inSite = rasteriseSite(site, W, H, grid.transform);
    const job = baselineJob(grid, layoutAt(0), camera, requirement, { targetHeightM: height, triggerM, minImages: 3, ceiling, takeoffGroundM: 0, clearanceM: A - 302, gsdTally: { first: 160, stepCm: 0.01, bins: 100 } }, inSite);
    const wasm = baselineFigures(job);
    const js = baselineFigures({ ...job, rowsIn: "js" });
    expect(wasm.altitudeAmslM).toBe(A);
    expect(Buffer.from(wasm.seenBits).equals(Buffer.from(js.seenBits))).toBe(true);
    expect({ ...wasm, seenBits: undefined }).toEqual({ ...js, seenBits: undefined });
    // Each boundary counts its patch (40 x 40 cells): at the threshold a breach, at the edge the
    // bin above it (2.50 <= g < 2.51: bin 90 of the tally from 1.60, where the bin found by
    // multiplying slips to 89 and the edge test moves it up), at the clearance not short (the
    // test is <: only the 305 m patch, above it, is short).
    expect(js.stats.ceilingBreaches.cells).toBe(1600);
    expect(js.gsdTally!.counts[90]).toBe(1600);
    expect(js.clearanceShortfall!.cells).toBe(1600);
  });
});
