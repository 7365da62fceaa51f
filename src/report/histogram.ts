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
 * Float32 values with a Uint8 mask (or none), the rasters' own types, take a typed loop
 * of their own: a loop over ArrayLike sees several array kinds and runs far slower on the
 * 20-80 M cells of a full-resolution raster. Both loops count alike.
 *
 * @example histogram(gsdCm, inSite, [2, 2.5, 3]) // { counts: [..], under, over }
 */
export function histogram(values: ArrayLike<number>, mask: ArrayLike<number> | null, edgesCm: number[]): Histogram {
  if (values instanceof Float32Array && (mask === null || mask instanceof Uint8Array)) return histogramFloat32(values, mask, edgesCm);
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

/** The typed loop of `histogram`: same bins, same counts. */
function histogramFloat32(values: Float32Array, mask: Uint8Array | null, edgesCm: number[]): Histogram {
  const counter = histogramCounter(edgesCm);
  counter.add(values, mask);
  return counter.result();
}

/**
 * `histogram` of float32 values that come in chunks (values made on the fly, never held
 * all at once): add each chunk, then read the result. The same bins and counts as one
 * `histogram` call over all the chunks end to end.
 * @example const c = histogramCounter([2, 2.5, 3]); c.add(chunk, null); c.result().counts
 */
export function histogramCounter(edgesCm: number[]): { add: (values: Float32Array, mask: Uint8Array | null) => void; result: () => Histogram } {
  const n = edgesCm.length - 1;
  const nb = Math.max(n, 0);
  const edges = Float64Array.from(edgesCm);
  // One spare slot either end: a bin index slipped by one at the axis ends lands there
  // before the correction moves it back.
  const bins = new Float64Array(nb + 2);
  const lo = edges[0];
  const hi = edges[n];
  // Multiplying by the inverse step may slip a bin where dividing would not: the edge
  // check below corrects either, so the counts are the same.
  const inv = n / (hi - lo);
  const last = n - 1;
  let under = 0;
  let over = 0;
  const add = (values: Float32Array, mask: Uint8Array | null): void => {
    const len = values.length;
    // Local tallies in the loop (closure variables would be written back every cell).
    let u = 0;
    let o = 0;
    for (let i = 0; i < len; i++) {
      if (mask !== null && mask[i] === 0) continue;
      const v = values[i];
      // NaN fails every comparison below and is skipped, as are the infinities.
      if (v < lo) {
        if (v > -Infinity) u++;
      } else if (v < hi) {
        let b = ((v - lo) * inv) | 0;
        if (b > last) b = last;
        if (v < edges[b]) b--;
        else if (v >= edges[b + 1]) b++;
        bins[b + 1]++;
      } else if (v < Infinity) o++;
    }
    under += u;
    over += o;
  };
  const result = (): Histogram => {
    const counts = new Array<number>(nb);
    for (let b = 0; b < nb; b++) counts[b] = bins[b + 1];
    return { edgesCm, counts, under, over };
  };
  return { add, result };
}
