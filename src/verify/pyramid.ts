/**
 * Block extrema of the ground: the cheap upper and lower bounds the checks try
 * before any exact work. Level 0 blocks hold 8 x 8 quads (the corners of
 * quads i..i+7 are centres i..i+8, so neighbouring blocks share an edge of
 * centres and every quad lies wholly in one block); each level up merges 2 x 2.
 * A bilinear surface stays within its corners' range on every quad, so a
 * block's max/min bound the surface over all its quads.
 */

export const BLOCK0 = 8;

export interface Pyramid {
  /** Quads per side of the grid (width - 1, height - 1). */
  quadsW: number;
  quadsH: number;
  levels: PyramidLevel[];
}

export interface PyramidLevel {
  /** Quads per block side at this level. */
  size: number;
  bw: number;
  bh: number;
  max: Float32Array;
  min: Float32Array;
  /** 1 where a corner height is missing (NaN in the heights used). */
  unusable: Uint8Array;
  /** 1 where the DEM has no data at a corner (even if a height is assumed there). */
  unknown: Uint8Array;
}

/**
 * Builds the pyramid over heights `z` (NaN = no height) and the DEM's own heights `demZ`
 * (NaN where it has no data; `z` itself unless ground is assumed).
 * @example buildPyramid(grid.heights, grid.heights, grid.width, grid.height).levels[0].size // 8
 */
export function buildPyramid(z: Float32Array, demZ: Float32Array, width: number, height: number): Pyramid {
  const quadsW = Math.max(0, width - 1);
  const quadsH = Math.max(0, height - 1);
  const levels: PyramidLevel[] = [];
  let bw = Math.max(1, Math.ceil(quadsW / BLOCK0));
  let bh = Math.max(1, Math.ceil(quadsH / BLOCK0));
  const l0 = newLevel(BLOCK0, bw, bh);
  // Block row by block row: block (bi, bj) holds the centres of rows bj * 8 .. bj * 8 + 8 and
  // columns bi * 8 .. bi * 8 + 8 (neighbours share an edge row and column), within the grid.
  for (let bj = 0; bj < bh; bj++) level0Row(z, demZ, width, bj * BLOCK0, Math.min(bj * BLOCK0 + BLOCK0, height - 1), l0, bj * bw);
  levels.push(l0);
  while (bw > 1 || bh > 1) {
    const prev = levels[levels.length - 1];
    bw = Math.ceil(prev.bw / 2);
    bh = Math.ceil(prev.bh / 2);
    const lv = newLevel(prev.size * 2, bw, bh);
    for (let bj = 0; bj < bh; bj++)
      for (let bi = 0; bi < bw; bi++) {
        let mx = -Infinity;
        let mn = Infinity;
        let bad = 0;
        let unk = 0;
        for (let dj = 0; dj < 2; dj++)
          for (let di = 0; di < 2; di++) {
            const ci = 2 * bi + di;
            const cj = 2 * bj + dj;
            if (ci >= prev.bw || cj >= prev.bh) continue;
            const k = cj * prev.bw + ci;
            if (prev.max[k] > mx) mx = prev.max[k];
            if (prev.min[k] < mn) mn = prev.min[k];
            bad |= prev.unusable[k];
            unk |= prev.unknown[k];
          }
        const b = bj * bw + bi;
        lv.max[b] = mx;
        lv.min[b] = mn;
        lv.unusable[b] = bad;
        lv.unknown[b] = unk;
      }
    levels.push(lv);
  }
  return { quadsW, quadsH, levels };
}

/**
 * One row of level-0 blocks (from block index `at`), over centre rows r0..r1: each block's
 * max and min of the heights with a value, whether one is missing and whether the DEM has no
 * data at one. Each block read whole (its 9 x 9 centres stay in the cache across the row):
 * folding every centre row into the blocks as it was read took ~2x the time (4557 x 4558
 * cells: ~75 ms).
 */
function level0Row(z: Float32Array, demZ: Float32Array, width: number, r0: number, r1: number, lv: PyramidLevel, at: number): void {
  // Without an assumed ground the two are one array (makeSurface): a cell is unknown exactly
  // where it is unusable, and the DEM's heights need no second reading (~40 % of the pass).
  const same = z === demZ;
  for (let bi = 0; bi < lv.bw; bi++) {
    const c0 = bi * BLOCK0;
    const c1 = Math.min(c0 + BLOCK0, width - 1);
    let mx = -Infinity;
    let mn = Infinity;
    let bad = 0;
    let unk = 0;
    for (let r = r0; r <= r1; r++) {
      const base = r * width;
      for (let c = c0; c <= c1; c++) {
        const v = z[base + c];
        if (v !== v) bad = 1;
        else {
          if (v > mx) mx = v;
          if (v < mn) mn = v;
        }
      }
      if (!same) {
        for (let c = c0; c <= c1; c++) {
          const o = demZ[base + c];
          if (o !== o) unk = 1;
        }
      }
    }
    lv.max[at + bi] = mx;
    lv.min[at + bi] = mn;
    lv.unusable[at + bi] = bad;
    lv.unknown[at + bi] = same ? bad : unk;
  }
}

function newLevel(size: number, bw: number, bh: number): PyramidLevel {
  const n = bw * bh;
  return { size, bw, bh, max: new Float32Array(n), min: new Float32Array(n), unusable: new Uint8Array(n), unknown: new Uint8Array(n) };
}

/**
 * Bounds over every quad touching the index box [c1, c2] x [r1, r2], written to
 * out = [max, min, unusable, unknown]. Returns false when the box leaves the
 * grid's quads (the caller must then decide by exact work). At most 3 x 3
 * blocks are read: the level is the finest whose blocks are at least half the box.
 * @example if (pyramidBounds(p, c - a, r - b, c + a, r + b, out) && out[2] === 0) upper = out[0]
 */
export function pyramidBounds(p: Pyramid, c1: number, r1: number, c2: number, r2: number, out: Float64Array): boolean {
  if (!(c1 >= 0 && r1 >= 0 && c2 <= p.quadsW && r2 <= p.quadsH)) return false;
  const i1 = Math.min(Math.floor(c1), p.quadsW - 1);
  const j1 = Math.min(Math.floor(r1), p.quadsH - 1);
  const i2 = Math.min(Math.floor(c2), p.quadsW - 1);
  const j2 = Math.min(Math.floor(r2), p.quadsH - 1);
  const span = Math.max(i2 - i1 + 1, j2 - j1 + 1);
  let li = 0;
  while (li + 1 < p.levels.length && p.levels[li].size * 2 < span) li++;
  const lv = p.levels[li];
  let mx = -Infinity;
  let mn = Infinity;
  let bad = 0;
  let unk = 0;
  const b1 = Math.floor(i1 / lv.size);
  const b2 = Math.floor(i2 / lv.size);
  for (let bj = Math.floor(j1 / lv.size); bj <= Math.floor(j2 / lv.size); bj++)
    for (let bi = b1; bi <= b2; bi++) {
      const k = bj * lv.bw + bi;
      if (lv.max[k] > mx) mx = lv.max[k];
      if (lv.min[k] < mn) mn = lv.min[k];
      bad |= lv.unusable[k];
      unk |= lv.unknown[k];
    }
  out[0] = mx;
  out[1] = mn;
  out[2] = bad;
  out[3] = unk;
  return true;
}
