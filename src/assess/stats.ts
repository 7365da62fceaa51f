import type { AssessmentStats, GsdStats } from "./types.js";
import type { SeenByBand } from "./coverageKernel.js";
import { bandThreads, runBands, shareable } from "./bandThreads.js";
import { splitAllowed } from "../background.js";
import { FLAG_COARSE, FLAG_FEW_IMAGES, FLAG_FINE, FLAG_VALUES, ASSESSMENT_FLAG_KINDS } from "./flags.js";
import { RADIX_BINS, countStatsOfHistogram, float32Keys, interpolate, orderStatisticsOfRadix, quantilesFloat32, radixBin, ranksOf, type RadixHistogram } from "./quantiles.js";

/**
 * Summary figures of an assessment over the site's cells.
 *
 * Denominators, stated once: GSD figures are over site cells that some photo
 * sees (a GSD exists); the image count over site cells with DEM data; the
 * within-band share and flag shares over all site cells, so unseen and
 * no-data ground counts against the plan rather than vanishing. A cell
 * belongs to the strip of its most nadir photo.
 */

export interface StatsInput {
  gsdCm: Float32Array;
  images: Uint16Array;
  flags: Uint16Array;
  inSite: Uint8Array;
  /** DEM data mask (DemGrid.valid). */
  valid: Uint8Array;
  /** Strip of the most nadir photo per cell, 0 where none. */
  nadirStrip: Uint16Array;
  cellAreaM2: number;
  /** Highest strip number that can occur in nadirStrip (saves a pass over the grid when known). */
  maxStrip?: number;
  /**
   * Seen site cells per band and nadir strip, counted by the coverage pass: saves the pass that
   * counts them here, and lets the pass over the cells go band by band on several threads.
   */
  seenByBand?: SeenByBand;
  /** Threads for that pass (see bandThreads); default the machine's choice. */
  threads?: number;
  /** Also count the seen site cells whose GSD is at least this (cm/px): stats.gsdAtLeast. */
  gsdAtLeastCm?: number;
}

const QUANTILES = [0, 0.05, 0.5, 0.95, 1];

function gsdStats([min, p5, median, p95, max]: Iterable<number>): GsdStats {
  return { min, p5, median, p95, max };
}

function quantilesOfRadix(values: Float32Array, radix: RadixHistogram): number[] {
  const { n, stats } = orderStatisticsOfRadix(values, radix, (m) => ranksOf(m, QUANTILES));
  return n === 0 ? QUANTILES.map(() => NaN) : interpolate(n, QUANTILES, stats);
}

/**
 * The statistics' pass over the cells, as plain typed arrays (in shared memory when several
 * threads take its bands): the cells' rasters, where each band's seen cells of each strip
 * go in `grouped`, and each thread's tallies at its slot.
 */
export interface StatsPassJob extends Pick<StatsInput, "gsdCm" | "images" | "flags" | "inSite" | "valid" | "nadirStrip"> {
  strips: number;
  /** (bands + 1) rows of `strips`: band b's first place per strip; the last row, each strip's end. */
  offsets: Int32Array;
  /** Cells per band (the last band may hold fewer). */
  bandCells: number;
  /** Seen site cells' GSD grouped by strip (out). */
  grouped: Float32Array;
  /** Per slot: flag values per strip (strips x FLAG_VALUES), image counts of site cells with data (65,536), seen cells in band per strip, the first radix pass of the GSD. */
  flagHist: Float64Array;
  imageHist: Float64Array;
  inBandSeen: Float64Array;
  radixHist: Uint32Array;
  /** Seen cells with a GSD of at least atLeastCm, per slot (atLeastCm Infinity: none asked for). */
  atLeastCm: number;
  atLeast: Float64Array;
}

/**
 * Takes bands of the statistics' pass from the counter until none is left, tallying at `slot`
 * (runBands' loop, on the calling thread or a worker).
 * @example runBands("stats", job, bands, threads, statsPassBands);
 */
export function statsPassBands(job: StatsPassJob, next: Int32Array, bands: number, slot: number): void {
  const S = job.strips;
  const fill = new Int32Array(S);
  for (let b = Atomics.add(next, 0, 1); b < bands; b = Atomics.add(next, 0, 1)) {
    fill.set(job.offsets.subarray(b * S, (b + 1) * S));
    const i0 = b * job.bandCells;
    statsPassCells(job, i0, Math.min(job.inSite.length, i0 + job.bandCells), slot, fill);
    for (let s = 0; s < S; s++) {
      const end = job.offsets[(b + 1) * S + s];
      if (fill[s] !== end) throw new Error(`band ${b}, strip ${s}: ${fill[s] - job.offsets[b * S + s]} seen cells grouped, ${end - job.offsets[b * S + s]} counted`);
    }
  }
}

/**
 * Cells i0..i1-1: a histogram of flag values per strip (strip 0: cells no photo sees) gives
 * every count (flag kinds are read off the 512 bins afterwards instead of testing 9 bits per
 * cell); image counts of site cells with data (their min and median); the seen cells' GSD
 * into their strip's places (`fill`, advanced); seen cells in band per strip; the first radix
 * pass of the site's GSD quantiles (quantiles.ts).
 */
function statsPassCells(job: StatsPassJob, i0: number, i1: number, slot: number, fill: Int32Array): void {
  const { gsdCm, images, flags, inSite, valid, nadirStrip, grouped, flagHist, imageHist, inBandSeen, radixHist, atLeastCm } = job;
  const S = job.strips;
  const fh = slot * S * FLAG_VALUES;
  const ih = slot * 65536;
  const bs = slot * S;
  const rh = slot * RADIX_BINS;
  const gsdBits = float32Keys(gsdCm);
  let atLeast = 0;
  for (let i = i0; i < i1; i++) {
    if (inSite[i] === 0) continue;
    if (valid[i] === 1) imageHist[ih + images[i]]++;
    const s = nadirStrip[i];
    const f = flags[i];
    flagHist[fh + s * FLAG_VALUES + f]++;
    const g = gsdCm[i];
    if (g !== g) continue;
    grouped[fill[s]++] = g;
    radixHist[rh + radixBin(gsdBits[i])]++;
    if ((f & (FLAG_COARSE | FLAG_FINE)) === 0) inBandSeen[bs + s]++;
    if (g >= atLeastCm) atLeast++;
  }
  job.atLeast[slot] += atLeast;
}

/** Each strip's GSD values (grouped[start[s]] up to start[s + 1]) and their quantiles (out, QUANTILES per strip). */
export interface StripQuantilesJob {
  grouped: Float32Array;
  start: Int32Array;
  quantiles: Float64Array;
}

/**
 * Takes strips from the counter until none is left and writes each one's GSD quantiles
 * (runBands' loop: a strip is a band here).
 * @example runBands("quantiles", job, strips, threads, stripQuantilesBands);
 */
export function stripQuantilesBands(job: StripQuantilesJob, next: Int32Array, strips: number): void {
  for (let s = Atomics.add(next, 0, 1); s < strips; s = Atomics.add(next, 0, 1)) {
    job.quantiles.set(quantilesFloat32(job.grouped.subarray(job.start[s], job.start[s + 1]), QUANTILES), s * QUANTILES.length);
  }
}

/** Memory for the statistics' pass: shared when other threads fill it. */
function buffer(threads: number, bytes: number): ArrayBufferLike {
  return threads > 1 ? new SharedArrayBuffer(bytes) : new ArrayBuffer(bytes);
}

/** The per-slot tallies added up (slot 0's own array when there is one slot). */
function sumOfSlots<T extends Float64Array | Uint32Array>(a: T, slots: number): T {
  const len = a.length / slots;
  const out = a.subarray(0, len) as T;
  for (let t = 1; t < slots; t++) for (let k = 0; k < len; k++) out[k] += a[t * len + k];
  return out;
}

/** Seen site cells per strip 0..maxStrip, summed over the bands of the coverage pass's table. */
function seenOfBands(seen: SeenByBand, maxStrip: number): Int32Array {
  if (seen.strips !== maxStrip + 1) throw new Error(`seen cells counted for ${seen.strips} strips, ${maxStrip + 1} expected`);
  const out = new Int32Array(maxStrip + 1);
  for (let b = 0; b < seen.counts.length; b += seen.strips) for (let s = 0; s <= maxStrip; s++) out[s] += seen.counts[b + s];
  return out;
}

/** Seen site cells (a GSD exists) per strip 0..maxStrip, from the cells. */
function seenOfCells(inSite: Uint8Array, gsdCm: Float32Array, nadirStrip: Uint16Array, maxStrip: number): Int32Array {
  const out = new Int32Array(maxStrip + 1);
  for (let i = 0; i < inSite.length; i++) if (inSite[i] !== 0 && gsdCm[i] === gsdCm[i]) out[nadirStrip[i]]++;
  return out;
}

function pct(part: number, whole: number): number {
  return whole > 0 ? (100 * part) / whole : 0;
}

/**
 * @example
 * const stats = assessmentStats({ gsdCm, images, flags, inSite, valid: grid.valid, nadirStrip, cellAreaM2: 0.25 });
 * stats.gsdCm.median; stats.flagged.byKind.coarse.areaM2;
 */
export function assessmentStats(input: StatsInput): AssessmentStats {
  const { gsdCm, images, flags, inSite, valid, nadirStrip, cellAreaM2 } = input;
  const n = inSite.length;
  let maxStrip = input.maxStrip ?? -1;
  if (maxStrip < 0) for (let i = 0; i < n; i++) if (inSite[i] === 1 && nadirStrip[i] > maxStrip) maxStrip = nadirStrip[i];
  maxStrip = Math.max(0, maxStrip);

  // Where each strip's GSD values go in one array grouped by strip: the seen cells per
  // strip, from the coverage pass's counts when it made them, else counted here.
  const S = maxStrip + 1;
  const seenCount = input.seenByBand ? seenOfBands(input.seenByBand, maxStrip) : seenOfCells(inSite, gsdCm, nadirStrip, maxStrip);
  const start = new Int32Array(S + 1);
  for (let s = 0; s < S; s++) start[s + 1] = start[s] + seenCount[s];

  // With the coverage pass's counts per band, the cells can be taken band by band on several
  // threads: each band's seen cells of a strip have their own place in the grouped array
  // (the same order as one pass over all the cells), the tallies are kept per thread.
  const banded = input.seenByBand;
  const bands = banded ? banded.counts.length / S : 1;
  const threads = banded && splitAllowed(n, input.threads) ? bandThreads(n, bands, input.threads) : 1;
  const offsets = new Int32Array(buffer(threads, 4 * (bands + 1) * S));
  offsets.set(start.subarray(0, S));
  for (let b = 0; b < bands; b++) {
    for (let s = 0; s < S; s++) offsets[(b + 1) * S + s] = offsets[b * S + s] + (banded ? banded.counts[b * S + s] : seenCount[s]);
  }
  const job: StatsPassJob = {
    gsdCm: shareable(gsdCm, threads), images: shareable(images, threads), flags: shareable(flags, threads),
    inSite: shareable(inSite, threads), valid: shareable(valid, threads), nadirStrip: shareable(nadirStrip, threads),
    strips: S, offsets, bandCells: banded ? banded.bandCells : n,
    grouped: new Float32Array(buffer(threads, 4 * start[S])),
    flagHist: new Float64Array(buffer(threads, 8 * threads * S * FLAG_VALUES)),
    imageHist: new Float64Array(buffer(threads, 8 * threads * 65536)),
    inBandSeen: new Float64Array(buffer(threads, 8 * threads * S)),
    radixHist: new Uint32Array(buffer(threads, 4 * threads * RADIX_BINS)),
    atLeastCm: input.gsdAtLeastCm ?? Infinity,
    atLeast: new Float64Array(buffer(threads, 8 * threads)),
  };
  runBands("stats", job, bands, threads, statsPassBands);
  const grouped = job.grouped;
  const flagHist = sumOfSlots(job.flagHist, threads);
  const imageHist = sumOfSlots(job.imageHist, threads);
  const inBandSeen = sumOfSlots(job.inBandSeen, threads);
  const radixHist = sumOfSlots(job.radixHist, threads);

  const kindCounts = (s0: number, s1: number): { cells: Float64Array; all: number; flagged: number; effect: number } => {
    const cells = new Float64Array(ASSESSMENT_FLAG_KINDS.length);
    let all = 0;
    let flagged = 0;
    let effect = 0;
    for (let s = s0; s <= s1; s++) {
      for (let f = 0; f < FLAG_VALUES; f++) {
        const c = flagHist[s * FLAG_VALUES + f];
        if (c === 0) continue;
        all += c;
        if (f !== 0) flagged += c;
        if (f & (FLAG_COARSE | FLAG_FINE | FLAG_FEW_IMAGES)) effect += c;
        ASSESSMENT_FLAG_KINDS.forEach((kind, k) => {
          if (f & kind.bit) cells[k] += c;
        });
      }
    }
    return { cells, all, flagged, effect };
  };
  const byKind = (counts: Float64Array, whole: number): Record<string, { cells: number; areaM2: number; pct: number }> => {
    const out: Record<string, { cells: number; areaM2: number; pct: number }> = {};
    ASSESSMENT_FLAG_KINDS.forEach((kind, k) => {
      out[kind.key] = { cells: counts[k], areaM2: counts[k] * cellAreaM2, pct: pct(counts[k], whole) };
    });
    return out;
  };

  // The strips' GSD quantiles, strips shared between threads as bands; this thread makes the
  // site's own first (from the pass's radix tallies), then takes strips too.
  const qThreads = Math.min(threads, S);
  const qJob: StripQuantilesJob = {
    grouped,
    start: shareable(start, qThreads),
    quantiles: new Float64Array(buffer(qThreads, 8 * S * QUANTILES.length)),
  };
  let siteGsd: GsdStats | undefined;
  runBands("quantiles", qJob, S, qThreads, (job, next, bands) => {
    siteGsd = gsdStats(quantilesOfRadix(grouped, { hist: radixHist, n: grouped.length }));
    stripQuantilesBands(job, next, bands);
  });
  const stripGsd = (s: number): GsdStats => gsdStats(qJob.quantiles.subarray(s * QUANTILES.length, (s + 1) * QUANTILES.length));

  const perStrip: AssessmentStats["perStrip"] = [];
  for (let s = 1; s <= maxStrip; s++) {
    const k = kindCounts(s, s);
    if (k.all === 0) continue;
    perStrip.push({
      strip: s,
      cells: k.all,
      gsdCm: stripGsd(s),
      withinBandPct: pct(inBandSeen[s], k.all),
      flagged: byKind(k.cells, k.all),
    });
  }

  const site = kindCounts(0, maxStrip);
  let inBand = 0;
  for (let s = 0; s <= maxStrip; s++) inBand += inBandSeen[s];
  return {
    siteCells: site.all,
    cellAreaM2,
    gsdCm: siteGsd!,
    withinBandPct: pct(inBand, site.all),
    images: countStatsOfHistogram(imageHist),
    flagged: { cells: site.flagged, areaM2: site.flagged * cellAreaM2, byKind: byKind(site.cells, site.all), effectCells: site.effect },
    perStrip,
    ...(input.gsdAtLeastCm !== undefined ? { gsdAtLeast: { cm: input.gsdAtLeastCm, cells: sumOfSlots(job.atLeast, threads)[0] } } : {}),
  };
}
