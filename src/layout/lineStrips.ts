/**
 * Strips along a line site: offset lines of the centre line, each flown end to
 * end in straight pieces (one per segment of the line) that turn at the
 * vertices. Everything in the site's local frame, metres.
 */
import { InputError } from "../errors.js";
import type { Layout, LayoutLeg, Site, XY } from "./types.js";
import { subtractIntervals, mergeIntervals, type Interval } from "./intervals.js";

/** Pieces shorter than this after keep-out cuts are dropped, metres (as in strip-lines.ts). */
const MIN_PIECE_M = 1;
/** Turns below this (sine of the angle) count as straight: no mitre, metres-scale noise only. */
const STRAIGHT_SIN = 1e-9;

export interface LineStripOptions {
  /** Width imaged, centred on the line, metres. */
  widthM: number;
  /** Strip spacing, metres: footprint across * (1 - side overlap). */
  spacingM: number;
  footprintAlongM: number;
  /** Strips per line; default the fewest that cover the width at the spacing. */
  strips?: number;
  /** Take-off point; default the first line's first vertex. */
  takeoff?: XY;
  /** Stretches [start, end] (metres from `from`) of a segment where no leg may go: strips are cut there. */
  keepOut?: (from: XY, to: XY) => Interval[];
}

/** A bend where an offset line folded back and its folded part was dropped. */
export interface LineFold {
  /** Line (0-based, file order) and vertex index of the bend. */
  line: number;
  vertex: number;
  at: XY;
  /** The offset of the strip that folded, metres, left of the line positive. */
  offsetM: number;
}

/**
 * Offsets of the strips from the line, metres, left of the line's direction
 * positive: n strips `spacingM` apart centred on the line, n = `strips` or
 * ceil(widthM / spacingM) (each strip images half a spacing to each side, so n
 * strips cover n x spacing; common practice for parallel strips, as in strip-lines.ts).
 * @example lineOffsetsM(100, 40) // [-40, 0, 40]
 */
export function lineOffsetsM(widthM: number, spacingM: number, strips?: number): number[] {
  // 1e-9 keeps a width that is an exact multiple of the spacing from gaining a strip to rounding.
  const n = strips ?? Math.max(1, Math.ceil(widthM / spacingM - 1e-9));
  return Array.from({ length: n }, (_, k) => (k - (n - 1) / 2) * spacingM);
}

/** One straight piece of an offset line: on segment `seg`, from t0 to t1 along it. */
interface OffsetPiece {
  seg: number;
  from: XY;
  to: XY;
}

/**
 * The straight pieces of one offset line, in the line's direction, before run-outs.
 * Each segment's offset runs between the mitre points where it meets its neighbours'
 * offsets on the inside of a bend, and to the perpendicular at the vertex on the
 * outside. An offset segment whose mitres cross (its start past its end) is where
 * the offset line folds back on itself: it is dropped and its neighbours meet
 * directly, and the fold is reported at the sharper of its two inside bends.
 * @example offsetPieces([[0, 0], [100, 0], [100, 100]], 10).pieces.length // 2
 */
export function offsetPieces(line: readonly XY[], offsetM: number): { pieces: { seg: number; t0: number; t1: number; a: XY; d: XY }[]; folds: number[] } {
  const m = line.length - 1;
  const d: XY[] = [];
  const len: number[] = [];
  for (let i = 0; i < m; i++) {
    const dx = line[i + 1][0] - line[i][0], dy = line[i + 1][1] - line[i][1];
    const l = Math.hypot(dx, dy);
    d.push([dx / l, dy / l]);
    len.push(l);
  }
  // Offset line of segment i: a_i + t d_i, a_i the segment start moved left by offsetM.
  const a: XY[] = d.map((di, i) => [line[i][0] - di[1] * offsetM, line[i][1] + di[0] * offsetM]);
  const cross = (p: XY, q: XY) => p[0] * q[1] - p[1] * q[0];
  // Inside of the bend between segments i and j: a left turn puts the left side inside.
  const inside = (i: number, j: number) => {
    const s = cross(d[i], d[j]);
    return Math.abs(s) > STRAIGHT_SIN && s * offsetM > 0;
  };
  // Parameter on line i of its meeting with line j.
  const meet = (i: number, j: number) => cross([a[j][0] - a[i][0], a[j][1] - a[i][1]], d[j]) / cross(d[i], d[j]);
  const active = Array.from({ length: m }, (_, i) => i);
  const folds: number[] = [];
  for (;;) {
    const t0: number[] = [], t1: number[] = [];
    let worst = -1, worstLen = 0;
    active.forEach((i, k) => {
      const prev = k > 0 ? active[k - 1] : -1;
      const next = k + 1 < active.length ? active[k + 1] : -1;
      t0[k] = prev >= 0 && inside(prev, i) ? meet(i, prev) : 0;
      t1[k] = next >= 0 && inside(i, next) ? meet(i, next) : len[i];
      if (t1[k] - t0[k] < worstLen) {
        worstLen = t1[k] - t0[k];
        worst = k;
      }
    });
    if (worst < 0) return { pieces: active.map((i, k) => ({ seg: i, t0: t0[k], t1: t1[k], a: a[i], d: d[i] })), folds };
    // Name the sharper inside bend at the ends of the folded segment.
    const i = active[worst];
    const prev = worst > 0 ? active[worst - 1] : -1;
    const next = worst + 1 < active.length ? active[worst + 1] : -1;
    const turn = (p: number, q: number) => (p >= 0 && q >= 0 && inside(p, q) ? Math.abs(Math.atan2(cross(d[p], d[q]), d[p][0] * d[q][0] + d[p][1] * d[q][1])) : -1);
    folds.push(turn(prev, i) >= turn(i, next) ? i : i + 1);
    active.splice(worst, 1);
    if (!active.length) return { pieces: [], folds };
  }
}

/**
 * Legs in flight order along the lines: per line, one strip per offset
 * (lineOffsetsM), each flown end to end as straight pieces along the offset
 * line's segments. Each piece runs on half the footprint along past its ends
 * (at the line's ends as at a polygon's edges, and past each bend so the
 * photos keep the front overlap on the outside of the turn); consecutive pieces
 * are joined by transit legs with the same strip number. Strips go back and
 * forth; the first starts at the end nearest the take-off. The transit back to
 * the take-off point carries the last strip's number.
 * @example lineStripLegs([[[0, 0], [500, 0], [800, 300]]], { widthM: 100, spacingM: 40, footprintAlongM: 60 }).legs[1].kind // "strip"
 */
export function lineStripLegs(lines: readonly (readonly XY[])[], opts: LineStripOptions): { legs: LayoutLeg[]; takeoff: XY; stripCount: number; folds: LineFold[]; offsetsM: number[]; keepOutCuts: { from: XY; to: XY }[] } {
  const runOut = opts.footprintAlongM / 2;
  const offsetsM = lineOffsetsM(opts.widthM, opts.spacingM, opts.strips);
  const folds: LineFold[] = [];
  const keepOutCuts: { from: XY; to: XY }[] = [];
  // strips[line][k]: the pieces of the strip at offsetsM[k], in the line's direction.
  const strips: OffsetPiece[][][] = lines.map((line, li) => {
    return offsetsM.map((c) => {
      const { pieces, folds: f } = offsetPieces(line, c);
      for (const v of f) {
        folds.push({ line: li, vertex: v, at: [line[v][0], line[v][1]], offsetM: c });
      }
      const out: OffsetPiece[] = [];
      for (const p of pieces) {
        const at = (t: number): XY => [p.a[0] + t * p.d[0], p.a[1] + t * p.d[1]];
        const [s, e] = [p.t0 - runOut, p.t1 + runOut];
        // A sliver (only with a run-out near 0) gives the solver no stations to work with.
        if (e - s < MIN_PIECE_M) continue;
        const from = at(s), to = at(e);
        let keep: Interval[] = [[0, e - s]];
        if (opts.keepOut) {
          const cut = mergeIntervals(opts.keepOut(from, to).map((iv): Interval => [Math.max(0, iv[0]), Math.min(e - s, iv[1])]).filter((iv) => iv[1] > iv[0]));
          if (cut.length) {
            for (const [u, v] of cut) keepOutCuts.push({ from: at(s + u), to: at(s + v) });
            keep = subtractIntervals([0, e - s], cut, MIN_PIECE_M);
          }
        }
        for (const [u, v] of keep) out.push({ seg: p.seg, from: at(s + u), to: at(s + v) });
      }
      return out;
    });
  });
  const takeoff: XY = opts.takeoff ?? [lines[0][0][0], lines[0][0][1]];
  const legs: LayoutLeg[] = [];
  let here: XY = takeoff;
  let stripNo = 0;
  const push = (kind: LayoutLeg["kind"], to: XY): void => {
    legs.push({ kind, strip: stripNo, from: here, to, lengthM: dist(here, to) });
    here = to;
  };
  for (const lineStrips of strips) {
    const flyable = lineStrips.filter((s) => s.length > 0);
    if (!flyable.length) continue;
    const first = flyable[0], last = flyable[flyable.length - 1];
    // The end nearest where the aircraft is: either outer strip, either end.
    const options = [
      { ascending: true, forward: true, p: first[0].from },
      { ascending: true, forward: false, p: first[first.length - 1].to },
      { ascending: false, forward: true, p: last[0].from },
      { ascending: false, forward: false, p: last[last.length - 1].to },
    ];
    let best = options[0];
    for (const o of options) if (dist(o.p, here) < dist(best.p, here) - 1e-9) best = o;
    const ordered = best.ascending ? flyable : [...flyable].reverse();
    ordered.forEach((pieces, i) => {
      stripNo++;
      const forward = best.forward === (i % 2 === 0);
      const flown = forward ? pieces : [...pieces].reverse();
      for (const p of flown) {
        push("transit", forward ? p.from : p.to);
        push("strip", forward ? p.to : p.from);
      }
    });
  }
  if (stripNo > 0) push("transit", takeoff);
  return { legs, takeoff, stripCount: stripNo, folds, offsetsM, keepOutCuts };
}

function dist(a: XY, b: XY): number {
  return Math.hypot(a[0] - b[0], a[1] - b[1]);
}

export interface LineLayoutOptions {
  spacingM: number;
  triggerM: number;
  footprintAcrossM: number;
  footprintAlongM: number;
  /** `lineStrips`: strips per line; default the fewest that cover the width. */
  strips?: number;
  takeoff?: XY;
  keepOut?: LineStripOptions["keepOut"];
}

/**
 * The layout of a line site (a Site with `line`): strips along the line
 * (lineStripLegs). The heading is not chosen: it follows the line;
 * `headingDeg` holds the direction of the longest segment, for the summary.
 * @example layoutLineSite(site, { spacingM: 40, triggerM: 20, footprintAcrossM: 100, footprintAlongM: 66 }).headingReason // "heading follows the line"
 */
export function layoutLineSite(site: Site, opts: LineLayoutOptions): Layout {
  if (!site.line) throw new Error("layoutLineSite: the site is not a line site");
  const { legs, takeoff, keepOutCuts } = lineStripLegs(site.line.local, {
    widthM: site.line.widthM,
    spacingM: opts.spacingM,
    footprintAlongM: opts.footprintAlongM,
    ...(opts.strips !== undefined ? { strips: opts.strips } : {}),
    ...(opts.takeoff ? { takeoff: opts.takeoff } : {}),
    ...(opts.keepOut ? { keepOut: opts.keepOut } : {}),
  });
  let longest = 0, headingDeg = 0;
  for (const line of site.line.local) for (let i = 0; i + 1 < line.length; i++) {
    const dx = line[i + 1][0] - line[i][0], dy = line[i + 1][1] - line[i][1];
    const l = Math.hypot(dx, dy);
    if (l > longest) {
      longest = l;
      headingDeg = ((((Math.atan2(dx, dy) * 180) / Math.PI) % 180) + 180) % 180;
    }
  }
  return {
    headingDeg,
    spacingM: opts.spacingM,
    triggerM: opts.triggerM,
    footprintAcrossM: opts.footprintAcrossM,
    footprintAlongM: opts.footprintAlongM,
    legs,
    takeoff,
    headingCandidates: [],
    headingReason: "heading follows the line",
    ...(keepOutCuts.length ? { keepOutCuts } : {}),
  };
}

/**
 * One warning per bend where some strip's offset line folded back (see
 * offsetPieces), naming the bend in WGS84.
 * @example lineFoldWarnings(folds, frame.toWgs84)[0] // "The line bends tighter than ... at lon 15.001234, lat 47.000100 ..."
 */
export function lineFoldWarnings(folds: readonly LineFold[], toWgs84: (x: number, y: number) => [number, number]): string[] {
  const byVertex = new Map<string, LineFold[]>();
  for (const f of folds) {
    const key = `${f.line}:${f.vertex}`;
    byVertex.set(key, [...(byVertex.get(key) ?? []), f]);
  }
  return [...byVertex.values()].map((fs) => {
    const [lon, lat] = toWgs84(fs[0].at[0], fs[0].at[1]);
    const widest = Math.max(...fs.map((f) => Math.abs(f.offsetM)));
    return (
      `The line bends tighter than the strip offset (${widest.toFixed(1)} m) at lon ${lon.toFixed(6)}, lat ${lat.toFixed(6)} ` +
      `(vertex ${fs[0].vertex + 1}${fs[0].line > 0 ? ` of line ${fs[0].line + 1}` : ""}): the folded part of ${fs.length} strip${fs.length === 1 ? "" : "s"} on the inside of the bend was cut.`
    );
  });
}

/**
 * The load stage's warnings about a line site: bends cut (lineFoldWarnings)
 * and a `lineStrips` too few to cover the width at the camera's spacing.
 * @example lineSiteWarnings(site, 40, 66, 1, frame.toWgs84) // ["lineStrips 1 covers 40 m of the 100 m width ..."]
 */
export function lineSiteWarnings(site: Site, spacingM: number, footprintAlongM: number, strips: number | undefined, toWgs84: (x: number, y: number) => [number, number]): string[] {
  if (!site.line) return [];
  const { widthM, local } = site.line;
  const out: string[] = [];
  if (strips !== undefined && strips * spacingM < widthM - 1e-6) {
    out.push(`lineStrips ${strips} covers ${(strips * spacingM).toFixed(1)} m of the ${widthM} m width at the ${spacingM.toFixed(1)} m strip spacing: the edges of the width are imaged with less side overlap or not at all.`);
  }
  const { folds } = lineStripLegs(local, { widthM, spacingM, footprintAlongM, ...(strips !== undefined ? { strips } : {}) });
  return [...out, ...lineFoldWarnings(folds, toWgs84)];
}

/**
 * Refuses a line site that reaches beyond `rangeM` from its take-off point: the
 * splitting into blocks assumes parallel strips, so a line site is flown as one block.
 * @example assertLineInRange(layout, 500) // throws when a leg end lies 600 m from the take-off
 */
export function assertLineInRange(layout: Layout, rangeM: number): void {
  if (!(rangeM > 0)) return;
  let far = 0;
  for (const l of layout.legs) for (const p of [l.from, l.to]) far = Math.max(far, dist(p, layout.takeoff));
  if (far > rangeM) {
    throw new InputError(
      "aircraft.maxRangeM",
      rangeM,
      `0 (no limit) or at least ${Math.ceil(far)} m, or a take-off point nearer the middle of the line`,
      `the line site reaches ${far.toFixed(0)} m from the take-off point, and a line site is not split into blocks yet`,
    );
  }
}
