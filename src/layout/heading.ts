/**
 * Choosing the strip heading. Each candidate heading is laid out in full and
 * scored in seconds: the flight time, plus the time the terrain forces the
 * aircraft to spend changing altitude along the strips. Flying along the
 * contours of a slope keeps the ground under a strip level, so the camera
 * height needs little changing; flying up and down the slope needs a lot.
 */
import type { DemGrid } from "../dem/grid.js";
import { bandThreads, runBands, type BandPool } from "../assess/bandThreads.js";
import { altitudeChangeOf, headingTerrainBands, headingTerrainJob } from "./headingTerrain.js";
import type { LayoutLeg, Site } from "./types.js";
import { stripLegsAtHeading, type StripLineOptions } from "./strip-lines.js";

export interface HeadingCostOptions {
  /** Ground speed on strips (photos), m/s. */
  photoSpeedMps: number;
  /** Ground speed on transit legs, m/s. */
  transitSpeedMps: number;
  /**
   * Extra time per turn from one strip to the next, seconds (default 10):
   * slowing, turning through 180 degrees and settling on the new line, on top
   * of the straight transit between the strip ends. A planning assumption,
   * not a measured figure; the turn count is what differs between headings.
   */
  turnCostS?: number;
  /** DEM in the local frame for the terrain term; without it only flight time counts. */
  grid?: DemGrid;
  /** Climb/descent rate converting altitude change to time, m/s (default 3). */
  maxClimbMps?: number;
  /** Ground sampling step along strips for the terrain term, metres (default: the DEM cell size). */
  terrainStepM?: number;
  /** Candidate step, degrees (default 5). */
  headingStepDeg?: number;
  /** Worker threads to share the candidates' terrain terms with (bandThreads.ts); default: this thread alone. */
  bandPool?: BandPool;
  /** Threads to use with bandPool (default: bandThreads' own). */
  threads?: number;
}

export interface HeadingCandidate {
  headingDeg: number;
  flightTimeS: number;
  /** Sum of |change of ground height| along all strip legs, metres. */
  altitudeChangeM: number;
  /** flightTimeS + altitudeChangeM / maxClimbMps, seconds. */
  score: number;
}

export const DEFAULT_TURN_COST_S = 10;
export const DEFAULT_MAX_CLIMB_MPS = 3;

/**
 * Flight time of a leg list: strip length / photo speed + transit length /
 * transit speed + turnCostS per change from one strip to the next.
 * @example flightTimeS(layout.legs, 8, 12, 10)
 */
export function flightTimeS(legs: readonly LayoutLeg[], photoSpeedMps: number, transitSpeedMps: number, turnCostS = DEFAULT_TURN_COST_S): number {
  let t = 0;
  let lastStrip = 0;
  let turns = 0;
  for (const leg of legs) {
    t += leg.lengthM / (leg.kind === "strip" ? photoSpeedMps : transitSpeedMps);
    if (leg.kind === "strip") {
      if (lastStrip !== 0 && leg.strip !== lastStrip) turns++;
      lastStrip = leg.strip;
    }
  }
  return t + turns * turnCostS;
}

/**
 * Total |change of ground height| along the strip legs, sampled every
 * `stepM` metres (bilinear); samples without data are skipped.
 * @example terrainAltitudeChangeM(layout.legs, grid, 5)
 */
export function terrainAltitudeChangeM(legs: readonly LayoutLeg[], grid: DemGrid, stepM: number): number {
  return altitudeChangeOf(headingTerrainJob(grid, [legs], stepM, false), 0);
}

/**
 * Scores every candidate heading in [0, 180) and returns them best first
 * with a sentence saying why the winner won.
 * @example
 * const { candidates, reason } = chooseHeading(site, { spacingM: 40, footprintAlongM: 50, photoSpeedMps: 8, transitSpeedMps: 12, grid });
 * candidates[0].headingDeg // 120
 */
export function chooseHeading(site: Site, opts: StripLineOptions & HeadingCostOptions): { candidates: HeadingCandidate[]; reason: string } {
  const stepDeg = opts.headingStepDeg ?? 5;
  const climb = opts.maxClimbMps ?? DEFAULT_MAX_CLIMB_MPS;
  const laidOut: { headingDeg: number; legs: LayoutLeg[] }[] = [];
  for (let hd = 0; hd < 180 - 1e-9; hd += stepDeg) laidOut.push({ headingDeg: hd, legs: stripLegsAtHeading(site, hd, opts).legs });
  // The terrain terms of all candidates in one job, shared with the band workers when given.
  const change = opts.grid ? altitudeChanges(laidOut.map((c) => c.legs), opts.grid, terrainStep(opts), opts) : undefined;
  const candidates = laidOut.map((c, j) => candidate(c.headingDeg, c.legs, change ? change[j] : 0, opts));
  // Ties (a square over flat ground) go to the smaller heading, so the choice is stable.
  // (Scores are compared to the microsecond so float noise does not break ties.)
  candidates.sort((p, q) => Math.round(p.score * 1e6) - Math.round(q.score * 1e6) || p.headingDeg - q.headingDeg);
  return { candidates, reason: headingReason(candidates, opts.grid !== undefined, climb) };
}

/**
 * Score of one heading.
 * @example scoreHeading(site, 90, opts).score
 */
export function scoreHeading(site: Site, headingDeg: number, opts: StripLineOptions & HeadingCostOptions): HeadingCandidate {
  const { legs } = stripLegsAtHeading(site, headingDeg, opts);
  return candidate(headingDeg, legs, opts.grid ? terrainAltitudeChangeM(legs, opts.grid, terrainStep(opts)) : 0, opts);
}

/** A heading's figures from its legs and their terrain term. */
function candidate(headingDeg: number, legs: readonly LayoutLeg[], altitudeChangeM: number, opts: HeadingCostOptions): HeadingCandidate {
  const climb = opts.maxClimbMps ?? DEFAULT_MAX_CLIMB_MPS;
  const flight = flightTimeS(legs, opts.photoSpeedMps, opts.transitSpeedMps, opts.turnCostS);
  return { headingDeg: round6(headingDeg), flightTimeS: flight, altitudeChangeM, score: flight + altitudeChangeM / climb };
}

/** The terrain term's sampling step: as given, else the DEM's cell. */
function terrainStep(opts: HeadingCostOptions): number {
  return opts.terrainStepM ?? (opts.grid ? Math.min(opts.grid.cellSizeM[0], opts.grid.cellSizeM[1]) : 0);
}

/**
 * terrainAltitudeChangeM of each candidate's legs: the candidates shared between this thread
 * and the band workers of `opts.bandPool` when one is given and the heights are in shared
 * memory (the DEM window's are: dem/window.ts), else all on this thread. At 0.5 m cells the
 * term samples every cell along every strip of every candidate (~6 M samples at 4 km2, ~40 M
 * at 25 km2), the most of the layout's time.
 */
function altitudeChanges(candidates: readonly (readonly LayoutLeg[])[], grid: DemGrid, stepM: number, opts: HeadingCostOptions): Float64Array {
  const threads = opts.bandPool && grid.heights.buffer instanceof SharedArrayBuffer ? bandThreads(grid.width * grid.height, candidates.length, opts.threads) : 1;
  const job = headingTerrainJob(grid, candidates, stepM, threads > 1);
  runBands("heading", job, candidates.length, threads, headingTerrainBands, opts.bandPool);
  return job.altitudeChangeM;
}

function headingReason(c: HeadingCandidate[], withTerrain: boolean, climbMps: number): string {
  const best = c[0];
  const next = c.find((k) => Math.abs(angleDiff(k.headingDeg, best.headingDeg)) > 10) ?? c[1];
  const head = `heading ${fmt(best.headingDeg)}`;
  if (!next) return `${head}: the only candidate`;
  const time = compare(best.flightTimeS, next.flightTimeS, "flight time");
  const terms = [time];
  if (withTerrain) terms.push(compare(best.altitudeChangeM, next.altitudeChangeM, "forced altitude change"));
  const nextText = withTerrain
    ? `heading ${fmt(next.headingDeg)}: ${Math.round(next.flightTimeS)} s and ${Math.round(next.altitudeChangeM)} m against ${Math.round(best.flightTimeS)} s and ${Math.round(best.altitudeChangeM)} m`
    : `heading ${fmt(next.headingDeg)}: ${Math.round(next.flightTimeS)} s against ${Math.round(best.flightTimeS)} s`;
  const tail = withTerrain
    ? `; score = flight time + altitude change / ${climbMps} m/s`
    : "; no DEM given, so only flight time counted";
  return `${head}: ${terms.join(" and ")}, compared with the best heading more than 10 degrees away (${nextText})${tail}`;
}

function compare(best: number, other: number, what: string): string {
  if (other <= 0 && best <= 0) return `equal ${what}`;
  const pct = ((other - best) / Math.max(other, 1e-12)) * 100;
  if (Math.abs(pct) < 0.5) return `about equal ${what}`;
  return pct > 0 ? `${Math.round(pct)}% less ${what}` : `${Math.round(-pct)}% more ${what}`;
}

function angleDiff(a: number, b: number): number {
  let d = (a - b) % 180;
  if (d > 90) d -= 180;
  if (d < -90) d += 180;
  return d;
}

function round6(x: number): number {
  return Math.round(x * 1e6) / 1e6;
}

function fmt(deg: number): string {
  return Number.isInteger(deg) ? String(deg) : deg.toFixed(1);
}
