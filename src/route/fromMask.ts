import type { GeoTransform } from "../dem/grid.js";
import type { XY } from "../layout/types.js";
import { knownBlocks, traceKnown } from "./maskTrace.js";
import { groupRings } from "./rings.js";
import { simplifyInward } from "./simplifyInward.js";

/**
 * Unknown ground (DEM nodata) as polygons, and the known ground as the bounds a
 * flight must stay inside.
 *
 * The bilinear ground between cell centres is known only inside quads whose
 * four centres have data; everything else, including all beyond the outermost
 * centres, is unknown and may not be flown over on a guess. The known region is
 * traced on blocks of `blockCells` quads (maskTrace.ts) and then simplified
 * inwards only (simplifyInward.ts), so both steps give up known ground and
 * never take in unknown ground: `known` lies inside the true known region and
 * `unknown` (with the outside of `frame`) covers all the unknown ground.
 */
export interface UnknownGround {
  /** Known ground: polygons, outer ring counter-clockwise first, holes clockwise, local frame. */
  known: XY[][][];
  /**
   * Unknown ground inside `frame`: the frame with the known polygons cut out,
   * and every nodata pocket inside the known ground (with any known islands in it as holes).
   */
  unknown: XY[][][];
  /** The outermost centres' extent widened by `frameMarginM`, counter-clockwise; all outside it is unknown too. */
  frame: XY[];
}

/** Options of `unknownGround`. */
export interface UnknownGroundOptions {
  /** Quads per block side: larger blocks give fewer vertices and give up more known ground. Default 1. */
  blockCells?: number;
  /** Largest depth of known ground given up by the simplification, metres. Default one block. */
  simplifyM?: number;
  /** How far the frame lies beyond the outermost centres, metres. Default one cell. */
  frameMarginM?: number;
}

/**
 * Unknown and known ground of a nodata mask (1 = data, 0 = nodata), row-major
 * `width` x `height`, cell (c, r) centred at x0 + (c + 0.5) dx, y0 + (r + 0.5) dy.
 * @example
 * // 3 x 3 cells of 10 m, the middle one without data: every quad has a nodata corner.
 * const g = unknownGround(Uint8Array.of(1, 1, 1, 1, 0, 1, 1, 1, 1), 3, 3, { x0: 0, y0: 30, dx: 10, dy: -10 });
 * g.known.length // 0
 */
export function unknownGround(mask: Uint8Array, width: number, height: number, transform: GeoTransform, options: UnknownGroundOptions = {}): UnknownGround {
  const { x0, y0, dx, dy } = transform;
  const k = Math.max(1, Math.floor(options.blockCells ?? 1));
  const cellM = Math.max(Math.abs(dx), Math.abs(dy));
  const simplifyM = options.simplifyM ?? k * cellM;
  const marginM = options.frameMarginM ?? cellM;
  const blocks = knownBlocks(mask, width, height, k);
  const qw = width - 1;
  const qh = height - 1;
  // Lattice corner (i, j) is the centre of cell (min(i k, qw), min(j k, qh)).
  const toXY = (p: [number, number]): XY => [x0 + (Math.min(p[0] * k, qw) + 0.5) * dx, y0 + (Math.min(p[1] * k, qh) + 0.5) * dy];
  // Lattice rings have the known ground on their left with j up; the frame
  // flips that when dx and dy have opposite signs (north-up grids).
  const flip = dx * dy < 0;
  const traced = traceKnown(blocks).map((r) => {
    const ring = r.map(toXY);
    return flip ? ring.reverse() : ring;
  });
  const rings = simplifyInward(traced, simplifyM);
  const known = groupRings(rings);
  const xs = [x0 + 0.5 * dx, x0 + (width - 0.5) * dx];
  const ys = [y0 + 0.5 * dy, y0 + (height - 0.5) * dy];
  const [w, e] = [Math.min(...xs) - marginM, Math.max(...xs) + marginM];
  const [s, n] = [Math.min(...ys) - marginM, Math.max(...ys) + marginM];
  const frame: XY[] = [[w, s], [e, s], [e, n], [w, n]];
  // The unknown ground is the frame minus the known polygons: their rings
  // reversed, outer rings becoming holes and holes (nodata pockets) outer rings.
  const kept = known.flat();
  const unknown = groupRings([frame, ...kept.map((r) => [...r].reverse())]);
  return { known, unknown, frame };
}
