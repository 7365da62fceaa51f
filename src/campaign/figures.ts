/**
 * A site's headline figures, from its summary.json, and the check that its outputs
 * are current (a complete output set whose summary carries the same inputs hash).
 */
import { access, readFile } from "node:fs/promises";
import path from "node:path";
import type { SiteFigures } from "./types.js";

/** The key the inputs hash is written under in summary.json. */
export const INPUTS_HASH_KEY = "inputsHash";

/**
 * The figures campaign.csv shows, from a summary (as planSummary returns it or as read back).
 * @example figuresFromSummary(JSON.parse(summaryJson)).photos
 */
export function figuresFromSummary(s: {
  areaM2: number;
  flights: number;
  batteries: number;
  photos: number;
  flightTimeS: number;
  withinBandPct: number;
  flagged: { pct: number };
}): SiteFigures {
  return {
    areaM2: s.areaM2,
    flights: s.flights,
    batteries: s.batteries,
    photos: s.photos,
    flightTimeS: s.flightTimeS,
    withinBandPct: s.withinBandPct,
    flaggedPct: s.flagged.pct,
  };
}

/**
 * The figures of a site whose outputs in `siteDir` are current for `hash` (every file
 * of `outputNames` present, summary.json carrying the same inputs hash), else null.
 * @example await currentFigures("out/gorge", hash, OUTPUT_NAMES) // null after the DEM changed
 */
export async function currentFigures(siteDir: string, hash: string, outputNames: readonly string[]): Promise<SiteFigures | null> {
  let summary: Record<string, unknown>;
  try {
    summary = JSON.parse(await readFile(path.join(siteDir, "summary.json"), "utf8")) as Record<string, unknown>;
  } catch {
    return null;
  }
  if (summary[INPUTS_HASH_KEY] !== hash) return null;
  for (const n of outputNames) {
    if (!(await access(path.join(siteDir, n)).then(() => true, () => false))) return null;
  }
  try {
    return figuresFromSummary(summary as unknown as Parameters<typeof figuresFromSummary>[0]);
  } catch {
    return null;
  }
}

/**
 * summary.json's text with the inputs hash added as its last key (the rest unchanged:
 * JSON numbers written by JSON.stringify read back and print the same).
 * @example withInputsHash('{\n  "site": "a"\n}\n', "sha256:ab") // '{\n  "site": "a",\n  "inputsHash": "sha256:ab"\n}\n'
 */
export function withInputsHash(summaryJson: string, hash: string): string {
  const s = JSON.parse(summaryJson) as Record<string, unknown>;
  s[INPUTS_HASH_KEY] = hash;
  return JSON.stringify(s, null, 2) + "\n";
}
