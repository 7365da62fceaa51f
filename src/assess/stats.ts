import type { AssessmentStats, GsdStats } from "./types.js";
import type { SeenByBand } from "./coverageKernel.js";
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
  /** Seen site cells per band and nadir strip, counted by the coverage pass (saves the pass that counts them here). */
  seenByBand?: SeenByBand;
}

const QUANTILES = [0, 0.05, 0.5, 0.95, 1];

function gsdStats(values: Float32Array, radix?: RadixHistogram): GsdStats {
  const [min, p5, median, p95, max] = radix ? quantilesOfRadix(values, radix) : quantilesFloat32(values, QUANTILES);
  return { min, p5, median, p95, max };
}

function quantilesOfRadix(values: Float32Array, radix: RadixHistogram): number[] {
  const { n, stats } = orderStatisticsOfRadix(values, radix, (m) => ranksOf(m, QUANTILES));
  return n === 0 ? QUANTILES.map(() => NaN) : interpolate(n, QUANTILES, stats);
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
  const seenCount = input.seenByBand ? seenOfBands(input.seenByBand, maxStrip) : seenOfCells(inSite, gsdCm, nadirStrip, maxStrip);
  const start = new Int32Array(maxStrip + 2);
  for (let s = 0; s <= maxStrip; s++) start[s + 1] = start[s] + seenCount[s];
  const grouped = new Float32Array(start[maxStrip + 1]);
  const fill = start.slice();

  // One pass: a histogram of flag values per strip (strip 0: cells no photo sees) gives every
  // count; flag kinds are read off the 512 bins afterwards instead of testing 9 bits per cell.
  // The same pass counts image counts of site cells with data (their min and median), groups
  // the seen cells' GSD by strip, counts the seen cells in band per strip, and makes the first
  // radix pass of the site's GSD quantiles (quantiles.ts).
  const flagHist = new Float64Array((maxStrip + 1) * FLAG_VALUES);
  const imageHist = new Float64Array(65536);
  const inBandSeen = new Float64Array(maxStrip + 1);
  const gsdBits = float32Keys(gsdCm);
  const radixHist = new Uint32Array(RADIX_BINS);
  for (let i = 0; i < n; i++) {
    if (inSite[i] === 0) continue;
    if (valid[i] === 1) imageHist[images[i]]++;
    const s = nadirStrip[i];
    const f = flags[i];
    flagHist[s * FLAG_VALUES + f]++;
    const g = gsdCm[i];
    if (g !== g) continue;
    grouped[fill[s]++] = g;
    radixHist[radixBin(gsdBits[i])]++;
    if ((f & (FLAG_COARSE | FLAG_FINE)) === 0) inBandSeen[s]++;
  }
  for (let s = 0; s <= maxStrip; s++) {
    if (fill[s] !== start[s + 1]) throw new Error(`strip ${s}: ${fill[s] - start[s]} seen cells grouped, ${seenCount[s]} counted`);
  }

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

  const perStrip: AssessmentStats["perStrip"] = [];
  for (let s = 1; s <= maxStrip; s++) {
    const k = kindCounts(s, s);
    if (k.all === 0) continue;
    perStrip.push({
      strip: s,
      cells: k.all,
      gsdCm: gsdStats(grouped.subarray(start[s], start[s + 1])),
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
    gsdCm: gsdStats(grouped, { hist: radixHist, n: grouped.length }),
    withinBandPct: pct(inBand, site.all),
    images: countStatsOfHistogram(imageHist),
    flagged: { cells: site.flagged, areaM2: site.flagged * cellAreaM2, byKind: byKind(site.cells, site.all), effectCells: site.effect },
    perStrip,
  };
}
