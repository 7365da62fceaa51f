/**
 * GSD values (cm/px) counted on a grid of equal decimal steps, as one more tally in a pass
 * over the cells that has other work to do (the statistics' pass, the comparison's pass). A
 * histogram whose edges all lie on that grid is then read off the tally
 * (report/histogram.ts histogramOfTally) instead of another pass over tens of millions of
 * cells: the report's histogram edges depend on figures known only after those passes (the
 * plan's and the comparison's extremes), but always fall on such a grid.
 *
 * Counting is report/histogram.ts histogramCounter's (both bin through binCounter below), the
 * edges being the decimal numbers (first + j) x step rounded to 12 significant digits as the
 * report's edges are.
 */

export interface GsdTallyGrid {
  /** The first edge as a whole number of steps. */
  first: number;
  /** The step, cm/px. */
  stepCm: number;
  /** Number of bins (edges: bins + 1). */
  bins: number;
}

export interface GsdTally {
  grid: GsdTallyGrid;
  /** Values in each bin. */
  counts: Float64Array;
  /** Values below the first edge, and at or above the last. */
  under: number;
  over: number;
}

/**
 * The grid's edges, cm/px.
 * @example tallyEdges({ first: 180, stepCm: 0.01, bins: 3 }) // Float64Array [1.8, 1.81, 1.82, 1.83]
 */
export function tallyEdges(g: GsdTallyGrid): Float64Array {
  const e = new Float64Array(g.bins + 1);
  for (let j = 0; j <= g.bins; j++) e[j] = tallyEdge(g, j);
  return e;
}

/** Edge j of the grid: (first + j) steps, rounded as the report rounds its edges. */
export function tallyEdge(g: GsdTallyGrid, j: number): number {
  return +((g.first + j) * g.stepCm).toPrecision(12);
}

/**
 * Counts into `slots`, a Float64Array of at least bins + 2 entries from `at`: [under, bin 0,
 * ..., bin bins-1, over]. Made once per pass, so a pass over the cells calls add(v) per value
 * (a few comparisons and one multiplication); `edges`: the grid's (tallyEdges), when made already.
 * @example const t = tallyCounter(grid, new Float64Array(grid.bins + 2), 0); t.add(2.51); tallyOfSlots(grid, slots, 0)
 */
export function tallyCounter(g: GsdTallyGrid, slots: Float64Array, at: number, edges: Float64Array = tallyEdges(g)): BinCounter {
  return binCounter(edges, slots, at);
}

/**
 * Counts values on equal-width `edges` into `slots` from `at`: [under, bin 0, ..., over], one
 * bin fewer than edges (none for fewer than two). The one way a value is binned, for the tally
 * and for report/histogram.ts histogramCounter alike: NaN is skipped, a value below the first
 * edge (above -Infinity) is under, one at or above the last (below Infinity) over, bin j holds
 * edges[j] <= v < edges[j + 1].
 * @example const slots = new Float64Array(4); binCounter(Float64Array.of(2, 2.5, 3), slots, 0).add(2.7) // slots [0, 0, 1, 0]
 */
export function binCounter(edges: Float64Array, slots: Float64Array, at: number): BinCounter {
  return new BinCounter(edges, slots, at);
}

/**
 * binCounter's counter. A class, so every counter's `add` is one function: the passes over
 * the cells make a counter per band of rows, and a closure made per counter was another call
 * target each time, which sent the pass's compiled code back to the interpreter at every new
 * band (node --trace-deopt: "wrong call target").
 */
export class BinCounter {
  private readonly lo: number;
  private readonly hi: number;
  private readonly inv: number;
  private readonly last: number;
  private readonly base: number;
  private readonly overAt: number;
  constructor(
    private readonly edges: Float64Array,
    private readonly slots: Float64Array,
    private readonly at: number,
  ) {
    const n = edges.length - 1;
    this.lo = edges[0];
    this.hi = edges[n];
    // Multiplying by the inverse step may slip a bin where dividing would not: the edge
    // check in add corrects either.
    this.inv = n / (this.hi - this.lo);
    this.last = n - 1;
    this.base = at + 1;
    this.overAt = this.base + Math.max(n, 0);
  }

  add(v: number): void {
    const k = this.slotOf(v);
    if (k >= 0) this.slots[k]++;
  }

  /** The entry of `slots` that counts v, or -1 for a value not counted (NaN, the infinities); larger values never get a smaller entry. */
  slotOf(v: number): number {
    const { lo, hi, edges } = this;
    // NaN fails every comparison and is skipped, as are the infinities.
    if (v < lo) return v > -Infinity ? this.at : -1;
    if (v < hi) {
      // Index by multiplication, then correct the slip of one at an edge.
      let b = ((v - lo) * this.inv) | 0;
      if (b > this.last) b = this.last;
      if (v < edges[b]) b--;
      else if (v >= edges[b + 1]) b++;
      return this.base + b;
    }
    return v < Infinity ? this.overAt : -1;
  }
}

/**
 * The tally held in `slots` at `at` (the layout tallyCounter counts into), summed over
 * `copies` such blocks of bins + 2 entries one after another (one per thread).
 * @example tallyOfSlots(grid, slots, 2)
 */
export function tallyOfSlots(g: GsdTallyGrid, slots: Float64Array, copies = 1): GsdTally {
  const w = g.bins + 2;
  const sum = new Float64Array(w);
  for (let c = 0; c < copies; c++) for (let k = 0; k < w; k++) sum[k] += slots[c * w + k];
  return { grid: g, counts: sum.slice(1, w - 1), under: sum[0], over: sum[w - 1] };
}
