/**
 * With `assumeGroundM`, legs may cross ground the DEM does not know, flown on the
 * assumed height: each crossing is said, with its length, so the pilot can check it.
 */
import type { DemGrid } from "../dem/grid.js";
import { sampleBilinear } from "../dem/sample.js";
import type { SolvedLeg, SolveWarning } from "../solve/types.js";

/**
 * One warning per leg that crosses unknown ground (a station whose bilinear
 * ground needs a nodata cell, or lies beyond the DEM's outermost cell centres),
 * listing each crossing's length along the leg.
 * @example assumedGroundCrossings(grid, flownLegs, 350)[0]?.message
 */
export function assumedGroundCrossings(grid: DemGrid, legs: readonly SolvedLeg[], assumeGroundM: number): SolveWarning[] {
  const out: SolveWarning[] = [];
  for (const leg of legs) {
    const p = leg.profile;
    const n = p.s.length;
    // The DEM's own bilinear ground: NaN where it needs a nodata cell or lies off the grid.
    const ground = sampleBilinear(grid, p.x, p.y);
    const runs: number[] = [];
    let start = -1;
    for (let k = 0; k <= n; k++) {
      const unknown = k < n && !Number.isFinite(ground[k]);
      if (unknown && start < 0) start = k;
      if (!unknown && start >= 0) {
        // From half a step before the first unknown station to half a step past the last.
        const a = start > 0 ? (p.s[start - 1] + p.s[start]) / 2 : p.s[start];
        const b = k < n ? (p.s[k - 1] + p.s[k]) / 2 : p.s[k - 1];
        runs.push(b - a);
        start = -1;
      }
    }
    if (!runs.length) continue;
    const what = leg.kind === "strip" ? `Strip ${leg.strip}` : leg.conflictGap ? `Bridge over strip ${leg.strip}` : `Leg into strip ${leg.strip}`;
    const total = runs.reduce((s, v) => s + v, 0);
    out.push({
      code: "assumed-ground",
      strip: leg.strip,
      message:
        `${what} crosses ground the DEM does not know ${runs.length === 1 ? "once" : `${runs.length} times`} (${runs.map((r) => `${Math.max(1, Math.round(r))} m`).join(", ")}; ${Math.round(total)} m in all), ` +
        `flown on the assumed ground height of ${assumeGroundM} m: check the ground there before flying.`,
    });
  }
  return out;
}
