/** The plan's blocks as the report map draws them: each block's extent and take-off point. */
import { featureCollection, polygon as turfPolygon } from "@turf/helpers";
import { union } from "@turf/union";
import type { XY } from "../layout/types.js";
import type { ReportBlock, ReportLeg, TakeoffFrom } from "./model.js";
import { convexHull } from "./hull.js";
import { rectUnion, type Rect } from "./rectUnion.js";

/**
 * The block a leg belongs to: its own `block` when the plan wrote it, else the block whose
 * strip list holds its strip, else `onlyBlock` (with one block every leg is in it).
 *
 * @example blockOfLeg({ strip: 14 }, new Map([[14, 2]])) // 2
 */
export function blockOfLeg(leg: Pick<ReportLeg, "strip" | "block">, byStrip: ReadonlyMap<number, number>, onlyBlock?: number): number | undefined {
  return leg.block ?? byStrip.get(leg.strip) ?? onlyBlock;
}

/**
 * The ground a strip leg images best, as a rectangle: the leg widened by `halfWidthM` to
 * each side (half the strip spacing: each strip's own zone), counter-clockwise.
 *
 * @example stripBand([0, 0], [100, 0], 20) // [[0, -20], [100, -20], [100, 20], [0, 20]]
 */
export function stripBand(from: XY, to: XY, halfWidthM: number): XY[] | null {
  const dx = to[0] - from[0];
  const dy = to[1] - from[1];
  const len = Math.hypot(dx, dy);
  if (!(len > 0) || !(halfWidthM > 0)) return null;
  // Left normal of the leg, scaled to the half width.
  const nx = (-dy / len) * halfWidthM;
  const ny = (dx / len) * halfWidthM;
  return [
    [from[0] - nx, from[1] - ny],
    [to[0] - nx, to[1] - ny],
    [to[0] + nx, to[1] + ny],
    [from[0] + nx, from[1] + ny],
  ];
}

/**
 * Each block's extent, in block order, as polygons (outer ring first, then holes) in the
 * local frame. With the strip spacing known, the union of its strip legs' bands (each strip
 * leg widened by about half the spacing to each side: the ground the block's strips image best,
 * so an L-shaped block stays L-shaped); without it, the convex hull of its strip legs' ends
 * and waypoints. Transits are left out: they lead to the block, they are not part of it.
 * A block with no strip legs has no extent and is left out.
 *
 * @example blockExtents(input.legs, input.blocks ?? [], input.summary.lineSpacingM) // [{ block: 1, polygons: [[[[x, y], ...]]] }, ...]
 */
export function blockExtents(legs: readonly ReportLeg[], blocks: readonly ReportBlock[], spacingM?: number): { block: number; polygons: XY[][][] }[] {
  const byStrip = new Map<number, number>();
  for (const b of blocks) for (const s of b.strips ?? []) byStrip.set(s, b.index);
  const only = blocks.length === 1 ? blocks[0].index : undefined;
  const mine = new Map<number, ReportLeg[]>(blocks.map((b) => [b.index, []]));
  for (const leg of legs) {
    if (leg.kind !== "strip") continue;
    const b = blockOfLeg(leg, byStrip, only);
    if (b !== undefined) mine.get(b)?.push(leg);
  }
  const out: { block: number; polygons: XY[][][] }[] = [];
  for (const [block, ls] of mine) {
    if (!ls.length) continue;
    // Half the spacing and 1 % more: neighbouring bands then overlap by 2 % of the spacing
    // instead of touching edge to edge, where rounding would leave slivers between them.
    const polygons = spacingM !== undefined && spacingM > 0 ? bandUnion(ls, spacingM * BAND_HALF_WIDTH) : null;
    if (polygons && polygons.length) out.push({ block, polygons });
    else {
      const pts: XY[] = [];
      for (const l of ls) pts.push(l.from, l.to, ...l.waypoints.map((w) => [w.x, w.y] as XY));
      out.push({ block, polygons: [[convexHull(pts)]] });
    }
  }
  return out;
}

/** A strip band's half width as a share of the strip spacing (see blockExtents). */
export const BAND_HALF_WIDTH = 0.51;

/**
 * The union of the legs' bands, or null when no leg has length: for parallel legs (a
 * block's strips) as rectangles in the strips' frame (rectUnion.ts), else by turf's union
 * (a general planar polygon clipper).
 */
function bandUnion(legs: readonly ReportLeg[], halfWidthM: number): XY[][][] | null {
  return parallelBandUnion(legs, halfWidthM) ?? clippedBandUnion(legs, halfWidthM);
}

/** Legs whose directions differ by less than this sine (about 6e-8 degrees) count as parallel. */
const PARALLEL_SINE = 1e-9;

/**
 * The bands of parallel legs as rectangles along (u) and across (v) the first leg with
 * length, united by rectUnion and mapped back; null when the legs are not all parallel
 * (or none has length). The legs of one strip share its first leg's offset across, so a
 * strip cut in pieces is one band however its pieces' ends were rounded.
 */
function parallelBandUnion(legs: readonly ReportLeg[], halfWidthM: number): XY[][][] | null {
  const first = legs.find((l) => Math.hypot(l.to[0] - l.from[0], l.to[1] - l.from[1]) > 0);
  if (!first) return null;
  const [ox, oy] = first.from;
  const len = Math.hypot(first.to[0] - first.from[0], first.to[1] - first.from[1]);
  const ux = (first.to[0] - first.from[0]) / len, uy = (first.to[1] - first.from[1]) / len;
  // Left normal of the first leg.
  const nx = -uy, ny = ux;
  const stripV = new Map<number, number>();
  const rects: Rect[] = [];
  for (const l of legs) {
    const dx = l.to[0] - l.from[0], dy = l.to[1] - l.from[1];
    const ll = Math.hypot(dx, dy);
    if (!(ll > 0)) continue;
    if (Math.abs(ux * dy - uy * dx) / ll > PARALLEL_SINE) return null;
    const a = (l.from[0] - ox) * ux + (l.from[1] - oy) * uy;
    const b = (l.to[0] - ox) * ux + (l.to[1] - oy) * uy;
    let v = stripV.get(l.strip);
    if (v === undefined) stripV.set(l.strip, (v = (l.from[0] - ox) * nx + (l.from[1] - oy) * ny));
    rects.push({ u0: Math.min(a, b), u1: Math.max(a, b), v0: v - halfWidthM, v1: v + halfWidthM });
  }
  return rectUnion(rects).map((poly) => poly.map((ring) => ring.map(([u, v]) => [ox + u * ux + v * nx, oy + u * uy + v * ny] as XY)));
}

/** The union of the legs' bands by turf's union (a planar polygon clipper), or null when no leg has length. */
function clippedBandUnion(legs: readonly ReportLeg[], halfWidthM: number): XY[][][] | null {
  // About the first leg's start: local-frame coordinates run to millions of metres, and the
  // clipper's intersections are better conditioned near the origin.
  const [ox, oy] = legs[0].from;
  const bands = legs
    .map((l) => stripBand([l.from[0] - ox, l.from[1] - oy], [l.to[0] - ox, l.to[1] - oy], halfWidthM))
    .filter((b): b is XY[] => b !== null)
    .map((b) => turfPolygon([[...b, b[0]]]));
  if (!bands.length) return null;
  const u = bands.length === 1 ? bands[0] : union(featureCollection(bands));
  if (!u) return null;
  const g = u.geometry;
  const polys = g.type === "Polygon" ? [g.coordinates] : g.coordinates;
  return polys.map((poly) => poly.map((ring) => ring.map(([x, y]) => [x + ox, y + oy] as XY)));
}

/** Words for how a take-off point was chosen, for its tooltip. */
export const TAKEOFF_FROM_WORDS: Record<TakeoffFrom, string> = {
  given: "given in the plan",
  layout: "placed by the layout (no take-off point given)",
  candidate: "the nearest given candidate that reaches the block",
  proposed: "proposed: the pilot must confirm access",
};
