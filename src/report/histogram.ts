import type { Histogram } from "./model.js";
import { niceStep } from "./nice.js";
import { binCounter, tallyEdge, type GsdTally, type GsdTallyGrid } from "../assess/gsdTally.js";

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
  const nb = Math.max(edgesCm.length - 1, 0);
  // [under, bins..., over] (assess/gsdTally.ts binCounter: the tallies bin the same way).
  const slots = new Float64Array(nb + 2);
  const counter = binCounter(Float64Array.from(edgesCm), slots, 0);
  const add = (values: Float32Array, mask: Uint8Array | null): void => {
    const len = values.length;
    for (let i = 0; i < len; i++) if (mask === null || mask[i] !== 0) counter.add(values[i]);
  };
  const result = (): Histogram => {
    const counts = new Array<number>(nb);
    for (let b = 0; b < nb; b++) counts[b] = slots[b + 1];
    return { edgesCm, counts, under: slots[0], over: slots[nb + 1] };
  };
  return { add, result };
}

/**
 * A tally grid (assess/gsdTally.ts) on which every gsdBinEdges(lowCm, highCm, min, max, bins)
 * falls, whatever the extremes: the axis spans 3 to 7 band widths, so its step is a nice step
 * between niceStep(3 w) and niceStep(7 w), every one of them a whole number of the grid's step
 * (a power of ten not above the smallest; a band width read 1 % narrower, so the rounding of
 * the summary's band edges cannot put the step under it), and its edges lie within 3 band
 * widths and a step of the band. Undefined for an empty band (the axis is then not of that form).
 * @example gsdTallyGrid(2.25, 2.75) // { first: 160, stepCm: 0.01, bins: ... }
 */
export function gsdTallyGrid(lowCm: number, highCm: number, bins = REPORT_GSD_BINS): GsdTallyGrid | undefined {
  const w = highCm - lowCm;
  if (!(w > 0) || !Number.isFinite(w)) return undefined;
  const stepCm = +Math.pow(10, Math.floor(Math.log10(niceStep(3 * w * 0.99, bins)))).toPrecision(1);
  const stepMax = niceStep(7 * w * 1.01, bins);
  const first = Math.floor((lowCm - 3 * w - 2 * stepMax) / stepCm);
  const end = Math.ceil((highCm + 3 * w + 3 * stepMax) / stepCm);
  return { first, stepCm, bins: end - first };
}

/**
 * The histogram over `edgesCm` read off a tally: the same counts as `histogram` over the
 * tallied values, when every edge is one of the tally's edges; undefined otherwise (count the
 * values themselves then).
 * @example histogramOfTally(run.assessment.gsdTally, edges) ?? histogram(gsdCm, inSite, edges)
 */
export function histogramOfTally(tally: GsdTally | undefined, edgesCm: number[]): Histogram | undefined {
  if (!tally || edgesCm.length < 2) return undefined;
  const g = tally.grid;
  // Each edge's place on the grid, which must hold exactly that number.
  const at: number[] = [];
  for (const e of edgesCm) {
    const j = Math.round(e / g.stepCm) - g.first;
    if (!(j >= 0 && j <= g.bins) || tallyEdge(g, j) !== e) return undefined;
    if (at.length && j <= at[at.length - 1]) return undefined;
    at.push(j);
  }
  const c = tally.counts;
  const sum = (j0: number, j1: number) => {
    let s = 0;
    for (let j = j0; j < j1; j++) s += c[j];
    return s;
  };
  const counts: number[] = [];
  for (let k = 0; k + 1 < at.length; k++) counts.push(sum(at[k], at[k + 1]));
  return { edgesCm, counts, under: tally.under + sum(0, at[0]), over: tally.over + sum(at[at.length - 1], g.bins) };
}
