import type { AssessmentStats, GsdStats } from "./types.js";
import { FLAG_COARSE, FLAG_FINE, FLAG_KINDS } from "./flags.js";
import { countStats, quantilesFloat32 } from "./quantiles.js";

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
  flags: Uint8Array;
  inSite: Uint8Array;
  /** DEM data mask (DemGrid.valid). */
  valid: Uint8Array;
  /** Strip of the most nadir photo per cell, 0 where none. */
  nadirStrip: Uint16Array;
  cellAreaM2: number;
}

const QUANTILES = [0, 0.05, 0.5, 0.95, 1];

function gsdStats(values: Float32Array): GsdStats {
  const [min, p5, median, p95, max] = quantilesFloat32(values, QUANTILES);
  return { min, p5, median, p95, max };
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
  let siteCells = 0;
  let maxStrip = 0;
  let flaggedCells = 0;
  let inBand = 0;
  const kindCells = new Float64Array(FLAG_KINDS.length);
  const withData = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    if (inSite[i] === 0) continue;
    siteCells++;
    if (valid[i] === 1) withData[i] = 1;
    const f = flags[i];
    if (f !== 0) flaggedCells++;
    for (let k = 0; k < FLAG_KINDS.length; k++) if (f & FLAG_KINDS[k].bit) kindCells[k]++;
    if (gsdCm[i] === gsdCm[i] && (f & (FLAG_COARSE | FLAG_FINE)) === 0) inBand++;
    if (nadirStrip[i] > maxStrip) maxStrip = nadirStrip[i];
  }

  // Group the seen cells by strip (counting sort), so each strip's GSD is one contiguous run.
  const perStripCount = new Int32Array(maxStrip + 2);
  for (let i = 0; i < n; i++) if (inSite[i] === 1 && gsdCm[i] === gsdCm[i]) perStripCount[nadirStrip[i] + 1]++;
  const start = new Int32Array(maxStrip + 2);
  for (let s = 0; s <= maxStrip; s++) start[s + 1] = start[s] + perStripCount[s + 1];
  const grouped = new Float32Array(start[maxStrip + 1]);
  const fill = start.slice();
  const stripInBand = new Float64Array(maxStrip + 1);
  const stripKind = Array.from({ length: maxStrip + 1 }, () => new Float64Array(FLAG_KINDS.length));
  const stripCells = new Float64Array(maxStrip + 1);
  for (let i = 0; i < n; i++) {
    if (inSite[i] === 0) continue;
    const s = nadirStrip[i];
    const seen = gsdCm[i] === gsdCm[i];
    if (seen) grouped[fill[s]++] = gsdCm[i];
    if (s === 0) continue;
    stripCells[s]++;
    const f = flags[i];
    for (let k = 0; k < FLAG_KINDS.length; k++) if (f & FLAG_KINDS[k].bit) stripKind[s][k]++;
    if (seen && (f & (FLAG_COARSE | FLAG_FINE)) === 0) stripInBand[s]++;
  }

  const byKind = (counts: Float64Array, whole: number): Record<string, { cells: number; areaM2: number; pct: number }> => {
    const out: Record<string, { cells: number; areaM2: number; pct: number }> = {};
    FLAG_KINDS.forEach((kind, k) => {
      out[kind.key] = { cells: counts[k], areaM2: counts[k] * cellAreaM2, pct: pct(counts[k], whole) };
    });
    return out;
  };

  const perStrip: AssessmentStats["perStrip"] = [];
  for (let s = 1; s <= maxStrip; s++) {
    if (stripCells[s] === 0) continue;
    perStrip.push({
      strip: s,
      cells: stripCells[s],
      gsdCm: gsdStats(grouped.subarray(start[s], start[s + 1])),
      withinBandPct: pct(stripInBand[s], stripCells[s]),
      flagged: byKind(stripKind[s], stripCells[s]),
    });
  }

  return {
    siteCells,
    cellAreaM2,
    gsdCm: gsdStats(grouped),
    withinBandPct: pct(inBand, siteCells),
    images: countStats(images, withData),
    flagged: { cells: flaggedCells, areaM2: flaggedCells * cellAreaM2, byKind: byKind(kindCells, siteCells) },
    perStrip,
  };
}
