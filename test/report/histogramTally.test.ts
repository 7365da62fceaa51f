// The report's GSD histograms read off a tally made in a pass over the cells (assess/gsdTally.ts,
// report/histogram.ts histogramOfTally) against the histogram counted value by value
// (report/histogram.ts histogram): the same counts, under and over for every band, extremes
// and values tried, values lying exactly on bin edges included. Bands span the GSD targets and
// tolerances plans are made with (about 0.5 to 10 cm, 1 to 60 %); the values are pseudo-random
// (a fixed seed), only the agreement of the two ways of counting is checked.
import { describe, it, expect } from "vitest";
import { REPORT_GSD_BINS, gsdBinEdges, gsdTallyGrid, histogram, histogramOfTally } from "../../src/report/histogram.js";
import { tallyCounter, tallyEdges, tallyOfSlots, type GsdTallyGrid } from "../../src/assess/gsdTally.js";
import path from "node:path";
import { seededRandom } from "../geo/projCli.js";
import { loadPlanFile, resolvePlanOptions } from "../../src/plan/options.js";
import { planMission } from "../../src/plan/plan.js";
import { planSummary } from "../../src/plan/summary.js";

/** A seeded generator (mulberry32), so a failure can be replayed. */
const random = seededRandom;

/** Summary rounding of the band edges (plan/summary.ts: 4 decimals). */
const r4 = (x: number) => Math.round(x * 1e4) / 1e4;

function tallied(grid: GsdTallyGrid, values: Float32Array, mask: Uint8Array) {
  const slots = new Float64Array(2 * (grid.bins + 2));
  // Two counters over two halves, as two threads' slots are.
  const half = values.length >> 1;
  const a = tallyCounter(grid, slots, 0);
  const b = tallyCounter(grid, slots, grid.bins + 2);
  for (let i = 0; i < values.length; i++) if (mask[i] !== 0 && values[i] === values[i]) (i < half ? a : b).add(values[i]);
  return tallyOfSlots(grid, slots, 2);
}

describe("GSD histograms read off a tally", () => {
  it("count as the histogram counts value by value, over 400 bands, extremes and samples", () => {
    const rnd = random(20261203);
    let read = 0;
    let readable = 0;
    for (let trial = 0; trial < 400; trial++) {
      const target = 0.5 + 9.5 * rnd();
      const tol = 0.01 + 0.59 * rnd();
      const low = r4(target * (1 - tol));
      const high = r4(target * (1 + tol));
      const w = high - low;
      // Extremes inside, at and beyond the axis' clamps (1 and 3 band widths out).
      const min = low - w * 4 * rnd();
      const max = high + w * 4 * rnd();
      const edges = gsdBinEdges(low, high, min, max, REPORT_GSD_BINS);
      const grid = gsdTallyGrid(low, high)!;
      expect(grid, `band ${low}-${high}`).toBeDefined();
      const n = 3000;
      const values = new Float32Array(n);
      const mask = new Uint8Array(n);
      for (let i = 0; i < n; i++) {
        mask[i] = rnd() < 0.9 ? 1 : 0;
        const k = rnd();
        if (k < 0.3) {
          // On an edge, or the float32 next to it either side.
          const e = edges[Math.floor(rnd() * edges.length)];
          const f = Math.fround(e);
          const bits = new Uint32Array(new Float32Array([f]).buffer)[0];
          const step = k < 0.1 ? 0 : k < 0.2 ? 1 : -1;
          values[i] = new Float32Array(new Uint32Array([bits + step]).buffer)[0];
        } else if (k < 0.33) values[i] = [NaN, Infinity, -Infinity, 0, -1, 1e6][Math.floor(rnd() * 6)];
        else values[i] = min - w + (max - min + 2 * w) * rnd();
      }
      const direct = histogram(values, mask, edges);
      const fromTally = histogramOfTally(tallied(grid, values, mask), edges);
      // An axis reaching below zero (tolerances over a third) may carry an edge of rounding
      // noise next to zero (8e-16 for 0): not on the grid, so the values are counted instead.
      const noisyZero = edges.some((e) => e !== 0 && Math.abs(e) < 1e-9);
      if (!noisyZero) {
        expect(fromTally, `band ${low}-${high}, extremes ${min}-${max}`).toBeDefined();
        readable++;
      }
      if (fromTally) {
        expect(fromTally).toEqual(direct);
        read++;
      }
    }
    // Every one without such an edge is read off the tally (347 of the 400 here).
    expect(read).toBe(readable);
    expect(read).toBeGreaterThan(300);
  });

  it("declines edges off the tally's grid, so the values are counted instead", () => {
    const grid = gsdTallyGrid(2.25, 2.75)!;
    const t = tallyOfSlots(grid, new Float64Array(grid.bins + 2));
    // 2.255 lies between two of the grid's edges (its step is 0.01 cm here).
    expect(grid.stepCm).toBe(0.01);
    expect(histogramOfTally(t, [2.2, 2.255, 2.3])).toBeUndefined();
    // Beyond the grid's range.
    expect(histogramOfTally(t, [2.2, 2.3, 50])).toBeUndefined();
    expect(histogramOfTally(t, [2.2, 2.25, 2.3])).toBeDefined();
    expect(histogramOfTally(undefined, [2.2, 2.3])).toBeUndefined();
  });

  it("has no grid for an empty band", () => {
    expect(gsdTallyGrid(2.5, 2.5)).toBeUndefined();
  });

  it("puts a value exactly on an edge in the bin above it, as the histogram does", () => {
    const grid: GsdTallyGrid = { first: 250, stepCm: 0.01, bins: 4 };
    expect([...tallyEdges(grid)]).toEqual([2.5, 2.51, 2.52, 2.53, 2.54]);
    const slots = new Float64Array(grid.bins + 2);
    const c = tallyCounter(grid, slots, 0);
    for (const v of [2.5, 2.51, 2.54, 2.49, NaN, Infinity]) c.add(v);
    const t = tallyOfSlots(grid, slots);
    expect([...t.counts]).toEqual([1, 1, 0, 0]);
    expect([t.under, t.over]).toEqual([1, 1]);
  });
});

describe("a plan's report histograms", () => {
  it("are read off the tallies of the statistics' and the comparison's passes, and equal the values counted one by one", async () => {
    // The report tests' plan on the GDAL-made hills (fixtures/report/hills-plan.yaml).
    const file = await loadPlanFile(path.join(import.meta.dirname, "../../fixtures/report/hills-plan.yaml"));
    const run = await planMission(resolvePlanOptions(file.data, {}, file.dir), { threads: 1 });
    const g = planSummary(run).gsdCm;
    const b = run.baseline;
    // The report's edges (plan/outputs.ts reportInput).
    const edges = gsdBinEdges(g.low, g.high, Math.min(g.min, b.stats.gsdCm.min), Math.max(g.max, b.stats.gsdCm.max), REPORT_GSD_BINS);
    const r = run.assessment.rasters;
    const plan = histogramOfTally(run.assessment.stats.gsdTally, edges);
    expect(plan).toBeDefined();
    expect(plan).toEqual(histogram(r.gsdCm, r.inSite, edges));
    expect(plan!.counts.reduce((a, c) => a + c, 0) + plan!.under + plan!.over).toBeGreaterThan(100_000);
    // The comparison's: read off its tally, and equal to the count over its values.
    const baseline = histogramOfTally(b.gsdTally, edges);
    expect(baseline).toBeDefined();
    expect(baseline).toEqual(histogram(b.gsdValuesCm(), null, edges));
    expect(b.gsdHistogram(edges)).toEqual(baseline);
  }, 60_000);
});
