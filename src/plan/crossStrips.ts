/**
 * Cross strips (plan key `crossStrips`): a second family of strips at the first
 * family's heading plus 90 degrees over the same site. Each ground point is then
 * seen from strips of both directions: for 3D models of facades and steep faces,
 * and, in classical aerial triangulation, to stiffen the block. Parallel strips
 * alone tie each strip to its neighbours only across the side overlap, so a block
 * can bend along the strips (a systematic "banana" deformation of the strips'
 * heights and scale); perpendicular strips tie all the parallel strips together
 * and hold that bending, the same job control points do at the block's edges.
 * Source, from memory: K. Kraus, "Photogrammetry: Geometry from Images and Laser
 * Scans" (2nd ed., de Gruyter, 2007), on block adjustment and the use of cross strips;
 * also P. R. Wolf and B. A. Dewitt, "Elements of Photogrammetry" (3rd ed., 2000),
 * on aerotriangulation.
 *
 * This module holds the layout side only: the second family's options and its
 * strip numbers. The plan blocks, solves and flies each family as it does one.
 */
import type { SiteFrame } from "../geo/localFrame.js";
import type { Layout, LayoutLeg } from "../layout/types.js";
import { zonesHolding, type KeepOutSet } from "../route/keepOut.js";
import type { PlanOptions } from "./options.js";

/**
 * Options for laying out the second family: the heading turned by 90 degrees, and,
 * when the user gave no take-off point, the first family's take-off point (one launch
 * site for both families; not when a keep-out zone holds it: the plan moves it then).
 * @example missionLayout(prepared, crossStripOptions(options, first, frame, keepOut))
 */
export function crossStripOptions(options: PlanOptions, first: Layout, frame: Pick<SiteFrame, "toWgs84">, keepOut: KeepOutSet | null): PlanOptions {
  const headingDeg = (first.headingDeg + 90) % 180;
  if (options.takeoff !== undefined || (keepOut && zonesHolding(keepOut, first.takeoff).length)) return { ...options, headingDeg };
  return { ...options, headingDeg, takeoff: frame.toWgs84(first.takeoff[0], first.takeoff[1]) };
}

/**
 * The second family with its strips numbered after the first family's (transits
 * carry the number of the strip they lead into, so they move with it).
 * @example secondFamily(first, second).legs[0].strip // first's last strip + 1
 */
export function secondFamily(first: Layout, second: Layout): Layout {
  let offset = 0;
  for (const l of first.legs) offset = Math.max(offset, l.strip);
  const legs: LayoutLeg[] = second.legs.map((l) => ({ ...l, strip: l.strip + offset }));
  return { ...second, legs };
}

/**
 * Blocks whose strips are renumbered to start after strip `afterStrip`, in their
 * order (planBlocks numbers a layout's strips from 1 when it cuts it into blocks).
 * @example numberedAfter(secondFamilyBlocks, 44)[0].legs[0].strip // 45
 */
export function numberedAfter<B extends { legs: LayoutLeg[] }>(blocks: readonly B[], afterStrip: number): B[] {
  let first = Infinity;
  for (const b of blocks) for (const l of b.legs) first = Math.min(first, l.strip);
  const shift = afterStrip + 1 - first;
  return blocks.map((b) => ({ ...b, legs: b.legs.map((l) => ({ ...l, strip: l.strip + shift })) }));
}

/**
 * The family of each strip number: 1 when its legs run along `headingDeg`
 * (the first family's heading, clockwise from grid north), 2 when across it.
 * @example stripFamilies(run.layout.legs, run.layout.headingDeg).get(1) // 1
 */
export function stripFamilies(legs: readonly Pick<LayoutLeg, "kind" | "strip" | "from" | "to">[], headingDeg: number): Map<number, 1 | 2> {
  const h = (headingDeg * Math.PI) / 180;
  const ux = Math.sin(h), uy = Math.cos(h);
  const out = new Map<number, 1 | 2>();
  for (const l of legs) {
    if (l.kind !== "strip" || out.has(l.strip)) continue;
    const dx = l.to[0] - l.from[0], dy = l.to[1] - l.from[1];
    const len = Math.hypot(dx, dy);
    if (!(len > 0)) continue;
    // |cos| of the angle to the heading: 1 along it, 0 across it.
    out.set(l.strip, Math.abs(dx * ux + dy * uy) / len >= Math.SQRT1_2 ? 1 : 2);
  }
  return out;
}
