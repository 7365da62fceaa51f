import { describe, it, expect } from "vitest";
import { gsdBinEdges, histogram, histogramCounter } from "../../src/report/histogram.js";
import { seededRandom } from "../geo/projCli.js";

/** A seeded generator (mulberry32), so a failure can be replayed. */
const rng = seededRandom;

/**
 * The definition itself: a value counts in bin i when edges[i] <= v < edges[i + 1], under
 * below the first edge, over at or above the last; NaN, the infinities and masked-out
 * cells are not counted. Found by scanning the edges, no arithmetic on the bin width.
 */
function byDefinition(values: ArrayLike<number>, mask: ArrayLike<number> | null, edges: number[]) {
  const counts = new Array<number>(edges.length - 1).fill(0);
  let under = 0, over = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if ((mask && !mask[i]) || !Number.isFinite(v)) continue;
    if (v < edges[0]) under++;
    else if (v >= edges[edges.length - 1]) over++;
    else {
      let b = 0;
      while (!(v < edges[b + 1])) b++;
      counts[b]++;
    }
  }
  return { edgesCm: edges, counts, under, over };
}

describe("histogram counts by the bin definition", () => {
  const edges = gsdBinEdges(2.25, 2.75, 0.5, 3.9, 60);
  const r = rng(7);
  const n = 20000;
  const values = new Float32Array(n);
  for (let i = 0; i < n; i++) values[i] = 0.3 + r() * 3.8;
  // Values on the edges themselves (as Float32, the rasters' type) and beyond both ends.
  for (let k = 0; k < edges.length; k++) values[k] = edges[k];
  values.set([NaN, Infinity, -Infinity, edges[0] - 1e-3, edges.at(-1)! + 1e-3], 100);
  const mask = new Uint8Array(n);
  for (let i = 0; i < n; i++) mask[i] = r() < 0.7 ? 1 : 0;

  it("Float32 values with a Uint8 mask and without one (the typed loop)", () => {
    const a = histogram(values, mask, edges);
    expect(a).toEqual(byDefinition(values, mask, edges));
    const b = histogram(values, null, edges);
    expect(b).toEqual(byDefinition(values, null, edges));
    expect(b.under).toBeGreaterThan(0);
    expect(b.over).toBeGreaterThan(0);
    expect(b.counts.reduce((s, c) => s + c, 0) + b.under + b.over).toBe(n - 3);
  });

  it("values added in chunks (histogramCounter) count as one call over all of them", () => {
    const c = histogramCounter(edges);
    for (let at = 0; at < n; at += 777) c.add(values.subarray(at, at + 777), mask.subarray(at, at + 777));
    expect(c.result()).toEqual(byDefinition(values, mask, edges));
  });

  it("plain arrays (the general loop) count the same", () => {
    expect(histogram(Array.from(values), Array.from(mask), edges)).toEqual(byDefinition(values, mask, edges));
    expect(histogram(Float64Array.from(values), null, edges)).toEqual(byDefinition(values, null, edges));
  });
});
