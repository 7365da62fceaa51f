/**
 * Exact quantiles of large float32 samples without sorting them.
 *
 * A sort of 16 million values takes seconds; the quantiles need only a few
 * order statistics. Float32 bit patterns, with the usual sign flip (negative
 * values: all bits inverted; positive: sign bit set), order exactly like the
 * numbers they encode, so two histogram passes over the 16 high and the 16
 * low bits of the key find each wanted rank exactly (radix selection).
 *
 * Quantile definition: linear interpolation between order statistics at
 * h = (n - 1) p, type 7 of Hyndman & Fan, "Sample quantiles in statistical
 * packages", The American Statistician 50 (1996) 361-365 (the default of R
 * and NumPy).
 */

/**
 * Quantiles `ps` (each in [0, 1]) of `values`; NaN entries are ignored. All NaN
 * (or empty) gives NaN for every p. `values` is not modified.
 * @example quantilesFloat32(gsd, [0, 0.05, 0.5, 0.95, 1]) // [min, p5, median, p95, max]
 */
export function quantilesFloat32(values: Float32Array, ps: readonly number[]): number[] {
  const keys = new Uint32Array(values.buffer, values.byteOffset, values.length);
  const hist = new Uint32Array(65536);
  let n = 0;
  for (let i = 0; i < keys.length; i++) {
    const v = values[i];
    if (v !== v) continue;
    hist[sortKey(keys[i]) >>> 16]++;
    n++;
  }
  if (n === 0) return ps.map(() => NaN);
  const ranks: number[] = [];
  for (const p of ps) {
    const h = (n - 1) * p;
    ranks.push(Math.floor(h), Math.min(n - 1, Math.floor(h) + 1));
  }
  // For each wanted rank: its high-16 bin and its rank within the bin, in one walk over the
  // bins with the ranks taken in ascending order.
  const order = ranks.map((_, j) => j).sort((a, b) => ranks[a] - ranks[b]);
  const binOf = new Array<number>(ranks.length);
  const within = new Array<number>(ranks.length);
  {
    let acc = 0;
    let b = 0;
    for (const j of order) {
      while (acc + hist[b] <= ranks[j]) acc += hist[b++];
      binOf[j] = b;
      within[j] = ranks[j] - acc;
    }
  }
  const bins = [...new Set(binOf)];
  const slot = new Int32Array(65536).fill(-1);
  bins.forEach((b, k) => (slot[b] = k));
  const low = new Uint32Array(bins.length * 65536);
  for (let i = 0; i < keys.length; i++) {
    const v = values[i];
    if (v !== v) continue;
    const k = sortKey(keys[i]);
    const s = slot[k >>> 16];
    if (s >= 0) low[s * 65536 + (k & 0xffff)]++;
  }
  const f32 = new Float32Array(1);
  const u32 = new Uint32Array(f32.buffer);
  const orderStat = new Array<number>(ranks.length);
  bins.forEach((bin, s) => {
    const mine = order.filter((j) => binOf[j] === bin).sort((a, b) => within[a] - within[b]);
    let acc = 0;
    let b = 0;
    for (const j of mine) {
      while (acc + low[s * 65536 + b] <= within[j]) acc += low[s * 65536 + b++];
      u32[0] = fromSortKey(((bin << 16) | b) >>> 0);
      orderStat[j] = f32[0];
    }
  });
  return ps.map((p, j) => {
    const h = (n - 1) * p;
    const lo = orderStat[2 * j];
    const hi = orderStat[2 * j + 1];
    return lo + (h - Math.floor(h)) * (hi - lo);
  });
}

function sortKey(u: number): number {
  // Negative: invert all bits; positive: set the sign bit (branch-free: the arithmetic
  // shift spreads the sign bit over the whole mask).
  return (u ^ ((u >> 31) | 0x80000000)) >>> 0;
}

function fromSortKey(k: number): number {
  return (k & 0x80000000 ? k & 0x7fffffff : ~k) >>> 0;
}

/**
 * Minimum and median (type 7, as above) of small non-negative integers, by counting.
 * Only entries with `include[i] === 1` count. Empty gives NaN.
 * @example countStats(images, inSiteWithData) // { min: 4, median: 9 }
 */
export function countStats(values: Uint16Array, include: Uint8Array): { min: number; median: number } {
  const hist = new Float64Array(65536);
  for (let i = 0; i < values.length; i++) if (include[i] === 1) hist[values[i]]++;
  return countStatsOfHistogram(hist);
}

/**
 * countStats from the counts themselves: hist[v] = how many entries equal v.
 * @example countStatsOfHistogram(Float64Array.of(0, 2, 1)) // { min: 1, median: 1 }
 */
export function countStatsOfHistogram(hist: Float64Array): { min: number; median: number } {
  let n = 0;
  for (let v = 0; v < hist.length; v++) n += hist[v];
  if (n === 0) return { min: NaN, median: NaN };
  const at = (r: number): number => {
    let acc = 0;
    let b = 0;
    while (acc + hist[b] <= r) acc += hist[b++];
    return b;
  };
  let min = 0;
  while (hist[min] === 0) min++;
  const h = (n - 1) / 2;
  const lo = at(Math.floor(h));
  const hi = at(Math.min(n - 1, Math.floor(h) + 1));
  return { min, median: lo + (h - Math.floor(h)) * (hi - lo) };
}
