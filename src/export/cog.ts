/**
 * A single-band cloud-optimized GeoTIFF (COG), laid out as GDAL's COG driver writes one
 * (gdal.org, "COG -- Cloud Optimized GeoTIFF generator", and the checks of GDAL's
 * validate_cloud_optimized_geotiff.py):
 *
 *   1. the TIFF header (little-endian classic TIFF: "II", 42, offset of the first IFD);
 *   2. GDAL's "ghost" header at byte 8, structural metadata a plain TIFF reader skips,
 *      telling GDAL the layout below (so `gdalinfo` reports LAYOUT=COG);
 *   3. the IFD of the full-resolution image, right after it, then the IFDs of the overviews
 *      from the largest to the smallest, each followed by its own small values;
 *   4. data several IFDs share (the colour map of a palette image);
 *   5. the tiles: the smallest overview's first, the full resolution's last, each image's in
 *      row-major order, each tile preceded by its byte count (4 bytes, little-endian) and
 *      followed by a copy of its last 4 bytes (BLOCK_LEADER, BLOCK_TRAILER in the ghost
 *      header: a reader can check that a range request returned a whole tile).
 *
 * So a reader gets every header with one or two small range requests at the start of the
 * file, and a zoomed-out view reads only the small overviews.
 *
 * Written by hand because the geotiff package's writer (3.0.5, geotiffwriter.js) writes
 * exactly one IFD holding one uncompressed strip after a fixed 1000-byte header: no tiles
 * (no TileWidth/TileOffsets), no overview IFDs (NewSubfileType), no compression, and no
 * room for a 65536-entry colour map. libtiff (through GDAL) is not a Node dependency here.
 */
import { deflateTiles, forEachTile, tileCount, type Predictor, type TileSamples } from "./cogTiles.js";
import { TAG, ifdByteSize, writeIfd, type TiffField } from "./tiffTags.js";

export interface CogImage {
  width: number;
  height: number;
  /** Row-major samples, nodata already in place. */
  values: TileSamples;
}

export interface CogOptions {
  /** Tile width and height in pixels (TIFF 6.0 wants a multiple of 16). */
  tileSize: number;
  /**
   * Deflate (TIFF Compression 8) or none (1). A predictor needs Deflate: GDAL and libtiff
   * apply one only to compressed data.
   */
  compression: "deflate" | "none";
  predictor: Predictor;
  /** Value of the tile parts beyond the raster's right and bottom edges (the nodata value). */
  fill: number;
  /** Fields of the full-resolution image only: georeferencing, GDAL metadata. */
  mainFields: TiffField[];
  /** Fields every image carries (GDAL_NODATA: GDAL writes it on overviews too). */
  commonFields: TiffField[];
  /** Palette image (TIFF 6.0 section 5): red, green, blue, each 2^bits 16-bit entries. */
  colorMap?: Uint16Array;
}

/**
 * GDAL's structural metadata ("ghost header") as its COG driver writes it. The space after the
 * last line is GDAL's own padding: it leaves room to turn NO into YES in place when a later
 * edit breaks the layout.
 */
const GHOST_LINES =
  "LAYOUT=IFDS_BEFORE_DATA\nBLOCK_ORDER=ROW_MAJOR\nBLOCK_LEADER=SIZE_AS_UINT4\nBLOCK_TRAILER=LAST_4_BYTES_REPEATED\nKNOWN_INCOMPATIBLE_EDITION=NO\n ";

/**
 * The ghost header's bytes: the size line, then the lines it counts.
 * @example cogGhostHeader().startsWith("GDAL_STRUCTURAL_METADATA_SIZE=000140 bytes\n") // true
 */
export function cogGhostHeader(): string {
  return `GDAL_STRUCTURAL_METADATA_SIZE=${String(GHOST_LINES.length).padStart(6, "0")} bytes\n${GHOST_LINES}`;
}

/** Classic TIFF offsets are 32-bit. */
const MAX_CLASSIC_TIFF_BYTES = 2 ** 32 - 1;

/**
 * The COG file for a full-resolution image and its overviews (largest first, each smaller
 * than the one before).
 * @example
 *   const tif = writeCog([{ width: 2, height: 2, values: new Uint16Array(4) }], { tileSize: 256, compression: "deflate", predictor: 2, fill: 0, mainFields: [], commonFields: [] });
 */
export function writeCog(images: CogImage[], o: CogOptions): ArrayBuffer {
  if (images.length === 0) throw new Error("a COG needs its full-resolution image");
  if (o.tileSize % 16 !== 0 || o.tileSize <= 0) throw new Error(`tile size ${o.tileSize} is not a positive multiple of 16 (TIFF 6.0)`);
  const bits = 8 * images[0].values.BYTES_PER_ELEMENT;
  if (o.colorMap && o.colorMap.length !== 3 * 2 ** bits) throw new Error(`a ${bits}-bit palette needs ${3 * 2 ** bits} colour map entries, got ${o.colorMap.length}`);
  if (o.compression === "none" && o.predictor !== 1) throw new Error("a predictor needs compression");
  const T = o.tileSize;
  // Compressed tiles are made first (their sizes fix the layout); raw tiles go straight into the file.
  const packed = o.compression === "deflate" ? images.map((im) => deflateTiles(im.values, im.width, im.height, T, o.predictor, o.fill)) : undefined;
  const rawBytes = T * T * images[0].values.BYTES_PER_ELEMENT;
  const sizes = images.map((im, k) => packed?.[k].map((t) => t.length) ?? new Array<number>(tileCount(im.width, im.height, T)).fill(rawBytes));

  // Layout: header, ghost header, IFDs (full resolution first), shared data, tiles (smallest image first).
  const ghost = cogGhostHeader();
  let pos = 8 + ghost.length;
  pos += pos & 1;
  const fields = images.map((im, k) => imageFields(im, k, sizes[k].length, o, images[0].values));
  const ifdAt: number[] = [];
  for (const f of fields) {
    ifdAt.push(pos);
    pos += ifdByteSize(f);
  }
  const colorMapAt = pos;
  if (o.colorMap) pos += 2 * o.colorMap.length;
  const tileAt: number[][] = images.map(() => []);
  for (let k = images.length - 1; k >= 0; k--) {
    for (const n of sizes[k]) {
      tileAt[k].push(pos + 4);
      pos += 4 + n + 4;
    }
  }
  if (pos > MAX_CLASSIC_TIFF_BYTES) throw new Error(`raster of ${images[0].width} x ${images[0].height} cells needs ${pos} bytes, beyond the 4 GiB of a classic TIFF`);

  const out = new Uint8Array(pos);
  const view = new DataView(out.buffer);
  out[0] = 0x49;
  out[1] = 0x49;
  view.setUint16(2, 42, true);
  view.setUint32(4, ifdAt[0], true);
  for (let i = 0; i < ghost.length; i++) out[8 + i] = ghost.charCodeAt(i);
  fields.forEach((f, k) => {
    setValues(f, TAG.TileOffsets, tileAt[k]);
    setValues(f, TAG.TileByteCounts, sizes[k]);
    const cm = f.find((x) => x.tag === TAG.ColorMap);
    if (cm) cm.at = colorMapAt;
    writeIfd(view, ifdAt[k], f, k + 1 < fields.length ? ifdAt[k + 1] : 0);
  });
  if (o.colorMap) for (let i = 0; i < o.colorMap.length; i++) view.setUint16(colorMapAt + 2 * i, o.colorMap[i], true);
  const put = (k: number) => (t: Uint8Array, i: number) => {
    const at = tileAt[k][i];
    view.setUint32(at - 4, t.length, true);
    out.set(t, at);
    // Trailer: the tile's last 4 bytes again (GDAL's validator compares the two).
    out.copyWithin(at + t.length, at + t.length - 4, at + t.length);
  };
  images.forEach((im, k) => {
    if (packed) packed[k].forEach(put(k));
    else forEachTile(im.values, im.width, im.height, T, 1, o.fill, put(k));
  });
  return out.buffer;
}

/** The fields of image `k` (0: full resolution), tile offsets and byte counts still zero. */
function imageFields(im: CogImage, k: number, tileCount: number, o: CogOptions, first: TileSamples): TiffField[] {
  const f: TiffField[] = [
    ...(k > 0 ? [{ tag: TAG.NewSubfileType, type: "LONG" as const, values: [1] }] : []),
    { tag: TAG.ImageWidth, type: "LONG", values: [im.width] },
    { tag: TAG.ImageLength, type: "LONG", values: [im.height] },
    { tag: TAG.BitsPerSample, type: "SHORT", values: [8 * first.BYTES_PER_ELEMENT] },
    // 8: Adobe Deflate (TIFF Technical Note 2; the code libtiff and GDAL write for DEFLATE); 1: none.
    { tag: TAG.Compression, type: "SHORT", values: [o.compression === "deflate" ? 8 : 1] },
    // 1: BlackIsZero, 3: Palette (TIFF 6.0 section 3 and 5).
    { tag: TAG.PhotometricInterpretation, type: "SHORT", values: [o.colorMap ? 3 : 1] },
    { tag: TAG.SamplesPerPixel, type: "SHORT", values: [1] },
    { tag: TAG.PlanarConfiguration, type: "SHORT", values: [1] },
    { tag: TAG.TileWidth, type: "SHORT", values: [o.tileSize] },
    { tag: TAG.TileLength, type: "SHORT", values: [o.tileSize] },
    { tag: TAG.TileOffsets, type: "LONG", values: new Array<number>(tileCount).fill(0) },
    { tag: TAG.TileByteCounts, type: "LONG", values: new Array<number>(tileCount).fill(0) },
    // 1: unsigned integer, 3: IEEE floating point (TIFF 6.0 section 19).
    { tag: TAG.SampleFormat, type: "SHORT", values: [first instanceof Float32Array ? 3 : 1] },
    ...o.commonFields,
    ...(k === 0 ? o.mainFields : []),
  ];
  if (o.predictor !== 1) f.push({ tag: TAG.Predictor, type: "SHORT", values: [o.predictor] });
  // One colour map for every image, written once after the IFDs (its offset is set then).
  if (o.colorMap) f.push({ tag: TAG.ColorMap, type: "SHORT", values: o.colorMap, at: 0 });
  return f;
}

function setValues(fields: TiffField[], tag: number, values: number[]): void {
  const f = fields.find((x) => x.tag === tag);
  if (!f) throw new Error(`tag ${tag} missing`);
  f.values = values;
}
