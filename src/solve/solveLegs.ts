import { nodataFilled } from "../dem/dataMask.js";
import type { DemGrid } from "../dem/grid.js";
import { InputError } from "../errors.js";
import type { LayoutLeg, XY } from "../layout/types.js";
import { corridorAlong } from "./corridor.js";
import { clearanceFloorM } from "./clearance.js";
import { gradientLimits, segmentSpeed } from "./gradient.js";
import { minLinkPathOnLattice } from "./minLinkPath.js";
import { stationsAlongLeg, stationsAlongPolyline } from "./stations.js";
import { hardEnvelope, targetGates } from "./targetGates.js";
import {
  CAUSE_CLIMB,
  CAUSE_NODATA,
  STATUS_DETAIL_LIMITED,
  STATUS_OK,
  STATUS_UNFLYABLE,
  type SolvedLeg,
  type SolveResult,
  type SolverOptions,
  type SolveWarning,
  type StationProfile,
  type Waypoint,
} from "./types.js";
import { shapedSolverOptions } from "./optionsShape.js";
import { gsdRange, validateSolverOptions } from "./validate.js";

/**
 * Default spacing of the stations that may hold a waypoint, metres. Gates are
 * still checked at every station. Legs between waypoints run for tens to
 * hundreds of metres, so a 5 m lattice costs few waypoints (on the solve
 * benchmark's first 8 strips, 0.5 m stations: 148 / 84 / 63 strip waypoints
 * against 143 / 83 / 62 with every station, at 5 / 10 / 20 % tolerance),
 * while the search's work falls roughly with the square of the spacing
 * (there 1.5-2.8 s -> 0.2 s of CPU).
 */
export const DEFAULT_VERTEX_STEP_M = 5;

interface Piece {
  kind: "strip" | "transit";
  strip: number;
  profile: StationProfile;
  conflictGap: boolean;
  /** Waypoints added after the path: a vertical step onto the next leg's start height. */
  stepToM?: number;
  /** Waypoint added before the path: the previous leg's end height, left by a vertical step. */
  stepFromM?: number;
  /** Stations at the vertices of a polyline transit (first and last included): each becomes a waypoint. */
  corners?: Int32Array;
  /** The same bridge's straight profile along the strip (its skipped stations). */
  skipped?: StationProfile;
  /** Unflyable stretches at strip ends over unknown ground this transit replaces (see trimEndBridges). */
  trimmed?: StationProfile[];
}

/**
 * A piece with all its fields, in one order: pieces made with their fields in other orders,
 * or given one later, are objects of other shapes to the engine, and solvePiece's compiled
 * code, made for the first shape it met, was thrown away at each new one (node --trace-deopt:
 * "wrong map").
 */
function newPiece(
  kind: Piece["kind"], strip: number, conflictGap: boolean, corridor: { profile: StationProfile; corners?: Int32Array }, trimmed?: StationProfile[],
): Piece {
  return { kind, strip, profile: corridor.profile, conflictGap, stepToM: undefined, stepFromM: undefined, corners: corridor.corners, skipped: undefined, trimmed };
}

/**
 * Waypoint altitudes for every leg of a layout: strips through the detail
 * band, transits with clearance, fewest waypoints (see minLinkPath).
 *
 * - Strips are solved first, each on its own; transits after, starting at the
 *   previous leg's end height and ending at the next strip's start height.
 * - `onConflict: "skip"` ends a strip before an unflyable stretch (or nodata)
 *   and resumes after it; the gap becomes a transit (`conflictGap`) that keeps
 *   clearance. `"clearance"` flies conflicts keeping clearance and reports the
 *   ceiling breach. Nodata is never flown as a strip.
 * - Stations whose band was met pointwise but not reachable within the climb
 *   and descent limits become detail-limited with CAUSE_CLIMB.
 * Every altitude is metres AMSL; the result is a plan to check, not a permit:
 * local rules, airspace and the pilot in command decide.
 * @example solvePlan(grid, layout.legs, opts).legs[1].waypoints
 */
export function solvePlan(grid: DemGrid, legs: LayoutLeg[], given: SolverOptions): SolveResult {
  validateSolverOptions(given);
  const opts = shapedSolverOptions(given);
  const work = opts.assumeGroundM !== undefined ? nodataFilled(grid, opts.assumeGroundM) : grid;
  const warnings: SolveWarning[] = [];
  const pieces: Piece[] = [];
  const stripProfiles: StationProfile[] = [];
  const bandWidthM = Math.max(1, opts.band.hMaxM - opts.band.hMinM);

  // Transits' corridors wait until trimEndBridges has settled which transits are flown
  // (it remakes those beside a bridge at a strip's end): until then they carry only
  // their stations' ends.
  const pending = new Map<Piece, LayoutLeg>();
  for (const leg of legs) {
    if (leg.kind === "transit") {
      const piece = newPiece("transit", leg.strip, false, { profile: stationEnds(leg, opts) });
      pending.set(piece, leg);
      pieces.push(piece);
      continue;
    }
    const st = stationsAlongLeg(leg, opts.stationStepM, opts.zoneHalfAcrossM, opts.zoneHalfAlongM ?? opts.stationStepM / 2);
    const prof = corridorAlong(work, st, opts, { band: true });
    stripProfiles.push(prof);
    const first = pieces.length;
    splitStrip(prof, leg.strip, opts.onConflict, pieces);
    // A bridge between two flyable pieces of the strip goes around unknown ground where it can
    // (a bridge at a strip's end starts or ends on the unknown ground itself: left as it is).
    for (let i = first + 1; i < pieces.length - 1; i++) if (pieces[i].conflictGap) routeBridge(work, pieces[i], opts);
  }
  if (opts.routeAround) trimEndBridges(work, pieces, opts);
  for (const piece of pieces) {
    const leg = pending.get(piece);
    if (!leg) continue;
    const corridor = transitCorridor(work, leg, opts);
    piece.profile = corridor.profile;
    piece.corners = corridor.corners;
  }
  checkTargetReachable(stripProfiles, opts);

  const paths: (Float64Array | null)[] = pieces.map(() => null);
  const vertices: (Int32Array | null)[] = pieces.map(() => null);
  const solveOne = (i: number, pinStart?: number, pinEnd?: number) => {
    const p = pieces[i];
    const r = solvePiece(p, opts, bandWidthM, pinStart, pinEnd, warnings);
    paths[i] = r.altitudeM;
    vertices[i] = r.vertexStation;
    if (r.stepToM !== undefined) p.stepToM = r.stepToM;
    if (r.stepFromM !== undefined) p.stepFromM = r.stepFromM;
  };
  pieces.forEach((p, i) => { if (p.kind === "strip") solveOne(i); });
  pieces.forEach((p, i) => {
    if (p.kind !== "transit") return;
    const prev = i > 0 ? paths[i - 1] : null;
    const pinStart = prev ? (pieces[i - 1].stepToM ?? prev[prev.length - 1]) : undefined;
    const next = i + 1 < pieces.length && pieces[i + 1].kind === "strip" ? paths[i + 1] : null;
    solveOne(i, pinStart, next ? next[0] : undefined);
  });

  const out: SolvedLeg[] = pieces.map((p, i) => buildLeg(p, paths[i]!, vertices[i]!, opts));
  const counts = stationCounts(out);
  ceilingBreaches(out, warnings);
  warnings.push({
    code: "ceiling-rule",
    message: `Ceiling applied: ${opts.ceiling.heightM} m ${ceilingWords(opts.ceiling.reference)}. Check the rules where you fly; local limits, airspace restrictions and permissions override this plan.`,
  });
  if (opts.clearance.obstacleMarginM === 0) {
    warnings.push({
      code: "obstacle-margin",
      // A terrain model beside the DEM says the DEM is the surface model: it holds trees and roofs, not wires.
      message: opts.terrain
        ? "No obstacle margin: the surface model holds trees and buildings but not wires, masts or what grew or was built since; verify clearance on site."
        : "No obstacle margin: a bare-earth DEM does not show trees, masts or buildings; verify clearance on site.",
    });
  }
  return { legs: out, warnings, counts };
}

/**
 * The stations of the solved strips (and bridges) by status. Apart from solvePlan: a loop over
 * every station made solvePlan hot mid-call, and the code after it, first reached once the
 * engine had compiled the loop, sent solvePlan back to the interpreter at every call
 * (node --trace-deopt: four times a 4 km2 plan, each then compiled again).
 */
function stationCounts(out: readonly SolvedLeg[]): SolveResult["counts"] {
  const counts = { ok: 0, detailLimited: 0, unflyable: 0 };
  for (const leg of out) {
    for (const t of leg.trimmed ?? []) for (let k = 0; k < t.status.length; k++) if (t.status[k] === STATUS_UNFLYABLE) counts.unflyable++;
    if (leg.kind !== "strip" && !leg.conflictGap) continue;
    // A routed bridge flies elsewhere: count the strip's stations it skipped, as a straight one would.
    const st = (leg.skipped ?? leg.profile).status;
    const n = st.length;
    for (let k = 0; k < n; k++) {
      // A gap shares its end stations with the strips beside it: count only its own.
      if (leg.conflictGap && st[k] !== STATUS_UNFLYABLE) continue;
      if (st[k] === STATUS_OK) counts.ok++;
      else if (st[k] === STATUS_DETAIL_LIMITED) counts.detailLimited++;
      else counts.unflyable++;
    }
  }
  return counts;
}

/**
 * One transit leg on its own (the legs to and from take-off that flight
 * splitting adds), with clearance over the terrain under it. `startAltM` /
 * `endAltM` pin its ends to the previous leg's end height and the next leg's
 * start height, so the legs join without a step; where the leg is too short
 * to reach the end height within the climb limits, it changes height on the
 * spot at its end and says so (as solvePlan does). The warnings are this
 * leg's own (vertical step, climb-ceiling, ceiling breach), not the plan-wide
 * ones solvePlan adds.
 * @example solveTransit(grid, { kind: "transit", strip: 3, from, to, lengthM }, opts, 512.4).leg.waypoints
 */
export function solveTransit(
  grid: DemGrid, leg: LayoutLeg, given: SolverOptions, startAltM?: number, endAltM?: number,
): { leg: SolvedLeg; warnings: SolveWarning[] } {
  validateSolverOptions(given);
  const opts = shapedSolverOptions(given);
  const work = opts.assumeGroundM !== undefined ? nodataFilled(grid, opts.assumeGroundM) : grid;
  const warnings: SolveWarning[] = [];
  const piece = newPiece("transit", leg.strip, false, transitCorridor(work, leg, opts));
  const bandWidthM = Math.max(1, opts.band.hMaxM - opts.band.hMinM);
  const r = solvePiece(piece, opts, bandWidthM, startAltM, endAltM, warnings);
  if (r.stepToM !== undefined) piece.stepToM = r.stepToM;
  if (r.stepFromM !== undefined) piece.stepFromM = r.stepFromM;
  const out = buildLeg(piece, r.altitudeM, r.vertexStation, opts);
  ceilingBreaches([out], warnings);
  return { leg: out, warnings };
}

/**
 * A transit's corridor: along its polyline when it has one; else straight, unless the
 * straight leg's floor needs unknown ground somewhere and `routeAround` finds a way
 * around it (then along that way, every vertex a waypoint).
 */
function transitCorridor(work: DemGrid, leg: LayoutLeg, opts: SolverOptions): { profile: StationProfile; corners?: Int32Array } {
  const halfAlong = opts.zoneHalfAlongM ?? opts.stationStepM / 2;
  if (leg.via?.length) {
    const { stations, corners } = stationsAlongPolyline([leg.from, ...leg.via, leg.to], opts.stationStepM, opts.zoneHalfAcrossM, halfAlong);
    return { profile: corridorAlong(work, stations, opts, { band: false }), corners };
  }
  const st = stationsAlongLeg(leg, opts.stationStepM, opts.zoneHalfAcrossM, halfAlong);
  const straight = corridorAlong(work, st, opts, { band: false });
  return aroundUnknown(work, straight, opts) ?? { profile: straight };
}

/**
 * A stand-in profile for a transit whose corridor is not made yet: the first and last
 * of its stations (all trimEndBridges reads of it), as transitCorridor's profile has them.
 */
function stationEnds(leg: LayoutLeg, opts: SolverOptions): StationProfile {
  const st = stationsAlongLeg(leg, opts.stationStepM, opts.zoneHalfAcrossM, opts.zoneHalfAlongM ?? opts.stationStepM / 2);
  const n = st.s.length;
  const two = (a: Float64Array) => Float64Array.of(a[0], a[n - 1]);
  const nan = new Float64Array(2).fill(NaN);
  return {
    s: two(st.s), x: two(st.x), y: two(st.y), groundM: nan, hardLowM: nan, hardHighM: nan, bandLowM: nan, bandHighM: nan, altitudeM: nan,
    status: new Uint8Array(2), cause: new Uint8Array(2),
  };
}

/**
 * A strip that begins or ends over unknown ground (a DEM hole, the DEM's edge, a strip
 * cut at a keep-out zone beside a hole) would start or end with a bridge flown along
 * the strip over that ground: a bridge at a strip's end has the unknown ground at its
 * own end, so no way around it exists. Instead the strip starts (ends) at its first
 * (last) flyable station, and the transit before (after) it is made again to reach that
 * station, around the obstacles; the dropped stretch rides on that transit as `trimmed`
 * so its unflyable stations are still counted and mapped. A strip with no flyable
 * station at all is replaced by one transit from the leg before it to the leg after it.
 */
function trimEndBridges(work: DemGrid, pieces: Piece[], opts: SolverOptions): void {
  const isBridge = (p: Piece | undefined) => p !== undefined && p.conflictGap;
  const isTransit = (p: Piece | undefined) => p !== undefined && p.kind === "transit" && !p.conflictGap;
  const end = (p: Piece, last: boolean): XY => {
    const k = last ? p.profile.s.length - 1 : 0;
    return [p.profile.x[k], p.profile.y[k]];
  };
  const overUnknown = (p: Piece) => {
    for (let k = 0; k < p.profile.cause.length; k++) if (p.profile.cause[k] & CAUSE_NODATA) return true;
    return false;
  };
  const remake = (before: Piece, from: XY, to: XY, trimmed: StationProfile[]): Piece => {
    const leg: LayoutLeg = { kind: "transit", strip: before.strip, from, to, lengthM: Math.hypot(to[0] - from[0], to[1] - from[1]) };
    return newPiece("transit", before.strip, false, transitCorridor(work, leg, opts), [...(before.trimmed ?? []), ...trimmed]);
  };
  for (let i = 0; i < pieces.length; i++) {
    const p = pieces[i];
    if (!isBridge(p) || !overUnknown(p)) continue;
    const leading = isTransit(pieces[i - 1]);
    const trailing = isTransit(pieces[i + 1]);
    if (leading && trailing) {
      const prev = pieces[i - 1], next = pieces[i + 1];
      pieces.splice(i - 1, 3, remake(prev, end(prev, false), end(next, true), [p.profile, ...(next.trimmed ?? [])]));
      i -= 2;
    } else if (leading) {
      const prev = pieces[i - 1];
      pieces.splice(i - 1, 2, remake(prev, end(prev, false), end(p, true), [p.profile]));
      i -= 1;
    } else if (trailing) {
      const next = pieces[i + 1];
      pieces.splice(i, 2, remake(next, end(p, false), end(next, true), [p.profile, ...(next.trimmed ?? [])]));
    }
  }
}

/** Reroutes a bridge over a strip's unknown ground (see aroundUnknown), keeping the strip's stations it skips. */
function routeBridge(work: DemGrid, piece: Piece, opts: SolverOptions): void {
  const routed = aroundUnknown(work, piece.profile, opts);
  if (!routed) return;
  piece.skipped = piece.profile;
  piece.profile = routed.profile;
  piece.corners = routed.corners;
}

/**
 * The corridor along the way around obstacles (unknown ground, keep-out zones) from a
 * straight profile's first station to its last, or null: when routeAround finds the
 * straight leg clear, or when no way exists (the leg then flies straight and
 * solvePiece warns of any crossing of unknown ground).
 */
function aroundUnknown(work: DemGrid, straight: StationProfile, opts: SolverOptions): { profile: StationProfile; corners: Int32Array } | null {
  if (!opts.routeAround) return null;
  const n = straight.s.length;
  let unknown = false;
  if (opts.assumeGroundM === undefined) for (let k = 0; k < n && !unknown; k++) unknown = straight.hardLowM[k] !== straight.hardLowM[k];
  const way = opts.routeAround([straight.x[0], straight.y[0]], [straight.x[n - 1], straight.y[n - 1]], unknown);
  if (!way || way.length < 3) return null;
  const { stations, corners } = stationsAlongPolyline(way, opts.stationStepM, opts.zoneHalfAcrossM, opts.zoneHalfAlongM ?? opts.stationStepM / 2);
  return { profile: corridorAlong(work, stations, opts, { band: false }), corners };
}

function ceilingWords(ref: SolverOptions["ceiling"]["reference"]): string {
  if (ref === "ground") return "above the ground straight below";
  if (ref === "surface") return "from the closest point of the terrain surface";
  return "above the take-off point";
}

/** Strip stations into flyable runs (strip pieces) and, for `skip`, unflyable gaps (transit pieces). */
function splitStrip(prof: StationProfile, strip: number, mode: SolverOptions["onConflict"], pieces: Piece[]): void {
  const n = prof.s.length;
  // nodata is never flown as a strip; plain conflicts only under `skip`
  const cut = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    cut[i] = prof.status[i] === STATUS_UNFLYABLE && (mode === "skip" || (prof.cause[i] & CAUSE_NODATA) !== 0) ? 1 : 0;
  }
  // Runs of fewer than two flyable stations cannot hold a strip segment: fold them into the gap.
  for (let i = 0; i < n; ) {
    if (cut[i]) { i++; continue; }
    let j = i;
    while (j + 1 < n && !cut[j + 1]) j++;
    if (j === i) cut[i] = 1;
    i = j + 1;
  }
  let i = 0;
  while (i < n) {
    if (!cut[i]) {
      let j = i;
      while (j + 1 < n && !cut[j + 1]) j++;
      pieces.push(newPiece("strip", strip, false, { profile: sliceProfile(prof, i, j) }));
      i = j + 1;
    } else {
      let j = i;
      while (j + 1 < n && cut[j + 1]) j++;
      const a = Math.max(0, i - 1), b = Math.min(n - 1, j + 1);
      pieces.push(newPiece("transit", strip, true, { profile: sliceProfile(prof, a, b) }));
      i = j + 1;
    }
  }
}

function sliceProfile(p: StationProfile, a: number, b: number): StationProfile {
  const s0 = p.s[a];
  const s = p.s.slice(a, b + 1);
  for (let i = 0; i < s.length; i++) s[i] -= s0;
  return {
    s,
    x: p.x.slice(a, b + 1),
    y: p.y.slice(a, b + 1),
    groundM: p.groundM.slice(a, b + 1),
    ...(p.terrainM ? { terrainM: p.terrainM.slice(a, b + 1) } : {}),
    hardLowM: p.hardLowM.slice(a, b + 1),
    hardHighM: p.hardHighM.slice(a, b + 1),
    bandLowM: p.bandLowM.slice(a, b + 1),
    bandHighM: p.bandHighM.slice(a, b + 1),
    altitudeM: p.altitudeM.slice(a, b + 1),
    ...(p.knownLowM ? { knownLowM: p.knownLowM.slice(a, b + 1) } : {}),
    status: p.status.slice(a, b + 1),
    cause: p.cause.slice(a, b + 1),
  };
}

function solvePiece(
  p: Piece, opts: SolverOptions, bandWidthM: number, pinStart: number | undefined, pinEnd: number | undefined, warnings: SolveWarning[],
): { altitudeM: Float64Array; vertexStation: Int32Array; stepToM?: number; stepFromM?: number } {
  const prof = p.profile;
  const n = prof.s.length;
  // Read before the loops below: the engine compiles a long loop while it runs, and code
  // after it that has not yet run then has no type feedback (node --trace-deopt showed this
  // call, made only after the loops, sending every later piece back to the interpreter).
  const vertexStepM = vertexStepOf(opts);
  // Likewise the preferred height's inputs, read in the loop below only on legs into strips
  // (after strips had the loop compiled, each such leg went back to the interpreter there).
  const isStrip = p.kind === "strip";
  const hTargetM = opts.band.hTargetM;
  const lo = new Float64Array(n), hi = new Float64Array(n);
  // Unknown ground under a transit: the floor over the cells that have data nearby, else
  // the highest floor known on this leg, else the take-off's (a guess: warned below).
  let knownLow = -Infinity;
  for (let k = 0; k < n; k++) {
    const v = prof.hardLowM[k] === prof.hardLowM[k] ? prof.hardLowM[k] : (prof.knownLowM?.[k] ?? NaN);
    if (v === v) knownLow = Math.max(knownLow, v);
  }
  if (knownLow === -Infinity) knownLow = opts.takeoffGroundM + clearanceFloorM(opts.clearance);
  let unknownM = 0;
  for (let k = 0; k < n; k++) {
    lo[k] = prof.hardLowM[k];
    hi[k] = prof.hardHighM[k];
    if (lo[k] !== lo[k]) {
      const near = prof.knownLowM?.[k] ?? NaN;
      lo[k] = near === near ? near : knownLow;
      if (!(hi[k] >= lo[k])) hi[k] = lo[k] + bandWidthM;
      if (k > 0) unknownM += prof.s[k] - prof.s[k - 1];
    }
    if (!(hi[k] >= lo[k])) hi[k] = lo[k] + bandWidthM; // conflict flown keeping clearance; breach reported later
  }
  if (unknownM > 0) {
    warnings.push({
      code: "unknown-ground",
      strip: p.strip,
      message: `${p.kind === "strip" ? "Strip" : p.conflictGap ? "Bridge over an unflyable stretch of strip" : "Leg into strip"} ${p.strip} crosses about ${unknownM.toFixed(0)} m where the DEM has no data (or ends): its height there holds the highest clearance known on the leg, a guess, not a promise. Fly around it or set assumeGroundM.`,
    });
  }
  const { gMin, gMax } = gradientLimits(opts, p.kind);
  const eLo = new Float64Array(n), eHi = new Float64Array(n);
  const tryEnvelope = (ps?: number, pe?: number) => {
    const l = lo.slice(), h = hi.slice();
    // A pin below clearance (only after a breach elsewhere) is raised to it.
    if (ps !== undefined) { l[0] = h[0] = Math.max(ps, l[0]); }
    if (pe !== undefined) { l[n - 1] = h[n - 1] = Math.max(pe, l[n - 1]); }
    return hardEnvelope(prof.s, l, h, gMin, gMax, eLo, eHi);
  };
  // Fallbacks, in order: both ends pinned; the end reached by a step on the
  // spot; then the same with the ceiling dropped (clearance is kept, the
  // breach is reported); last, a climb on the spot at the start too (the
  // clearance floor rises from the pinned start faster than the aircraft
  // climbs). With no pins and no ceiling the envelope is never empty (the
  // floor's forward and backward gradient closure), so every plan a user can
  // give ends in a path.
  let stepToM: number | undefined, stepFromM: number | undefined;
  const withEndStep = (): boolean => {
    if (tryEnvelope(pinStart, pinEnd) < 0) return true;
    if (pinEnd === undefined || tryEnvelope(pinStart, undefined) >= 0) return false;
    stepToM = pinEnd;
    return true;
  };
  let ok = withEndStep();
  if (!ok) {
    // Drop the ceiling only as far as clearance and the climb limits demand: the least
    // gradient-feasible height above the floor. Every height the path takes is then
    // explained by the band, clearance, the ceiling or a neighbour's climb limit.
    const floor = floorClosure(prof.s, lo, gMin, gMax);
    for (let k = 0; k < n; k++) hi[k] = Math.max(hi[k], floor[k]);
    warnings.push({ code: "climb-ceiling", message: `${p.kind === "strip" ? "Strip" : "Leg into strip"} ${p.strip}: clearance cannot be kept under the ceiling within the climb and descent limits; the plan keeps clearance (see the ceiling breaches).` });
    ok = withEndStep();
  }
  if (!ok && pinStart !== undefined) {
    stepFromM = pinStart;
    pinStart = undefined;
    ok = withEndStep();
    warnings.push({ code: "vertical-step", message: `Leg into strip ${p.strip}: the terrain ahead rises faster than the aircraft can climb to keep clearance: the plan climbs on the spot at its start (a multirotor hovers; a fixed-wing needs a loiter).` });
  }
  if (!ok) throw new Error(`solver: no height keeps clearance within the climb limits on the leg into strip ${p.strip} (internal error)`);
  if (stepToM !== undefined) {
    warnings.push({ code: "vertical-step", message: `Leg into strip ${p.strip} is too short to reach the strip's start height within the climb limits: the plan changes height on the spot at its end (a multirotor hovers; a fixed-wing needs a loiter).` });
  }
  const tLo = new Float64Array(n), tHi = new Float64Array(n), pref = new Float64Array(n);
  // 1 where the band meets the hard corridor but not its gradient-feasible envelope.
  const envelopeCut = new Uint8Array(n);
  for (let k = 0; k < n; k++) {
    const bl = Math.min(prof.bandLowM[k], prof.bandHighM[k]);
    const bh = Math.max(prof.bandLowM[k], prof.bandHighM[k]);
    pref[k] = isStrip && bl === bl ? (bl + bh) / 2 : prof.groundM[k] + hTargetM;
    if (pref[k] !== pref[k]) pref[k] = eLo[k];
    if (!isStrip || bl !== bl) { tLo[k] = eLo[k]; tHi[k] = eHi[k]; continue; }
    const a = Math.max(bl, eLo[k]), b = Math.min(bh, eHi[k]);
    if (a <= b) { tLo[k] = a; tHi[k] = b; }
    else if (bl > eHi[k]) { envelopeCut[k] = 1; tLo[k] = Math.max(eLo[k], eHi[k] - bandWidthM); tHi[k] = eHi[k]; }
    else { envelopeCut[k] = 1; tLo[k] = eLo[k]; tHi[k] = Math.min(eHi[k], eLo[k] + bandWidthM); }
  }
  const gates = targetGates(prof.s, eLo, eHi, tLo, tHi, gMin, gMax);
  const path = minLinkPathOnLattice(prof.s, gates.lo, gates.hi, gMin, gMax, vertexStepM, pref);
  if (!path) throw new Error(`solver: no path through the gates of ${p.kind === "strip" ? "strip" : "the leg into strip"} ${p.strip} (internal error)`);
  const alt = prof.altitudeM;
  for (let v = 0; v + 1 < path.vertexStation.length; v++) {
    const a = path.vertexStation[v], b = path.vertexStation[v + 1];
    const za = path.vertexHeightM[v], zb = path.vertexHeightM[v + 1];
    const D = prof.s[b] - prof.s[a];
    for (let k = a; k <= b; k++) alt[k] = za + ((zb - za) * (prof.s[k] - prof.s[a])) / D;
  }
  if (path.vertexStation.length === 1) alt[0] = path.vertexHeightM[0];
  if (p.kind === "strip") {
    for (let k = 0; k < n; k++) {
      // The band met the hard corridor here, yet the gradient limits kept the path off it.
      if (prof.status[k] === STATUS_OK && (gates.offTarget[k] || envelopeCut[k])) {
        prof.status[k] = STATUS_DETAIL_LIMITED;
        prof.cause[k] |= CAUSE_CLIMB;
      }
    }
  }
  return { altitudeM: alt, vertexStation: path.vertexStation, stepToM, stepFromM };
}

function buildLeg(p: Piece, alt: Float64Array, vs: Int32Array, opts: SolverOptions): SolvedLeg {
  const prof = p.profile;
  const n = prof.s.length;
  const wps: Waypoint[] = [];
  let timeS = 0;
  if (p.stepFromM !== undefined) {
    const dz = alt[0] - p.stepFromM;
    timeS += Math.abs(dz) / (dz > 0 ? opts.aircraft.maxClimbMps : opts.aircraft.maxDescentMps);
    wps.push(waypoint(prof, 0, p.stepFromM, 0));
  }
  // A polyline's corners are waypoints too: the path is linear in distance between its
  // vertices, so a corner's height is the path's there and the climb gradient is unchanged.
  const at = p.corners ? mergeStations(vs, p.corners) : vs;
  for (let v = 0; v < at.length; v++) {
    const k = at[v];
    let speed = 0;
    if (v > 0) {
      const a = at[v - 1];
      const D = prof.s[k] - prof.s[a];
      const g = (alt[k] - alt[a]) / D;
      speed = segmentSpeed(opts, p.kind, g);
      timeS += D / speed;
    }
    wps.push(waypoint(prof, k, alt[k], speed));
  }
  if (p.stepToM !== undefined) {
    const dz = p.stepToM - alt[n - 1];
    const rate = dz > 0 ? opts.aircraft.maxClimbMps : opts.aircraft.maxDescentMps;
    timeS += Math.abs(dz) / rate;
    wps.push(waypoint(prof, n - 1, p.stepToM, 0));
  }
  const from: XY = [prof.x[0], prof.y[0]];
  const to: XY = [prof.x[n - 1], prof.y[n - 1]];
  return { kind: p.kind, strip: p.strip, from, to, waypoints: wps, profile: prof, lengthM: prof.s[n - 1], timeS, ...(p.conflictGap ? { conflictGap: true } : {}), ...(p.skipped ? { skipped: p.skipped } : {}), ...(p.trimmed?.length ? { trimmed: p.trimmed } : {}) };
}

/** Sorted union of two sorted station index lists. */
function mergeStations(a: Int32Array, b: Int32Array): Int32Array {
  const out: number[] = [];
  let i = 0, j = 0;
  while (i < a.length || j < b.length) {
    const v = j >= b.length || (i < a.length && a[i] <= b[j]) ? a[i++] : b[j++];
    if (out[out.length - 1] !== v) out.push(v);
  }
  return Int32Array.from(out);
}

function waypoint(prof: StationProfile, k: number, altM: number, speedMps: number): Waypoint {
  const g = prof.groundM[k];
  return { x: prof.x[k], y: prof.y[k], s: prof.s[k], altitudeAmslM: altM, groundAmslM: g, heightAboveGroundM: altM - g, ...(prof.terrainM ? { terrainAmslM: prof.terrainM[k] } : {}), speedMps };
}

/** Warn, per leg, where the flown height passes the ceiling: place, length and height over it. */
function ceilingBreaches(legs: SolvedLeg[], warnings: SolveWarning[]): void {
  for (const leg of legs) {
    const p = leg.profile;
    const n = p.s.length;
    for (let i = 0; i < n; ) {
      if (!(p.altitudeM[i] > p.hardHighM[i] + 1e-6)) { i++; continue; }
      let j = i, over = 0;
      while (j < n && p.altitudeM[j] > p.hardHighM[j] + 1e-6) { over = Math.max(over, p.altitudeM[j] - p.hardHighM[j]); j++; }
      const len = p.s[j - 1] - p.s[i];
      warnings.push({
        code: "ceiling-breach",
        strip: leg.strip,
        message: `${leg.kind === "strip" ? "Strip" : leg.conflictGap ? "Bridge over an unflyable stretch of strip" : "Transit into strip"} ${leg.strip}: above the ceiling from (${p.x[i].toFixed(1)}, ${p.y[i].toFixed(1)}) for ${len.toFixed(0)} m, up to ${over.toFixed(1)} m over it, to keep terrain clearance. Get permission or change the layout before flying.`,
      });
      i = j;
    }
  }
}

/** InputError when the target height is above the ceiling, or below clearance, at every strip station. */
function checkTargetReachable(profiles: StationProfile[], o: SolverOptions): void {
  let seen = 0, underCeiling = 0, aboveClearance = 0;
  let lowAgl = Infinity, highAgl = -Infinity;
  for (const p of profiles) {
    for (let k = 0; k < p.s.length; k++) {
      const g = p.groundM[k];
      if (g !== g || p.hardLowM[k] !== p.hardLowM[k]) continue;
      seen++;
      const z = g + o.band.hTargetM;
      if (z <= p.hardHighM[k]) underCeiling++;
      if (z >= p.hardLowM[k]) aboveClearance++;
      lowAgl = Math.min(lowAgl, p.hardLowM[k] - g);
      highAgl = Math.max(highAgl, p.hardHighM[k] - g);
      // Reachable somewhere on both counts: nothing to refuse (the heights above ground
      // are for the messages below only). Most plans stop at their first station.
      if (underCeiling > 0 && aboveClearance > 0) return;
    }
  }
  if (seen === 0) return;
  if (underCeiling === 0) {
    throw new InputError("band.hTargetM", o.band.hTargetM, `a height above ground under the ceiling somewhere on the strips (up to ${highAgl.toFixed(1)} m)${gsdRange(o, Math.max(0, lowAgl), highAgl)}`,
      "the target height is above the legal ceiling over every strip");
  }
  if (aboveClearance === 0) {
    throw new InputError("band.hTargetM", o.band.hTargetM, `a height above ground that keeps clearance somewhere on the strips (at least ${lowAgl.toFixed(1)} m)${gsdRange(o, Math.max(0, lowAgl), highAgl)}`,
      "the target height is below the terrain clearance over every strip");
  }
}

/**
 * The least gradient-feasible heights at or above `lo`: lo raised where the
 * aircraft must already be climbing towards higher ground ahead (or still be
 * descending from higher ground behind). Itself a feasible path.
 * @example floorClosure(s, lo, -0.3, 0.3)
 */
export function floorClosure(s: Float64Array, lo: Float64Array, gMin: number, gMax: number): Float64Array {
  const n = s.length;
  const f = lo.slice();
  for (let j = 1; j < n; j++) f[j] = Math.max(f[j], f[j - 1] + gMin * (s[j] - s[j - 1]));
  for (let j = n - 2; j >= 0; j--) f[j] = Math.max(f[j], f[j + 1] - gMax * (s[j + 1] - s[j]));
  return f;
}

/** The vertex lattice spacing in use: the option, else DEFAULT_VERTEX_STEP_M, never finer than the stations. */
function vertexStepOf(o: SolverOptions): number {
  return Math.max(o.stationStepM, o.vertexStepM ?? DEFAULT_VERTEX_STEP_M);
}
