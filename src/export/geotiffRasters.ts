/**
 * gsd.tif (Float32, cm/px), images.tif (UInt16 image count) and flags.tif
 * (UInt16 bitmask, see assess/flags.ts) on the assessment grid, or a window of it (the plan
 * writes the site's box: RasterWindow), as cloud-optimized GeoTIFFs (cog.ts: 512 x 512
 * tiles, overviews, GDAL's COG layout).
 *
 * Overviews (each half the size of the one before, until the image fits one tile):
 *   gsd.tif     mean of the full-resolution cells with a value in the block (a GSD
 *               zoomed out is the typical GSD there; nodata ignored);
 *   images.tif  nearest-neighbour decimation, preferring a cell with a value (counts stay
 *               counts the plan gives somewhere);
 *   flags.tif   bitwise OR of the block's cells with a value, so a flagged cell stays
 *               visible at every zoom (decimation would drop three in four lone flags).
 * Compression: Deflate without predictor for image counts and flags (runs of equal values:
 * on the 4 km2 benchmark the horizontal predictor made counts 7 % smaller for a third more
 * time, and flags larger); none for gsd.tif (GSD_COMPRESSION).
 *
 * Georeferencing follows the GeoTIFF 1.0 spec: ModelTiepointTag and
 * ModelPixelScaleTag for the north-up grid, RasterPixelIsArea, and the CRS as
 * an EPSG code in ProjectedCSTypeGeoKey (or GeographicTypeGeoKey). A CRS
 * without an EPSG code is written as a user-defined key set, mapped from the
 * proj4 string for the transverse Mercator family (tmerc, utm), the
 * projections a local metric frame uses. We encode the GeoKey directory
 * ourselves (GeoTIFF 1.0, 2.4).
 * Nodata is GDAL's GDAL_NODATA tag (42113): NaN for gsd.tif, 65535 and 255
 * (values the data cannot take) for the others. Band description and unit are
 * GDAL's GDAL_METADATA tag (42112), the XML `gdal_edit.py -units` and a band
 * description write; flags.tif is a palette image (flagPalette.ts) and names its bits
 * there too (FLAG_1 ... FLAG_256).
 */
import type { CrsInfo, GeoTransform } from "../dem/grid.js";
import type { AssessmentRasters } from "../assess/types.js";
import { ASSESSMENT_FLAG_KINDS, FLAG_FINE } from "../assess/flags.js";
import { cogChunks, writeCog, type CogImage, type CogOptions, type SampleArrayType } from "./cog.js";
import { arrayImage, type Predictor } from "./cogTiles.js";
import { flagColorMap } from "./flagPalette.js";
import { blockMeans, blockSums, coarserSums, coarserSumsInto, nearestOverview, newBlockSums, orOverview, overviewSizes, type BlockSums } from "./overviews.js";
import { TAG, type TiffField } from "./tiffTags.js";
import { escapeXml } from "./xml.js";
import { inBackground, NOT_IN_BACKGROUND, type Background } from "../background.js";

export const IMAGES_NODATA = 65535;
/** 255 would set both "coarser" (1) and "finer" (2), which no cell can be: safe as nodata whatever bits are in use. */
export const FLAGS_NODATA = 255;
/** Tile width and height: the default BLOCKSIZE of GDAL's COG driver. */
export const COG_TILE_SIZE = 512;

export type RasterCrs = Pick<CrsInfo, "epsg" | "proj4" | "geographic"> & { name?: string };

export interface AssessmentTiffs {
  "gsd.tif": ArrayBuffer;
  "images.tif": ArrayBuffer;
  "flags.tif": ArrayBuffer;
}

/**
 * gsd.tif is stored without compression. Measured on the 4 km2 benchmark (4557 x 4558
 * cells, four overviews): Deflate with predictor 3 shrinks it from 126 to 31 MB but costs
 * about 1.3 s of CPU more (the low bytes of each GSD value are noise to zlib), three times
 * what the single-strip writer took for gsd.tif; image counts and flags shrink from 63 MB
 * each to 3.7 and 0.7 MB for about 0.2 s together, so they are compressed. For a smaller
 * gsd.tif set { compression: "deflate", predictor: 3 } here.
 */
const GSD_COMPRESSION = { compression: "none", predictor: 1 } as const;

type Grid = { width: number; height: number; transform: GeoTransform };

/**
 * The cells a file holds: columns c0 .. c0 + width - 1 and rows r0 .. r0 + height - 1 of the
 * rasters (default: all of them). The plan writes the site's box (siteWindow), not the DEM
 * window's margin, where every cell would be nodata.
 */
export interface RasterWindow {
  c0: number;
  r0: number;
  width: number;
  height: number;
}

/**
 * The window of whole cells that holds the box [minX, minY, maxX, maxY] (in the rasters'
 * frame), clipped to the rasters: every cell whose centre can lie in a polygon with that box,
 * and the polygon's corners. Undefined when the box misses the rasters.
 * @example siteWindow({ width: 100, height: 80, transform: { x0: 0, y0: 80, dx: 1, dy: -1 } }, [10.2, 5, 20.5, 30]) // { c0: 10, r0: 50, width: 11, height: 26 }
 */
export function siteWindow(r: Grid, box: readonly [number, number, number, number]): RasterWindow | undefined {
  const { x0, y0, dx, dy } = r.transform;
  const cA = Math.max(0, Math.floor((box[0] - x0) / dx));
  const cB = Math.min(r.width - 1, Math.floor((box[2] - x0) / dx));
  const rA = Math.max(0, Math.floor((box[3] - y0) / dy));
  const rB = Math.min(r.height - 1, Math.floor((box[1] - y0) / dy));
  if (!(cA <= cB && rA <= rB)) return undefined;
  return { c0: cA, r0: rA, width: cB - cA + 1, height: rB - rA + 1 };
}

/** The grid of `win` (its first cell's corner as the origin). */
function windowGrid(t: GeoTransform, win: RasterWindow): Grid {
  return { width: win.width, height: win.height, transform: { x0: t.x0 + win.c0 * t.dx, y0: t.y0 + win.r0 * t.dy, dx: t.dx, dy: t.dy } };
}

/** `win`, or the whole of the rasters, checked to lie within them. */
function checkedWindow(r: Pick<AssessmentRasters, "width" | "height">, win: RasterWindow | undefined): RasterWindow {
  if (!win) return { c0: 0, r0: 0, width: r.width, height: r.height };
  const ok = [win.c0, win.r0, win.width, win.height].every(Number.isInteger) && win.c0 >= 0 && win.r0 >= 0 && win.width > 0 && win.height > 0 &&
    win.c0 + win.width <= r.width && win.r0 + win.height <= r.height;
  if (!ok) throw new Error(`raster window ${JSON.stringify(win)} is not within the ${r.width} x ${r.height} rasters`);
  return win;
}

/** Band description, unit and further band metadata items, as GDAL_METADATA holds them. */
export interface BandMetadata {
  description?: string;
  unit?: string;
  items?: Record<string, string>;
}

/**
 * The three assessment rasters as GeoTIFF bytes, nodata outside the site. Each file is
 * made when it is read, so a writer taking them one at a time never holds two at once (a
 * 25 km2 site's gsd.tif is half a gigabyte); the object keeps only a weak reference to
 * each, so a file is made again only if it is read again after its bytes were dropped.
 *
 * @example
 *   const tiffs = assessmentGeoTiffs(assessment.rasters, dem.crs);
 *   await writeOutputSet(out, Object.entries(tiffs).map(([name, data]) => ({ name, data })));
 */
export function assessmentGeoTiffs(r: AssessmentRasters, crs: RasterCrs, window?: RasterWindow): AssessmentTiffs {
  const made = new Map<keyof AssessmentTiffs, WeakRef<ArrayBuffer>>();
  const get = (which: keyof AssessmentTiffs) => {
    let tif = made.get(which)?.deref();
    if (!tif) {
      tif = assessmentGeoTiff(r, crs, which, window);
      made.set(which, new WeakRef(tif));
    }
    return tif;
  };
  return {
    get "gsd.tif"() {
      return get("gsd.tif");
    },
    get "images.tif"() {
      return get("images.tif");
    },
    get "flags.tif"() {
      return get("flags.tif");
    },
  };
}

/**
 * One of the three assessment rasters (so a writer can make them one at a time).
 *
 * @example assessmentGeoTiff(assessment.rasters, dem.crs, "gsd.tif")
 */
export function assessmentGeoTiff(r: AssessmentRasters, crs: RasterCrs, which: keyof AssessmentTiffs, window?: RasterWindow): ArrayBuffer {
  const c = assessmentCog(r, crs, which, window);
  return writeCog(c.images, c.options);
}

/**
 * The same file as chunks in file order (cog.ts, cogChunks), for writing straight to disk:
 * the uncompressed gsd.tif is never held whole in memory. The same bytes as assessmentGeoTiff.
 * Each chunk is valid until the next is asked for (cogChunks): write it, or copy it, first.
 * @example await writeFile("gsd.tif", assessmentGeoTiffChunks(assessment.rasters, dem.crs, "gsd.tif"))
 */
export function assessmentGeoTiffChunks(r: AssessmentRasters, crs: RasterCrs, which: keyof AssessmentTiffs, window?: RasterWindow): Iterable<Uint8Array> {
  return {
    [Symbol.iterator]: () => {
      const c = assessmentCog(r, crs, which, window);
      return cogChunks(c.images, c.options);
    },
  };
}

/** A COG's images and the writer's options. */
interface CogFile {
  images: CogImage[];
  options: CogOptions;
}

/**
 * The images of one assessment raster and how to write them. The full-resolution image is
 * masked (nodata outside the site) band by band as the COG writer reads it, and the first
 * overview is reduced from each band right then: no full-size copy of the raster is made;
 * each further overview comes from the one before.
 */
function assessmentCog(r: AssessmentRasters, crs: RasterCrs, which: keyof AssessmentTiffs, window?: RasterWindow): CogFile {
  const { inSite } = r;
  const win = checkedWindow(r, window);
  const grid = windowGrid(r.transform, win);
  const { width, height } = grid;
  const W = r.width;
  // Row y of the file is row win.r0 + y of the rasters, from column win.c0.
  const at = (y: number) => (win.r0 + y) * W + win.c0;
  const sizes = overviewSizes(width, height, COG_TILE_SIZE);
  // Each row's cells before its first site cell and after its last are nodata, written as a
  // run (TypedArray fill); only those between are read (on an oblique site, half its box).
  const spans = siteRowSpans(inSite, W, win);
  if (which === "gsd.tif") {
    const g = r.gsdCm;
    const levels = meanPyramid(width, height, sizes, (y, band) => siteRows(g, inSite, spans, at, width, y, band, NaN, NaN));
    return cogFile(levels, Float32Array, grid, crs, {
      nodata: NaN,
      ...GSD_COMPRESSION,
      band: { description: "nadir GSD from the most nadir image, cm per image pixel", unit: "cm" },
    });
  }
  if (which === "images.tif") {
    const v = r.images;
    const cap = IMAGES_NODATA - 1;
    // Counts saturate just below nodata.
    const levels = uint16Pyramid(width, height, sizes, (y, band) => siteRows(v, inSite, spans, at, width, y, band, IMAGES_NODATA, cap), (values, w, h, out) => nearestOverview(values, w, h, IMAGES_NODATA, out));
    return cogFile(levels, Uint16Array, grid, crs, {
      nodata: IMAGES_NODATA,
      compression: "deflate",
      predictor: 1,
      band: { description: "number of images covering the cell" },
    });
  }
  const f = r.flags;
  // No cell can be both coarser and finer, so no cell is 255; should one be, it keeps its other bits.
  const levels = uint16Pyramid(width, height, sizes, (y, band) => siteRows(f, inSite, spans, at, width, y, band, FLAGS_NODATA, FLAGS_NODATA & ~FLAG_FINE), (values, w, h, out) => orOverview(values, w, h, FLAGS_NODATA, FLAG_FINE, out));
  const items: Record<string, string> = {};
  for (const k of ASSESSMENT_FLAG_KINDS) items[`FLAG_${k.bit}`] = k.label;
  return cogFile(levels, Uint16Array, grid, crs, {
    nodata: FLAGS_NODATA,
    compression: "deflate",
    predictor: 1,
    colorMap: flagColorMap(FLAGS_NODATA),
    band: { description: "assessment flag bits: a cell holds the sum of the values of its FLAG_n items", items },
  });
}

/**
 * Per row of the window: the columns (from its left) from the row's first site cell (inSite 1)
 * to just past its last, [start, end) at 2y and 2y + 1; [width, width) for a row without one.
 * @example siteRowSpans(Uint8Array.of(0, 1, 1, 0, 0, 0, 0, 0), 4, { c0: 0, r0: 0, width: 4, height: 2 }) // [1, 3, 4, 4]
 */
export function siteRowSpans(inSite: Uint8Array, W: number, win: RasterWindow): Int32Array {
  const spans = new Int32Array(2 * win.height);
  for (let y = 0; y < win.height; y++) {
    const base = (win.r0 + y) * W + win.c0;
    let a = 0;
    while (a < win.width && inSite[base + a] !== 1) a++;
    let b = win.width;
    while (b > a && inSite[base + b - 1] !== 1) b--;
    spans[2 * y] = a;
    spans[2 * y + 1] = b;
  }
  return spans;
}

/**
 * The file's rows from `y` on into `band` (whole rows): a cell's value from the rasters'
 * `values` (its file row starts at rasters cell rowAt(row)) where the cell is in the site,
 * `nodata` elsewhere; a site cell holding `nodata` itself is written as `held` (in the file
 * nodata means outside the site; NaN is never matched: an unseen cell's NaN GSD stays). Each
 * row's site span (`spans`, siteRowSpans) is copied whole, then the cells of the span equal to
 * nodata, and those outside the site (inSite 0: the mask is 0 or 1), are found with the
 * arrays' own indexOf and patched: cell by cell (three reads and a branch a cell) the three
 * files' rows took ~5 ns a cell, some 0.2 s of CPU at 4 km2, about three times this.
 */
function siteRows<T extends Float32Array | Uint16Array>(values: T, inSite: Uint8Array, spans: Int32Array, rowAt: (y: number) => number, width: number, y: number, band: T, nodata: number, held: number): void {
  for (let o = 0, rows = band.length / width; o < rows; o++) {
    const a = spans[2 * (y + o)], b = spans[2 * (y + o) + 1];
    const row = band.subarray(o * width, (o + 1) * width) as T;
    row.fill(nodata, 0, a);
    row.fill(nodata, b);
    if (a >= b) continue;
    const base = rowAt(y + o);
    const out = row.subarray(a, b) as T;
    out.set(values.subarray(base + a, base + b));
    if (nodata === nodata) for (let k = out.indexOf(nodata); k !== -1; k = out.indexOf(nodata, k + 1)) out[k] = held;
    const site = inSite.subarray(base + a, base + b);
    for (let k = site.indexOf(0); k !== -1; ) {
      let e = site.indexOf(1, k);
      if (e === -1) e = site.length;
      out.fill(nodata, k, e);
      k = site.indexOf(0, e);
    }
  }
}

/** Fills `band` with the file's full-resolution rows from row `y` on (whole rows, row-major), nodata in place. */
type FillBand<T> = (y: number, band: T) => void;

/** Rows made and reduced at a time (a multiple of 4, so a chunk's 2 x 2 blocks, and theirs, are the raster's). */
const CHUNK_ROWS = 8;

/**
 * The full-resolution image, made band by band into one reused band buffer by `fill`, as the COG
 * writer reads it (cog.ts: images in order, bands top to bottom). Reduced the first time it is
 * read through; it may be read through again (the streaming writer, cogChunks, writes the
 * overviews first), then only made.
 */
function bandImage<T extends Float32Array | Uint16Array>(width: number, height: number, band: T, fill: FillBand<T>, reduce: (band: T, y0: number, rows: number) => void): CogImage {
  let next = 0;
  let reduced = false;
  return {
    width,
    height,
    rows(y0, count) {
      if (y0 === 0 && next === height) {
        next = 0;
        reduced = true;
      }
      // The writer reads whole tile rows (a multiple of 16 rows), so every chunk but the last is whole.
      if (y0 !== next) throw new Error(`rows from ${y0} asked for, expected ${next}`);
      if (count % CHUNK_ROWS !== 0 && y0 + count !== height) throw new Error(`a band of ${count} rows is not whole chunks of ${CHUNK_ROWS}`);
      next = y0 + count;
      // Made and reduced a few rows at a time, so the reduction reads rows still in the CPU cache.
      for (let r = 0; r < count; r += CHUNK_ROWS) {
        const rows = Math.min(CHUNK_ROWS, count - r);
        const chunk = band.subarray(r * width, (r + rows) * width) as T;
        fill(y0 + r, chunk);
        if (!reduced) reduce(chunk, y0 + r, rows);
      }
      return band.subarray(0, count * width) as T;
    },
  };
}

/** The rows asked of one overview once the image before it has been read to the end. */
function overviewImage(width: number, height: number, ready: () => boolean, rows: (y0: number, count: number) => Float32Array | Uint16Array): CogImage {
  return {
    width,
    height,
    rows(y0, count) {
      if (!ready()) throw new Error("an overview is read before the image it is reduced from");
      return rows(y0, count);
    },
  };
}

/**
 * gsd.tif's images: the full resolution (`fill`) and mean overviews of the `sizes` given, from
 * block sums and counts carried from level to level (overviews.ts). Each chunk of full-resolution
 * rows is reduced while it is in the CPU cache: its first-level sums, kept only for the chunk,
 * give the first overview's means and the second level's sums; the further levels' means (a
 * twelfth of the raster's cells together) are all made, from level to level, when one of
 * them is first read, so the overviews can be read in any order (the streaming writer reads
 * the smallest first, in file order) and the sums are let go.
 */
function meanPyramid(width: number, height: number, sizes: [number, number][], fill: FillBand<Float32Array>): CogImage[] {
  const T = COG_TILE_SIZE;
  const band = new Float32Array(Math.min(T, height) * width);
  if (sizes.length === 0) return [bandImage(width, height, band, fill, () => undefined)];
  const [w1, h1] = sizes[0];
  const chunkSums = newBlockSums(w1, CHUNK_ROWS >> 1, 1);
  const means1 = new Float32Array(w1 * h1);
  let sums: BlockSums | undefined = sizes.length > 1 ? newBlockSums(sizes[1][0], sizes[1][1], 2) : undefined;
  let reducedRows = 0;
  const full = bandImage(width, height, band, fill, (chunk, y0, rows) => {
    // y0 is a multiple of CHUNK_ROWS (4 or more), so the chunk's blocks start a row of both levels.
    const rows1 = (rows + 1) >> 1;
    const s1 = chunkSums.sum.subarray(0, rows1 * w1);
    const c1 = chunkSums.count.subarray(0, rows1 * w1);
    blockSums(chunk, width, rows, s1, c1);
    blockMeans(s1, c1, means1.subarray((y0 >> 1) * w1, ((y0 >> 1) + rows1) * w1));
    if (sums) {
      const at = (y0 >> 2) * sums.width;
      coarserSumsInto(s1, c1, w1, rows1, sums.sum.subarray(at), sums.count.subarray(at));
    }
    reducedRows = y0 + rows;
  });
  const images = [full];
  const ready = () => reducedRows === height;
  images.push(overviewImage(w1, h1, ready, (y0, count) => means1.subarray(y0 * w1, (y0 + count) * w1)));
  // Levels 2 and up, made whole when the first of them is read (index k - 2 for level k).
  let further: Float32Array[] | undefined;
  const furtherMeans = (): Float32Array[] => {
    if (further) return further;
    if (!sums) throw new Error("no block sums");
    further = [];
    for (let k = 2; k <= sizes.length; k++) {
      if (k > 2) sums = coarserSums(sums, k);
      further.push(blockMeans(sums.sum, sums.count, new Float32Array(sums.sum.length)));
    }
    sums = undefined;
    return further;
  };
  sizes.slice(1).forEach(([w, h], i) => {
    images.push(overviewImage(w, h, ready, (y0, count) => furtherMeans()[i].subarray(y0 * w, (y0 + count) * w)));
  });
  return images;
}

/**
 * images.tif's or flags.tif's images: the full resolution (`fill`) and overviews of the `sizes`
 * given, each reduced by `reduce` from the one before (the first from the bands as they are read).
 */
function uint16Pyramid(
  width: number,
  height: number,
  sizes: [number, number][],
  fill: FillBand<Uint16Array>,
  reduce: (values: Uint16Array, width: number, height: number, out: Uint16Array) => Uint16Array,
): CogImage[] {
  const T = COG_TILE_SIZE;
  const band = new Uint16Array(Math.min(T, height) * width);
  if (sizes.length === 0) return [bandImage(width, height, band, fill, () => undefined)];
  const first = new Uint16Array(sizes[0][0] * sizes[0][1]);
  let reducedRows = 0;
  const full = bandImage(width, height, band, fill, (b, y0, rows) => {
    reduce(b, width, rows, first.subarray((y0 >> 1) * sizes[0][0]));
    reducedRows = y0 + rows;
  });
  // Further levels are small (a twelfth of the raster together): each made whole, from the one
  // before, when it or a smaller one is first read, so they can be read in any order.
  const levels: Uint16Array[] = [first];
  const level = (i: number): Uint16Array => {
    while (levels.length <= i) {
      const j = levels.length;
      const [pw, ph] = sizes[j - 1];
      levels.push(reduce(levels[j - 1], pw, ph, new Uint16Array(sizes[j][0] * sizes[j][1])));
    }
    return levels[i];
  };
  const images = [full];
  sizes.forEach(([w, h], i) => {
    images.push(overviewImage(w, h, () => reducedRows === height, (y0, count) => level(i).subarray(y0 * w, (y0 + count) * w)));
  });
  return images;
}

/**
 * One single-band GeoTIFF, tiled and Deflate-compressed in the COG layout, without
 * overviews (the assessment rasters get theirs from assessmentGeoTiff). The sample type
 * follows the array (Float32Array -> Float32, Uint16Array -> UInt16, Uint8Array -> Byte).
 *
 * @example rasterGeoTiff(new Float32Array(4), { width: 2, height: 2, transform: { x0: 0, y0: 2, dx: 1, dy: -1 } }, { epsg: 32633, proj4: "", geographic: false }, "nan")
 */
export function rasterGeoTiff(
  values: Float32Array | Uint16Array | Uint8Array,
  grid: { width: number; height: number; transform: GeoTransform },
  crs: RasterCrs,
  nodata?: string,
): ArrayBuffer {
  if (values.length !== grid.width * grid.height) throw new Error("raster size does not match its grid");
  const nd = nodata === undefined ? undefined : Number(nodata);
  const c = cogFile([arrayImage(values, grid.width, grid.height)], values.constructor as SampleArrayType, grid, crs, {
    nodata: nd,
    compression: "deflate",
    predictor: values instanceof Float32Array ? 3 : 2,
  });
  return writeCog(c.images, c.options);
}

/** A COG of `images` (full resolution first) with georeferencing, nodata and band metadata. */
function cogFile(
  images: CogImage[],
  samples: SampleArrayType,
  grid: Grid,
  crs: RasterCrs,
  o: { nodata?: number; compression: "deflate" | "none"; predictor: Predictor; colorMap?: Uint16Array; band?: BandMetadata },
): CogFile {
  const common: TiffField[] = o.nodata === undefined ? [] : [{ tag: TAG.GdalNodata, type: "ASCII", values: gdalNodataText(o.nodata) }];
  const main = [...georeferenceFields(grid, crs)];
  const xml = o.band ? gdalMetadataXml(o.band) : undefined;
  if (xml) main.push({ tag: TAG.GdalMetadata, type: "ASCII", values: xml });
  const options: CogOptions = {
    samples,
    tileSize: COG_TILE_SIZE,
    compression: o.compression,
    predictor: o.predictor,
    fill: o.nodata ?? 0,
    mainFields: main,
    commonFields: common,
    colorMap: o.colorMap,
  };
  return { images, options };
}

/**
 * GDAL_NODATA's text: the value as GDAL prints it ("nan" for NaN, which GDAL reads back as NaN).
 * @example gdalNodataText(NaN) // "nan"
 */
export function gdalNodataText(v: number): string {
  return Number.isNaN(v) ? "nan" : String(v);
}

/**
 * The GDAL_METADATA XML for band 1 (sample 0) as GDAL itself writes it (a test compares with
 * GDAL's copy of the file): further items as plain band metadata, sorted by name ignoring
 * case, then the unit and the description with the roles GDAL gives them (`gdal_edit.py
 * -units`, a band description).
 * @example gdalMetadataXml({ unit: "cm" }) // '<GDALMetadata>\n  <Item name="UNITTYPE" sample="0" role="unittype">cm</Item>\n</GDALMetadata>\n'
 */
export function gdalMetadataXml(band: BandMetadata): string | undefined {
  const lines: string[] = [];
  const items = Object.entries(band.items ?? {}).sort(([a], [b]) => (a.toLowerCase() < b.toLowerCase() ? -1 : a.toLowerCase() > b.toLowerCase() ? 1 : 0));
  for (const [name, value] of items) lines.push(`  <Item name="${escapeXml(name)}" sample="0">${escapeXml(value)}</Item>`);
  if (band.unit) lines.push(`  <Item name="UNITTYPE" sample="0" role="unittype">${escapeXml(band.unit)}</Item>`);
  if (band.description) lines.push(`  <Item name="DESCRIPTION" sample="0" role="description">${escapeXml(band.description)}</Item>`);
  return lines.length ? `<GDALMetadata>\n${lines.join("\n")}\n</GDALMetadata>\n` : undefined;
}

/** ModelPixelScale, ModelTiepoint and the GeoKey directory of a north-up grid (GeoTIFF 1.0). */
function georeferenceFields(grid: Grid, crs: RasterCrs): TiffField[] {
  const t = grid.transform;
  const keys = encodeGeoKeys({
    // GeoTIFF 1.0, 6.3.1.2: RasterPixelIsArea (the grid's corners are cell corners).
    GTRasterTypeGeoKey: 1,
    ...crsGeoKeys(crs),
  });
  const fields: TiffField[] = [
    { tag: TAG.ModelPixelScale, type: "DOUBLE", values: [t.dx, -t.dy, 0] },
    { tag: TAG.ModelTiepoint, type: "DOUBLE", values: [0, 0, 0, t.x0, t.y0, 0] },
    { tag: TAG.GeoKeyDirectory, type: "SHORT", values: keys.GeoKeyDirectory },
  ];
  if (keys.GeoDoubleParams) fields.push({ tag: TAG.GeoDoubleParams, type: "DOUBLE", values: keys.GeoDoubleParams });
  if (keys.GeoAsciiParams) fields.push({ tag: TAG.GeoAsciiParams, type: "ASCII", values: keys.GeoAsciiParams });
  return fields;
}

/**
 * GeoKeys for a CRS: EPSG code when known, else a user-defined transverse Mercator key set.
 * @example crsGeoKeys({ epsg: 4326, proj4: "", geographic: true }) // { GTModelTypeGeoKey: 2, GeographicTypeGeoKey: 4326 }
 */
export function crsGeoKeys(crs: RasterCrs): Record<string, number | string | number[]> {
  if (crs.epsg !== null) {
    return crs.geographic
      ? { GTModelTypeGeoKey: 2, GeographicTypeGeoKey: crs.epsg }
      : { GTModelTypeGeoKey: 1, ProjectedCSTypeGeoKey: crs.epsg, ...(crs.name ? { GTCitationGeoKey: crs.name } : {}) };
  }
  // A user-defined geographic CRS (a DEM's own degrees, written on its own cells).
  if (crs.geographic) return { GTModelTypeGeoKey: 2, ...geographicKeys(parseProj4(crs.proj4)) };
  return userDefinedKeys(crs);
}

const USER_DEFINED = 32767;

/** GeoKey codes and value types, GeoTIFF 1.0 spec 6.2. */
const GEOKEYS: Record<string, [number, "SHORT" | "DOUBLE" | "ASCII"]> = {
  GTModelTypeGeoKey: [1024, "SHORT"],
  GTRasterTypeGeoKey: [1025, "SHORT"],
  GTCitationGeoKey: [1026, "ASCII"],
  GeographicTypeGeoKey: [2048, "SHORT"],
  GeogCitationGeoKey: [2049, "ASCII"],
  GeogGeodeticDatumGeoKey: [2050, "SHORT"],
  GeogPrimeMeridianGeoKey: [2051, "SHORT"],
  GeogAngularUnitsGeoKey: [2054, "SHORT"],
  GeogEllipsoidGeoKey: [2056, "SHORT"],
  GeogSemiMajorAxisGeoKey: [2057, "DOUBLE"],
  GeogInvFlatteningGeoKey: [2059, "DOUBLE"],
  ProjectedCSTypeGeoKey: [3072, "SHORT"],
  PCSCitationGeoKey: [3073, "ASCII"],
  ProjectionGeoKey: [3074, "SHORT"],
  ProjCoordTransGeoKey: [3075, "SHORT"],
  ProjLinearUnitsGeoKey: [3076, "SHORT"],
  ProjLinearUnitSizeGeoKey: [3077, "DOUBLE"],
  ProjNatOriginLongGeoKey: [3080, "DOUBLE"],
  ProjNatOriginLatGeoKey: [3081, "DOUBLE"],
  ProjFalseEastingGeoKey: [3082, "DOUBLE"],
  ProjFalseNorthingGeoKey: [3083, "DOUBLE"],
  ProjScaleAtNatOriginGeoKey: [3092, "DOUBLE"],
};

/**
 * The GeoKeyDirectoryTag with its GeoDoubleParamsTag and GeoAsciiParamsTag
 * (GeoTIFF 1.0, 2.4): header [1, 1, 0, count], then per key, in key order,
 * [id, location tag (0: value inline), count, value or offset]. ASCII values
 * end with "|".
 * @example encodeGeoKeys({ GTModelTypeGeoKey: 1 }).GeoKeyDirectory // [1, 1, 0, 1, 1024, 0, 1, 1]
 */
export function encodeGeoKeys(keys: Record<string, number | string | number[]>): {
  GeoKeyDirectory: number[];
  GeoDoubleParams?: number[];
  GeoAsciiParams?: string;
} {
  const entries = Object.entries(keys)
    .map(([name, value]) => {
      const def = GEOKEYS[name];
      if (!def) throw new Error(`GeoKey ${name} not mapped`);
      return { id: def[0], type: def[1], value };
    })
    .sort((a, b) => a.id - b.id);
  const dir = [1, 1, 0, entries.length];
  const doubles: number[] = [];
  let ascii = "";
  for (const e of entries) {
    if (e.type === "SHORT") dir.push(e.id, 0, 1, Number(e.value));
    else if (e.type === "DOUBLE") {
      const v = Array.isArray(e.value) ? e.value : [Number(e.value)];
      dir.push(e.id, 34736, v.length, doubles.length);
      doubles.push(...v);
    } else {
      const text = String(e.value).replace(/\|/g, "/") + "|";
      dir.push(e.id, 34737, text.length, ascii.length);
      ascii += text;
    }
  }
  return { GeoKeyDirectory: dir, ...(doubles.length ? { GeoDoubleParams: doubles } : {}), ...(ascii ? { GeoAsciiParams: ascii } : {}) };
}

function userDefinedKeys(crs: RasterCrs): Record<string, number | string | number[]> {
  const p = parseProj4(crs.proj4);
  let lon0: number;
  let k0: number;
  let x0: number;
  let y0: number;
  if (p.proj === "utm") {
    const zone = Number(p.zone);
    if (!(zone >= 1 && zone <= 60)) throw new Error(`UTM zone missing in ${crs.proj4}`);
    lon0 = zone * 6 - 183;
    k0 = 0.9996;
    x0 = 500000;
    y0 = "south" in p ? 10000000 : 0;
  } else if (p.proj === "tmerc") {
    lon0 = num(p.lon_0, 0);
    k0 = num(p.k_0 ?? p.k, 1);
    x0 = num(p.x_0, 0);
    y0 = num(p.y_0, 0);
  } else {
    throw new Error(`cannot write CRS without EPSG code to GeoTIFF (projection ${p.proj ?? "?"} not mapped): ${crs.proj4}`);
  }
  const toMeter = p.to_meter !== undefined ? Number(p.to_meter) : unitToMeter(p.units ?? "m");
  return {
    GTModelTypeGeoKey: 1,
    GTCitationGeoKey: crs.name ?? "user-defined transverse Mercator",
    ...geographicKeys(p),
    ProjectedCSTypeGeoKey: USER_DEFINED,
    ProjectionGeoKey: USER_DEFINED,
    // GeoTIFF 1.0, 6.3.3.3: CT_TransverseMercator = 1.
    ProjCoordTransGeoKey: 1,
    ...(toMeter === 1
      ? { ProjLinearUnitsGeoKey: 9001 }
      : Math.abs(toMeter - 0.3048006096012192) < 1e-12
        ? { ProjLinearUnitsGeoKey: 9003 }
        : Math.abs(toMeter - 0.3048) < 1e-12
          ? { ProjLinearUnitsGeoKey: 9002 }
          : { ProjLinearUnitsGeoKey: USER_DEFINED, ProjLinearUnitSizeGeoKey: toMeter }),
    ProjNatOriginLongGeoKey: lon0,
    ProjNatOriginLatGeoKey: num(p.lat_0, 0),
    ProjFalseEastingGeoKey: x0,
    ProjFalseNorthingGeoKey: y0,
    ProjScaleAtNatOriginGeoKey: k0,
  };
}

function geographicKeys(p: Record<string, string>): Record<string, number | string> {
  const e = (p.datum === "WGS84" ? "WGS84" : p.ellps) ?? "WGS84";
  if (e === "WGS84" && (p.datum === "WGS84" || p.towgs84 === undefined || /^0(,0)*$/.test(p.towgs84))) {
    return { GeographicTypeGeoKey: 4326 };
  }
  // Ellipsoid parameters from the defining documents (WGS84: NIMA TR8350.2; GRS80: Moritz 1980), from memory.
  const ellipsoids: Record<string, [number, number]> = {
    WGS84: [6378137, 298.257223563],
    GRS80: [6378137, 298.257222101],
    intl: [6378388, 297],
    bessel: [6377397.155, 299.1528128],
  };
  const a = p.a !== undefined ? Number(p.a) : ellipsoids[e]?.[0];
  const rf = p.rf !== undefined ? Number(p.rf) : p.b !== undefined && a !== undefined ? a / (a - Number(p.b)) : ellipsoids[e]?.[1];
  if (a === undefined || rf === undefined || !Number.isFinite(a) || !Number.isFinite(rf)) {
    throw new Error(`cannot write the ellipsoid ${e} to GeoTIFF`);
  }
  return {
    GeographicTypeGeoKey: USER_DEFINED,
    GeogGeodeticDatumGeoKey: USER_DEFINED,
    GeogEllipsoidGeoKey: USER_DEFINED,
    GeogSemiMajorAxisGeoKey: a,
    GeogInvFlatteningGeoKey: rf,
    // Greenwich, degrees (EPSG 8901, 9102).
    GeogPrimeMeridianGeoKey: 8901,
    GeogAngularUnitsGeoKey: 9102,
  };
}

function parseProj4(def: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const tok of def.trim().split(/\s+/)) {
    const m = /^\+([a-z_0-9]+)(?:=(.*))?$/i.exec(tok);
    if (m) out[m[1]] = m[2] ?? "";
  }
  return out;
}

function num(v: string | undefined, dflt: number): number {
  return v === undefined ? dflt : Number(v);
}

function unitToMeter(u: string): number {
  if (u === "m") return 1;
  if (u === "us-ft") return 0.3048006096012192;
  if (u === "ft") return 0.3048;
  if (u === "km") return 1000;
  throw new Error(`unit ${u} not mapped for GeoTIFF`);
}

/** The CRS fields a worker needs, as plain data. */
function plainCrs(crs: RasterCrs): RasterCrs {
  return { epsg: crs.epsg, proj4: crs.proj4, geographic: crs.geographic, ...(crs.name !== undefined ? { name: crs.name } : {}) };
}

const cogFileWorkerUrl = new URL("./cogFileWorker.js", import.meta.url);

/** What the file-writing worker gets: the arrays its file reads (in shared memory), the CRS, the file and where to write it. */
export interface CogFileJob {
  rasters: Pick<AssessmentRasters, "width" | "height" | "transform" | "inSite"> & Partial<Pick<AssessmentRasters, "gsdCm" | "images" | "flags">>;
  window?: RasterWindow;
  crs: RasterCrs;
  name: keyof AssessmentTiffs;
  path: string;
}

/**
 * Starts writing one assessment raster's file at `filePath` on a worker thread, chunk by
 * chunk (the same bytes as assessmentGeoTiffChunks, test/export/geotiffRasters.test.ts),
 * so a large uncompressed gsd.tif is made and written on another core. Starts only when the
 * arrays the file reads are in shared memory (read in place, never copied); result() gives
 * true once the file is whole, undefined when no worker ran or it failed.
 * @example (await assessmentGeoTiffFileInBackground(rasters, crs, "gsd.tif", "out/gsd.tif").result()) ?? writeOnThisThread()
 */
export function assessmentGeoTiffFileInBackground(r: AssessmentRasters, crs: RasterCrs, name: keyof AssessmentTiffs, filePath: string, window?: RasterWindow): Background<true> {
  const { width, height, transform, inSite } = r;
  const own = name === "gsd.tif" ? { gsdCm: r.gsdCm } : name === "images.tif" ? { images: r.images } : { flags: r.flags };
  if (![inSite, ...Object.values(own)].every((a) => a.buffer instanceof SharedArrayBuffer)) return NOT_IN_BACKGROUND;
  const job: CogFileJob = { rasters: { width, height, transform, inSite, ...own }, crs: plainCrs(crs), name, path: filePath, ...(window ? { window } : {}) };
  return inBackground<true>(cogFileWorkerUrl, job);
}
