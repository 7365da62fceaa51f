import type { AssessmentStats, GsdStats } from "./types.js";
import { FLAG_COARSE, FLAG_FINE, FLAG_VALUES, ASSESSMENT_FLAG_KINDS } from "./flags.js";
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

  // One pass: a histogram of flag values per strip (strip 0: cells no photo sees) gives every
  // count; flag kinds are read off the 512 bins afterwards instead of testing 9 bits per cell.
  // The same pass counts image counts of site cells with data (their min and median).
  const flagHist = new Float64Array((maxStrip + 1) * FLAG_VALUES);
  const seenCount = new Int32Array(maxStrip + 2);
  const imageHist = new Float64Array(65536);
  for (let i = 0; i < n; i++) {
    if (inSite[i] === 0) continue;
    if (valid[i] === 1) imageHist[images[i]]++;
    const s = nadirStrip[i];
    flagHist[s * FLAG_VALUES + flags[i]]++;
    if (gsdCm[i] === gsdCm[i]) seenCount[s + 1]++;
  }
  const start = new Int32Array(maxStrip + 2);
  for (let s = 0; s <= maxStrip; s++) start[s + 1] = start[s] + seenCount[s + 1];
  const grouped = new Float32Array(start[maxStrip + 1]);
  const fill = start.slice();
  // Seen cells in band, per strip: no coarse/fine bit and a GSD.
  const inBandSeen = new Float64Array(maxStrip + 1);
  // The same pass makes the first radix pass of the site's GSD quantiles (quantiles.ts).
  const gsdBits = float32Keys(gsdCm);
  const radixHist = new Uint32Array(RADIX_BINS);
  for (let i = 0; i < n; i++) {
    if (inSite[i] === 0) continue;
    const g = gsdCm[i];
    if (g !== g) continue;
    const s = nadirStrip[i];
    grouped[fill[s]++] = g;
    radixHist[radixBin(gsdBits[i])]++;
    if ((flags[i] & (FLAG_COARSE | FLAG_FINE)) === 0) inBandSeen[s]++;
  }

  const kindCounts = (s0: number, s1: number): { cells: Float64Array; all: number; flagged: number } => {
    const cells = new Float64Array(ASSESSMENT_FLAG_KINDS.length);
    let all = 0;
    let flagged = 0;
    for (let s = s0; s <= s1; s++) {
      for (let f = 0; f < FLAG_VALUES; f++) {
        const c = flagHist[s * FLAG_VALUES + f];
        if (c === 0) continue;
        all += c;
        if (f !== 0) flagged += c;
        ASSESSMENT_FLAG_KINDS.forEach((kind, k) => {
          if (f & kind.bit) cells[k] += c;
        });
      }
    }
    return { cells, all, flagged };
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
    flagged: { cells: site.flagged, areaM2: site.flagged * cellAreaM2, byKind: byKind(site.cells, site.all) },
    perStrip,
  };
}
