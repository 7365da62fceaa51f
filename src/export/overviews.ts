/**
 * Reduced-resolution images (overviews) of a raster, each half the size of the one
 * before, rounded up, as `gdaladdo` sizes GeoTIFF overviews of factor 2, 4, 8... (GDAL's
 * COG driver rounds down instead, leaving an odd last row or column out of every block; we
 * round up so each cell falls in exactly one 2 x 2 block). Pure math on row-major typed
 * arrays; nodata cells never count.
 */

export interface RasterLevel<T> {
  width: number;
  height: number;
  values: T;
}

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
 * the full-resolution cells with a value in its 2^k x 2^k block (sums and counts carried
 * from level to level, so a block half nodata is not weighted like a full one); NaN where
 * the block has none. `levels` overviews are made.
 * @example meanOverviews(Float32Array.of(1, 3, NaN, 5), 2, 2, 1)[0].values // Float32Array [3]
 */
export function meanOverviews(values: Float32Array, width: number, height: number, levels: number): RasterLevel<Float32Array>[] {
  const out: RasterLevel<Float32Array>[] = [];
  let w = width;
  let h = height;
  let sum: Float64Array | undefined;
  let count: Uint32Array | undefined;
  for (let k = 0; k < levels; k++) {
    const w2 = (w + 1) >> 1;
    const h2 = (h + 1) >> 1;
    const s2 = new Float64Array(w2 * h2);
    const c2 = new Uint32Array(w2 * h2);
    for (let y2 = 0; y2 < h2; y2++) {
      const top = 2 * y2 * w;
      // At the bottom and right edges a missing neighbour is skipped (never counted twice).
      const down = 2 * y2 + 1 < h ? w : -1;
      const d = y2 * w2;
      for (let x2 = 0; x2 < w2; x2++) {
        const i = top + 2 * x2;
        const right = 2 * x2 + 1 < w;
        let s: number;
        let c: number;
        if (sum === undefined || count === undefined) {
          // NaN fails v === v: nodata never counts.
          const v0 = values[i];
          const v1 = right ? values[i + 1] : NaN;
          const v2 = down > 0 ? values[i + down] : NaN;
          const v3 = right && down > 0 ? values[i + down + 1] : NaN;
          s = (v0 === v0 ? v0 : 0) + (v1 === v1 ? v1 : 0) + (v2 === v2 ? v2 : 0) + (v3 === v3 ? v3 : 0);
          c = (v0 === v0 ? 1 : 0) + (v1 === v1 ? 1 : 0) + (v2 === v2 ? 1 : 0) + (v3 === v3 ? 1 : 0);
        } else {
          s = sum[i] + (right ? sum[i + 1] : 0) + (down > 0 ? sum[i + down] : 0) + (right && down > 0 ? sum[i + down + 1] : 0);
          c = count[i] + (right ? count[i + 1] : 0) + (down > 0 ? count[i + down] : 0) + (right && down > 0 ? count[i + down + 1] : 0);
        }
        s2[d + x2] = s;
        c2[d + x2] = c;
      }
    }
    const mean = new Float32Array(w2 * h2);
    for (let i = 0; i < mean.length; i++) mean[i] = c2[i] === 0 ? NaN : s2[i] / c2[i];
    out.push({ width: w2, height: h2, values: mean });
    sum = s2;
    count = c2;
    w = w2;
    h = h2;
  }
  return out;
}

/**
 * One overview by nearest-neighbour decimation: each cell takes the top-left cell of its
 * 2 x 2 block, or when that is nodata the first other one with a value (top-right,
 * bottom-left, bottom-right), so the site's outline does not shrink as the view zooms
 * out; nodata where all four are. The values stay values the raster holds.
 * @example nearestOverview(Uint16Array.of(9, 1, 2, 3), 2, 2, 9) // Uint16Array [1]
 */
export function nearestOverview(values: Uint16Array, width: number, height: number, nodata: number): Uint16Array {
  const w2 = (width + 1) >> 1;
  const h2 = (height + 1) >> 1;
  const out = new Uint16Array(w2 * h2);
  for (let y2 = 0; y2 < h2; y2++) {
    const top = 2 * y2 * width;
    // At the bottom and right edges a missing neighbour stands in as the cell itself.
    const down = 2 * y2 + 1 < height ? width : 0;
    const d = y2 * w2;
    for (let x2 = 0; x2 < w2; x2++) {
      const i = top + 2 * x2;
      const right = 2 * x2 + 1 < width ? 1 : 0;
      let v = values[i];
      if (v === nodata) v = values[i + right];
      if (v === nodata) v = values[i + down];
      if (v === nodata) v = values[i + down + right];
      out[d + x2] = v;
    }
  }
  return out;
}

/**
 * One overview of a bit-flag raster by bitwise OR of the cells with a value in each
 * 2 x 2 block, so a flag on one cell stays visible when the view zooms out; nodata where
 * all four are. Where the OR would equal `nodata` itself (it can, combining bits no single
 * cell holds together), the bits `dropOnClash` are cleared so the cell does not vanish.
 * @example orOverview(Uint16Array.of(1, 8, 255, 0), 2, 2, 255, 2) // Uint16Array [9]
 */
export function orOverview(values: Uint16Array, width: number, height: number, nodata: number, dropOnClash: number): Uint16Array {
  const w2 = (width + 1) >> 1;
  const h2 = (height + 1) >> 1;
  const out = new Uint16Array(w2 * h2);
  for (let y2 = 0; y2 < h2; y2++) {
    const top = 2 * y2 * width;
    // At the bottom and right edges a missing neighbour stands in as the cell itself (OR is idempotent).
    const down = 2 * y2 + 1 < height ? width : 0;
    const d = y2 * w2;
    for (let x2 = 0; x2 < w2; x2++) {
      const i = top + 2 * x2;
      const right = 2 * x2 + 1 < width ? 1 : 0;
      const v0 = values[i];
      const v1 = values[i + right];
      const v2 = values[i + down];
      const v3 = values[i + down + right];
      const acc = (v0 === nodata ? 0 : v0) | (v1 === nodata ? 0 : v1) | (v2 === nodata ? 0 : v2) | (v3 === nodata ? 0 : v3);
      const any = v0 !== nodata || v1 !== nodata || v2 !== nodata || v3 !== nodata;
      out[d + x2] = !any ? nodata : acc === nodata ? acc & ~dropOnClash : acc;
    }
  }
  return out;
}
