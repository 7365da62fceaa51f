import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { RADIX_BINS, RADIX_SHIFT, binOfValue, countStatsOfHistogram, float32Keys, float32OfSortKey, float32SortKey, gatherBands, orderStatistics, orderStatisticsOfRadix, quantilesFloat32, quantilesOfAllAndGroups, quantilesOfGroups, radixBin, radixBinOfValue, type GatherBands, type GroupRadix } from "../../src/assess/quantiles.js";

/**
 * Straightforward reference: sort, then interpolate linearly at h = (n - 1) p
 * (Hyndman & Fan 1996, type 7, the default of R and NumPy).
 */
function sortedQuantile(values: number[], p: number): number {
  const s = values.filter((v) => !Number.isNaN(v)).sort((a, b) => a - b);
  if (s.length === 0) return NaN;
  const h = (s.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(s.length - 1, lo + 1);
  return s[lo] + (h - lo) * (s[hi] - s[lo]);
}

const PS = [0, 0.05, 0.5, 0.95, 1];

describe("exact quantiles by radix selection", () => {
  it("agree with a sort on random float32 samples (with NaN and negatives)", () => {
    fc.assert(
      fc.property(fc.array(fc.oneof(fc.float({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 }), fc.constant(NaN)), { minLength: 1, maxLength: 400 }), (raw) => {
        const values = Float32Array.from(raw);
        const got = quantilesFloat32(values, PS);
        const want = PS.map((p) => sortedQuantile(Array.from(values), p));
        for (let k = 0; k < PS.length; k++) {
          if (Number.isNaN(want[k])) expect(got[k]).toBeNaN();
          else expect(got[k]).toBeCloseTo(want[k], 6);
        }
      }),
      { numRuns: 300 },
    );
  });

  // Both methods: selection on a copy below 2^16 values, a radix pass then selection above.
  for (const n of [50_001, 200_001]) {
    it(`agree with a sort on a large GSD-like sample with many ties and NaN (${n} values)`, () => {
      const values = new Float32Array(n);
      let seed = 12345;
      for (let i = 0; i < n; i++) {
        seed = (seed * 1103515245 + 12345) >>> 0;
        values[i] = i % 17 === 0 ? NaN : 2 + Math.round((seed / 2 ** 32) * 1000) / 1000;
      }
      const want = PS.map((p) => sortedQuantile(Array.from(values), p));
      expect(quantilesFloat32(values, PS)).toEqual(want);
      // The sample itself is left as it was.
      expect(values[17]).toBeNaN();
    });
  }

  it("leave out masked entries (a site mask, or counts where 0 means unseen), by both methods", () => {
    for (const n of [5_001, 300_001]) {
      const values = new Float32Array(n);
      const mask = new Uint16Array(n);
      let seed = 777;
      for (let i = 0; i < n; i++) {
        seed = (seed * 1103515245 + 12345) >>> 0;
        values[i] = 100 + (seed % 10007) / 7;
        mask[i] = i % 3 === 0 ? 0 : 1 + (i % 5);
      }
      const kept = Array.from(values).filter((_, i) => mask[i] !== 0);
      expect(quantilesFloat32(values, PS, mask)).toEqual(PS.map((p) => sortedQuantile(kept, p)));
    }
  });

  it("take a first pass made by the caller (radixBin over the included cells) and refuse one that does not match", () => {
    const n = 120_001;
    const values = new Float32Array(n);
    const mask = new Uint8Array(n);
    let seed = 4242;
    for (let i = 0; i < n; i++) {
      seed = (seed * 1103515245 + 12345) >>> 0;
      values[i] = i % 11 === 0 ? NaN : -50 + (seed % 100003) / 97;
      mask[i] = i % 4 === 0 ? 0 : 1;
    }
    const bits = float32Keys(values);
    const hist = new Uint32Array(RADIX_BINS);
    let m = 0;
    for (let i = 0; i < n; i++) {
      if (mask[i] === 0 || values[i] !== values[i]) continue;
      hist[radixBin(bits[i])]++;
      m++;
    }
    const ranks = (k: number) => [0, k >> 2, k >> 1, k - 1];
    const got = orderStatisticsOfRadix(values, { hist, n: m }, ranks, mask);
    expect(got).toEqual(orderStatistics(values, ranks, mask));
    const sorted = Array.from(values).filter((v, i) => mask[i] !== 0 && v === v).sort((a, b) => a - b);
    expect(got.stats).toEqual(ranks(sorted.length).map((r) => sorted[r]));
    // Counted without the mask: the gathered bins overflow, and the call says so.
    expect(() => orderStatisticsOfRadix(values, { hist, n: m }, ranks)).toThrow(/does not match/);
    // The same cells as a bit each (n is not a multiple of 8: the last byte is part used).
    const cellBits = new Uint8Array((n + 7) >> 3);
    for (let i = 0; i < n; i++) if (mask[i]) cellBits[i >> 3] |= 1 << (i & 7);
    expect(orderStatisticsOfRadix(values, { hist, n: m }, ranks, { bits: cellBits })).toEqual(got);
    // The smallest value's bit left unset: its bin, gathered, comes up short, and the call says so.
    const least = Array.from(values).findIndex((v, i) => mask[i] !== 0 && v === got.stats[0]);
    const short = cellBits.slice();
    short[least >> 3] &= ~(1 << (least & 7));
    expect(() => orderStatisticsOfRadix(values, { hist, n: m }, ranks, { bits: short })).toThrow(/does not match/);
  });

  it("count stats: min and median of the included cells", () => {
    const v = Uint16Array.from([5, 1, 9, 7, 3, 100, 0]);
    const inc = Uint8Array.from([1, 1, 1, 1, 1, 1, 0]);
    // Included: 1 3 5 7 9 100 -> median (5 + 7) / 2 = 6.
    // The counts of the included values, as the statistics pass gathers them.
    const counts = (include: Uint8Array) => {
      const hist = new Float64Array(65536);
      v.forEach((x, i) => (hist[x] += include[i]));
      return hist;
    };
    expect(countStatsOfHistogram(counts(inc))).toEqual({ min: 1, median: 6 });
    expect(countStatsOfHistogram(counts(new Uint8Array(7)))).toEqual({ min: NaN, median: NaN });
  });
});

describe("quantiles of every group at once (quantilesOfGroups)", () => {
  // Reference: each group's values sorted, type 7 of Hyndman & Fan (1996) (sortedQuantile).
  it("equal each group's own sorted quantiles: NaN and excluded cells left out, empty groups NaN", () => {
    let seed = 11;
    const rnd = () => (seed = (seed * 16807) % 2147483647) / 2147483647;
    const n = 300_000;
    const groups = 7;
    const values = new Float32Array(n);
    const group = new Uint16Array(n);
    const include = new Uint8Array(n);
    for (let i = 0; i < n; i++) {
      // Group 5 is never used; group 6 has a handful of values; most values crowd near 2.5,
      // as a plan's GSD does (a few radix bins hold most of them), with a spread tail.
      const g = rnd() < 0.0001 ? 6 : Math.floor(rnd() * 5);
      group[i] = g;
      include[i] = rnd() < 0.9 ? 1 : 0;
      values[i] = rnd() < 0.02 ? NaN : rnd() < 0.8 ? 2.5 + 0.01 * (rnd() - 0.5) : 0.5 + 4 * rnd() + g;
    }
    const radix = new Uint32Array(RADIX_BINS);
    const keys = float32Keys(values);
    for (let i = 0; i < n; i++) if (include[i] && values[i] === values[i]) radix[radixBin(keys[i])]++;
    const got = quantilesOfGroups(values, group, include, groups, PS, radix);
    for (let g = 0; g < groups; g++) {
      const v: number[] = [];
      for (let i = 0; i < n; i++) if (group[i] === g && include[i] && values[i] === values[i]) v.push(values[i]);
      v.sort((a, b) => a - b);
      if (g === 5) expect(v.length).toBe(0);
      PS.forEach((p, k) => {
        const want = v.length ? sortedQuantile(v, p) : NaN;
        expect(got[g * PS.length + k], `group ${g} p ${p} of ${v.length}`).toBe(want);
      });
    }
    // No value at all: every group NaN.
    expect(Array.from(quantilesOfGroups(values, group, new Uint8Array(n), groups, PS, new Uint32Array(RADIX_BINS))).every(Number.isNaN)).toBe(true);
  });
});

describe("quantiles of all values and of every group, the groups' first pass counted over a span (quantilesOfAllAndGroups)", () => {
  // Reference: the values sorted, type 7 of Hyndman & Fan (1996) (sortedQuantile), for all
  // included values and for each group's.
  function sample(seed0: number, outlierGroup: number | undefined, shift = RADIX_SHIFT, spanFrom = 0.5) {
    let seed = seed0;
    const rnd = () => (seed = (seed * 16807) % 2147483647) / 2147483647;
    const n = 200_000;
    const groups = 6;
    const values = new Float32Array(n);
    const group = new Uint16Array(n);
    const include = new Uint8Array(n);
    for (let i = 0; i < n; i++) {
      const g = rnd() < 0.0002 ? 5 : Math.floor(rnd() * 4);
      group[i] = g;
      include[i] = rnd() < 0.9 ? 1 : 0;
      // Mostly near 2.5, a spread tail, a few far values (0.6 and 9.5, near the span's ends) in
      // every group; in `outlierGroup` a fifth of the values far below the span, so its
      // extremes and 5 % quantile lie there.
      const far = rnd();
      values[i] = rnd() < 0.02 ? NaN : g === outlierGroup && far < 0.2 ? 0.01 + 0.01 * rnd() : far < 0.001 ? (rnd() < 0.5 ? 0.6 : 9.5) : rnd() < 0.8 ? 2.5 + 0.01 * (rnd() - 0.5) : 1.5 + 2 * rnd();
    }
    const all = new Uint32Array(RADIX_BINS);
    // The groups' bins: radixBin's (shift 16) or finer (fewer low bits of the sort key dropped).
    const lo = binOfValue(spanFrom, shift), span = binOfValue(10, shift) - lo + 1;
    const byGroup: GroupRadix = { lo, span, hist: new Uint32Array(groups * span), below: new Uint32Array(groups), above: new Uint32Array(groups), ...(shift !== RADIX_SHIFT ? { shift } : {}) };
    const keys = float32Keys(values);
    for (let i = 0; i < n; i++) {
      if (!include[i] || values[i] !== values[i]) continue;
      const bin = radixBin(keys[i]);
      all[bin]++;
      const b = (float32SortKey(keys[i]) >>> shift) - lo;
      if (b < 0) byGroup.below[group[i]]++;
      else if (b >= span) byGroup.above[group[i]]++;
      else byGroup.hist[group[i] * span + b]++;
    }
    const sorted = (keep: (i: number) => boolean) => {
      const v: number[] = [];
      for (let i = 0; i < n; i++) if (keep(i) && include[i] && values[i] === values[i]) v.push(values[i]);
      return v.sort((a, b) => a - b);
    };
    return { values, group, include, groups, all, byGroup, sorted };
  }

  for (const outlierGroup of [undefined, 2]) {
    it(outlierGroup === undefined ? "equal the sorted quantiles, from one more pass over the values" : "equal them when a group's wanted rank lies below the span (made the groups' own way)", () => {
      const s = sample(outlierGroup === undefined ? 5 : 9, outlierGroup);
      const got = quantilesOfAllAndGroups(s.values, s.group, s.include, s.groups, PS, s.all, s.byGroup);
      expect(got.fromSpans).toBe(outlierGroup === undefined);
      const every = s.sorted(() => true);
      PS.forEach((p, k) => expect(got.all[k], `all p ${p}`).toBe(sortedQuantile(every, p)));
      for (let g = 0; g < s.groups; g++) {
        const v = s.sorted((i) => s.group[i] === g);
        if (g === 4) expect(v.length).toBe(0);
        PS.forEach((p, k) => expect(got.groups[g * PS.length + k], `group ${g} p ${p} of ${v.length}`).toBe(v.length ? sortedQuantile(v, p) : NaN));
      }
      // The same figures as the groups' own way.
      expect(Array.from(got.groups)).toEqual(Array.from(quantilesOfGroups(s.values, s.group, s.include, s.groups, PS, s.all)));
    });
  }

  it("place the wanted ranks past the values counted below the span (quantiles without the extremes)", () => {
    const s = sample(5, undefined);
    // Half the 0.6 values fall below a span from 1.0: counted below, not in it.
    const lo = radixBinOfValue(1.0), span = radixBinOfValue(10) - lo + 1;
    const byGroup: GroupRadix = { lo, span, hist: new Uint32Array(s.groups * span), below: new Uint32Array(s.groups), above: new Uint32Array(s.groups) };
    const keys = float32Keys(s.values);
    for (let i = 0; i < s.values.length; i++) {
      if (!s.include[i] || s.values[i] !== s.values[i]) continue;
      const b = radixBin(keys[i]) - lo;
      if (b < 0) byGroup.below[s.group[i]]++;
      else if (b >= span) byGroup.above[s.group[i]]++;
      else byGroup.hist[s.group[i] * span + b]++;
    }
    expect(byGroup.below[0]).toBeGreaterThan(10);
    const ps = [0.05, 0.5, 0.95];
    const got = quantilesOfAllAndGroups(s.values, s.group, s.include, s.groups, ps, s.all, byGroup);
    expect(got.fromSpans).toBe(true);
    for (let g = 0; g < s.groups; g++) {
      const v = s.sorted((i) => s.group[i] === g);
      ps.forEach((p, k) => expect(got.groups[g * ps.length + k], `group ${g} p ${p}`).toBe(v.length ? sortedQuantile(v, p) : NaN));
    }
  });

  // The statistics' pass counts the strips' bins at 1/1024 of a doubling (shift 13): a wanted
  // rank's bin then holds few values to gather, and the site's ranks are found in the groups'
  // bins added up. The same figures as the sorted values', with values below the span (a span
  // from 1.0 leaves half the 0.6 values below it) or without.
  for (const spanFrom of [0.5, 1.0]) {
    it(`equal the sorted quantiles from the groups' finer bins, the site's too (span from ${spanFrom})`, () => {
      const s = sample(5, undefined, 13, spanFrom);
      expect(s.byGroup.span).toBeGreaterThan(8 * 200);
      // Below the span: the extremes lie there, so only the inner quantiles are asked.
      const ps = spanFrom === 1.0 ? [0.05, 0.5, 0.95] : PS;
      if (spanFrom === 1.0) expect(s.byGroup.below[0]).toBeGreaterThan(10);
      const got = quantilesOfAllAndGroups(s.values, s.group, s.include, s.groups, ps, s.all, s.byGroup);
      expect(got.fromSpans).toBe(true);
      checkAgainstSorted(s, got, ps);
    });
  }

  // The second pass shared between two threads (stats.ts runs it on its band workers), here
  // taken in turn on this one: thread 1 takes the last bands, filling its bins from their
  // ends, thread 0 the first, from their starts.
  // Each with the second pass in JavaScript and in WebAssembly (gatherCells.as.ts, where built).
  for (const shift of [RADIX_SHIFT, 13]) for (const cellsIn of ["js", "wasm"] as const) {
    it(`equal the sorted quantiles with the second pass split between two threads (shift ${shift}, gathered in ${cellsIn})`, () => {
      const s = sample(7, undefined, shift);
      const bandCells = 10_007;
      const bands: GatherBands = {
        bandCells,
        run: (job, count) => {
          const half = count >> 1;
          gatherBands(job, Int32Array.of(half), count, 1);
          gatherBands(job, Int32Array.of(0), half, 0);
        },
      };
      const got = quantilesOfAllAndGroups(s.values, s.group, s.include, s.groups, PS, s.all, s.byGroup, bands, cellsIn);
      expect(got.fromSpans).toBe(true);
      checkAgainstSorted(s, got);
      // A thread that misses its bands leaves the bins short: refused.
      const short: GatherBands = { bandCells, run: (job, count) => gatherBands(job, Int32Array.of(1), count, 1) };
      expect(() => quantilesOfAllAndGroups(s.values, s.group, s.include, s.groups, PS, s.all, s.byGroup, short, cellsIn)).toThrow(/do not match/);
    });
  }

  // A value in the first bin past the span belongs to no group's bins: not to the next group's
  // first bin, which sits right after it in the table (here a wanted one: group 1's minimum).
  for (const cellsIn of ["js", "wasm"] as const) it(`leave a value just past the span out of the next group's first bin (gathered in ${cellsIn})`, () => {
    const shift = 13, lo = binOfValue(2, shift), span = binOfValue(3, shift) - lo + 1;
    const first = (bin: number) => float32OfSortKey(bin * 2 ** shift);
    const n = 4000, groups = 2;
    const values = new Float32Array(n), group = new Uint16Array(n), include = new Uint8Array(n).fill(1);
    for (let i = 0; i < n; i++) {
      group[i] = i % 2;
      // Group 0: one in fifty in the bin just past the span; group 1: its lowest in the span's first bin.
      values[i] = i % 2 === 0 ? (i % 100 === 0 ? first(lo + span) : 2.5 + (i % 7) / 100) : i % 10 === 1 ? first(lo) : 2.4 + (i % 11) / 100;
    }
    const all = new Uint32Array(RADIX_BINS);
    const byGroup: GroupRadix = { lo, span, shift, hist: new Uint32Array(groups * span), below: new Uint32Array(groups), above: new Uint32Array(groups) };
    const keys = float32Keys(values);
    for (let i = 0; i < n; i++) {
      all[radixBin(keys[i])]++;
      const b = (float32SortKey(keys[i]) >>> shift) - lo;
      if (b < 0) byGroup.below[group[i]]++;
      else if (b >= span) byGroup.above[group[i]]++;
      else byGroup.hist[group[i] * span + b]++;
    }
    expect(byGroup.above[0]).toBe(40);
    const ps = [0, 0.5, 0.95];
    const got = quantilesOfAllAndGroups(values, group, include, groups, ps, all, byGroup, undefined, cellsIn);
    expect(got.fromSpans).toBe(true);
    const own = Array.from(values).filter((_, i) => group[i] === 1).sort((a, b) => a - b);
    ps.forEach((p, k) => expect(got.groups[1 * ps.length + k], `group 1 p ${p}`).toBe(sortedQuantile(own, p)));
  });

  function checkAgainstSorted(s: ReturnType<typeof sample>, got: ReturnType<typeof quantilesOfAllAndGroups>, ps = PS): void {
    const every = s.sorted(() => true);
    ps.forEach((p, k) => expect(got.all[k], `all p ${p}`).toBe(sortedQuantile(every, p)));
    for (let g = 0; g < s.groups; g++) {
      const v = s.sorted((i) => s.group[i] === g);
      ps.forEach((p, k) => expect(got.groups[g * ps.length + k], `group ${g} p ${p} of ${v.length}`).toBe(v.length ? sortedQuantile(v, p) : NaN));
    }
  }

  for (const cellsIn of ["js", "wasm"] as const) it(`refuse first passes that do not match the values (gathered in ${cellsIn})`, () => {
    const s = sample(5, undefined);
    const hist = s.byGroup.hist.slice();
    // One count moved to another group's bin holding a wanted rank: the gathered bins come out short.
    const lo = s.byGroup.lo, span = s.byGroup.span;
    const bin = radixBinOfValue(2.5) - lo;
    hist[0 * span + bin]--;
    hist[1 * span + bin]++;
    expect(() => quantilesOfAllAndGroups(s.values, s.group, s.include, s.groups, PS, s.all, { ...s.byGroup, hist }, undefined, cellsIn)).toThrow(/do not match/);
  });
});

describe("float32OfSortKey", () => {
  it("undoes float32SortKey for every kind of float32 and keeps the keys' order (IEEE 754 binary32)", () => {
    const values = Float32Array.of(-Infinity, -3.4e38, -2.5, -1e-45, -0, 0, 1e-45, 1.17549435e-38, 0.01, 2.5, 2.5000002, 3.4e38, Infinity);
    const keys = Array.from(float32Keys(values), (b) => float32SortKey(b));
    for (let i = 0; i < values.length; i++) expect(Object.is(float32OfSortKey(keys[i]), values[i]), `${values[i]}`).toBe(true);
    for (let i = 1; i < keys.length; i++) expect(keys[i]).toBeGreaterThan(keys[i - 1]);
  });
});
