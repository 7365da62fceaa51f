import type { Histogram } from "./model.js";
import { niceStep } from "./nice.js";

/**
 * Bins across the histogram's whole axis: with the axis spanning three to seven band
 * widths this puts five to ten bins inside the band, enough to see its shape.
 */
export const REPORT_GSD_BINS = 60;

/**
 * Bin edges for a GSD histogram: nice steps covering the band with room either side, about
 * `bins` of them, so the band edges are easy to read against the bars.
 *
 * @example gsdBinEdges(2.4, 2.6, 1.8, 3.4, 30)
 */
export function gsdBinEdges(lowCm: number, highCm: number, minCm: number, maxCm: number, bins = 30): number[] {
  const width = highCm - lowCm;
  // Show at least one band width either side, at most three: beyond that the tail is
  // collected in the under/over counts instead of stretching the axis.
  const lo = Math.max(Math.min(minCm, lowCm - width), lowCm - 3 * width);
  const hi = Math.min(Math.max(maxCm, highCm + width), highCm + 3 * width);
  const step = niceStep(hi - lo, bins);
  const edges: number[] = [];
  for (let v = Math.floor(lo / step) * step; v < hi + step; v += step) edges.push(+v.toPrecision(12));
  return edges;
}

/**
 * Count the in-site, finite values per bin.
 *
 * @example histogram(gsdCm, inSite, [2, 2.5, 3]) // { counts: [..], under, over }
 */
export function histogram(values: ArrayLike<number>, mask: ArrayLike<number> | null, edgesCm: number[]): Histogram {
  const n = edgesCm.length - 1;
  const counts = new Array<number>(Math.max(n, 0)).fill(0);
  let under = 0;
  let over = 0;
  const lo = edgesCm[0];
  const hi = edgesCm[n];
  const step = (hi - lo) / n;
  for (let i = 0; i < values.length; i++) {
    if (mask && !mask[i]) continue;
    const v = values[i];
    if (!Number.isFinite(v)) continue;
    if (v < lo) under++;
    else if (v >= hi) over++;
    else {
      // Uniform edges: index by division, then correct the rare float slip at an edge.
      let b = Math.min(n - 1, Math.floor((v - lo) / step));
      if (v < edgesCm[b]) b--;
      else if (v >= edgesCm[b + 1]) b++;
      counts[b]++;
    }
  }
  return { edgesCm, counts, under, over };
}
