import { BLOCK, type BlockMinima } from "./coverageKernel.js";
import { RADIX_BINS, float32Keys, interpolate, orderStatisticsOfRadix, radixBin, ranksOf, type BinBlocks, type RadixHistogram } from "./quantiles.js";
import { zeroFilled } from "../zeroFill.js";

/**
 * The site's ground in one pass, for the constant-altitude comparison (plan/baseline.ts):
 * the lowest ground of each BLOCK x BLOCK cells (siteGroundBlocks' minima, which bound the
 * photo lattices' reach), the first radix pass of the site's ground (for its median, the
 * comparison's altitude) and each block's range of radix bins (BinBlocks: the quantiles'
 * second passes then read only the blocks that can hold a wanted bin). Where the median took
 * two passes over the whole window of its own and the minima a third, this is one.
 */
export interface SiteGround {
  blocks: BlockMinima;
  radix: RadixHistogram;
  bins: BinBlocks;
}

/**
 * The summary of the site's ground: cells where `inSite` is not 0 and the height is a number.
 * @example const g = siteGround(grid.heights, inSite, grid.width, grid.height); medianOfSiteGround(grid.heights, inSite, g)
 */
export function siteGround(heights: Float32Array, inSite: Uint8Array, width: number, height: number): SiteGround {
  const bw = Math.ceil(width / BLOCK);
  const bh = Math.ceil(height / BLOCK);
  const mins = new Float64Array(bw * bh).fill(Infinity);
  const binLo = new Int32Array(bw * bh).fill(RADIX_BINS);
  const binHi = new Int32Array(bw * bh).fill(-1);
  const hist = zeroFilled(new Uint32Array(RADIX_BINS));
  const keys = float32Keys(heights);
  let n = 0;
  // Neighbouring cells mostly share a bin: the histogram is added to a run of one bin at a
  // time, not cell by cell (each increment of the same entry waits on the one before).
  let runBin = 0;
  let run = 0;
  // Block by block along each row, the block's running figures in locals.
  for (let r = 0; r < height; r++) {
    const brow = ((r / BLOCK) | 0) * bw;
    const base = r * width;
    for (let b = 0; b < bw; b++) {
      let m = mins[brow + b];
      let lo = binLo[brow + b];
      let hi = binHi[brow + b];
      const end = base + Math.min(width, (b + 1) * BLOCK);
      for (let i = base + b * BLOCK; i < end; i++) {
        if (inSite[i] === 0) continue;
        const g = heights[i];
        // No data: not ground.
        if (g !== g) continue;
        const k = radixBin(keys[i]);
        if (k === runBin) run++;
        else {
          hist[runBin] += run;
          n += run;
          runBin = k;
          run = 1;
        }
        if (g < m) m = g;
        if (k < lo) lo = k;
        if (k > hi) hi = k;
      }
      mins[brow + b] = m;
      binLo[brow + b] = lo;
      binHi[brow + b] = hi;
    }
  }
  hist[runBin] += run;
  n += run;
  let globalMin = Infinity;
  for (let b = 0; b < mins.length; b++) if (mins[b] < globalMin) globalMin = mins[b];
  return {
    blocks: { mins, bw, bh, globalMin },
    radix: { hist, n },
    bins: { width, height, size: BLOCK, bw, binLo, binHi },
  };
}

/**
 * The median (type 7, as quantilesFloat32 gives it) of the site's ground from its summary;
 * NaN without site ground.
 * @example medianOfSiteGround(grid.heights, inSite, siteGround(grid.heights, inSite, w, h))
 */
export function medianOfSiteGround(heights: Float32Array, inSite: Uint8Array, g: SiteGround): number {
  const { n } = g.radix;
  if (n === 0) return NaN;
  const ps = [0.5];
  return interpolate(n, ps, orderStatisticsOfRadix(heights, g.radix, (m) => ranksOf(m, ps), inSite, g.bins).stats)[0];
}
