/**
 * Strip legs at one heading: parallel lines a spacing apart, cut to the site,
 * extended half a footprint past it, flown back and forth (boustrophedon)
 * starting with the strip nearest the take-off point.
 */
import type { LayoutLeg, Site, XY } from "./types.js";
import { bandProjection, edgesInStripFrame } from "./band.js";
import { expandIntervals, mergeIntervals, subtractIntervals, type Interval } from "./intervals.js";
import { siteRings } from "./rings.js";

export interface StripLineOptions {
  /** Distance between neighbouring strips, metres (> 0). */
  spacingM: number;
  /** Footprint along the track, metres: strips run on half of it past the site. */
  footprintAlongM: number;
  /**
   * How far photos continue over a hole before stopping, metres. Default
   * footprintAlongM / 2, the same run-on as at the outer boundary, so the
   * hole's rim gets the full front overlap.
   */
  holeMarginM?: number;
  /** Take-off point in the local frame; default the outer-ring corner nearest the first strip's start. */
  takeoff?: XY;
  /**
   * Where the aircraft may not fly along a straight segment: intervals of metres
   * from `from` towards `to` (sorted or not, may overlap). Strips are cut there.
   */
  keepOut?: (from: XY, to: XY) => Interval[];
}

/** A strip piece shorter than this after a keep-out cut is dropped, metres. */
const MIN_PIECE_M = 1;

/** One piece of a strip line, along-track coordinates on that line. */
interface Piece {
  a0: number;
  a1: number;
  noPhoto: Interval[];
}

interface StripLine {
  c: number;
  pieces: Piece[];
}

/**
 * Legs in flight order at `headingDeg` (clockwise from grid north).
 *
 * Placement: the n = ceil(W / spacing) strips are centred on the site's width W
 * across the heading, so both edge strips sit the same distance (at most half a
 * spacing) inside the outermost corners and every strip's zone of half a
 * spacing to each side tiles the width. Each strip covers, along its line,
 * every place where the site lies within its zone (not only under the line),
 * so slanted edges and concave corners are covered too; that extent is then
 * extended by footprintAlongM / 2 at each end. Where the zone leaves the site
 * and comes back (concave sites) the strip is flown in pieces joined by a
 * transit leg carrying the same strip number.
 *
 * The transit back to the take-off point carries the last strip's number.
 * @example stripLegsAtHeading(site, 90, { spacingM: 40, footprintAlongM: 50 }).legs[1].kind // "strip"
 */
export function stripLegsAtHeading(
  site: Site,
  headingDeg: number,
  opts: StripLineOptions,
): { legs: LayoutLeg[]; takeoff: XY; stripCount: number; keepOutCuts: KeepOutCut[] } {
  const { spacingM, footprintAlongM } = opts;
  const holeMarginM = opts.holeMarginM ?? footprintAlongM / 2;
  const h = (headingDeg * Math.PI) / 180;
  const ux = Math.sin(h);
  const uy = Math.cos(h);
  const { outer, all } = siteRings(site);
  const outerEdges = edgesInStripFrame(outer, ux, uy);
  const hasHoles = all.length > outer.length;
  const allEdges = hasHoles ? edgesInStripFrame(all, ux, uy) : outerEdges;

  const widthM = outerEdges.cMax - outerEdges.cMin;
  // 1e-9 keeps a width that is an exact multiple of the spacing from gaining a strip to rounding.
  const n = Math.max(1, Math.ceil(widthM / spacingM - 1e-9));
  const firstC = outerEdges.cMin + (widthM - (n - 1) * spacingM) / 2;
  const toXY = (a: number, c: number): XY => [a * ux + c * uy, a * uy - c * ux];
  const lines: StripLine[] = [];
  const keepOutCuts: KeepOutCut[] = [];
  for (let k = 0; k < n; k++) {
    const c = firstC + k * spacingM;
    const lo = c - spacingM / 2;
    const hi = c + spacingM / 2;
    // No photos where the zone lies over holes only: the site's own extent along
    // the line minus the extent with holes taken out (grown by the hole margin).
    // The run-on past the outer boundary keeps its photos.
    const ground = bandProjection(outerEdges, lo, hi);
    const photo = hasHoles ? expandIntervals(bandProjection(allEdges, lo, hi), holeMarginM) : [];
    const noPhoto = hasHoles ? ground.flatMap((iv) => subtractIntervals(iv, photo, 1e-6)) : [];
    let pieces = expandIntervals(ground, footprintAlongM / 2).map(([a0, a1]): Piece => ({
      a0,
      a1,
      noPhoto: noPhoto.filter((iv) => iv[0] >= a0 && iv[1] <= a1),
    }));
    if (opts.keepOut) pieces = pieces.flatMap((p) => cutAtKeepOut(p, c, toXY, opts.keepOut!, keepOutCuts));
    if (pieces.length) lines.push({ c, pieces });
  }

  const startOf = (line: StripLine, forward: boolean): XY =>
    forward ? toXY(line.pieces[0].a0, line.c) : toXY(line.pieces[line.pieces.length - 1].a1, line.c);

  if (!lines.length) {
    // Nothing left to fly (every strip cut away at keep-out zones): no legs; the caller refuses.
    return { legs: [], takeoff: opts.takeoff ?? [outer[0][0][0], outer[0][0][1]], stripCount: 0, keepOutCuts };
  }
  // Choose which end of the site to start from: the option whose first point is nearest the take-off.
  const first = lines[0];
  const last = lines[lines.length - 1];
  const takeoff: XY = opts.takeoff ?? nearestCorner(outer, startOf(first, true));
  const options = [
    { ascending: true, forward: true, p: startOf(first, true) },
    { ascending: true, forward: false, p: startOf(first, false) },
    { ascending: false, forward: true, p: startOf(last, true) },
    { ascending: false, forward: false, p: startOf(last, false) },
  ];
  let best = options[0];
  for (const o of options) if (dist(o.p, takeoff) < dist(best.p, takeoff) - 1e-9) best = o;
  const ordered = best.ascending ? lines : [...lines].reverse();

  const legs: LayoutLeg[] = [];
  let here: XY = takeoff;
  const push = (kind: LayoutLeg["kind"], strip: number, to: XY, noPhoto?: Interval[]): void => {
    const leg: LayoutLeg = { kind, strip, from: here, to, lengthM: dist(here, to) };
    if (noPhoto && noPhoto.length) leg.noPhotoIntervals = noPhoto;
    legs.push(leg);
    here = to;
  };
  ordered.forEach((line, i) => {
    const forward = best.forward === (i % 2 === 0);
    const pieces = forward ? line.pieces : [...line.pieces].reverse();
    for (const piece of pieces) {
      const [s, e] = forward ? [piece.a0, piece.a1] : [piece.a1, piece.a0];
      push("transit", i + 1, toXY(s, line.c));
      // Along-track distances from the leg's start, in flight direction.
      const noPhoto = piece.noPhoto.map(([p, q]): Interval => (forward ? [p - s, q - s] : [s - q, s - p]));
      if (!forward) noPhoto.reverse();
      push("strip", i + 1, toXY(e, line.c), noPhoto);
    }
  });
  push("transit", ordered.length, takeoff);
  return { legs, takeoff, stripCount: ordered.length, keepOutCuts };
}

/** A stretch of a strip line taken out because it lies in a keep-out zone or its buffer. */
export interface KeepOutCut {
  from: XY;
  to: XY;
}

/**
 * A piece without its keep-out stretches: the flyable sub-pieces (no-photo
 * intervals clipped to each), the removed stretches appended to `cuts`.
 */
function cutAtKeepOut(p: Piece, c: number, toXY: (a: number, c: number) => XY, keepOut: (from: XY, to: XY) => Interval[], cuts: KeepOutCut[]): Piece[] {
  const out = keepOut(toXY(p.a0, c), toXY(p.a1, c)).map((iv): Interval => [p.a0 + Math.max(0, iv[0]), p.a0 + Math.min(p.a1 - p.a0, iv[1])]);
  if (!out.length) return [p];
  const merged = mergeIntervals(out);
  for (const [u, v] of merged) if (v > u) cuts.push({ from: toXY(u, c), to: toXY(v, c) });
  return subtractIntervals([p.a0, p.a1], merged, MIN_PIECE_M).map(([a0, a1]): Piece => ({
    a0,
    a1,
    noPhoto: p.noPhoto.map((iv): Interval => [Math.max(iv[0], a0), Math.min(iv[1], a1)]).filter((iv) => iv[1] > iv[0]),
  }));
}

function nearestCorner(rings: readonly number[][][], p: XY): XY {
  let best: XY = [rings[0][0][0], rings[0][0][1]];
  for (const r of rings) for (const q of r) if (dist([q[0], q[1]], p) < dist(best, p)) best = [q[0], q[1]];
  return best;
}

function dist(p: XY, q: XY): number {
  return Math.hypot(q[0] - p[0], q[1] - p[1]);
}
