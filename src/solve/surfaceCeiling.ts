import type { DemGrid } from "../dem/grid.js";

/**
 * Highest altitude at each point that stays within `ceilingM` of the closest
 * point of the terrain surface (Regulation (EU) 2019/947, UAS.OPEN.010:
 * "120 m from the closest point of the surface of the earth"):
 *   max over cells q with horizontal distance d <= C of h(q) + sqrt(C^2 - d^2).
 * The point is legal iff some surface point lies within C, so this maximum
 * is the ceiling exactly (cells stand for the surface at their centres).
 *
 * A disc of C = 120 m at 1 m cells is ~45 000 cells, so the scan is a
 * branch-and-bound over 8 x 8 blocks: a block's best possible value is its
 * maximum height + sqrt(C^2 - dmin^2), dmin the distance to its nearest cell
 * centre; blocks are visited nearest first and skipped when that bound cannot
 * beat the best value found. The bound is a true upper bound, so the result
 * equals the full scan. Nodata cells are skipped (they can only lower the
 * ceiling, the safe side); NaN when the disc holds no data at all.
 * @example surfaceCeiling(grid, xs, ys, 120, out)
 */
export function surfaceCeiling(grid: DemGrid, xs: ArrayLike<number>, ys: ArrayLike<number>, ceilingM: number, out: Float64Array): void {
  const B = 8;
  const { width: w, height: h, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const bw = Math.ceil(w / B), bh = Math.ceil(h / B);
  const bmax = blockMax(grid, B);
  const C2 = ceilingM * ceilingM;
  const adx = Math.abs(dx), ady = Math.abs(dy);
  const rc = ceilingM / adx, rr = ceilingM / ady;
  // Candidate blocks of one station and their bounds, reused across stations.
  const maxBlocks = (Math.ceil((2 * rc) / B) + 2) * (Math.ceil((2 * rr) / B) + 2);
  const order = new Int32Array(maxBlocks);
  const bound = new Float64Array(maxBlocks);
  const scanBlock = (b: number, pc: number, pr: number, best: number): number => {
    const br = Math.floor(b / bw), bc = b - br * bw;
    for (let r = br * B; r < Math.min(h, br * B + B); r++) {
      const ddy = (r - pr) * ady;
      for (let c = bc * B; c < Math.min(w, bc * B + B); c++) {
        const z = heights[r * w + c];
        if (z !== z) continue;
        const ddx = (c - pc) * adx;
        const rem = C2 - ddx * ddx - ddy * ddy;
        if (rem < 0) continue;
        const v = z + Math.sqrt(rem);
        if (v > best) best = v;
      }
    }
    return best;
  };
  for (let i = 0; i < xs.length; i++) {
    const px = xs[i], py = ys[i];
    // fractional col/row of the point in cell-centre coordinates
    const pc = (px - x0) / dx - 0.5;
    const pr = (py - y0) / dy - 0.5;
    const bc0 = Math.max(0, Math.floor((pc - rc) / B)), bc1 = Math.min(bw - 1, Math.floor((pc + rc) / B));
    const br0 = Math.max(0, Math.floor((pr - rr) / B)), br1 = Math.min(bh - 1, Math.floor((pr + rr) / B));
    // Seed with the block under the point: usually near the answer, so most
    // blocks fail the bound test below and are never listed.
    let best = -Infinity;
    const obc = Math.floor(Math.round(pc) / B), obr = Math.floor(Math.round(pr) / B);
    const own = obc >= 0 && obc < bw && obr >= 0 && obr < bh ? obr * bw + obc : -1;
    if (own >= 0) best = scanBlock(own, pc, pr, best);
    let nb = 0;
    for (let br = br0; br <= br1; br++) {
      for (let bc = bc0; bc <= bc1; bc++) {
        const b = br * bw + bc;
        if (b === own) continue;
        const m = bmax[b];
        if (m !== m || m === -Infinity) continue;
        // nearest cell centre of the block to the point
        const cc = Math.min(Math.max(pc, bc * B), Math.min(w - 1, bc * B + B - 1));
        const cr = Math.min(Math.max(pr, br * B), Math.min(h - 1, br * B + B - 1));
        const ddx = (cc - pc) * adx, ddy = (cr - pr) * ady;
        const d2 = ddx * ddx + ddy * ddy;
        if (d2 > C2) continue;
        const bnd = m + Math.sqrt(C2 - d2);
        if (bnd <= best) continue;
        order[nb] = b;
        bound[nb] = bnd;
        nb++;
      }
    }
    // Best-bound first without a sort: take the highest remaining bound, stop
    // when it cannot beat the best value found (the bound is a true upper bound).
    for (;;) {
      let k = -1;
      let top = best;
      for (let j = 0; j < nb; j++) if (bound[j] > top) (top = bound[j]), (k = j);
      if (k < 0) break;
      best = scanBlock(order[k], pc, pr, best);
      bound[k] = -Infinity;
    }
    out[i] = best === -Infinity ? NaN : best;
  }
}

const cache = new WeakMap<DemGrid, Float32Array>();

function blockMax(grid: DemGrid, B: number): Float32Array {
  const hit = cache.get(grid);
  if (hit) return hit;
  const { width: w, height: h, heights } = grid;
  const bw = Math.ceil(w / B), bh = Math.ceil(h / B);
  const out = new Float32Array(bw * bh).fill(-Infinity);
  for (let r = 0; r < h; r++) {
    const base = Math.floor(r / B) * bw;
    for (let c = 0; c < w; c++) {
      const z = heights[r * w + c];
      if (z !== z) continue;
      const k = base + Math.floor(c / B);
      if (z > out[k]) out[k] = z;
    }
  }
  cache.set(grid, out);
  return out;
}
