/**
 * Blocks: a site too large for one take-off point's range, cut into rectangles
 * in the strip frame (along and across the strips), each flown from its own
 * take-off point. Pure geometry on the local frame.
 */
import type { LayoutLeg, XY } from "../layout/types.js";

/** A strip piece in the strip frame: `c` across (its line), `a0 < a1` along. */
export interface StripPiece {
  strip: number;
  c: number;
  a0: number;
  a1: number;
  /** Along-track stretches without photos, in metres from a0 (the layout's holes). */
  noPhoto?: [number, number][];
  /**
   * Along coordinate of the line's photo grid origin: photos fall at photoGridA + k x trigger,
   * so pieces of one line cut at a seam continue one sequence of photos. Absent: the piece's own ends.
   */
  photoGridA?: number;
}

/** One block: its strip pieces (cut at the block's along edges, overlapping the seams). */
export interface Block {
  index: number;
  pieces: StripPiece[];
  /** The block's rectangle in the strip frame: the pieces' extent. */
  aMin: number;
  aMax: number;
  cMin: number;
  cMax: number;
}

/** The strip frame of a heading (degrees clockwise from grid north). */
export interface StripFrame {
  toXY(a: number, c: number): XY;
  toAC(p: XY): [number, number];
}

/**
 * @example stripFrame(90).toXY(10, 0) // [10, 0]: along east
 */
export function stripFrame(headingDeg: number): StripFrame {
  const h = (headingDeg * Math.PI) / 180;
  const ux = Math.sin(h), uy = Math.cos(h);
  return {
    toXY: (a, c) => [a * ux + c * uy, a * uy - c * ux],
    toAC: (p) => [p[0] * ux + p[1] * uy, p[0] * uy - p[1] * ux],
  };
}

/**
 * The strip legs of a layout as pieces in the strip frame (direction forgotten:
 * a0 < a1, no-photo intervals measured from a0).
 * @example stripPieces(layout.legs, stripFrame(layout.headingDeg)).length
 */
export function stripPieces(legs: readonly LayoutLeg[], frame: StripFrame): StripPiece[] {
  const out: StripPiece[] = [];
  for (const l of legs) {
    if (l.kind !== "strip") continue;
    const [a, c] = frame.toAC(l.from);
    const [b] = frame.toAC(l.to);
    const a0 = Math.min(a, b), a1 = Math.max(a, b);
    const forward = b >= a;
    const noPhoto = l.noPhotoIntervals?.map(([p, q]): [number, number] => (forward ? [p, q] : [l.lengthM - q, l.lengthM - p]));
    out.push({ strip: l.strip, c, a0, a1, ...(noPhoto?.length ? { noPhoto } : {}) });
  }
  return out;
}

/** How a site is cut into blocks. */
export interface BlockGrid {
  /** Blocks along and across the strips. */
  along: number;
  across: number;
  /** Room kept between a block's farthest corner and the range, for the take-off point's offset from the centre, metres. */
  slackM: number;
}

/**
 * The fewest blocks whose every point lies within `rangeM` of the block's centre
 * less `slackM`: blocks are rectangles of whole strips across (lines `spacingM`
 * apart) and equal lengths along, each seam free to move by up to `seamM` (a line is
 * cut between two of its photos, see blocksOf). Every split of the strips across (1, 2, ... blocks)
 * is tried with the fewest blocks along that fits; the least total wins, the more
 * square on a tie (shorter transits within a block).
 * @example blockGrid(5000, 80, 40, 500, 25) // { along: 9, across: 9, ... } for a 5 km x 3.2 km site
 */
export function blockGrid(alongM: number, lines: number, spacingM: number, rangeM: number, seamM: number): BlockGrid {
  const slackM = 0.15 * rangeM;
  const reach = rangeM - slackM;
  let best: BlockGrid & { score: number } | null = null;
  for (let across = 1; across <= lines; across++) {
    const perBlock = Math.ceil(lines / across);
    const halfC = ((perBlock - 1) * spacingM) / 2;
    if (halfC >= reach) continue;
    const halfA = Math.sqrt(reach * reach - halfC * halfC);
    // Block along-length with the seam growth: alongM / n + 2 seamM (one seam each side at most).
    let along = 1;
    while (along < 10_000 && (along === 1 ? alongM / 2 : alongM / along / 2 + seamM) > halfA) along++;
    const n = along * across;
    const squareness = Math.abs(Math.log((alongM / along + 1) / ((perBlock - 1) * spacingM + 1)));
    const score = n + squareness * 1e-3;
    if (!best || score < best.score) best = { along, across, slackM, score };
    if (across > 1 && along === 1) break;
  }
  if (!best) return { along: Math.max(1, Math.ceil(alongM / (2 * reach))), across: lines, slackM };
  return { along: best.along, across: best.across, slackM: best.slackM };
}

/**
 * The pieces grouped into blocks: lines split across into `grid.across` groups of
 * consecutive strips (sizes differing by at most one), the along extent into
 * `grid.along` equal lengths. A piece is cut at each seam moved to the nearest point
 * halfway between two of its photos (photos every `triggerM` from its start), and
 * every part keeps that photo grid (`photoGridA`): flown in two blocks, the line's
 * photos are the photos of the uncut line, so the front overlap carries across the
 * seam with no photo missing or doubled; the lines are the same in every block, so
 * the side overlap does too. Empty blocks are dropped.
 * @example blocksOf(pieces, blockGrid(...), 22.5).length
 */
export function blocksOf(pieces: readonly StripPiece[], grid: BlockGrid, triggerM: number): Block[] {
  const lines = [...new Set(pieces.map((p) => p.c))].sort((u, v) => u - v);
  const aMin = Math.min(...pieces.map((p) => p.a0));
  const aMax = Math.max(...pieces.map((p) => p.a1));
  const lengthA = (aMax - aMin) / grid.along;
  const groupOf = new Map<number, number>();
  lines.forEach((c, i) => groupOf.set(c, Math.min(grid.across - 1, Math.floor((i * grid.across) / lines.length))));
  const blocks: Block[] = [];
  for (let g = 0; g < grid.across; g++) {
    for (let j = 0; j < grid.along; j++) {
      const lo = aMin + j * lengthA, hi = j + 1 === grid.along ? aMax : aMin + (j + 1) * lengthA;
      const mine: StripPiece[] = [];
      for (const p of pieces) {
        if (groupOf.get(p.c) !== g) continue;
        const origin = p.photoGridA ?? p.a0;
        // A seam halfway between two photos of this piece's grid.
        const seam = (a: number) => origin + (Math.round((a - origin) / triggerM - 0.5) + 0.5) * triggerM;
        const a0 = Math.max(p.a0, j === 0 ? -Infinity : seam(lo));
        const a1 = Math.min(p.a1, j + 1 === grid.along ? Infinity : seam(hi));
        if (a1 - a0 < 1) continue;
        const noPhoto = p.noPhoto
          ?.map(([u, v]): [number, number] => [Math.max(p.a0 + u, a0) - a0, Math.min(p.a0 + v, a1) - a0])
          .filter(([u, v]) => v > u);
        mine.push({ strip: p.strip, c: p.c, a0, a1, photoGridA: origin, ...(noPhoto?.length ? { noPhoto } : {}) });
      }
      if (!mine.length) continue;
      blocks.push({
        index: blocks.length + 1,
        pieces: mine,
        aMin: Math.min(...mine.map((p) => p.a0)),
        aMax: Math.max(...mine.map((p) => p.a1)),
        cMin: Math.min(...mine.map((p) => p.c)),
        cMax: Math.max(...mine.map((p) => p.c)),
      });
    }
  }
  return blocks;
}

/** Farthest distance from p to any end of the block's pieces (the farthest point of a straight piece is an end). */
export function farthestFromM(block: Block, frame: StripFrame, p: XY): number {
  const e = pieceEnds(block, frame);
  const { xs, ys } = e;
  // Math.hypot is slow: find the farthest by squared distance, then take hypot of every
  // end within rounding of it (the same maximum the hypot of every end would give).
  let m2 = 0;
  for (let i = 0; i < xs.length; i++) {
    const ex = xs[i] - p[0], ey = ys[i] - p[1];
    const d2 = ex * ex + ey * ey;
    if (d2 > m2) m2 = d2;
  }
  const near = m2 * (1 - 1e-9);
  let m = 0;
  for (let i = 0; i < xs.length; i++) {
    const ex = xs[i] - p[0], ey = ys[i] - p[1];
    if (ex * ex + ey * ey >= near) m = Math.max(m, Math.hypot(ex, ey));
  }
  return m;
}

/** The ends of a block's pieces in the local frame, in piece order (a0 then a1), kept per block and frame: a take-off search asks for them at every cell it tries. */
const endsOf = new WeakMap<Block, { frame: StripFrame; pieces: readonly StripPiece[]; n: number; xs: Float64Array; ys: Float64Array }>();

function pieceEnds(block: Block, frame: StripFrame): { xs: Float64Array; ys: Float64Array } {
  const hit = endsOf.get(block);
  if (hit && hit.frame === frame && hit.pieces === block.pieces && hit.n === block.pieces.length) return hit;
  const n = block.pieces.length;
  const xs = new Float64Array(2 * n), ys = new Float64Array(2 * n);
  block.pieces.forEach((q, i) => {
    [xs[2 * i], ys[2 * i]] = frame.toXY(q.a0, q.c);
    [xs[2 * i + 1], ys[2 * i + 1]] = frame.toXY(q.a1, q.c);
  });
  const ends = { frame, pieces: block.pieces, n, xs, ys };
  endsOf.set(block, ends);
  return ends;
}

/**
 * A block's legs from its take-off point: its lines flown back and forth
 * (boustrophedon), starting with the line end nearest the take-off, joined by
 * transits, and back. Strip numbers count on from `firstStrip`.
 * @example blockLegs(block, frame, takeoff, 1).legs[1].kind // "strip"
 */
export function blockLegs(block: Block, frame: StripFrame, takeoff: XY, firstStrip: number, triggerM: number): { legs: LayoutLeg[]; lastStrip: number } {
  const lines = [...new Set(block.pieces.map((p) => p.c))].sort((u, v) => u - v);
  const byLine = lines.map((c) => block.pieces.filter((p) => p.c === c).sort((u, v) => u.a0 - v.a0));
  const d = (p: XY) => Math.hypot(p[0] - takeoff[0], p[1] - takeoff[1]);
  const first = byLine[0], last = byLine[byLine.length - 1];
  const options = [
    { asc: true, fwd: true, p: frame.toXY(first[0].a0, first[0].c) },
    { asc: true, fwd: false, p: frame.toXY(first[first.length - 1].a1, first[0].c) },
    { asc: false, fwd: true, p: frame.toXY(last[0].a0, last[0].c) },
    { asc: false, fwd: false, p: frame.toXY(last[last.length - 1].a1, last[0].c) },
  ];
  let best = options[0];
  for (const o of options) if (d(o.p) < d(best.p) - 1e-9) best = o;
  const ordered = best.asc ? byLine : [...byLine].reverse();
  const legs: LayoutLeg[] = [];
  let here = takeoff;
  const push = (kind: LayoutLeg["kind"], strip: number, to: XY, noPhoto?: [number, number][], phase?: number) => {
    const leg: LayoutLeg = { kind, strip, from: here, to, lengthM: Math.hypot(to[0] - here[0], to[1] - here[1]) };
    if (noPhoto?.length) leg.noPhotoIntervals = noPhoto;
    if (phase !== undefined) leg.photoGrid = { firstM: phase, everyM: triggerM };
    legs.push(leg);
    here = to;
  };
  let strip = firstStrip - 1;
  ordered.forEach((line, i) => {
    strip++;
    const fwd = best.fwd === (i % 2 === 0);
    for (const p of fwd ? line : [...line].reverse()) {
      const len = p.a1 - p.a0;
      push("transit", strip, frame.toXY(fwd ? p.a0 : p.a1, p.c));
      const np = p.noPhoto?.map(([u, v]): [number, number] => (fwd ? [u, v] : [len - v, len - u]));
      if (!fwd) np?.reverse();
      push("strip", strip, frame.toXY(fwd ? p.a1 : p.a0, p.c), np, photoPhase(p, fwd, triggerM));
    }
  });
  push("transit", strip, takeoff);
  return { legs, lastStrip: strip };
}

/**
 * Distance from where the piece is flown from to its first photo on its line's grid
 * (photos at photoGridA + k x trigger): going forward the first grid point at or after
 * a0, going back the last one at or before a1. Undefined without a grid.
 */
function photoPhase(p: StripPiece, forward: boolean, triggerM: number): number | undefined {
  if (p.photoGridA === undefined) return undefined;
  const g = p.photoGridA;
  if (forward) return g + Math.ceil((p.a0 - g) / triggerM - 1e-9) * triggerM - p.a0;
  return p.a1 - (g + Math.floor((p.a1 - g) / triggerM + 1e-9) * triggerM);
}
