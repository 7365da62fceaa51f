/**
 * Distance from a point in the air to the closest point of the terrain surface
 * (3-D), the measure of the EU open category's ceiling ("120 m from the closest
 * point of the surface of the earth", Regulation (EU) 2019/947, UAS.OPEN.010).
 *
 * Method: branch and bound over boxes that hold the surface. A pyramid block, a
 * quad, or any sub-rectangle of a quad holds the bilinear surface within its
 * corners' height range (bilinear extremes on an axis-aligned rectangle are at
 * its corners), so the distance from the point to that box is a lower bound;
 * the distance to the surface point at a box's centre is an upper bound. Boxes
 * whose lower bound cannot beat the best upper bound (less the tolerance) are
 * dropped, others split; a box smaller than the tolerance always drops after its
 * centre is measured. The result is [lower, upper] with upper - lower <= tol.
 */
import type { Surface } from "./surface.js";
import { groundAtIndex } from "./surface.js";
import { grown } from "./grow.js";

let blocks = new Int32Array(3 * 256);
let patches = new Float64Array(4 * 256);

/** Scratch result: [lower, upper] metres. */
export const distanceOut = new Float64Array(2);

/**
 * Distance from (pc, pr) in index space at altitude zM to the surface, searched
 * out to `limitM` (beyond it the answer is [limitM - tol, Infinity]).
 * sx, sy: metres per column and per row. Writes distanceOut; returns evaluations made.
 * With `enoughM`, the search stops as soon as a surface point that close is found:
 * distanceOut[1] is then that distance and distanceOut[0] is NaN (no lower bound).
 * @example surfaceDistance(s, 100.2, 50.7, 1020, 1, 1, 170, 0.01); distanceOut[1] // metres to the closest terrain point
 */
export function surfaceDistance(s: Surface, pc: number, pr: number, zM: number, sx: number, sy: number, limitM: number, tol: number, enoughM = -Infinity): number {
  let evals = 1;
  const g0 = groundAtIndex(s, pc, pr);
  let up = g0 === g0 ? Math.abs(zM - g0) : Infinity;
  // The ground straight below is usually close enough to decide (the aircraft flies near it).
  if (up <= enoughM) {
    distanceOut[0] = NaN;
    distanceOut[1] = up;
    return evals;
  }
  const p = s.pyramid;
  const cap = () => Math.min(up, limitM) - tol;
  // Blocks of the level whose size is about the search radius, around the point.
  const radC = Math.min(up, limitM) / sx;
  const radR = Math.min(up, limitM) / sy;
  let li = 0;
  while (li + 1 < p.levels.length && p.levels[li].size < Math.max(radC, radR)) li++;
  const lv0 = p.levels[li];
  let bp = 0;
  const b1 = Math.max(0, Math.floor((pc - radC) / lv0.size));
  const b2 = Math.min(lv0.bw - 1, Math.floor((pc + radC) / lv0.size));
  const c1 = Math.max(0, Math.floor((pr - radR) / lv0.size));
  const c2 = Math.min(lv0.bh - 1, Math.floor((pr + radR) / lv0.size));
  for (let bj = c1; bj <= c2; bj++) for (let bi = b1; bi <= b2; bi++) bp = pushBlock(bp, li, bi, bj);
  while (bp > 0) {
    const bj = blocks[--bp];
    const bi = blocks[--bp];
    const l = blocks[--bp];
    const lv = p.levels[l];
    const k = bj * lv.bw + bi;
    const i0 = bi * lv.size;
    const j0 = bj * lv.size;
    const i1 = Math.min(i0 + lv.size, p.quadsW);
    const j1 = Math.min(j0 + lv.size, p.quadsH);
    if (boxDistance(pc, pr, zM, sx, sy, i0, j0, i1, j1, lv.min[k], lv.max[k]) >= cap()) continue;
    if (l > 0) {
      for (let dj = 0; dj < 2; dj++)
        for (let di = 0; di < 2; di++) {
          const ci = 2 * bi + di;
          const cj = 2 * bj + dj;
          if (ci < p.levels[l - 1].bw && cj < p.levels[l - 1].bh) bp = pushBlock(bp, l - 1, ci, cj);
        }
      continue;
    }
    // Quads of a level-0 block, each refined as bilinear patches.
    const w = s.width;
    const z = s.z;
    for (let j = j0; j < j1; j++)
      for (let i = i0; i < i1; i++) {
        const q = j * w + i;
        const z00 = z[q];
        const z10 = z[q + 1];
        const z01 = z[q + w];
        const z11 = z[q + w + 1];
        if (z00 !== z00 || z10 !== z10 || z01 !== z01 || z11 !== z11) continue;
        const lo = Math.min(z00, z10, z01, z11);
        const hi = Math.max(z00, z10, z01, z11);
        if (boxDistance(pc, pr, zM, sx, sy, i, j, i + 1, j + 1, lo, hi) >= cap()) continue;
        // Sub-rectangles [u1, u2] x [v1, v2] of the quad (u, v in 0..1).
        let pp = 0;
        pp = pushPatch(pp, 0, 0, 1, 1);
        while (pp > 0) {
          const v2 = patches[--pp];
          const u2 = patches[--pp];
          const v1 = patches[--pp];
          const u1 = patches[--pp];
          const a = bil(z00, z10, z01, z11, u1, v1);
          const b = bil(z00, z10, z01, z11, u2, v1);
          const c = bil(z00, z10, z01, z11, u1, v2);
          const d = bil(z00, z10, z01, z11, u2, v2);
          const plo = Math.min(a, b, c, d);
          const phi = Math.max(a, b, c, d);
          if (boxDistance(pc, pr, zM, sx, sy, i + u1, j + v1, i + u2, j + v2, plo, phi) >= cap()) continue;
          const um = 0.5 * (u1 + u2);
          const vm = 0.5 * (v1 + v2);
          const gm = bil(z00, z10, z01, z11, um, vm);
          evals++;
          const dm = Math.hypot((i + um - pc) * sx, (j + vm - pr) * sy, gm - zM);
          if (dm < up) {
            up = dm;
            if (up <= enoughM) {
              distanceOut[0] = NaN;
              distanceOut[1] = up;
              return evals;
            }
          }
          const size = Math.hypot((u2 - u1) * sx, (v2 - v1) * sy, phi - plo);
          if (size <= tol) continue;
          pp = pushPatch(pp, u1, v1, um, vm);
          pp = pushPatch(pp, um, v1, u2, vm);
          pp = pushPatch(pp, u1, vm, um, v2);
          pp = pushPatch(pp, um, vm, u2, v2);
        }
      }
  }
  distanceOut[0] = Math.min(up, limitM) - tol;
  distanceOut[1] = up;
  return evals;
}

function bil(z00: number, z10: number, z01: number, z11: number, u: number, v: number): number {
  return (z00 * (1 - u) + z10 * u) * (1 - v) + (z01 * (1 - u) + z11 * u) * v;
}

/** Distance from the point to the box [c1, c2] x [r1, r2] (index space) x [zlo, zhi] (metres). */
function boxDistance(pc: number, pr: number, zM: number, sx: number, sy: number, c1: number, r1: number, c2: number, r2: number, zlo: number, zhi: number): number {
  const ddx = (pc < c1 ? c1 - pc : pc > c2 ? pc - c2 : 0) * sx;
  const ddy = (pr < r1 ? r1 - pr : pr > r2 ? pr - r2 : 0) * sy;
  const ddz = zM > zhi ? zM - zhi : zM < zlo ? zlo - zM : 0;
  return Math.sqrt(ddx * ddx + ddy * ddy + ddz * ddz);
}

function pushBlock(bp: number, l: number, bi: number, bj: number): number {
  blocks = grown(blocks, bp + 3);
  blocks[bp++] = l;
  blocks[bp++] = bi;
  blocks[bp++] = bj;
  return bp;
}

function pushPatch(pp: number, u1: number, v1: number, u2: number, v2: number): number {
  patches = grown(patches, pp + 4);
  patches[pp++] = u1;
  patches[pp++] = v1;
  patches[pp++] = u2;
  patches[pp++] = v2;
  return pp;
}
