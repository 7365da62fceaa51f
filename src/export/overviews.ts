/**
 * Reduced-resolution images (overviews) of a raster, each half the size of the one
 * before, rounded up, as `gdaladdo` sizes GeoTIFF overviews of factor 2, 4, 8... (GDAL's
 * COG driver rounds down instead, leaving an odd last row or column out of every block; we
 * round up so each cell falls in exactly one 2 x 2 block). Pure math on row-major typed
 * arrays; nodata cells never count.
 *
 * Every reduction of a full-resolution raster also works on a band of its rows starting at
 * an even row (a band's 2 x 2 blocks are the raster's), writing into the matching rows of
 * the overview: so the COG writer reduces each band as it makes it and no full-size copy
 * of the raster is kept. The loops are hand-written over typed arrays, the interior of the
 * grid apart from its last odd row and column, without a function call per cell.
 */

/**
 * Overview sizes for a COG: halve (rounding up) until the image fits one tile, the stopping
 * rule of GDAL's COG driver by default (gdal.org, COG driver, OVERVIEW_COUNT). None when it
 * fits already.
 * @example overviewSizes(1100, 700, 512) // [[550, 350], [275, 175]]
 */
export function overviewSizes(width: number, height: number, tileSize: number): [number, number][] {
  const out: [number, number][] = [];
  let w = width;
  let h = height;
  while (w > tileSize || h > tileSize) {
    w = (w + 1) >> 1;
    h = (h + 1) >> 1;
    out.push([w, h]);
  }
  return out;
}

/**
 * Mean overviews of a Float32 raster whose nodata is NaN: each overview cell is the mean of
 * the full-resolution cells with a value in its 2^k x 2^k block, NaN where the block has none.
 * Sums and counts are carried from level to level (blockSums, then coarserSums), so a block
 * half nodata is not weighted like a full one; blockMeans gives a level's means.
 *
 * BlockSums: the sums and counts of the cells with a value in each block of one overview
 * level. Counts fit 16 bits up to the 7th level (4^7 cells a block), 32 bits beyond.
 */
export interface BlockSums {
  width: number;
  height: number;
  sum: Float64Array;
  count: Uint16Array | Uint32Array;
}

/**
 * Empty sums of overview `level` (1: the first) of a width x height level.
 * @example newBlockSums(4, 3, 1).count.length // 2 * 2
 */
export function newBlockSums(width: number, height: number, level: number): BlockSums {
  const n = width * height;
  return { width, height, sum: new Float64Array(n), count: level < 8 ? new Uint16Array(n) : new Uint32Array(n) };
}

/**
 * The 2 x 2 block sums and counts of a Float32 raster (or band of rows starting at an even
 * row) whose nodata is NaN, into `sum` and `count` from their index 0. A missing neighbour at
 * the right or bottom edge counts as nodata.
 * @example const s = newBlockSums(1, 1, 1); blockSums(Float32Array.of(1, 3, NaN, 5), 2, 2, s.sum, s.count); // s.sum [9], s.count [3]
 */
export function blockSums(values: Float32Array, width: number, height: number, sum: Float64Array, count: Uint16Array | Uint32Array): void {
  const w2 = (width + 1) >> 1;
  const h2 = (height + 1) >> 1;
  const full = width >> 1;
  for (let y2 = 0; y2 < h2; y2++) {
    const top = 2 * y2 * width;
    const d = y2 * w2;
    if (2 * y2 + 1 < height) {
      const bottom = top + width;
      for (let x2 = 0; x2 < full; x2++) {
        const i = top + 2 * x2;
        const j = bottom + 2 * x2;
        // NaN fails v === v: nodata never counts.
        const v0 = values[i];
        const v1 = values[i + 1];
        const v2 = values[j];
        const v3 = values[j + 1];
        sum[d + x2] = (v0 === v0 ? v0 : 0) + (v1 === v1 ? v1 : 0) + (v2 === v2 ? v2 : 0) + (v3 === v3 ? v3 : 0);
        count[d + x2] = (v0 === v0 ? 1 : 0) + (v1 === v1 ? 1 : 0) + (v2 === v2 ? 1 : 0) + (v3 === v3 ? 1 : 0);
      }
      if (full < w2) edgeSum(values[top + 2 * full], NaN, values[bottom + 2 * full], NaN, sum, count, d + full);
    } else {
      for (let x2 = 0; x2 < w2; x2++) {
        const i = top + 2 * x2;
        edgeSum(values[i], x2 < full ? values[i + 1] : NaN, NaN, NaN, sum, count, d + x2);
      }
    }
  }
}

/** One block at the right or bottom edge, missing neighbours NaN: the same sum, term by term, as inside. */
function edgeSum(v0: number, v1: number, v2: number, v3: number, sum: Float64Array, count: Uint16Array | Uint32Array, at: number): void {
  sum[at] = (v0 === v0 ? v0 : 0) + (v1 === v1 ? v1 : 0) + (v2 === v2 ? v2 : 0) + (v3 === v3 ? v3 : 0);
  count[at] = (v0 === v0 ? 1 : 0) + (v1 === v1 ? 1 : 0) + (v2 === v2 ? 1 : 0) + (v3 === v3 ? 1 : 0);
}

/**
 * The next level's sums and counts (blocks twice as large), from one level's: a block half
 * nodata is not weighted like a full one. `level` is the new level's number (1: the first).
 * @example coarserSums({ width: 2, height: 1, sum: Float64Array.of(9, 2), count: Uint16Array.of(3, 1) }, 2).sum // Float64Array [11]
 */
export function coarserSums(l: BlockSums, level: number): BlockSums {
  const out = newBlockSums((l.width + 1) >> 1, (l.height + 1) >> 1, level);
  coarserSumsInto(l.sum, l.count, l.width, l.height, out.sum, out.count);
  return out;
}

/**
 * coarserSums of a width x height level (or band of its rows starting at an even row), into
 * `s2` and `c2` from their index 0.
 * @example const s = newBlockSums(1, 1, 2); coarserSumsInto(Float64Array.of(9, 2), Uint16Array.of(3, 1), 2, 1, s.sum, s.count); // s.sum [11]
 */
export function coarserSumsInto(sum: Float64Array, count: Uint16Array | Uint32Array, width: number, height: number, s2: Float64Array, c2: Uint16Array | Uint32Array): void {
  const w2 = (width + 1) >> 1;
  const h2 = (height + 1) >> 1;
  const full = width >> 1;
  for (let y2 = 0; y2 < h2; y2++) {
    const top = 2 * y2 * width;
    const d = y2 * w2;
    if (2 * y2 + 1 < height) {
      const bottom = top + width;
      for (let x2 = 0; x2 < full; x2++) {
        const i = top + 2 * x2;
        const j = bottom + 2 * x2;
        s2[d + x2] = sum[i] + sum[i + 1] + sum[j] + sum[j + 1];
        c2[d + x2] = count[i] + count[i + 1] + count[j] + count[j + 1];
      }
      if (full < w2) {
        const i = top + 2 * full;
        // A missing neighbour adds 0, term by term as inside (x + 0 is not always x: -0).
        s2[d + full] = sum[i] + 0 + sum[i + width] + 0;
        c2[d + full] = count[i] + count[i + width];
      }
    } else {
      for (let x2 = 0; x2 < w2; x2++) {
        const i = top + 2 * x2;
        const right = x2 < full;
        s2[d + x2] = sum[i] + (right ? sum[i + 1] : 0) + 0 + 0;
        c2[d + x2] = count[i] + (right ? count[i + 1] : 0);
      }
    }
  }
}

/**
 * Means of blocks from their sums and counts, into `out` (as many as it holds, from index 0 of
 * `sum` and `count`): NaN where a block has no value.
 * @example blockMeans(Float64Array.of(9, 0), Uint16Array.of(3, 0), new Float32Array(2)) // Float32Array [3, NaN]
 */
export function blockMeans(sum: Float64Array, count: Uint16Array | Uint32Array, out: Float32Array): Float32Array {
  for (let i = 0; i < out.length; i++) {
    const c = count[i];
    out[i] = c === 0 ? NaN : sum[i] / c;
  }
  return out;
}

/**
 * One overview by nearest-neighbour decimation: each cell takes the top-left cell of its
 * 2 x 2 block, or when that is nodata the first other one with a value (top-right,
 * bottom-left, bottom-right), so the site's outline does not shrink as the view zooms
 * out; nodata where all four are. The values stay values the raster holds. Written into
 * `out` (from its index 0) when given.
 * @example nearestOverview(Uint16Array.of(9, 1, 2, 3), 2, 2, 9) // Uint16Array [1]
 */
export function nearestOverview(values: Uint16Array, width: number, height: number, nodata: number, out?: Uint16Array): Uint16Array {
  const w2 = (width + 1) >> 1;
  const h2 = (height + 1) >> 1;
  const o = out ?? new Uint16Array(w2 * h2);
  for (let y2 = 0; y2 < h2; y2++) {
    const top = 2 * y2 * width;
    // At the bottom and right edges a missing neighbour stands in as the cell itself.
    const down = 2 * y2 + 1 < height ? width : 0;
    const d = y2 * w2;
    const full = width >> 1;
    for (let x2 = 0; x2 < full; x2++) {
      const i = top + 2 * x2;
      let v = values[i];
      if (v === nodata) {
        v = values[i + 1];
        if (v === nodata) {
          v = values[i + down];
          if (v === nodata) v = values[i + down + 1];
        }
      }
      o[d + x2] = v;
    }
    if (full < w2) {
      const i = top + 2 * full;
      const v = values[i];
      o[d + full] = v === nodata ? values[i + down] : v;
    }
  }
  return o;
}

/**
 * One overview of a bit-flag raster by bitwise OR of the cells with a value in each
 * 2 x 2 block, so a flag on one cell stays visible when the view zooms out; nodata where
 * all four are. Where the OR would equal `nodata` itself (it can, combining bits no single
 * cell holds together), the bits `dropOnClash` are cleared so the cell does not vanish.
 * Written into `out` (from its index 0) when given.
 * @example orOverview(Uint16Array.of(1, 8, 255, 0), 2, 2, 255, 2) // Uint16Array [9]
 */
export function orOverview(values: Uint16Array, width: number, height: number, nodata: number, dropOnClash: number, out?: Uint16Array): Uint16Array {
  const w2 = (width + 1) >> 1;
  const h2 = (height + 1) >> 1;
  const o = out ?? new Uint16Array(w2 * h2);
  const full = width >> 1;
  for (let y2 = 0; y2 < h2; y2++) {
    const top = 2 * y2 * width;
    // At the bottom and right edges a missing neighbour stands in as the cell itself (OR is idempotent).
    const down = 2 * y2 + 1 < height ? width : 0;
    const d = y2 * w2;
    for (let x2 = 0; x2 < w2; x2++) {
      const i = top + 2 * x2;
      const right = x2 < full ? 1 : 0;
      const v0 = values[i];
      const v1 = values[i + right];
      const v2 = values[i + down];
      const v3 = values[i + down + right];
      if (v0 === nodata && v1 === nodata && v2 === nodata && v3 === nodata) {
        o[d + x2] = nodata;
        continue;
      }
      const acc = (v0 === nodata ? 0 : v0) | (v1 === nodata ? 0 : v1) | (v2 === nodata ? 0 : v2) | (v3 === nodata ? 0 : v3);
      o[d + x2] = acc === nodata ? acc & ~dropOnClash : acc;
    }
  }
  return o;
}
