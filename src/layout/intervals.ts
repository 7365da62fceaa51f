/**
 * Sets of closed intervals on a line (along-track distances), kept sorted and
 * disjoint. Small hand-written helpers: the sets have a handful of members, so
 * a library would add more than it saves.
 */

/** A closed interval [start, end] with start <= end. */
export type Interval = [number, number];

/**
 * Sorted union of intervals; members closer than `joinGapM` are merged.
 * @example mergeIntervals([[5, 8], [0, 2], [1, 3]]) // [[0, 3], [5, 8]]
 */
export function mergeIntervals(intervals: readonly Interval[], joinGapM = 0): Interval[] {
  const sorted = intervals.filter((iv) => iv[1] >= iv[0]).map((iv): Interval => [iv[0], iv[1]]);
  sorted.sort((p, q) => p[0] - q[0]);
  const out: Interval[] = [];
  for (const iv of sorted) {
    const last = out[out.length - 1];
    if (last && iv[0] <= last[1] + joinGapM) last[1] = Math.max(last[1], iv[1]);
    else out.push(iv);
  }
  return out;
}

/**
 * Each interval grown by `marginM` at both ends, then merged.
 * @example expandIntervals([[0, 10], [14, 20]], 2) // [[-2, 22]]
 */
export function expandIntervals(intervals: readonly Interval[], marginM: number): Interval[] {
  return mergeIntervals(intervals.map((iv): Interval => [iv[0] - marginM, iv[1] + marginM]));
}

/**
 * The parts of `base` not covered by `cut` (sorted, disjoint), dropping
 * slivers shorter than `minLengthM`.
 * @example subtractIntervals([0, 10], [[2, 3], [8, 12]]) // [[0, 2], [3, 8]]
 */
export function subtractIntervals(base: Interval, cut: readonly Interval[], minLengthM = 0): Interval[] {
  const out: Interval[] = [];
  let start = base[0];
  for (const iv of mergeIntervals(cut)) {
    if (iv[1] <= start) continue;
    if (iv[0] >= base[1]) break;
    if (iv[0] - start > minLengthM) out.push([start, iv[0]]);
    start = Math.max(start, iv[1]);
  }
  if (base[1] - start > minLengthM) out.push([start, base[1]]);
  return out;
}
