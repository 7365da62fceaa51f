import type { AssessmentStats, GsdStats, StripRaster } from "./types.js";
import type { SeenByBand } from "./coverageKernel.js";
import { bandThreads, runBands, shareable, type BandPool } from "./bandThreads.js";
import { splitAllowed } from "../background.js";
import { FLAG_COARSE, FLAG_FEW_IMAGES, FLAG_FINE, FLAG_VALUES, ASSESSMENT_FLAG_KINDS } from "./flags.js";
import { tallyCounter, tallyEdges, tallyOfSlots, type GsdTallyGrid } from "./gsdTally.js";
import { RADIX_BINS, RADIX_SHIFT, binOfValue, countStatsOfHistogram, float32Keys, float32OfSortKey, float32SortKey, gatherBands, quantilesOfAllAndGroups, type GatherBands, type GroupRadix } from "./quantiles.js";
import { zeroFilled } from "../zeroFill.js";
import { statsCells } from "./statsCellsWasm.js";

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
  /** The DEM's heights (DemGrid.heights): a cell has data where its height is a number. */
  ground: Float32Array;
  /** Strip of the most nadir photo per cell, 0 where none. */
  nadirStrip: StripRaster;
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
  /** Workers to use, kept for later passes (bandThreads.ts BandPool); default: started for this pass and ended. */
  bandPool?: BandPool;
  /** Also count the seen site cells whose GSD is at least this (cm/px): stats.gsdAtLeast. */
  gsdAtLeastCm?: number;
  /** Also tally the seen site cells' GSD on this grid (gsdTally.ts): stats.gsdTally. */
  gsdTally?: GsdTallyGrid;
  /**
   * GSD range (cm/px) whose first-pass radix bins each strip counts in the pass (the band
   * widened well beyond its edges): the strips' quantiles then need one more pass over the
   * cells instead of two, unless a strip's wanted rank lies outside the range.
   */
  stripSpanCm?: [number, number];
  /** Count and gather the cells in JavaScript or WebAssembly (the default, where built): the same figures (StatsPassJob.cellsIn, GatherJob.cellsIn). */
  cellsIn?: "js" | "wasm";
}

const QUANTILES = [0, 0.05, 0.5, 0.95, 1];

function gsdStats([min, p5, median, p95, max]: Iterable<number>): GsdStats {
  return { min, p5, median, p95, max };
}

/** Above this many strip x bin counters per thread the strips' first pass is left to quantilesOfGroups (64 MB). */
const MAX_STRIP_BINS = 1 << 24;

/**
 * The statistics' pass over the cells, as plain typed arrays (in shared memory when several
 * threads take its bands): the cells' rasters and each thread's tallies at its slot.
 */
export interface StatsPassJob extends Pick<StatsInput, "gsdCm" | "images" | "flags" | "inSite" | "ground" | "nadirStrip"> {
  strips: number;
  /** Cells per band (the last band may hold fewer). */
  bandCells: number;
  /** Per slot: flag values per strip (strips x FLAG_VALUES), image counts of site cells with data (65,536), seen cells in band per strip, the first radix pass of the GSD. */
  flagHist: Float64Array;
  imageHist: Float64Array;
  inBandSeen: Float64Array;
  radixHist: Uint32Array;
  /** Seen cells with a GSD of at least atLeastCm, per slot (atLeastCm Infinity: none asked for). */
  atLeastCm: number;
  /** Per slot at slot * SLOT_STRIDE. */
  atLeast: Float64Array;
  /** The seen cells' GSD on this grid, per slot (gsdTally.ts tallyCounter's layout), if asked for. */
  tallyGrid?: GsdTallyGrid;
  tallyEdges?: Float64Array;
  tally?: Float64Array;
  /** Each strip's first pass over its finer bins (STRIP_BIN_SHIFT) spanLo .. spanLo + span - 1, per slot (strips x span), and its values below and above (strips), if asked for. */
  spanLo?: number;
  span?: number;
  stripHist?: Uint32Array;
  stripBelow?: Uint32Array;
  stripAbove?: Uint32Array;
  /**
   * With both the tally and the strips' bins: per strip bin (span entries), the tally's entry
   * (tallyCounter's, from 0) that counts every value of the bin, or -1 where the bin's values
   * fall in more than one. The pass tallies a cell itself only where that is -1 (or its value
   * is outside the span); the rest are added from the strips' bins afterwards (tallyFromStripBins).
   */
  tallyOfStripBin?: Int32Array;
  /** Count the cells in JavaScript (statsPassCells) or WebAssembly (statsCells.as.ts, where built: the default); the counts are the same. */
  cellsIn?: "js" | "wasm";
}

/**
 * Takes bands of the statistics' pass from the counter until none is left, tallying at `slot`
 * (runBands' loop, on the calling thread or a worker), PASS_CHUNK cells a call.
 * @example runBands("stats", job, bands, threads, statsPassBands);
 */
export function statsPassBands(job: StatsPassJob, next: Int32Array, bands: number, slot: number): void {
  const wasm = job.cellsIn === "js" ? undefined : statsCells(job, PASS_CHUNK, STRIP_BIN_SHIFT);
  for (let b = Atomics.add(next, 0, 1); b < bands; b = Atomics.add(next, 0, 1)) {
    const i0 = b * job.bandCells;
    const i1 = Math.min(job.inSite.length, i0 + job.bandCells);
    for (let c = i0; c < i1; c += PASS_CHUNK) {
      if (wasm) wasm.cells(c, Math.min(i1, c + PASS_CHUNK));
      else statsPassCells(job, c, Math.min(i1, c + PASS_CHUNK), slot);
    }
  }
  if (wasm) job.atLeast[slot * SLOT_STRIDE] += wasm.flush(slot);
}

/**
 * Cells statsPassCells takes a call: its counts are kept in locals and added to the tallies
 * at the end of each call, so the engine compiles it whole after its first calls, the code
 * after its loop included (a loop compiled mid-call with that code not yet run was sent back
 * to the interpreter when it first ran: node --trace-deopt).
 */
const PASS_CHUNK = 8192;

/**
 * Cells i0..i1-1: a histogram of flag values per strip (strip 0: cells no photo sees) gives
 * every count (flag kinds are read off the 512 bins afterwards instead of testing 9 bits per
 * cell); image counts of site cells with data (their min and median); seen cells in band per
 * strip; the first radix pass of the site's GSD quantiles (quantiles.ts); each strip's finer
 * bins and the GSD tally, when asked for. Neighbouring cells mostly fall in the same entries
 * (strip and flags, radix bin, image count), and an entry incremented cell after cell makes
 * each increment wait for the one before (~5 cycles): so those histograms are added to a run
 * of one entry at a time (the strips' finer bins, which change from cell to cell, are not).
 */
function statsPassCells(job: StatsPassJob, i0: number, i1: number, slot: number): void {
  const { gsdCm, images, flags, inSite, ground, nadirStrip, flagHist, imageHist, inBandSeen, radixHist, atLeastCm } = job;
  const S = job.strips;
  const fh = slot * S * FLAG_VALUES;
  const ih = slot * 65536;
  const bs = slot * S;
  const rh = slot * RADIX_BINS;
  const gsdBits = float32Keys(gsdCm);
  const tally = job.tallyGrid && job.tally ? tallyCounter(job.tallyGrid, job.tally, slot * (job.tallyGrid.bins + 2), job.tallyEdges) : undefined;
  const { stripHist, stripBelow, stripAbove, tallyOfStripBin } = job;
  const spanLo = job.spanLo ?? 0;
  const span = job.span ?? 0;
  const sh = slot * S * span;
  // Runs of one entry: image count, strip and flag value, radix bin, strip in band.
  let imageAt = ih, imageRun = 0;
  let flagAt = fh, flagRun = 0;
  let radixAt = rh, radixRun = 0;
  let inBandAt = bs, inBandRun = 0;
  let atLeast = 0;
  for (let i = i0; i < i1; i++) {
    if (inSite[i] === 0) continue;
    const z = ground[i];
    if (z === z) {
      const k = ih + images[i];
      if (k === imageAt) imageRun++;
      else {
        imageHist[imageAt] += imageRun;
        imageAt = k;
        imageRun = 1;
      }
    }
    const s = nadirStrip[i];
    const f = flags[i];
    const fk = fh + s * FLAG_VALUES + f;
    if (fk === flagAt) flagRun++;
    else {
      flagHist[flagAt] += flagRun;
      flagAt = fk;
      flagRun = 1;
    }
    const g = gsdCm[i];
    if (g !== g) continue;
    const key = float32SortKey(gsdBits[i]);
    const bin = key >>> RADIX_SHIFT;
    if (rh + bin === radixAt) radixRun++;
    else {
      radixHist[radixAt] += radixRun;
      radixAt = rh + bin;
      radixRun = 1;
    }
    // The tally takes the cell here, or, where its strip bin maps whole to one of its entries,
    // from the strips' bins after the pass (tallyOfStripBins: ~4 cells in 5 at 4 km2).
    if (stripHist !== undefined && stripBelow !== undefined && stripAbove !== undefined) {
      const b = (key >>> STRIP_BIN_SHIFT) - spanLo;
      if (b < 0) {
        stripBelow[bs + s]++;
        if (tally !== undefined) tally.add(g);
      } else if (b >= span) {
        stripAbove[bs + s]++;
        if (tally !== undefined) tally.add(g);
      } else {
        // A bin of 1/1024 of a doubling: neighbouring cells mostly differ, so it is counted
        // cell by cell (the run of one entry the other counts keep lost more than it saved).
        stripHist[sh + s * span + b]++;
        if (tally !== undefined && (tallyOfStripBin === undefined || tallyOfStripBin[b] < 0)) tally.add(g);
      }
    } else if (tally !== undefined) tally.add(g);
    if ((f & (FLAG_COARSE | FLAG_FINE)) === 0) {
      if (bs + s === inBandAt) inBandRun++;
      else {
        inBandSeen[inBandAt] += inBandRun;
        inBandAt = bs + s;
        inBandRun = 1;
      }
    }
    atLeast += g >= atLeastCm ? 1 : 0;
  }
  imageHist[imageAt] += imageRun;
  flagHist[flagAt] += flagRun;
  radixHist[radixAt] += radixRun;
  inBandSeen[inBandAt] += inBandRun;
  job.atLeast[slot * SLOT_STRIDE] += atLeast;
}

/** Float64 entries between two threads' counts (each thread adds to its own as it goes): 64 bytes, one cache line each. */
const SLOT_STRIDE = 8;

/**
 * Bits of the GSD's sort key the strips' first pass drops (quantiles.ts GroupRadix.shift): bins
 * of 1/1024 of a doubling, eight to the site's radix bin. A strip's GSD spans a few of the
 * site's bins, so a wanted rank's site-sized bin held a tenth or more of the strip's cells:
 * at 4 km2 the quantiles' second pass gathered 7.0 M of the 16 M seen cells (28 MB) and
 * selected among them. The counters cost strips x span (~6 400 bins over the span below) x 4
 * bytes a thread: 4.3 MB a thread at 4 km2.
 */
const STRIP_BIN_SHIFT = 13;

/** The pass's counters of each strip's first radix pass over the bins of `spanCm`, if asked for and not too many. */
function stripSpanJob(spanCm: [number, number] | undefined, strips: number, threads: number): Pick<StatsPassJob, "spanLo" | "span" | "stripHist" | "stripBelow" | "stripAbove"> {
  if (!spanCm || !(spanCm[0] > 0) || !(spanCm[1] >= spanCm[0]) || !Number.isFinite(spanCm[1])) return {};
  const spanLo = binOfValue(spanCm[0], STRIP_BIN_SHIFT);
  const span = binOfValue(spanCm[1], STRIP_BIN_SHIFT) - spanLo + 1;
  if (strips * span > MAX_STRIP_BINS) return {};
  return {
    spanLo, span,
    stripHist: new Uint32Array(buffer(threads, 4 * threads * strips * span)),
    stripBelow: new Uint32Array(buffer(threads, 4 * threads * strips)),
    stripAbove: new Uint32Array(buffer(threads, 4 * threads * strips)),
  };
}

/**
 * For each strip bin spanLo .. spanLo + span - 1 (float32 sort keys >>> STRIP_BIN_SHIFT), the
 * tally's entry (tallyCounter from 0) counting every value of the bin, or -1 where its values
 * fall in different entries (its first and last float32 do) or some are not counted (NaN, the
 * infinities). A tally bin of 0.01 cm holds ~4 strip bins at 2.5 cm, so most are whole.
 * @example tallyOfStripBins({ first: 180, stepCm: 0.01, bins: 150 }, edges, binOfValue(2.2, 13), 300)
 */
export function tallyOfStripBins(grid: GsdTallyGrid, edges: Float64Array, spanLo: number, span: number): Int32Array {
  const counter = tallyCounter(grid, new Float64Array(grid.bins + 2), 0, edges);
  const out = new Int32Array(span);
  const width = 2 ** STRIP_BIN_SHIFT;
  for (let b = 0; b < span; b++) {
    const first = counter.slotOf(float32OfSortKey((spanLo + b) * width));
    const last = counter.slotOf(float32OfSortKey((spanLo + b + 1) * width - 1));
    out[b] = first === last ? first : -1;
  }
  return out;
}

/** Adds the strips' bins (summed over threads: strips x span) to the tally's entries they map to whole (tallyOfStripBins), at slot 0. */
function tallyFromStripBins(tally: Float64Array, map: Int32Array, hist: Uint32Array, strips: number): void {
  const span = map.length;
  for (let s = 0; s < strips; s++) {
    for (let b = 0; b < span; b++) {
      const k = map[b];
      if (k >= 0) tally[k] += hist[s * span + b];
    }
  }
}

/** Memory for the statistics' pass: shared when other threads fill it. */
function buffer(threads: number, bytes: number): ArrayBufferLike {
  // Counters: zeros written before the first count is read (zeroFill.ts).
  const b = threads > 1 ? new SharedArrayBuffer(bytes) : new ArrayBuffer(bytes);
  zeroFilled(new Uint8Array(b));
  return b;
}

/** The per-slot tallies added up (slot 0's own array when there is one slot). */
function sumOfSlots<T extends Float64Array | Uint32Array>(a: T, slots: number): T {
  const len = a.length / slots;
  const out = a.subarray(0, len) as T;
  for (let t = 1; t < slots; t++) for (let k = 0; k < len; k++) out[k] += a[t * len + k];
  return out;
}

/** Refuses a coverage pass's table of seen cells made for another number of strips than 0..maxStrip. */
function checkSeenTable(seen: SeenByBand, maxStrip: number): void {
  if (seen.strips !== maxStrip + 1) throw new Error(`seen cells counted for ${seen.strips} strips, ${maxStrip + 1} expected`);
}

function pct(part: number, whole: number): number {
  return whole > 0 ? (100 * part) / whole : 0;
}

/**
 * @example
 * const stats = assessmentStats({ gsdCm, images, flags, inSite, ground: grid.heights, nadirStrip, cellAreaM2: 0.25 });
 * stats.gsdCm.median; stats.flagged.byKind.coarse.areaM2;
 */
export function assessmentStats(input: StatsInput): AssessmentStats {
  const { gsdCm, images, flags, inSite, ground, nadirStrip, cellAreaM2 } = input;
  const n = inSite.length;
  let maxStrip = input.maxStrip ?? -1;
  if (maxStrip < 0) for (let i = 0; i < n; i++) if (inSite[i] === 1 && nadirStrip[i] > maxStrip) maxStrip = nadirStrip[i];
  maxStrip = Math.max(0, maxStrip);

  const S = maxStrip + 1;
  // The coverage pass's table of seen cells per band and strip must be for these strips.
  if (input.seenByBand) checkSeenTable(input.seenByBand, maxStrip);

  // With the coverage pass's bands, the cells can be taken band by band on several threads,
  // the tallies kept per thread.
  const banded = input.seenByBand;
  const bands = banded ? banded.counts.length / S : 1;
  const threads = banded && splitAllowed(n, input.threads) ? bandThreads(n, bands, input.threads) : 1;
  const spanJob = stripSpanJob(input.stripSpanCm, S, threads);
  const edges = input.gsdTally ? tallyEdges(input.gsdTally) : undefined;
  const job: StatsPassJob = {
    gsdCm: shareable(gsdCm, threads), images: shareable(images, threads), flags: shareable(flags, threads),
    inSite: shareable(inSite, threads), ground: shareable(ground, threads), nadirStrip: shareable(nadirStrip, threads),
    strips: S, bandCells: banded ? banded.bandCells : n,
    flagHist: new Float64Array(buffer(threads, 8 * threads * S * FLAG_VALUES)),
    imageHist: new Float64Array(buffer(threads, 8 * threads * 65536)),
    inBandSeen: new Float64Array(buffer(threads, 8 * threads * S)),
    radixHist: new Uint32Array(buffer(threads, 4 * threads * RADIX_BINS)),
    atLeastCm: input.gsdAtLeastCm ?? Infinity,
    atLeast: new Float64Array(buffer(threads, 8 * SLOT_STRIDE * threads)),
    ...(input.gsdTally && edges ? { tallyGrid: input.gsdTally, tallyEdges: edges, tally: new Float64Array(buffer(threads, 8 * threads * (input.gsdTally.bins + 2))) } : {}),
    ...spanJob,
    ...(input.gsdTally && edges && spanJob.stripHist ? { tallyOfStripBin: tallyOfStripBins(input.gsdTally, edges, spanJob.spanLo!, spanJob.span!) } : {}),
    ...(input.cellsIn ? { cellsIn: input.cellsIn } : {}),
  };
  runBands("stats", job, bands, threads, statsPassBands, input.bandPool);
  const flagHist = sumOfSlots(job.flagHist, threads);
  const imageHist = sumOfSlots(job.imageHist, threads);
  const inBandSeen = sumOfSlots(job.inBandSeen, threads);
  const radixHist = sumOfSlots(job.radixHist, threads);
  const stripHist = job.stripHist ? sumOfSlots(job.stripHist, threads) : undefined;
  if (job.tally && job.tallyOfStripBin && stripHist) tallyFromStripBins(job.tally, job.tallyOfStripBin, stripHist, S);

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
        // A plain loop: a callback made per nonzero bin was ~14 MB of garbage at 4 km2.
        for (let k = 0; k < ASSESSMENT_FLAG_KINDS.length; k++) if (f & ASSESSMENT_FLAG_KINDS[k].bit) cells[k] += c;
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

  // The site's GSD quantiles from the pass's radix tallies; each strip's from its own, counted
  // in the pass over the bins around the band (stripSpanCm), one more pass gathering the bins
  // that hold the wanted ranks of both (quantiles.ts quantilesOfAllAndGroups; for a strip
  // with a wanted rank beyond that span, quantilesOfGroups): no copy of the GSD grouped by
  // strip (4 bytes a seen cell) is made.
  const byStrip: GroupRadix | undefined = stripHist && job.stripBelow && job.stripAbove && job.span !== undefined && job.spanLo !== undefined
    ? { lo: job.spanLo, span: job.span, shift: STRIP_BIN_SHIFT, hist: stripHist, below: sumOfSlots(job.stripBelow, threads), above: sumOfSlots(job.stripAbove, threads) }
    : undefined;
  // Its pass over the cells on two of the statistics' pass's threads, band by band.
  const gather: GatherBands | undefined = threads > 1
    ? { bandCells: job.bandCells, run: (g, gatherBandCount) => runBands("gather", g, gatherBandCount, 2, gatherBands, input.bandPool) }
    : undefined;
  const q = quantilesOfAllAndGroups(job.gsdCm, job.nadirStrip, job.inSite, S, QUANTILES, radixHist, byStrip, gather, input.cellsIn);
  const siteGsd = gsdStats(q.all);
  const stripQuantiles = q.groups;
  const stripGsd = (s: number): GsdStats => gsdStats(stripQuantiles.subarray(s * QUANTILES.length, (s + 1) * QUANTILES.length));

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
    gsdCm: siteGsd,
    withinBandPct: pct(inBand, site.all),
    images: countStatsOfHistogram(imageHist),
    flagged: { cells: site.flagged, areaM2: site.flagged * cellAreaM2, byKind: byKind(site.cells, site.all), effectCells: site.effect },
    perStrip,
    ...(input.gsdAtLeastCm !== undefined ? { gsdAtLeast: { cm: input.gsdAtLeastCm, cells: sumOfSlots(job.atLeast, threads)[0] } } : {}),
    ...(job.tallyGrid && job.tally ? { gsdTally: tallyOfSlots(job.tallyGrid, job.tally, threads) } : {}),
  };
}
