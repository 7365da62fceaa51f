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
 * blocks row by row (at 4 km2, 0.5 m cells: the strip stations' maxima 261 -> ~205 ms, the
 * part besides the rim blocks' scans ~140 -> 84 ms). Distances are in metres
 * (cells need not be square) and are compared with 1e-6 m more margin than the per-station
 * rule's (rounding); the nearest and farthest distance along each axis are worked out once
 * per part and block offset, so classing a part's blocks is a sum and a comparison each.
 */

/** Parts a block side is cut into (the station's place within its block, per axis). */
const BINS = 8;

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
  /** Most rim blocks of any part (room for a station's rim list). */
  mostRim: number;
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
  const rIn2 = rIn * rIn;
  const rOut2 = rOut * rOut;
  const reach = Math.ceil(radiusM / Math.min(adx, ady) / k) + 2;
  const side = 2 * reach + 1;
  // The nearest and farthest squared distance, in metres, between a part's station positions
  // and a block's cell centres, along each axis apart (the sums give them in the plane):
  // near[part axis index * side + block offset + reach].
  const axis = (cellM: number) => {
    const near = new Float64Array(BINS * side);
    const far = new Float64Array(BINS * side);
    // A part's station positions, in cell-centre units from its block's first centre, widened
    // a little for the rounding of the station's own place.
    const eps = 1e-9;
    for (let b = 0; b < BINS; b++) {
      const s0 = (b * k) / BINS - eps, s1 = ((b + 1) * k) / BINS + eps;
      for (let d = -reach; d <= reach; d++) {
        const c0 = d * k, c1 = d * k + k - 1;
        const n = Math.max(0, c0 - s1, s0 - c1) * cellM;
        const f = Math.max(Math.abs(c1 - s0), Math.abs(s1 - c0)) * cellM;
        near[b * side + d + reach] = n * n;
        far[b * side + d + reach] = f * f;
      }
    }
    return { near, far };
  };
  const x = axis(adx);
  const y = axis(ady);
  const parts = BINS * BINS;
  const inside = new Int32Array(parts * side * side);
  const rim = new Int32Array(parts * side * side);
  const insideAt = new Int32Array(parts + 1);
  const rimAt = new Int32Array(parts + 1);
  let nIn = 0;
  let nRim = 0;
  for (let iy = 0; iy < BINS; iy++) {
    for (let ix = 0; ix < BINS; ix++) {
      const p = iy * BINS + ix;
      insideAt[p] = nIn;
      rimAt[p] = nRim;
      for (let r = 0; r < side; r++) {
        const nearY = y.near[iy * side + r];
        const farY = y.far[iy * side + r];
        for (let c = 0; c < side; c++) {
          const offset = (r - reach) * pooledWidth + (c - reach);
          if (x.far[ix * side + c] + farY <= rIn2) inside[nIn++] = offset;
          else if (x.near[ix * side + c] + nearY <= rOut2) rim[nRim++] = offset;
        }
      }
    }
  }
  insideAt[parts] = nIn;
  rimAt[parts] = nRim;
  let mostRim = 0;
  for (let p = 0; p < parts; p++) mostRim = Math.max(mostRim, rimAt[p + 1] - rimAt[p]);
  const d: DiscBlocks = { k, bins: BINS, inside: inside.slice(0, nIn), insideAt, rim: rim.slice(0, nRim), rimAt, reach, mostRim };
  byRadius.set(key, d);
  return d;
}
