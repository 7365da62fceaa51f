import { describe, it, expect } from "vitest";
import { siteGroundBlocks } from "../../src/assess/coverageKernel.js";
import { RADIX_BINS, float32Keys, orderStatisticsOfRadix, radixBin } from "../../src/assess/quantiles.js";
import { medianOfSiteGround, siteGround } from "../../src/assess/siteGround.js";

/** Straightforward reference: the sorted included values (Array sort, numeric). */
function sortedIncluded(values: Float32Array, keep: (i: number) => boolean): number[] {
  const out: number[] = [];
  for (let i = 0; i < values.length; i++) if (keep(i) && values[i] === values[i]) out.push(values[i]);
  return out.sort((a, b) => a - b);
}

/** Type-7 median of sorted values (Hyndman & Fan 1996, the default of R and NumPy). */
function median(sorted: number[]): number {
  const h = (sorted.length - 1) / 2;
  const lo = Math.floor(h);
  return sorted[lo] + (h - lo) * (sorted[Math.min(sorted.length - 1, lo + 1)] - sorted[lo]);
}

// A hilly grid whose sides are not multiples of the 32-cell block, heights from below sea level
// to some 700 m, nodata in patches, signed zeros (which order apart as float32 keys), and an
// irregular site.
const W = 1001, H = 703;
const heights = new Float32Array(W * H);
const inSite = new Uint8Array(W * H);
let seed = 99;
for (let r = 0; r < H; r++) {
  for (let c = 0; c < W; c++) {
    const i = r * W + c;
    seed = (seed * 1103515245 + 12345) >>> 0;
    heights[i] = -40 + 350 * (1 + Math.sin(c / 90) * Math.cos(r / 70)) + (seed % 1000) / 250;
    if ((r - 300) ** 2 + (c - 600) ** 2 < 40 ** 2) heights[i] = NaN;
    if (r === 500 && c < 200) heights[i] = c % 2 === 0 ? -0 : 0;
    inSite[i] = (c - 500) ** 2 / 480 ** 2 + (r - 350) ** 2 / 330 ** 2 <= 1 && !(c > 800 && r < 100) ? 1 : 0;
  }
}

describe("the site's ground in one pass (constant-altitude comparison)", () => {
  const g = siteGround(heights, inSite, W, H);

  it("gives siteGroundBlocks' minima and a first radix pass of exactly the site's ground", () => {
    const ref = siteGroundBlocks(heights, inSite, W, H);
    expect(g.blocks.bw).toBe(ref.bw);
    expect(g.blocks.bh).toBe(ref.bh);
    expect(g.blocks.globalMin).toBe(ref.globalMin);
    expect(Array.from(g.blocks.mins)).toEqual(Array.from(ref.mins));
    const keys = float32Keys(heights);
    const hist = new Uint32Array(RADIX_BINS);
    let n = 0;
    for (let i = 0; i < heights.length; i++) {
      if (inSite[i] === 0 || heights[i] !== heights[i]) continue;
      hist[radixBin(keys[i])]++;
      n++;
    }
    expect(g.radix.n).toBe(n);
    expect(Array.from(g.radix.hist)).toEqual(Array.from(hist));
  });

  it("its median is the sorted site ground's (type 7)", () => {
    const sorted = sortedIncluded(heights, (i) => inSite[i] !== 0);
    expect(medianOfSiteGround(heights, inSite, g)).toBe(median(sorted));
    expect(medianOfSiteGround(heights, new Uint8Array(W * H), siteGround(heights, new Uint8Array(W * H), W, H))).toBeNaN();
  });

  it("lets the second pass read only the blocks that can hold a wanted bin, with the same order statistics, by a byte or a bit a cell", () => {
    const ranks = (m: number) => [0, Math.floor(m / 20), m >> 1, Math.floor((19 * m) / 20), m - 1];
    const sorted = sortedIncluded(heights, (i) => inSite[i] !== 0);
    expect(orderStatisticsOfRadix(heights, g.radix, ranks, inSite, g.bins).stats).toEqual(ranks(sorted.length).map((r) => sorted[r]));
    // Part of the site as a bit a cell (as the comparison's seen cells): its own first pass, the site's blocks.
    const keys = float32Keys(heights);
    const bits = new Uint8Array((W * H + 7) >> 3);
    const hist = new Uint32Array(RADIX_BINS);
    let n = 0;
    for (let i = 0; i < heights.length; i++) {
      if (inSite[i] === 0 || i % 7 === 0 || heights[i] !== heights[i]) continue;
      bits[i >> 3] |= 1 << (i & 7);
      hist[radixBin(keys[i])]++;
      n++;
    }
    const part = sortedIncluded(heights, (i) => inSite[i] !== 0 && i % 7 !== 0);
    expect(orderStatisticsOfRadix(heights, { hist, n }, ranks, { bits }, g.bins).stats).toEqual(ranks(part.length).map((r) => part[r]));
    // Blocks that understate where their values lie hide some of a wanted bin: the call says so.
    const medianBin = radixBin(float32Keys(Float32Array.of(sorted[sorted.length >> 1]))[0]);
    const wrong = { ...g.bins, binHi: g.bins.binHi.map((hi, b) => (g.bins.binLo[b] <= medianBin && hi >= medianBin ? medianBin - 1 : hi)) };
    expect(() => orderStatisticsOfRadix(heights, g.radix, ranks, inSite, wrong)).toThrow(/does not match/);
  });
});
