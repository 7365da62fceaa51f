/**
 * The site in blocks, each with its take-off point, when one take-off point's
 * range (aircraft.maxRangeM) does not reach the whole layout.
 */
import type { DemGrid } from "../dem/grid.js";
import { rasteriseSite } from "../assess/siteMask.js";
import type { Layout, LayoutLeg, Site, XY } from "../layout/types.js";
import { blockGrid, blockLegs, blocksOf, farthestFromM, stripFrame, stripPieces, type Block } from "../route/blocks.js";
import { pointInsideAny } from "../route/inside.js";
import type { KeepOutSet } from "../route/keepOut.js";
import { proposeTakeoff } from "../route/takeoffSite.js";
import type { SolveWarning } from "../solve/types.js";

/** One block's layout: its legs from and back to its take-off point. */
export interface PlannedBlock {
  /** 1-based. */
  index: number;
  takeoff: XY;
  /** How the take-off point was chosen. */
  takeoffFrom: "given" | "layout" | "candidate" | "proposed";
  /** Ground slope at a proposed point, degrees (Horn). */
  slopeDeg?: number;
  legs: LayoutLeg[];
  /** Farthest point of the block's strips from its take-off point, metres. */
  farthestM: number;
}

export interface BlockInputs {
  layout: Layout;
  site: Site;
  grid: DemGrid;
  rangeM: number;
  footprintAlongM: number;
  /** Candidate take-off points in the local frame (the user's `takeoff` list, or one point). */
  candidates: XY[];
  /** True when the user gave exactly one take-off point. */
  givenOne: boolean;
  keepOut: KeepOutSet | null;
}

/**
 * The blocks of a plan. With no range limit, or when the layout's take-off point
 * reaches every strip, the layout is one block as it is. Otherwise the strips are
 * cut into the fewest blocks of whole lines and equal lengths that a centred take-off
 * point reaches (route/blocks.ts blockGrid), grown past each seam by half a
 * footprint along (the front overlap carries across the seam; lines are the same
 * across blocks, so the side overlap does too), and each block takes off from the
 * nearest candidate that reaches it, else from a proposed point (route/takeoffSite.ts).
 * @example const { blocks, warnings } = planBlocks(inputs);
 */
export function planBlocks(b: BlockInputs): { blocks: PlannedBlock[]; warnings: SolveWarning[] } {
  const warnings: SolveWarning[] = [];
  const frame = stripFrame(b.layout.headingDeg);
  const pieces = stripPieces(b.layout.legs, frame);
  const whole: Block = {
    index: 1,
    pieces,
    aMin: Math.min(...pieces.map((p) => p.a0)),
    aMax: Math.max(...pieces.map((p) => p.a1)),
    cMin: Math.min(...pieces.map((p) => p.c)),
    cMax: Math.max(...pieces.map((p) => p.c)),
  };
  const asIs = (): PlannedBlock => ({
    index: 1,
    takeoff: b.layout.takeoff,
    takeoffFrom: b.givenOne ? "given" : "layout",
    legs: b.layout.legs,
    farthestM: farthestFromM(whole, frame, b.layout.takeoff),
  });
  if (!(b.rangeM > 0) || !pieces.length) return { blocks: [asIs()], warnings };
  const one = asIs();
  if (one.farthestM <= b.rangeM) return { blocks: [one], warnings };

  const seamM = b.footprintAlongM / 2;
  const lines = new Set(pieces.map((p) => p.c)).size;
  const spacing = b.layout.spacingM;
  const grid = blockGrid(whole.aMax - whole.aMin, lines, spacing, b.rangeM, seamM);
  const blocks = blocksOf(pieces, grid, seamM);
  const inSite = rasteriseSite(b.site.local, b.grid.width, b.grid.height, b.grid.transform);
  const out: PlannedBlock[] = [];
  let strip = 1;
  for (const blk of blocks) {
    const centre = frame.toXY((blk.aMin + blk.aMax) / 2, (blk.cMin + blk.cMax) / 2);
    const reaches = (p: XY) => farthestFromM(blk, frame, p) <= b.rangeM;
    let takeoff: XY | null = null;
    let takeoffFrom: PlannedBlock["takeoffFrom"] = "candidate";
    let slopeDeg: number | undefined;
    const near = b.candidates.filter(reaches).sort((p, q) => dist(p, centre) - dist(q, centre));
    if (near.length) takeoff = near[0];
    else {
      const found = proposeTakeoff(
        { grid: b.grid, inSite, reaches, ...(b.keepOut ? { blocked: (p: XY) => pointInsideAny(b.keepOut!.index, p) } : {}) },
        centre,
        grid.slackM,
        b.rangeM,
      );
      if (found) {
        takeoff = found.xy;
        takeoffFrom = "proposed";
        slopeDeg = found.slopeDeg;
        if (b.candidates.length) {
          warnings.push({ code: "takeoff-proposed", message: `No take-off point given reaches block ${blk.index} within ${b.rangeM} m: a point was proposed for it.` });
        }
      }
    }
    if (!takeoff) {
      // No site ground reaches the whole block: the nearest candidate, or the block's centre, and say so.
      takeoff = b.candidates.length ? [...b.candidates].sort((p, q) => dist(p, centre) - dist(q, centre))[0] : centre;
      takeoffFrom = b.candidates.length ? "candidate" : "proposed";
      warnings.push({
        code: "range",
        message: `Block ${blk.index}: no take-off point on the site's DEM ground outside keep-out zones reaches all of it within ${b.rangeM} m (farthest ${farthestFromM(blk, frame, takeoff).toFixed(0)} m): give a take-off point, or a larger aircraft.maxRangeM if your rules allow.`,
      });
    }
    const legs = blockLegs(blk, frame, takeoff, strip);
    strip = legs.lastStrip + 1;
    out.push({ index: blk.index, takeoff, takeoffFrom, ...(slopeDeg !== undefined ? { slopeDeg } : {}), legs: legs.legs, farthestM: farthestFromM(blk, frame, takeoff) });
  }
  const proposed = out.filter((p) => p.takeoffFrom === "proposed").length;
  warnings.push({
    code: "blocks",
    message:
      `The site does not fit one take-off point's ${b.rangeM} m range: flown in ${out.length} blocks (${grid.along} along x ${grid.across} across the strips), each from its own take-off point` +
      (proposed ? `; ${proposed} take-off point${proposed === 1 ? " was" : "s were"} proposed on the flattest site ground near the block's centre: the pilot must confirm access, footing and line of sight there.` : "."),
  });
  return { blocks: out, warnings };
}

function dist(p: XY, q: XY): number {
  return Math.hypot(p[0] - q[0], p[1] - q[1]);
}
