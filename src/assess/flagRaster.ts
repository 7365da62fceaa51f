import type { DemGrid } from "../dem/grid.js";
import {
  CAUSE_CEILING,
  CAUSE_CLEARANCE,
  CAUSE_CLIMB,
  CAUSE_NODATA,
  CAUSE_RELIEF,
  STATUS_UNFLYABLE,
  type SolvedLeg,
} from "../solve/types.js";
import { FLAG_CEILING, FLAG_CLEARANCE, FLAG_FEW_IMAGES, FLAG_KEEP_OUT, FLAG_NODATA, FLAG_RELIEF, FLAG_UNFLYABLE } from "./flags.js";
import { orientedRectColSpan, orientedRectRowRange } from "./orientedRect.js";

/**
 * The per-cell flag bitmask, in two independent halves:
 * - effect bits (coarse, fine, too few images) are the assessment's own
 *   measurement from the photos placed on the final waypoints;
 * - cause bits (ceiling, clearance or climb, unflyable, relief) are the solver's
 *   explanation, painted from its station statuses onto the zone each
 *   station images best. No-data comes from the DEM itself.
 * Keeping them apart lets a test check that the two agree: every cell the
 * measurement finds out of band should carry a cause the solver gave. The
 * effect bits are set by the coverage pass itself (coverageKernel.ts), band by
 * band; this module paints the causes and the keep-out effect.
 */

/** Flag bits a station paints: the solver's cause bits mapped onto the assessment's. */
export function stationFlagBits(status: number, cause: number): number {
  let f = 0;
  if (cause & CAUSE_CEILING) f |= FLAG_CEILING;
  if (cause & (CAUSE_CLEARANCE | CAUSE_CLIMB)) f |= FLAG_CLEARANCE;
  if (cause & CAUSE_NODATA) f |= FLAG_NODATA;
  if (cause & CAUSE_RELIEF) f |= FLAG_RELIEF;
  if (status === STATUS_UNFLYABLE) f |= FLAG_UNFLYABLE;
  return f;
}

/**
 * OR each strip station's cause bits (and those of transits bridging a strip's
 * unflyable stretch) into the site cells of its zone: the
 * rectangle around the station reaching `zoneHalfAcrossM` across the track
 * and half the station step along it (half the gap to each neighbour, so
 * zones tile the strip without holes where stations are unevenly spaced).
 * @example
 * paintCauseZones(flags, grid, inSite, solved.legs, layout.spacingM / 2);
 */
export function paintCauseZones(
  flags: Uint16Array,
  grid: DemGrid,
  inSite: Uint8Array,
  legs: readonly SolvedLeg[],
  zoneHalfAcrossM: number,
): void {
  const { width, height } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const rows = new Int32Array(2);
  const span = new Int32Array(2);
  const profiles: SolvedLeg["profile"][] = [];
  for (const leg of legs) {
    // Strip ends over unknown ground that a transit replaced still lie over their strips' zones.
    profiles.push(...(leg.trimmed ?? []));
    // A transit bridging an unflyable stretch of a strip still lies over that strip's zone.
    if (leg.kind !== "strip" && !leg.conflictGap) continue;
    // A bridge routed around unknown ground keeps the strip's own stations it skipped.
    profiles.push(leg.skipped ?? leg.profile);
  }
  for (const p of profiles) {
    const m = p.s.length;
    if (m === 0) continue;
    const len = Math.hypot(p.x[m - 1] - p.x[0], p.y[m - 1] - p.y[0]);
    if (!(len > 0)) continue;
    const ux = (p.x[m - 1] - p.x[0]) / len;
    const uy = (p.y[m - 1] - p.y[0]) / len;
    for (let k = 0; k < m; k++) {
      const bits = stationFlagBits(p.status[k], p.cause[k]);
      if (bits === 0) continue;
      const back = k > 0 ? p.s[k] - p.s[k - 1] : k + 1 < m ? p.s[k + 1] - p.s[k] : 0;
      const ahead = k + 1 < m ? p.s[k + 1] - p.s[k] : back;
      // Symmetric half-length covering half of the larger gap keeps neighbouring zones touching.
      const halfAlong = Math.max(back, ahead) / 2;
      paintZone(flags, inSite, width, height, x0, y0, dx, dy, p.x[k], p.y[k], ux, uy, halfAlong, zoneHalfAcrossM, bits, rows, span);
    }
  }
}

/**
 * OR `bits` into the site cells of one station's zone (the rectangle around (px, py)). A
 * function of its own, called per flagged station: as the innermost loops of
 * paintCauseZones it ran in the interpreter until the whole function was compiled in
 * mid-call, then compiled again for its next call (three compiles and ~20 MB of boxed
 * numbers on the demo: node --trace-opt, the sampling heap profiler).
 */
function paintZone(
  flags: Uint16Array, inSite: Uint8Array, width: number, height: number, x0: number, y0: number, dx: number, dy: number,
  px: number, py: number, ux: number, uy: number, halfAlong: number, halfAcross: number, bits: number, rows: Int32Array, span: Int32Array,
): void {
  orientedRectRowRange(py, ux, uy, halfAlong, halfAcross, y0, dy, height, rows);
  for (let r = rows[0]; r <= rows[1]; r++) {
    orientedRectColSpan(y0 + (r + 0.5) * dy, px, py, ux, uy, halfAlong, halfAcross, x0, dx, width, span);
    const base = r * width;
    for (let c = span[0]; c <= span[1]; c++) if (inSite[base + c] === 1) flags[base + c] |= bits;
  }
}

/**
 * The keep-out bit on site cells with too few images that a cut stretch of a
 * strip would have imaged: the rectangle around the stretch reaching half the
 * footprint across the track and half the footprint past each end (a photo at
 * the stretch's end images that far along). Cells that lose images for another
 * reason elsewhere keep only the too-few-images bit.
 * @example paintKeepOutCuts(flags, grid, inSite, layout.keepOutCuts ?? [], 50, 33)
 */
export function paintKeepOutCuts(
  flags: Uint16Array,
  grid: DemGrid,
  inSite: Uint8Array,
  cuts: readonly { from: readonly [number, number]; to: readonly [number, number] }[],
  halfAcrossM: number,
  halfFootprintAlongM: number,
): void {
  const { width, height } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const rows = new Int32Array(2);
  const span = new Int32Array(2);
  for (const { from, to } of cuts) {
    const len = Math.hypot(to[0] - from[0], to[1] - from[1]);
    if (!(len > 0)) continue;
    const ux = (to[0] - from[0]) / len, uy = (to[1] - from[1]) / len;
    const px = (from[0] + to[0]) / 2, py = (from[1] + to[1]) / 2;
    const halfAlong = len / 2 + halfFootprintAlongM;
    orientedRectRowRange(py, ux, uy, halfAlong, halfAcrossM, y0, dy, height, rows);
    for (let r = rows[0]; r <= rows[1]; r++) {
      orientedRectColSpan(y0 + (r + 0.5) * dy, px, py, ux, uy, halfAlong, halfAcrossM, x0, dx, width, span);
      const base = r * width;
      for (let c = span[0]; c <= span[1]; c++) {
        const i = base + c;
        if (inSite[i] === 1 && (flags[i] & FLAG_FEW_IMAGES) !== 0) flags[i] |= FLAG_KEEP_OUT;
      }
    }
  }
}
