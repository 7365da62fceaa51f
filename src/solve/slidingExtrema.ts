/**
 * Max and min over a window of items that only moves forward, in amortised
 * O(1) per item: two monotone deques of item indices (the sliding window
 * extremum; D. Lemire, "Streaming maximum-minimum filter using no more than
 * three comparisons per element", 2006, from memory). Items carry their own
 * max and min (a cell: both its height; a column of cells: its max and min).
 * @example
 * const w = new SlidingExtrema(maxOf, minOf); w.push(0); w.push(1); w.evictBelow(1); w.max() // maxOf[1]
 */
export class SlidingExtrema {
  private readonly dqMax: Int32Array;
  private readonly dqMin: Int32Array;
  private hMax = 0;
  private tMax = 0;
  private hMin = 0;
  private tMin = 0;

  constructor(
    private readonly maxOf: Float64Array,
    private readonly minOf: Float64Array,
  ) {
    this.dqMax = new Int32Array(maxOf.length);
    this.dqMin = new Int32Array(minOf.length);
  }

  /** Adds item j (items are pushed in increasing index order). */
  push(j: number): void {
    const zx = this.maxOf[j];
    const zn = this.minOf[j];
    while (this.tMax > this.hMax && this.maxOf[this.dqMax[this.tMax - 1]] <= zx) this.tMax--;
    this.dqMax[this.tMax++] = j;
    while (this.tMin > this.hMin && this.minOf[this.dqMin[this.tMin - 1]] >= zn) this.tMin--;
    this.dqMin[this.tMin++] = j;
  }

  /** Drops the items with index below `lo` (the window's start only moves forward). */
  evictBelow(lo: number): void {
    while (this.hMax < this.tMax && this.dqMax[this.hMax] < lo) this.hMax++;
    while (this.hMin < this.tMin && this.dqMin[this.hMin] < lo) this.hMin++;
  }

  /** Max of the items in the window, -Infinity when it holds none. */
  max(): number {
    return this.hMax < this.tMax ? this.maxOf[this.dqMax[this.hMax]] : -Infinity;
  }

  /** Min of the items in the window, Infinity when it holds none. */
  min(): number {
    return this.hMin < this.tMin ? this.minOf[this.dqMin[this.hMin]] : Infinity;
  }
}
