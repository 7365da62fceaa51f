import { describe, it, expect } from "vitest";
import { assessmentStats } from "../../src/assess/stats.js";
import { ASSESSMENT_FLAG_KINDS, FLAG_COARSE, FLAG_FEW_IMAGES, FLAG_FINE, FLAG_NODATA, FLAG_RELIEF } from "../../src/assess/flags.js";
import { tallyEdges } from "../../src/assess/gsdTally.js";

/*
 * The assessment's statistics against a count made here cell by cell from the same rasters:
 * every figure (site cells, flags by kind, the within-band share, image counts, GSD quantiles,
 * per strip too, the cells at or above a GSD, the GSD tally). The rasters are random but made
 * of runs, as real ones are (neighbouring cells share a strip, flags and near GSD), with
 * single odd cells among them, nodata and cells outside the site.
 */

/** Type-7 quantile of sorted values (Hyndman & Fan 1996, the default of R and NumPy). */
function q7(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN;
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  return sorted[lo] + (h - lo) * (sorted[Math.min(sorted.length - 1, lo + 1)] - sorted[lo]);
}
const gsdOf = (values: number[]) => {
  const s = values.slice().sort((a, b) => a - b);
  return { min: q7(s, 0), p5: q7(s, 0.05), median: q7(s, 0.5), p95: q7(s, 0.95), max: q7(s, 1) };
};

function rasters(W: number, H: number, seed: number) {
  let x = seed;
  const rnd = () => ((x = (x * 1103515245 + 12345) % 2147483648) / 2147483648);
  const n = W * H;
  const gsdCm = new Float32Array(n), images = new Uint16Array(n), flags = new Uint16Array(n), inSite = new Uint8Array(n), ground = new Float32Array(n);
  const nadirStrip = new Uint8Array(n);
  let f = 0, c = 5;
  for (let r = 0; r < H; r++) {
    for (let col = 0; col < W; col++) {
      const i = r * W + col;
      inSite[i] = (col - W / 2) ** 2 / (W / 2.1) ** 2 + (r - H / 2) ** 2 / (H / 2.1) ** 2 <= 1 ? 1 : 0;
      ground[i] = rnd() < 0.01 ? NaN : 200 + r / 7;
      // Runs of one flag value and one image count, changing now and then.
      if (rnd() < 0.05) f = [0, 0, FLAG_COARSE, FLAG_FINE, FLAG_FEW_IMAGES | FLAG_FINE, FLAG_RELIEF, FLAG_NODATA, FLAG_COARSE | FLAG_RELIEF][Math.floor(rnd() * 8)];
      if (rnd() < 0.08) c = Math.floor(rnd() * 14);
      flags[i] = rnd() < 0.02 ? FLAG_COARSE : f;
      images[i] = c;
      nadirStrip[i] = c === 0 ? 0 : 1 + Math.floor(r / 23) + (rnd() < 0.01 ? 1 : 0);
      gsdCm[i] = c === 0 ? NaN : 2.5 + 0.4 * Math.sin(col / 40) + (r % 23) / 100 + (rnd() < 0.05 ? rnd() : 0);
    }
  }
  return { gsdCm, images, flags, inSite, ground, nadirStrip };
}

describe("the assessment's statistics against a count cell by cell", () => {
  // The last, small, case is one run of a few thousand cells: a run left uncounted loses it all.
  // Spans: [2.2, 3.2] cm leaves the odd high cells' GSD above it (the strips' maxima then made
  // afterwards); [1, 8] cm holds every strip's values (their quantiles from the pass's bins).
  // Each case with the cells counted in JavaScript and in WebAssembly (statsCells.as.ts, where built).
  for (const [W, H, span] of [[700, 300, [2.2, 3.2]], [700, 300, [1, 8]], [513, 257, null], [61, 40, [2.2, 3.2]]] as const) for (const cellsIn of ["js", "wasm"] as const) {
    it(`${W} x ${H} cells, strips' first pass ${span ? `counted in the pass over ${span[0]} .. ${span[1]} cm` : "made afterwards"}, counted in ${cellsIn}`, () => {
      const r = rasters(W, H, W + H);
      if (W < 100) {
        // One strip, one image count, one flag value and near GSD over the whole site.
        r.nadirStrip.fill(3);
        r.images.fill(9);
        r.flags.fill(FLAG_FINE);
        r.ground.fill(250);
        for (let i = 0; i < r.gsdCm.length; i++) r.gsdCm[i] = 2.5 + (i % 61) / 1000;
      }
      const tallyGrid = { first: 180, stepCm: 0.01, bins: 150 };
      const stats = assessmentStats({ ...r, cellAreaM2: 0.25, threads: 1, cellsIn, gsdAtLeastCm: 2.75, gsdTally: tallyGrid, ...(span ? { stripSpanCm: [span[0], span[1]] as [number, number] } : {}) });
      const n = W * H;
      const site: number[] = [];
      for (let i = 0; i < n; i++) if (r.inSite[i]) site.push(i);
      expect(stats.siteCells).toBe(site.length);
      const seen = site.filter((i) => r.gsdCm[i] === r.gsdCm[i]);
      const inBand = (i: number) => r.gsdCm[i] === r.gsdCm[i] && (r.flags[i] & (FLAG_COARSE | FLAG_FINE)) === 0;
      expect(stats.withinBandPct).toBeCloseTo((100 * site.filter(inBand).length) / site.length, 10);
      const counts = site.filter((i) => r.ground[i] === r.ground[i]).map((i) => r.images[i]).sort((a, b) => a - b);
      expect(stats.images).toEqual({ min: counts[0], median: q7(counts, 0.5) });
      expect(stats.flagged.cells).toBe(site.filter((i) => r.flags[i] !== 0).length);
      expect(stats.flagged.effectCells).toBe(site.filter((i) => r.flags[i] & (FLAG_COARSE | FLAG_FINE | FLAG_FEW_IMAGES)).length);
      for (const k of ASSESSMENT_FLAG_KINDS) expect(stats.flagged.byKind[k.key].cells, k.key).toBe(site.filter((i) => r.flags[i] & k.bit).length);
      expect(stats.gsdCm).toEqual(gsdOf(seen.map((i) => r.gsdCm[i])));
      expect(stats.gsdAtLeast).toEqual({ cm: 2.75, cells: seen.filter((i) => r.gsdCm[i] >= 2.75).length });
      // The tally: bin j holds edges[j] <= v < edges[j + 1].
      const e = tallyEdges(tallyGrid);
      const bins = new Float64Array(tallyGrid.bins);
      let under = 0, over = 0;
      for (const i of seen) {
        const v = r.gsdCm[i];
        if (v < e[0]) under++;
        else if (v >= e[tallyGrid.bins]) over++;
        else {
          let j = 0;
          while (!(v < e[j + 1])) j++;
          bins[j]++;
        }
      }
      expect(stats.gsdTally!.under).toBe(under);
      expect(stats.gsdTally!.over).toBe(over);
      expect(Array.from(stats.gsdTally!.counts)).toEqual(Array.from(bins));
      // Each strip from its own cells.
      const strips = new Set(site.map((i) => r.nadirStrip[i]).filter((s) => s > 0));
      expect(stats.perStrip.map((p) => p.strip)).toEqual([...strips].sort((a, b) => a - b));
      for (const p of stats.perStrip) {
        const own = site.filter((i) => r.nadirStrip[i] === p.strip);
        expect(p.cells).toBe(own.length);
        expect(p.withinBandPct).toBeCloseTo((100 * own.filter(inBand).length) / own.length, 10);
        expect(p.gsdCm).toEqual(gsdOf(own.filter((i) => r.gsdCm[i] === r.gsdCm[i]).map((i) => r.gsdCm[i])));
        for (const k of ASSESSMENT_FLAG_KINDS) expect(p.flagged![k.key].cells, `${p.strip} ${k.key}`).toBe(own.filter((i) => r.flags[i] & k.bit).length);
      }
      expect(stats.perStrip.length).toBeGreaterThan(W > 100 ? 8 : 0);
    });
  }
});
