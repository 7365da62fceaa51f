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
import { zeroFilled } from "../zeroFill.js";
import { gatherCells as gatherKernel } from "./gatherCellsWasm.js";

/**
 * Quantiles `ps` (each in [0, 1]) of `values`; NaN entries are ignored, and so are
 * entries where `mask` (when given) is 0. None left gives NaN for every p. `values`
 * is not modified.
 * @example quantilesFloat32(gsd, [0, 0.05, 0.5, 0.95, 1]) // [min, p5, median, p95, max]
 */
export function quantilesFloat32(values: Float32Array, ps: readonly number[], mask?: CellMask): number[] {
  const { n, stats } = orderStatistics(values, (count) => ranksOf(count, ps), mask);
  if (n === 0) return ps.map(() => NaN);
  return interpolate(n, ps, stats);
}

/** Cells to include: non-zero entries (a site mask, or counts where > 0 means seen). */
export type CellMask = Uint8Array | Uint16Array;

/** Cells to include as a bit each: cell i is bit (i & 7) of bits[i >> 3] (a set of cells kept in 1/8 of a byte mask). */
export interface CellBits {
  bits: Uint8Array;
}

/**
 * Order statistics (0-based ranks, smallest first) of the included values: `ranksFor`
 * gets their number and gives the ranks wanted. Ranks must lie in [0, n).
 * @example orderStatistics(heights, (n) => [n >> 1], inSite).stats[0] // a median
 */
export function orderStatistics(values: Float32Array, ranksFor: (n: number) => number[], mask?: CellMask): { n: number; stats: number[] } {
  // Below this many values the radix table (65,536 bins) costs more than selecting on a copy.
  if (values.length <= SELECT_BELOW) return statsBySelection(values, ranksFor, mask);
  const keys = float32Keys(values);
  const hist = zeroFilled(new Uint32Array(RADIX_BINS));
  let n = 0;
  for (let i = 0; i < keys.length; i++) {
    const v = values[i];
    if (v !== v || (mask !== undefined && mask[i] === 0)) continue;
    hist[radixBin(keys[i])]++;
    n++;
  }
  return orderStatisticsOfRadix(values, { hist, n }, ranksFor, mask);
}

/** Bins of the first radix pass (the 16 high bits of a float32's sort key). */
export const RADIX_BINS = 65536;

/**
 * The first radix pass made elsewhere, in a loop over the cells that had other work to do:
 * hist[radixBin(key)] counted for each of the n included values.
 */
export interface RadixHistogram {
  hist: Uint32Array;
  n: number;
}

/** The raw bits of each float32 (no copy), for radixBin. */
export function float32Keys(values: Float32Array): Uint32Array {
  return new Uint32Array(values.buffer, values.byteOffset, values.length);
}

/** The first-pass bin of a number as a float32 (radixBin of its bits). */
export function radixBinOfValue(v: number): number {
  return binOfValue(v, RADIX_SHIFT);
}

/** The first-pass bin of a float32's raw bits: bins order like the values (NaN excluded by the caller). */
export function radixBin(bits: number): number {
  return float32SortKey(bits) >>> RADIX_SHIFT;
}

/** Low bits of the sort key radixBin drops: its bins are 1/128 of a doubling (7 bits of the fraction kept). */
export const RADIX_SHIFT = 16;

/**
 * A float32's sort key (its raw bits with the sign flip above): keys order like the values,
 * and key >>> shift is a bin of 2^(23 - shift) a doubling (radixBin: shift 16).
 * @example float32SortKey(bits) >>> 13 // a bin of 1/1024 of a doubling
 */
export function float32SortKey(u: number): number {
  // Negative: invert all bits; positive: set the sign bit (branch-free: the arithmetic
  // shift spreads the sign bit over the whole mask).
  return (u ^ ((u >> 31) | 0x80000000)) >>> 0;
}

/**
 * The float32 whose sort key is `key` (float32SortKey undone): keys with the top bit set are
 * the positive numbers', the others the negative numbers' with every bit inverted.
 * @example float32OfSortKey(float32SortKey(float32Keys(Float32Array.of(2.5))[0])) // 2.5
 */
export function float32OfSortKey(key: number): number {
  const bits = key >= 0x80000000 ? key - 0x80000000 : ~key >>> 0;
  return new Float32Array(Uint32Array.of(bits).buffer)[0];
}

/** The bin (sort key >>> shift) of a number as a float32. */
export function binOfValue(v: number, shift: number): number {
  return float32SortKey(float32Keys(new Float32Array([v]))[0]) >>> shift;
}

/**
 * orderStatistics from its first pass made by the caller (`radix`: counts of exactly the
 * values `mask` and NaN leave in; `mask` a byte or count per cell, or a bit per cell): the
 * second pass gathers the wanted bins' values and selects within them (with `blocks`, from
 * the blocks that can hold them only). The same statistics as orderStatistics.
 * @example orderStatisticsOfRadix(v, { hist, n }, (m) => [m >> 1])
 */
export function orderStatisticsOfRadix(values: Float32Array, radix: RadixHistogram, ranksFor: (n: number) => number[], mask?: CellMask | CellBits, blocks?: BinBlocks): { n: number; stats: number[] } {
  const { hist, n } = radix;
  if (n === 0) return { n, stats: [] };
  const keys = float32Keys(values);
  const { binOf, within } = ranksInBins(hist, 0, ranksFor(n));
  // Second pass: gather the values of those bins only, then select within each bin (a bin
  // holds 1/128 of an octave, a small share of a plan's GSD values).
  const bins = [...new Set(binOf)];
  const slot = new Int32Array(RADIX_BINS).fill(-1);
  const gathered = bins.map((b, k) => {
    slot[b] = k;
    return new Float32Array(hist[b]);
  });
  const fill = new Int32Array(bins.length);
  if (blocks) gatherInBlocks(values, keys, mask, blocks, bins, slot, gathered, fill);
  else if (mask !== undefined && !ArrayBuffer.isView(mask)) gatherSetBits(values, keys, mask.bits, slot, gathered, fill);
  else {
    for (let i = 0; i < keys.length; i++) {
      const v = values[i];
      if (v !== v || (mask !== undefined && mask[i] === 0)) continue;
      const k = slot[radixBin(keys[i])];
      if (k >= 0) gathered[k][fill[k]++] = v;
    }
  }
  // A first pass counted on other cells than `mask` selects would select wrongly: refuse it.
  bins.forEach((b, k) => {
    if (fill[k] !== hist[b]) throw new Error(`radix histogram does not match the values: bin ${b} counted ${hist[b]}, found ${fill[k]}`);
  });
  return { n, stats: selectWithinBins(binOf, within, (bin) => gathered[slot[bin]]) };
}

/**
 * Where the included values of a grid (`width` x `height`, row-major) can lie, block by
 * block: square blocks of `size` cells a side, `bw` to a row of blocks, block b's values all
 * in first-pass bins binLo[b] .. binHi[b] (none when binLo[b] > binHi[b]). Given to
 * orderStatisticsOfRadix, its second pass reads only the blocks that can hold a wanted bin
 * (a bin is 1/128 of an octave: 2 m of ground between 256 and 512 m, so a median's bin lies
 * in the blocks along one contour band of a hilly site, not in all of them).
 */
export interface BinBlocks {
  width: number;
  height: number;
  size: number;
  bw: number;
  binLo: Int32Array;
  binHi: Int32Array;
}

/**
 * orderStatisticsOfRadix's second pass block by block (see BinBlocks), over the blocks whose
 * bins take in one of `wanted`, the cells `mask` (a byte or a bit a cell) includes.
 */
function gatherInBlocks(values: Float32Array, keys: Uint32Array, mask: CellMask | CellBits | undefined, blocks: BinBlocks, wanted: readonly number[], slot: Int32Array, gathered: Float32Array[], fill: Int32Array): void {
  const { width, height, size, bw, binLo, binHi } = blocks;
  const bits = mask !== undefined && !ArrayBuffer.isView(mask) ? mask.bits : undefined;
  const bytes = mask !== undefined && ArrayBuffer.isView(mask) ? mask : undefined;
  for (let b = 0; b < binLo.length; b++) {
    const lo = binLo[b];
    const hi = binHi[b];
    let read = false;
    for (let j = 0; j < wanted.length; j++) if (wanted[j] >= lo && wanted[j] <= hi) read = true;
    if (!read) continue;
    const br = (b / bw) | 0;
    const c0 = (b - br * bw) * size;
    const c1 = Math.min(width, c0 + size);
    const r1 = Math.min(height, br * size + size);
    for (let r = br * size; r < r1; r++) {
      for (let i = r * width + c0; i < r * width + c1; i++) {
        if (bits !== undefined ? (bits[i >> 3] & (1 << (i & 7))) === 0 : bytes !== undefined && bytes[i] === 0) continue;
        const v = values[i];
        if (v !== v) continue;
        const k = slot[radixBin(keys[i])];
        if (k >= 0) gathered[k][fill[k]++] = v;
      }
    }
  }
}

/** orderStatisticsOfRadix's second pass over the cells whose bit is set, a byte (8 cells) at a time. */
function gatherSetBits(values: Float32Array, keys: Uint32Array, bits: Uint8Array, slot: Int32Array, gathered: Float32Array[], fill: Int32Array): void {
  const n = values.length;
  for (let byte = 0; byte < bits.length; byte++) {
    const set = bits[byte];
    if (set === 0) continue;
    for (let j = 0, i = byte << 3; j < 8 && i < n; j++, i++) {
      if ((set & (1 << j)) === 0) continue;
      const v = values[i];
      if (v !== v) continue;
      const k = slot[radixBin(keys[i])];
      if (k >= 0) gathered[k][fill[k]++] = v;
    }
  }
}

/**
 * Where each wanted rank of a first pass's counts hist[from ..] lies: its bin (counted from
 * `from`) and its rank within that bin, in one walk over the bins with the ranks taken in
 * ascending order. Ranks must lie in [0, n), n the counts' sum.
 */
function ranksInBins(hist: ArrayLike<number>, from: number, ranks: readonly number[]): { binOf: number[]; within: number[] } {
  const order = ranks.map((_, j) => j).sort((a, b) => ranks[a] - ranks[b]);
  const binOf = new Array<number>(ranks.length);
  const within = new Array<number>(ranks.length);
  let acc = 0;
  let b = 0;
  for (const j of order) {
    while (acc + hist[from + b] <= ranks[j]) acc += hist[from + b++];
    binOf[j] = b;
    within[j] = ranks[j] - acc;
  }
  return { binOf, within };
}

/**
 * The order statistics the second pass gathered for: rank j is the within[j]-th smallest of
 * its bin's values (`gatheredOf(binOf[j])`). A bin's ranks are selected in ascending order,
 * each search starting where the one before stopped.
 */
function selectWithinBins(binOf: readonly number[], within: readonly number[], gatheredOf: (bin: number) => Float32Array): number[] {
  const order = binOf.map((_, j) => j).sort((x, y) => binOf[x] - binOf[y] || within[x] - within[y]);
  const stats = new Array<number>(binOf.length);
  let bin = -1;
  let from = 0;
  for (const j of order) {
    if (binOf[j] !== bin) {
      bin = binOf[j];
      from = 0;
    }
    const a = gatheredOf(bin);
    selectRank(a, within[j], from, a.length - 1);
    stats[j] = a[within[j]];
    from = within[j];
  }
  return stats;
}

/**
 * Type-7 quantiles `ps` of each group of values at once, without copying the values into
 * groups: `group[i]` (0 .. groups - 1) names value i's group, and only values where
 * `include[i]` is not 0 (and not NaN) count. `all` is the first radix pass over exactly those
 * values (RADIX_BINS bins, as orderStatistics counts them): it bounds the bins the values fall
 * in, so each group's own first pass needs only that span of bins (the first pass over the
 * cells counts groups x span, not groups x 65,536); a second pass gathers the values of the
 * bins that hold a wanted rank, per group, and selects within them. The same order statistics
 * as quantilesFloat32 on each group's values alone. Out: `groups` rows of ps.length values
 * (NaN for a group with no values).
 * @example quantilesOfGroups(gsdCm, nadirStrip, inSite, strips, [0, 0.5, 1], siteRadix)
 */
export function quantilesOfGroups(values: Float32Array, group: GroupArray, include: Uint8Array, groups: number, ps: readonly number[], all: Uint32Array): Float64Array {
  let lo = 0;
  while (lo < RADIX_BINS && all[lo] === 0) lo++;
  if (lo === RADIX_BINS) return new Float64Array(groups * ps.length).fill(NaN);
  let hi = RADIX_BINS - 1;
  while (all[hi] === 0) hi--;
  const span = hi - lo + 1;
  const keys = float32Keys(values);
  const n = values.length;
  // First pass: each group's bins, within the span.
  const hist = zeroFilled(new Uint32Array(groups * span));
  for (let i = 0; i < n; i++) {
    if (include[i] === 0) continue;
    const v = values[i];
    if (v !== v) continue;
    hist[group[i] * span + radixBin(keys[i]) - lo]++;
  }
  // Every value lies in the span: each group's wanted ranks are in its bins.
  const byGroup: GroupRadix = { lo, span, hist, below: new Uint32Array(groups), above: new Uint32Array(groups) };
  return gatherWanted(values, group, include, ps, byGroup, groupRanks(byGroup, groups, ps)!).groups;
}

/**
 * Each group's first radix pass over a span of bins fixed before the pass (the statistics'
 * pass counts it beside its other tallies): hist[g * span + (bin - lo)] for values whose bin
 * lies in lo .. lo + span - 1, and per group the values below and above that span.
 */
export interface GroupRadix {
  lo: number;
  span: number;
  hist: Uint32Array;
  below: Uint32Array;
  above: Uint32Array;
  /**
   * Low bits of the sort key dropped for a bin (float32SortKey): RADIX_SHIFT (the default)
   * counts radixBin's bins; fewer counts finer ones, whose wanted bins hold fewer values to
   * gather and select among (the statistics' pass counts the strips' at 13, 1/1024 of a doubling).
   */
  shift?: number;
}

/**
 * The quantiles `ps` of all included values (their first pass `all`, as quantilesOfGroups
 * takes it) and of each group's, from the groups' first passes counted elsewhere (`byGroup`):
 * one pass over the values gathers the bins that hold a wanted rank, the site's and every
 * group's at once, where quantilesFloat32's and quantilesOfGroups's ways take three. When a
 * group's wanted rank lies outside its counted span (or no byGroup is given) the groups'
 * quantiles are made by quantilesOfGroups instead (`fromSpans` false). The same figures either way.
 * @example const { all, groups } = quantilesOfAllAndGroups(gsdCm, nadirStrip, inSite, strips, [0, 0.5, 1], siteRadix, stripRadix)
 */
export function quantilesOfAllAndGroups(values: Float32Array, group: GroupArray, include: Uint8Array, groups: number, ps: readonly number[], all: Uint32Array, byGroup?: GroupRadix, bands?: GatherBands, cellsIn?: GatherJob["cellsIn"]): { all: number[]; groups: Float64Array; fromSpans: boolean } {
  let n = 0;
  for (let b = 0; b < RADIX_BINS; b++) n += all[b];
  const wantedGroups = byGroup ? groupRanks(byGroup, groups, ps) : undefined;
  if (n === 0 || !wantedGroups || !byGroup) {
    const { stats } = orderStatisticsOfRadix(values, { hist: all, n }, (m) => ranksOf(m, ps), include);
    return { all: n === 0 ? ps.map(() => NaN) : interpolate(n, ps, stats), groups: quantilesOfGroups(values, group, include, groups, ps, all), fromSpans: false };
  }
  const got = gatherWanted(values, group, include, ps, byGroup, wantedGroups, { hist: all, n }, bands, cellsIn);
  return { ...got, fromSpans: true };
}

/** A group number per value (quantilesOfGroups): a strip number per cell. */
export type GroupArray = Uint8Array | Uint16Array;

/**
 * gatherWanted's pass over the values taken band by band on two threads (more would need
 * room for each thread's share of every bin, or a pass to count it): run by `run` (stats.ts:
 * runBands("gather", ...) on the statistics' band workers, each thread taking bands with
 * gatherBands), `bandCells` values a band. The values, groups and mask must then be in
 * shared memory.
 */
export interface GatherBands {
  bandCells: number;
  run: (job: GatherJob, bands: number) => void;
}

/**
 * gatherWanted's pass as plain typed arrays: which slot each bin goes to (the site's by bin,
 * each group's by group and bin from `lo`), and where each slot's values go in `out`: each
 * slot has a stretch as long as its first pass counted, thread 0 filling it from its start and
 * thread 1 from its end (at[t * slots + k]: the next place, moving by +1 or -1), so the two
 * threads' values meet without a gap or a copy.
 */
export interface GatherJob {
  values: Float32Array;
  group: GroupArray;
  include: Uint8Array;
  lo: number;
  span: number;
  /** GroupRadix.shift of the groups' bins. */
  shift: number;
  siteSlot: Int32Array;
  /** The site's slots by the groups' bins (from `lo`), not by radixBin. */
  siteFine: boolean;
  groupSlot: Int32Array;
  slots: number;
  out: Float32Array;
  at: Int32Array;
  bandCells: number;
  /** Each slot's first place in `out` (slots + 1 entries: the last is out's length). */
  slotAt: Int32Array;
  /** Gather in JavaScript (gatherCells) or WebAssembly (gatherCells.as.ts, where built: the default); the quantiles are the same. */
  cellsIn?: "js" | "wasm";
}

/**
 * Takes bands of gatherWanted's pass from the counter until none is left (runBands' loop),
 * as thread `slot` (0 or 1).
 * @example runBands("gather", job, bands, 2, gatherBands)
 */
export function gatherBands(job: GatherJob, next: Int32Array, bands: number, slot: number): void {
  const n = job.values.length;
  const wasm = job.cellsIn === "js" ? undefined : gatherKernel(job, GATHER_CHUNK, RADIX_SHIFT);
  for (let b = Atomics.add(next, 0, 1); b < bands; b = Atomics.add(next, 0, 1)) {
    const i1 = Math.min(n, (b + 1) * job.bandCells);
    for (let i0 = b * job.bandCells; i0 < i1; i0 += GATHER_CHUNK) {
      if (wasm) wasm.cells(i0, Math.min(i1, i0 + GATHER_CHUNK));
      else gatherCells(job, i0, Math.min(i1, i0 + GATHER_CHUNK), slot);
    }
  }
  wasm?.flush(slot);
}

/** Cells the pass takes at a time (the WebAssembly pass copies them into its memory: ~112 KB). */
const GATHER_CHUNK = 16384;

/** Values i0 .. i1 - 1 of the wanted bins, put at thread t's places in their slots. */
function gatherCells(job: GatherJob, i0: number, i1: number, t: number): void {
  const { values, group, include, lo, span, shift, siteSlot, siteFine, groupSlot, out, at } = job;
  if (t > 1) throw new Error("gatherCells: two threads at most");
  const keys = float32Keys(values);
  const a0 = t * job.slots;
  const step = t === 0 ? 1 : -1;
  const site = siteSlot.length > 0;
  for (let i = i0; i < i1; i++) {
    if (include[i] === 0) continue;
    const v = values[i];
    if (v !== v) continue;
    const key = float32SortKey(keys[i]);
    const b = (key >>> shift) - lo;
    if (site) {
      const k = siteFine ? (b >= 0 && b < span ? siteSlot[b] : -1) : siteSlot[key >>> RADIX_SHIFT];
      if (k >= 0) {
        out[at[a0 + k]] = v;
        at[a0 + k] += step;
      }
    }
    if (b >= 0 && b < span) {
      const kg = groupSlot[group[i] * span + b];
      if (kg >= 0) {
        out[at[a0 + kg]] = v;
        at[a0 + kg] += step;
      }
    }
  }
}

/**
 * The second pass of quantilesOfGroups and quantilesOfAllAndGroups: gathers the values of the
 * bins holding each group's wanted ranks (and, with `site`, those of all values' first pass),
 * and selects within them (the values of a bin in any order: a rank's value is the same). With
 * `bands`, the pass is shared between two threads (GatherJob). Out: `groups` rows of
 * ps.length values (NaN for a group with no values), and all values' quantiles when `site`
 * was given (else none).
 */
function gatherWanted(
  values: Float32Array,
  group: GroupArray,
  include: Uint8Array,
  ps: readonly number[],
  byGroup: GroupRadix,
  wanted: ({ n: number } & ReturnType<typeof ranksInBins>)[],
  site?: RadixHistogram,
  bands?: GatherBands,
  cellsIn?: GatherJob["cellsIn"],
): { all: number[]; groups: Float64Array } {
  const { lo, span, hist } = byGroup;
  const groups = wanted.length;
  // Slots of the bins to gather: the site's (by bin) and each group's (by group and bin). The
  // site's ranks are found in the groups' bins added up when those are finer and hold them.
  const sizes: number[] = [];
  const siteRanks = site ? ranksOf(site.n, ps) : [];
  const fine = site && (byGroup.shift ?? RADIX_SHIFT) < RADIX_SHIFT ? ranksInGroupBins(byGroup, groups, site.n, siteRanks) : undefined;
  const siteW = fine ?? (site ? { ...ranksInBins(site.hist, 0, siteRanks), hist: site.hist } : undefined);
  const siteSlot = new Int32Array(site ? (fine ? span : RADIX_BINS) : 0).fill(-1);
  for (const b of siteW?.binOf ?? []) {
    if (siteSlot[b] < 0) {
      siteSlot[b] = sizes.length;
      sizes.push(siteW!.hist[b]);
    }
  }
  const groupSlot = new Int32Array(groups * span).fill(-1);
  for (let g = 0; g < groups; g++) {
    for (const b of wanted[g].binOf) {
      const at = g * span + b;
      if (groupSlot[at] < 0) {
        groupSlot[at] = sizes.length;
        sizes.push(hist[at]);
      }
    }
  }
  const slots = sizes.length;
  const slotAt = new Int32Array(slots + 1);
  for (let k = 0; k < slots; k++) slotAt[k + 1] = slotAt[k] + sizes[k];
  const shared = bands !== undefined;
  const memory = (bytes: number) => (shared ? new SharedArrayBuffer(bytes) : new ArrayBuffer(bytes));
  const at = new Int32Array(memory(4 * 2 * slots));
  for (let k = 0; k < slots; k++) {
    at[k] = slotAt[k];
    at[slots + k] = slotAt[k + 1] - 1;
  }
  const job: GatherJob = {
    values, group, include, lo, span, shift: byGroup.shift ?? RADIX_SHIFT, siteSlot, siteFine: fine !== undefined, groupSlot, slots,
    out: new Float32Array(memory(4 * slotAt[slots])),
    at,
    bandCells: bands?.bandCells ?? values.length,
    slotAt,
    ...(cellsIn ? { cellsIn } : {}),
  };
  if (bands) bands.run(job, Math.ceil(values.length / job.bandCells));
  else gatherBands(job, new Int32Array(1), 1, 0);
  const gathered: Float32Array[] = [];
  for (let k = 0; k < slots; k++) {
    // First passes counted on other values than these would select wrongly: refuse them
    // (the two threads' values must meet exactly: thread 0's next place is thread 1's last).
    const found = at[k] - slotAt[k] + (slotAt[k + 1] - 1 - at[slots + k]);
    if (found !== sizes[k] || at[k] !== at[slots + k] + 1) throw new Error(`radix histograms do not match the values: slot ${k} counted ${sizes[k]}, found ${found}`);
    gathered.push(job.out.subarray(slotAt[k], slotAt[k + 1]));
  }
  const out = new Float64Array(groups * ps.length).fill(NaN);
  for (let g = 0; g < groups; g++) {
    const w = wanted[g];
    if (w.n === 0) continue;
    const stats = selectWithinBins(w.binOf, w.within, (b) => gathered[groupSlot[g * span + b]]);
    out.set(interpolate(w.n, ps, stats), g * ps.length);
  }
  if (!site || !siteW) return { all: [], groups: out };
  const siteStats = selectWithinBins(siteW.binOf, siteW.within, (b) => gathered[siteSlot[b]]);
  return { all: interpolate(site.n, ps, siteStats), groups: out };
}

/**
 * Where the ranks of all values lie in the groups' bins added up (the bins of the span, from
 * `lo`), with those sums: when every value is in some group's count (the groups' counts add up
 * to `n`) and every rank lies within the span; else undefined.
 */
function ranksInGroupBins(r: GroupRadix, groups: number, n: number, ranks: readonly number[]): { binOf: number[]; within: number[]; hist: Float64Array } | undefined {
  const sum = new Float64Array(r.span);
  let below = 0, above = 0;
  for (let g = 0; g < groups; g++) {
    below += r.below[g];
    above += r.above[g];
    const row = g * r.span;
    for (let b = 0; b < r.span; b++) sum[b] += r.hist[row + b];
  }
  let inSpan = 0;
  for (let b = 0; b < r.span; b++) inSpan += sum[b];
  if (inSpan + below + above !== n) return undefined;
  const shifted = ranks.map((k) => k - below);
  if (shifted.some((k) => k < 0 || k >= inSpan)) return undefined;
  return { ...ranksInBins(sum, 0, shifted), hist: sum };
}

/**
 * Each group's count and where its wanted ranks lie in its counted span (bins from lo, ranks
 * within them); undefined when a wanted rank lies below or above the span.
 */
function groupRanks(r: GroupRadix, groups: number, ps: readonly number[]): ({ n: number } & ReturnType<typeof ranksInBins>)[] | undefined {
  const out: ({ n: number } & ReturnType<typeof ranksInBins>)[] = [];
  for (let g = 0; g < groups; g++) {
    const row = g * r.span;
    let inSpan = 0;
    for (let b = 0; b < r.span; b++) inSpan += r.hist[row + b];
    const n = inSpan + r.below[g] + r.above[g];
    if (n === 0) {
      out.push({ n, binOf: [], within: [] });
      continue;
    }
    const ranks = ranksOf(n, ps).map((k) => k - r.below[g]);
    if (ranks.some((k) => k < 0 || k >= inSpan)) return undefined;
    out.push({ n, ...ranksInBins(r.hist, row, ranks) });
  }
  return out;
}

const SELECT_BELOW = 1 << 16;

/** The two order statistics (0-based ranks) each quantile interpolates between: floor(h) and the next, h = (n - 1) p. */
export function ranksOf(n: number, ps: readonly number[]): number[] {
  const ranks: number[] = [];
  for (const p of ps) {
    const h = (n - 1) * p;
    ranks.push(Math.floor(h), Math.min(n - 1, Math.floor(h) + 1));
  }
  return ranks;
}

/**
 * Type-7 quantiles from the order statistics at ranksOf(n, ps).
 * @example interpolate(n, ps, orderStatistics(v, (m) => ranksOf(m, ps)).stats)
 */
export function interpolate(n: number, ps: readonly number[], orderStat: readonly number[]): number[] {
  return ps.map((p, j) => {
    const h = (n - 1) * p;
    const lo = orderStat[2 * j];
    const hi = orderStat[2 * j + 1];
    return lo + (h - Math.floor(h)) * (hi - lo);
  });
}

/**
 * orderStatistics for small samples: the included values are copied and the wanted
 * ranks selected in ascending order (Hoare's partition with a median-of-three pivot;
 * each selection leaves everything below its rank on its left, so the next one
 * searches only to the right of it).
 */
function statsBySelection(values: Float32Array, ranksFor: (n: number) => number[], mask?: CellMask): { n: number; stats: number[] } {
  const keep = (i: number) => values[i] === values[i] && (mask === undefined || mask[i] !== 0);
  let n = 0;
  for (let i = 0; i < values.length; i++) if (keep(i)) n++;
  if (n === 0) return { n, stats: [] };
  const a = new Float32Array(n);
  for (let i = 0, k = 0; i < values.length; i++) if (keep(i)) a[k++] = values[i];
  const ranks = ranksFor(n);
  return { n, stats: selectWithinBins(ranks.map(() => 0), ranks, () => a) };
}

/**
 * Moves the k-th smallest of a[lo..hi] to a[k], smaller ones before it, larger after (no NaN
 * in a). The indices are made small integers and the pivot (median of three) is taken
 * without branches: a branch of the pivot's choice first taken, or an index first passed as
 * a double, after the engine compiled the loop sent it back to the interpreter (node
 * --trace-deopt: twelve compiles at 4 km2).
 */
function selectRank(a: Float32Array, k: number, lo: number, hi: number): void {
  k |= 0;
  lo |= 0;
  hi |= 0;
  while (hi > lo) {
    const x = a[lo];
    const y = a[(lo + hi) >>> 1];
    const z = a[hi];
    const pivot = Math.max(Math.min(x, y), Math.min(Math.max(x, y), z));
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        const t = a[i];
        a[i] = a[j];
        a[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return;
  }
}

/**
 * Minimum and median (type 7, as above) of small non-negative integers from their counts:
 * hist[v] = how many entries equal v. No entries gives NaN.
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
