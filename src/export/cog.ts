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
import { LITTLE_ENDIAN_HOST } from "../hostEndian.js";
import { deflateTiles, swapBytes, tileBand, tileCount, type Predictor, type RowImage, type TileSamples } from "./cogTiles.js";
import { TAG, ifdByteSize, writeIfd, type TiffField } from "./tiffTags.js";

/**
 * One image of the file, read band by band (cogTiles.ts, RowImage). The writer reads the
 * images in order, full resolution first, each band once, top to bottom: so an overview can
 * be reduced from the bands of the image before it while they are read.
 */
export type CogImage = RowImage;

/** The typed array of the samples, which fixes their TIFF type. */
export type SampleArrayType = Float32ArrayConstructor | Uint16ArrayConstructor | Uint8ArrayConstructor;

export interface CogOptions {
  /** Sample type of every image (Float32Array -> Float32, Uint16Array -> UInt16, Uint8Array -> Byte). */
  samples: SampleArrayType;
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
 *   const tif = writeCog([arrayImage(new Uint16Array(4), 2, 2)], { samples: Uint16Array, tileSize: 256, compression: "deflate", predictor: 2, fill: 0, mainFields: [], commonFields: [] });
 */
export function writeCog(images: CogImage[], o: CogOptions): ArrayBuffer {
  check(images, o);
  // Compressed tiles are made first (their sizes fix the layout); raw tiles go straight into the file.
  return assemble(images, o, o.compression === "deflate" ? images.map((im) => deflateTiles(checked(im, o.samples), o.tileSize, o.predictor, o.fill)) : undefined);
}

function check(images: CogImage[], o: CogOptions): void {
  if (images.length === 0) throw new Error("a COG needs its full-resolution image");
  if (o.tileSize % 16 !== 0 || o.tileSize <= 0) throw new Error(`tile size ${o.tileSize} is not a positive multiple of 16 (TIFF 6.0)`);
  const bytesPerSample = o.samples.BYTES_PER_ELEMENT;
  const bits = 8 * bytesPerSample;
  if (o.colorMap && o.colorMap.length !== 3 * 2 ** bits) throw new Error(`a ${bits}-bit palette needs ${3 * 2 ** bits} colour map entries, got ${o.colorMap.length}`);
  if (o.compression === "none" && o.predictor !== 1) throw new Error("a predictor needs compression");
  if (o.predictor === 3 && o.samples !== Float32Array) throw new Error("predictor 3 is for floating-point samples");
}

/**
 * The file as chunks in file order, for a writer that streams it to disk: an uncompressed
 * file never exists whole in memory (a 25 km2 site's gsd.tif is half a gigabyte). The
 * header and IFDs come first, then the tiles a tile row at a time, the smallest overview's
 * first and the full resolution's last. Overviews are reduced from the full-resolution
 * bands as they are read, so those are read once before the first chunk and again for their
 * own tiles; an image whose bands come from a reduction (geotiffRasters.ts) must allow that
 * second reading, and its overviews must allow being read smallest first.
 * A compressed file comes as one chunk (its tiles must all be known to lay it out).
 * The tile rows come in one buffer, filled anew for each: a chunk is valid until the next
 * one is asked for (a writer that writes each before taking the next, as fs's writeFile
 * does with an iterable, needs no copy; one that keeps them must copy each).
 * @example for (const chunk of cogChunks(images, options)) await file.write(chunk);
 */
export function* cogChunks(images: CogImage[], o: CogOptions): Generator<Uint8Array, void, undefined> {
  if (o.compression === "deflate") {
    yield new Uint8Array(writeCog(images, o));
    return;
  }
  check(images, o);
  const T = o.tileSize;
  const full = checked(images[0], o.samples);
  const down = Math.ceil(full.height / T);
  const across = Math.ceil(full.width / T);
  if (images.length > 1) for (let ty = 0; ty < down; ty++) tileBand(full, ty, T);
  const L = layout(images, o, undefined);
  const rawBytes = T * T * o.samples.BYTES_PER_ELEMENT;
  // Header, IFDs and colour map: everything before the first tile's leader (the smallest
  // overview's first tile: tiles run from the smallest image to the full resolution).
  const last = images.length - 1;
  const head = new Uint8Array(L.tileAt[last][0] - 4);
  writeHead(head, L, o);
  yield head;
  const span = 4 + rawBytes + 4;
  // One tile row's buffer (as wide as the full resolution's), filled anew for each tile row
  // of every image in file order (every byte is written: tiles, their padding, leaders and
  // trailers). The overviews' tiles went into one buffer with the header before: at 25 km2
  // ~170 MB, held by the writer's thread until it ended, at the run's memory peak; a fresh
  // buffer per row left ~10 MB of garbage a row at 4 km2, which the allocator kept long
  // after it was collected.
  const chunk = new Uint8Array(across * span);
  const view = new DataView(chunk.buffer);
  for (let k = last; k >= 0; k--) {
    const im = k === 0 ? full : checked(images[k], o.samples);
    const imAcross = Math.ceil(im.width / T);
    const imDown = Math.ceil(im.height / T);
    for (let ty = 0; ty < imDown; ty++) {
      const row = L.tileAt[k].slice(ty * imAcross, (ty + 1) * imAcross);
      // The row's first leader starts the chunk; its tiles follow one another in the file.
      const base = row[0] - 4;
      const at = row.map((p) => p - base);
      writeRawTileRow(im, ty, T, o.fill, chunk, at);
      for (const p of at) frameTile(chunk, view, p, rawBytes);
      yield chunk.subarray(0, imAcross * span);
    }
  }
}

/** Where everything goes in the file: IFD offsets and fields, the colour map, every tile. */
interface Layout {
  fields: TiffField[][];
  ifdAt: number[];
  colorMapAt: number;
  /** Per image, the offset of each tile's data (row-major; its 4-byte leader just before). */
  tileAt: number[][];
  sizes: number[][];
  bytes: number;
}

function layout(images: CogImage[], o: CogOptions, packed: Uint8Array[][] | undefined): Layout {
  const T = o.tileSize;
  const rawBytes = T * T * o.samples.BYTES_PER_ELEMENT;
  const sizes = images.map((im, k) => packed?.[k].map((t) => t.length) ?? new Array<number>(tileCount(im.width, im.height, T)).fill(rawBytes));
  // Header, ghost header, IFDs (full resolution first), shared data, tiles (smallest image first).
  let pos = 8 + cogGhostHeader().length;
  pos += pos & 1;
  const fields = images.map((im, k) => imageFields(im, k, sizes[k].length, o));
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
  return { fields, ifdAt, colorMapAt, tileAt, sizes, bytes: pos };
}

/** The TIFF header, ghost header, IFDs (with tile offsets and sizes) and colour map, into `out` from byte 0. */
function writeHead(out: Uint8Array, L: Layout, o: CogOptions): void {
  const view = new DataView(out.buffer, out.byteOffset, out.byteLength);
  const ghost = cogGhostHeader();
  out[0] = 0x49;
  out[1] = 0x49;
  view.setUint16(2, 42, true);
  view.setUint32(4, L.ifdAt[0], true);
  for (let i = 0; i < ghost.length; i++) out[8 + i] = ghost.charCodeAt(i);
  L.fields.forEach((f, k) => {
    setValues(f, TAG.TileOffsets, L.tileAt[k]);
    setValues(f, TAG.TileByteCounts, L.sizes[k]);
    const cm = f.find((x) => x.tag === TAG.ColorMap);
    if (cm) cm.at = L.colorMapAt;
    writeIfd(view, L.ifdAt[k], f, k + 1 < L.fields.length ? L.ifdAt[k + 1] : 0);
  });
  if (o.colorMap) for (let i = 0; i < o.colorMap.length; i++) view.setUint16(L.colorMapAt + 2 * i, o.colorMap[i], true);
}

/** The file, from its images and, when compressed, their tiles (row-major per image). */
function assemble(images: CogImage[], o: CogOptions, packed: Uint8Array[][] | undefined): ArrayBuffer {
  const L = layout(images, o, packed);
  const out = new Uint8Array(L.bytes);
  const view = new DataView(out.buffer);
  writeHead(out, L, o);
  images.forEach((im, k) => {
    if (packed) {
      packed[k].forEach((t, i) => {
        out.set(t, L.tileAt[k][i]);
        frameTile(out, view, L.tileAt[k][i], t.length);
      });
    } else writeRawImage(checked(im, o.samples), o, out, L.tileAt[k]);
  });
  return out.buffer;
}

/** An uncompressed image's tiles, framed, at `tileAt` in `out`. */
function writeRawImage(im: CogImage, o: CogOptions, out: Uint8Array, tileAt: number[]): void {
  const T = o.tileSize;
  const rawBytes = T * T * o.samples.BYTES_PER_ELEMENT;
  const view = new DataView(out.buffer, out.byteOffset, out.byteLength);
  const across = Math.ceil(im.width / T);
  const down = Math.ceil(im.height / T);
  for (let ty = 0; ty < down; ty++) writeRawTileRow(im, ty, T, o.fill, out, tileAt.slice(ty * across, (ty + 1) * across));
  for (const at of tileAt) frameTile(out, view, at, rawBytes);
}

/** The image, its bands checked to be of the file's sample type as they are read. */
function checked(im: CogImage, samples: SampleArrayType): CogImage {
  return {
    width: im.width,
    height: im.height,
    rows: (y0, count) => {
      const band = im.rows(y0, count);
      if (band.constructor !== samples) throw new Error(`image samples are ${band.constructor.name}, the file's ${samples.name}`);
      return band;
    },
  };
}

/** The tile's leader (its byte count) and trailer (its last 4 bytes again, which GDAL's validator compares). */
function frameTile(out: Uint8Array, view: DataView, at: number, length: number): void {
  view.setUint32(at - 4, length, true);
  out.copyWithin(at + length, at + length - 4, at + length);
}

/**
 * The uncompressed tiles of tile row `ty`, copied row by row from its band straight to their
 * place in `out` (`tileAt`, left to right), parts beyond the raster filled with `fill`.
 */
function writeRawTileRow(im: CogImage, ty: number, T: number, fill: number, out: Uint8Array, tileAt: number[]): void {
  const w = im.width;
  let band = tileBand(im, ty, T);
  const size = band.BYTES_PER_ELEMENT;
  if (!LITTLE_ENDIAN_HOST) {
    band = band.slice();
    swapBytes(band);
  }
  const f = new (band.constructor as new (n: number) => TileSamples)(T).fill(fill);
  if (!LITTLE_ENDIAN_HOST) swapBytes(f);
  const fillRow = new Uint8Array(f.buffer);
  const bytes = new Uint8Array(band.buffer, band.byteOffset, band.byteLength);
  const rows = band.length / w;
  const rowBytes = T * size;
  tileAt.forEach((at, tx) => {
    const x0 = tx * T;
    const cols = Math.min(T, w - x0);
    for (let r = 0; r < rows; r++) {
      const src = (r * w + x0) * size;
      out.set(bytes.subarray(src, src + cols * size), at + r * rowBytes);
      if (cols < T) out.set(fillRow.subarray(0, (T - cols) * size), at + r * rowBytes + cols * size);
    }
    for (let r = rows; r < T; r++) out.set(fillRow, at + r * rowBytes);
  });
}

/** The fields of image `k` (0: full resolution), tile offsets and byte counts still zero. */
function imageFields(im: CogImage, k: number, tileCount: number, o: CogOptions): TiffField[] {
  const f: TiffField[] = [
    ...(k > 0 ? [{ tag: TAG.NewSubfileType, type: "LONG" as const, values: [1] }] : []),
    { tag: TAG.ImageWidth, type: "LONG", values: [im.width] },
    { tag: TAG.ImageLength, type: "LONG", values: [im.height] },
    { tag: TAG.BitsPerSample, type: "SHORT", values: [8 * o.samples.BYTES_PER_ELEMENT] },
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
    { tag: TAG.SampleFormat, type: "SHORT", values: [o.samples === Float32Array ? 3 : 1] },
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
