/**
 * The site in blocks, each with its take-off point, when one take-off point's
 * range (aircraft.maxRangeM) does not reach the whole layout.
 */
import type { DemGrid } from "../dem/grid.js";
import { rasteriseSite } from "../assess/siteMask.js";
import type { Layout, LayoutLeg, Site, XY } from "../layout/types.js";
import { blockGrid, blockLegs, blocksOf, farthestFromM, stripFrame, stripPieces, type Block, type BlockGrid, type StripFrame } from "../route/blocks.js";
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
  triggerM: number;
  /** Candidate take-off points in the local frame (the user's `takeoff` list, or one point). */
  candidates: XY[];
  /** True when the user gave exactly one take-off point. */
  givenOne: boolean;
  keepOut: KeepOutSet | null;
  /** The site's cells on `grid` (rasteriseSite), when the caller has them or makes them anyway: asked for only when the site is cut into blocks. */
  inSite?: () => Uint8Array;
}

/**
 * The blocks of a plan. With no range limit, or when the layout's take-off point
 * reaches every strip, the layout is one block as it is. Otherwise the strips are
 * cut into the fewest blocks of whole lines and equal lengths that a centred take-off
 * point reaches (route/blocks.ts blockGrid), each line cut between two of its photos
 * and keeping its photo sequence across the seam (blocksOf), and each block takes off from the
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

  // A seam moves by up to half a trigger distance to fall between two photos.
  const seamM = b.triggerM / 2;
  const lines = new Set(pieces.map((p) => p.c)).size;
  const spacing = b.layout.spacingM;
  // One block still, when some point near the middle reaches all of it (the grid's slack
  // is for blocks whose take-off point is not known yet): a proposed or given point.
  const halfDiagonalM = Math.hypot((whole.aMax - whole.aMin) / 2, (whole.cMax - whole.cMin) / 2);
  if (halfDiagonalM <= b.rangeM) {
    const single = blocksFor(b, { along: 1, across: 1, slackM: b.rangeM - halfDiagonalM }, whole, frame);
    if (!single.warnings.some((w) => w.code === "range")) return { blocks: single.blocks, warnings: [...warnings, ...single.warnings] };
  }
  const res = blocksFor(b, blockGrid(whole.aMax - whole.aMin, lines, spacing, b.rangeM, seamM), whole, frame);
  return { blocks: res.blocks, warnings: [...warnings, ...res.warnings] };
}

/** The blocks of one grid, each with its take-off point and legs. */
function blocksFor(b: BlockInputs, grid: BlockGrid, whole: Block, frame: StripFrame): { blocks: PlannedBlock[]; warnings: SolveWarning[] } {
  const warnings: SolveWarning[] = [];
  const pieces = whole.pieces;
  const blocks = blocksOf(pieces, grid, b.triggerM);
  const inSite = b.inSite?.() ?? rasteriseSite(b.site.local, b.grid.width, b.grid.height, b.grid.transform);
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
        // Near the centre: within the grid's slack, and never less than 15 % of the range (the
        // reach test keeps only points that reach the whole block).
        Math.max(grid.slackM, 0.15 * b.rangeM, b.grid.cellSizeM[0] * 2),
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
      // No site ground reaches the whole block (part of it lies beyond the DEM, or in zones):
      // the nearest candidate, else the site ground that reaches farthest into it, and say so.
      if (b.candidates.length) {
        takeoff = [...b.candidates].sort((p, q) => dist(p, centre) - dist(q, centre))[0];
        takeoffFrom = "candidate";
      } else {
        for (const k of [1.25, 1.5, 2]) {
          const found = proposeTakeoff(
            { grid: b.grid, inSite, reaches: (p: XY) => farthestFromM(blk, frame, p) <= k * b.rangeM, ...(b.keepOut ? { blocked: (p: XY) => pointInsideAny(b.keepOut!.index, p) } : {}) },
            centre,
            Math.max(grid.slackM, 0.15 * b.rangeM, b.grid.cellSizeM[0] * 2),
            k * b.rangeM,
          );
          if (found) {
            takeoff = found.xy;
            slopeDeg = found.slopeDeg;
            break;
          }
        }
        takeoff ??= centre;
        takeoffFrom = "proposed";
      }
      warnings.push({
        code: "range",
        message: `Block ${blk.index}: no take-off point on the site's DEM ground outside keep-out zones reaches all of it within ${b.rangeM} m (farthest ${farthestFromM(blk, frame, takeoff).toFixed(0)} m): give a take-off point, or a larger aircraft.maxRangeM if your rules allow.`,
      });
    }
    const legs = blockLegs(blk, frame, takeoff, strip, b.triggerM);
    strip = legs.lastStrip + 1;
    out.push({ index: blk.index, takeoff, takeoffFrom, ...(slopeDeg !== undefined ? { slopeDeg } : {}), legs: legs.legs, farthestM: farthestFromM(blk, frame, takeoff) });
  }
  const proposed = out.filter((p) => p.takeoffFrom === "proposed").length;
  if (out.length === 1) {
    warnings.push({ code: "takeoff-proposed", message: `The take-off point was moved to reach the whole site within the ${b.rangeM} m range: the pilot must confirm access, footing and line of sight there.` });
    return { blocks: out, warnings };
  }
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
