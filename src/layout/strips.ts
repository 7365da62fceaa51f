/**
 * The flight-strip layout over a site: heading (given or chosen), strips and
 * transits in flight order. Everything in the site's local frame, metres.
 */
import { InputError } from "../errors.js";
import type { DemGrid } from "../dem/grid.js";
import type { Layout, Site, XY } from "./types.js";
import { chooseHeading, scoreHeading, type HeadingCostOptions } from "./heading.js";
import { stripLegsAtHeading, type StripLineOptions } from "./strip-lines.js";

export interface LayoutOptions {
  /** Strip direction, degrees clockwise from grid north, or `auto` to choose it. */
  headingDeg: number | "auto";
  /** Strip spacing, metres: footprint across * (1 - side overlap). */
  spacingM: number;
  /** Trigger distance, metres: footprint along * (1 - front overlap). */
  triggerM: number;
  footprintAcrossM: number;
  footprintAlongM: number;
  /** Take-off point in the local frame; default the outer-ring corner nearest the first strip's start. */
  takeoff?: XY;
  photoSpeedMps: number;
  transitSpeedMps: number;
  /** DEM in the local frame: makes `auto` terrain-aware. */
  grid?: DemGrid;
  /** Climb rate converting altitude change to time in the `auto` score, m/s (default 3). */
  maxClimbMps?: number;
  /** Per-turn cost in the `auto` score, seconds (default 10). */
  turnCostS?: number;
  /** How far photos continue over a hole, metres (default footprintAlongM / 2). */
  holeMarginM?: number;
  /** Where no leg may go along a segment (see StripLineOptions.keepOut): strips are cut there. */
  keepOut?: StripLineOptions["keepOut"];
  /** Band workers to share the `auto` choice's terrain terms with, and threads (HeadingCostOptions). */
  bandPool?: HeadingCostOptions["bandPool"];
  threads?: number;
}

/**
 * Lays out parallel strips over the site (see `stripLegsAtHeading` for the
 * placement rules and `chooseHeading` for `auto`).
 * @example
 * const layout = layoutStrips(site, { headingDeg: "auto", spacingM: 40, triggerM: 20,
 *   footprintAcrossM: 100, footprintAlongM: 66, photoSpeedMps: 8, transitSpeedMps: 12, grid });
 * layout.legs.filter((l) => l.kind === "strip").length
 */
export function layoutStrips(site: Site, opts: LayoutOptions): Layout {
  for (const key of ["spacingM", "triggerM", "footprintAcrossM", "footprintAlongM", "photoSpeedMps", "transitSpeedMps"] as const) {
    const v = opts[key];
    if (!(typeof v === "number" && Number.isFinite(v) && v > 0)) throw new InputError(`layout.${key}`, v, "a number > 0");
  }
  for (const key of ["maxClimbMps", "turnCostS", "holeMarginM"] as const) {
    const v = opts[key];
    if (v !== undefined && !(Number.isFinite(v) && v >= (key === "maxClimbMps" ? Number.MIN_VALUE : 0))) {
      throw new InputError(`layout.${key}`, v, key === "maxClimbMps" ? "a number > 0" : "a number >= 0");
    }
  }
  if (opts.takeoff && !(opts.takeoff.length === 2 && opts.takeoff.every(Number.isFinite))) {
    throw new InputError("layout.takeoff", opts.takeoff, "an [x, y] point in the local frame, metres");
  }
  const cost: HeadingCostOptions = {
    photoSpeedMps: opts.photoSpeedMps,
    transitSpeedMps: opts.transitSpeedMps,
    turnCostS: opts.turnCostS,
    grid: opts.grid,
    maxClimbMps: opts.maxClimbMps,
    ...(opts.bandPool ? { bandPool: opts.bandPool } : {}),
    ...(opts.threads !== undefined ? { threads: opts.threads } : {}),
  };
  const lineOpts = { spacingM: opts.spacingM, footprintAlongM: opts.footprintAlongM, holeMarginM: opts.holeMarginM, takeoff: opts.takeoff, keepOut: opts.keepOut };

  let headingDeg: number;
  let headingCandidates: Layout["headingCandidates"];
  let headingReason: string;
  if (opts.headingDeg === "auto") {
    const chosen = chooseHeading(site, { ...lineOpts, ...cost });
    headingCandidates = chosen.candidates;
    headingDeg = chosen.candidates[0].headingDeg;
    headingReason = chosen.reason;
  } else {
    const given = opts.headingDeg;
    if (!(typeof given === "number" && Number.isFinite(given))) {
      throw new InputError("layout.headingDeg", given, "degrees clockwise from grid north, or \"auto\"");
    }
    // A strip flown either way is the same strip: headings are kept in [0, 180).
    headingDeg = ((given % 180) + 180) % 180;
    headingCandidates = [scoreHeading(site, headingDeg, { ...lineOpts, ...cost })];
    headingReason = `heading ${headingDeg} as given`;
  }
  const { legs, takeoff, keepOutCuts } = stripLegsAtHeading(site, headingDeg, lineOpts);
  return {
    headingDeg,
    spacingM: opts.spacingM,
    triggerM: opts.triggerM,
    footprintAcrossM: opts.footprintAcrossM,
    footprintAlongM: opts.footprintAlongM,
    legs,
    takeoff,
    headingCandidates,
    headingReason,
    ...(keepOutCuts.length ? { keepOutCuts } : {}),
  };
}
