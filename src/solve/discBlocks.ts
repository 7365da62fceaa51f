/**
 * The pooled blocks a clearance disc covers, worked out once per radius instead of per station
 * (maxGroundInRadius, clearance.ts). Which of the k x k blocks lie wholly inside a disc and
 * which its rim crosses depends only on where the station sits within its own block; so the
 * block is cut into BINS x BINS parts and, for each part, every block is classed for every
 * station position in that part at once (by the nearest and the farthest of its cell centres
 * from any point of the part):
 * - inside: all its cell centres lie within the radius of every point of the part (so its
 *   pooled maximum counts whole, as the per-station rule lets it);
 * - rim: some cell centre may lie within the radius of some point of the part (scanned cell by
 *   cell with extremaInRadius's own chords when its maximum can matter);
 * - neither: no cell centre can lie within the radius.
 * The classes hold for the whole part, so they hold for each station in it: the answer is the
 * per-station branch and bound's, with a few more rim blocks (those the part's spread of
 * stations adds) and none of the per-station square roots and divisions that classed the
 * blocks row by row (~2/3 of its time on the solver's 0.5 m grids). Distances are in metres
 * (cells need not be square) and are compared with 1e-6 m more margin than the per-station
 * rule's (rounding).
 */

/** Parts a block side is cut into (the station's place within its block, per axis). */
const BINS = 16;

/** A disc's blocks per part: offsets (block row * pooled width + block column) from the station's own block. */
export interface DiscBlocks {
  /** Cells a block side (the pooled grid's k). */
  k: number;
  bins: number;
  /** Part p = iy * bins + ix: inside blocks inside[insideAt[p] .. insideAt[p + 1]), rim blocks likewise. */
  inside: Int32Array;
  insideAt: Int32Array;
  rim: Int32Array;
  rimAt: Int32Array;
  /** The block rows and columns any part's offsets reach, relative to the station's block. */
  reach: number;
}

const made = new WeakMap<object, Map<string, DiscBlocks>>();

/**
 * The disc's blocks on a pooled grid `pooledWidth` blocks wide of k x k cells of adx x ady
 * metres, for radius `radiusM` (the per-station rule's margins: inside within radius - 1e-6,
 * rim within radius + 1e-6); cached per pooled grid (`owner`) and radius.
 * @example const d = discBlocks(pooled, 5, pooled.width, 0.5, 0.5, 16.2)
 */
export function discBlocks(owner: object, k: number, pooledWidth: number, adx: number, ady: number, radiusM: number): DiscBlocks {
  let byRadius = made.get(owner);
  if (!byRadius) made.set(owner, (byRadius = new Map()));
  const key = `${k} ${pooledWidth} ${adx} ${ady} ${radiusM}`;
  const hit = byRadius.get(key);
  if (hit) return hit;
  const rIn = Math.max(0, radiusM - 2e-6);
  const rOut = radiusM + 2e-6;
  const reach = Math.ceil(radiusM / Math.min(adx, ady) / k) + 2;
  const inside: number[] = [];
  const rim: number[] = [];
  const insideAt = new Int32Array(BINS * BINS + 1);
  const rimAt = new Int32Array(BINS * BINS + 1);
  // A part's station positions, in cell-centre units from its block's first centre, widened a
  // little for the rounding of the station's own place.
  const eps = 1e-9;
  for (let iy = 0; iy < BINS; iy++) {
    const sy0 = (iy * k) / BINS - eps, sy1 = ((iy + 1) * k) / BINS + eps;
    for (let ix = 0; ix < BINS; ix++) {
      const sx0 = (ix * k) / BINS - eps, sx1 = ((ix + 1) * k) / BINS + eps;
      const p = iy * BINS + ix;
      insideAt[p] = inside.length;
      rimAt[p] = rim.length;
      for (let dbr = -reach; dbr <= reach; dbr++) {
        // The block's cell centres, in the same units.
        const cy0 = dbr * k, cy1 = dbr * k + k - 1;
        const nearY = Math.max(0, cy0 - sy1, sy0 - cy1) * ady;
        const farY = Math.max(Math.abs(cy1 - sy0), Math.abs(sy1 - cy0)) * ady;
        for (let dbc = -reach; dbc <= reach; dbc++) {
          const cx0 = dbc * k, cx1 = dbc * k + k - 1;
          const nearX = Math.max(0, cx0 - sx1, sx0 - cx1) * adx;
          const farX = Math.max(Math.abs(cx1 - sx0), Math.abs(sx1 - cx0)) * adx;
          const offset = dbr * pooledWidth + dbc;
          if (Math.hypot(farX, farY) <= rIn) inside.push(offset);
          else if (Math.hypot(nearX, nearY) <= rOut) rim.push(offset);
        }
      }
    }
  }
  insideAt[BINS * BINS] = inside.length;
  rimAt[BINS * BINS] = rim.length;
  const d: DiscBlocks = { k, bins: BINS, inside: Int32Array.from(inside), insideAt, rim: Int32Array.from(rim), rimAt, reach };
  byRadius.set(key, d);
  return d;
}
