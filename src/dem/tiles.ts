import { getDecoder, type GeoTIFFImage } from "geotiff";
import { InputFileError } from "../errors.js";
import type { DemSource } from "./source.js";
import type { CellWindow } from "./window.js";
import { StrictLzwDecoder, withZstdContentSize } from "./zlib-decoder.js";

type Raw = Int8Array | Uint8Array | Int16Array | Uint16Array | Int32Array | Uint32Array | Float32Array | Float64Array;

// Compressions whose decoders need only the default parameters (LERC and JPEG need more).
const SIMPLE_COMPRESSIONS = new Set([1, 5, 8, 32946, 32773, 50000]);
// Blocks decoded at once: bounds the compressed and decoded blocks alive together.
const BATCH = 16;

function rawView(fmt: DemSource["sampleFormat"], bits: number, buf: ArrayBuffer): Raw {
  if (fmt === "float") return bits === 64 ? new Float64Array(buf, 0, buf.byteLength >> 3) : new Float32Array(buf, 0, buf.byteLength >> 2);
  if (fmt === "int") return bits === 8 ? new Int8Array(buf) : bits === 16 ? new Int16Array(buf, 0, buf.byteLength >> 1) : new Int32Array(buf, 0, buf.byteLength >> 2);
  return bits === 8 ? new Uint8Array(buf) : bits === 16 ? new Uint16Array(buf, 0, buf.byteLength >> 1) : new Uint32Array(buf, 0, buf.byteLength >> 2);
}

/**
 * Decodes the strips/tiles under a cell window and writes heights in metres straight
 * into the output (one pass: no intermediate window of raw samples). Returns false when
 * the file's layout needs geotiff's general reader (big-endian, mixed sample sizes,
 * JPEG/LERC), so the caller can fall back to it.
 */
export async function decodeWindowDirect(
  source: DemSource,
  image: GeoTIFFImage,
  win: CellWindow,
  heights: Float32Array,
  valid: Uint8Array,
): Promise<boolean> {
  const fd = image.fileDirectory;
  const bitsAll = Array.from(fd.getValue("BitsPerSample") as ArrayLike<number>);
  const planar = image.planarConfiguration;
  if (!image.littleEndian || !SIMPLE_COMPRESSIONS.has(source.compressionCode)) return false;
  if (bitsAll.some((b) => b !== bitsAll[0]) || bitsAll[0] % 8 !== 0) return false;

  const spp = source.bands;
  const s = source.band - 1;
  const tw = image.getTileWidth();
  const th = image.getTileHeight();
  const params = {
    tileWidth: tw,
    tileHeight: th,
    planarConfiguration: planar,
    bitsPerSample: bitsAll,
    predictor: source.predictor,
  };
  // Bytes a block holds: tiles are whole; the last strip may be shorter.
  const blockBytes = (ty: number): number => tw * image.getBlockHeight(ty) * (bitsAll[0] / 8) * (planar === 2 ? 1 : spp);
  // LZW through our strict decoder (geotiff's turns a damaged block into plausible
  // heights); Zstandard told each block's size (see withZstdContentSize).
  const base = source.compressionCode === 5 ? new StrictLzwDecoder(params) : await getDecoder(source.compressionCode, params as never);
  const decoderFor = source.compressionCode === 50000 ? (ty: number) => withZstdContentSize(base, blockBytes(ty)) : () => base;

  const outW = win.col1 - win.col0;
  const k = source.scale * source.verticalUnitM;
  const c = source.offset * source.verticalUnitM;
  const nd = source.nodata === null ? NaN : source.sampleFormat === "float" && source.bitsPerSample === 32 ? Math.fround(source.nodata) : source.nodata;
  const pixStride = planar === 2 ? 1 : spp;
  const sampleOff = planar === 2 ? 0 : s;

  const tx0 = Math.floor(win.col0 / tw), tx1 = Math.ceil(win.col1 / tw);
  const ty0 = Math.floor(win.row0 / th), ty1 = Math.ceil(win.row1 / th);
  const jobs: [number, number][] = [];
  for (let ty = ty0; ty < ty1; ty++) for (let tx = tx0; tx < tx1; tx++) jobs.push([tx, ty]);

  for (let j = 0; j < jobs.length; j += BATCH) {
    await Promise.all(
      jobs.slice(j, j + BATCH).map(async ([tx, ty]) => {
        const data = await readBlock(source, image, decoderFor(ty), tx, ty, planar === 2 ? s : 0, blockBytes(ty));
        const raw = rawView(source.sampleFormat, source.bitsPerSample, data);
        const colA = Math.max(win.col0, tx * tw), colB = Math.min(win.col1, (tx + 1) * tw);
        const rowA = Math.max(win.row0, ty * th), rowB = Math.min(win.row1, (ty + 1) * th, source.height);
        copyBlock(raw, tw, tx * tw, ty * th, pixStride, sampleOff, colA, colB, rowA, rowB, win.col0, win.row0, outW, heights, valid, k, c, nd);
      }),
    );
  }
  return true;
}

/**
 * One strip or tile, decoded. Anything that goes wrong decoding it, or a block
 * that decodes to fewer bytes than it holds cells, is the file's fault: an
 * InputFileError naming the block, where it lies in the file and what the
 * decoder said (libtiff's reading of the same file fails on the same block).
 */
async function readBlock(source: DemSource, image: GeoTIFFImage, decoder: unknown, tx: number, ty: number, sample: number, need: number): Promise<ArrayBuffer> {
  let data: ArrayBuffer;
  try {
    data = (await image.getTileOrStrip(tx, ty, sample, decoder as never)).data as ArrayBuffer;
  } catch (e) {
    throw await damagedBlock(source, image, tx, ty, sample, String((e as Error)?.message ?? e).split("\n")[0]);
  }
  if (data.byteLength < need) throw await damagedBlock(source, image, tx, ty, sample, `decodes to ${data.byteLength} bytes, ${need} expected`);
  return data;
}

/** "damaged compressed data in tile 4 (column 1, row 1 of 3 x 3 tiles; 1234 bytes at byte offset 5678): <why>". */
async function damagedBlock(source: DemSource, image: GeoTIFFImage, tx: number, ty: number, sample: number, why: string): Promise<InputFileError> {
  const across = Math.ceil(source.width / image.getTileWidth());
  const down = Math.ceil(source.height / image.getTileHeight());
  // geotiff's block numbering (TIFF 6.0 section 15: tiles row by row, planes one after another).
  const index = (image.planarConfiguration === 2 ? sample * across * down : 0) + ty * across + tx;
  const kind = image.isTiled ? "tile" : "strip";
  let where = "";
  try {
    const fd = image.fileDirectory;
    const offset = Number(await fd.loadValueIndexed(image.isTiled ? "TileOffsets" : "StripOffsets", index));
    const bytes = Number(await fd.loadValueIndexed(image.isTiled ? "TileByteCounts" : "StripByteCounts", index));
    where = `; ${bytes} bytes at byte offset ${offset}`;
  } catch {
    // The place is a courtesy: the block number alone still names it.
  }
  const grid = image.isTiled ? `column ${tx}, row ${ty} of ${across} x ${down} tiles` : `rows ${ty * image.getTileHeight()} to ${Math.min(source.height, (ty + 1) * image.getTileHeight()) - 1}`;
  return new InputFileError(source.path, `damaged compressed data in ${kind} ${index} (${grid}${where}): ${why}`);
}

/** Copies and converts one block's part of the window: height = raw * k + c; nodata -> NaN. */
function copyBlock(
  raw: Raw, tw: number, bx0: number, by0: number, pixStride: number, sampleOff: number,
  colA: number, colB: number, rowA: number, rowB: number, wc0: number, wr0: number, outW: number,
  heights: Float32Array, valid: Uint8Array, k: number, c: number, nd: number,
): void {
  const identity = k === 1 && c === 0;
  for (let row = rowA; row < rowB; row++) {
    let src = ((row - by0) * tw + (colA - bx0)) * pixStride + sampleOff;
    let dst = (row - wr0) * outW + (colA - wc0);
    for (let col = colA; col < colB; col++, src += pixStride, dst++) {
      const r = raw[src];
      heights[dst] = identity ? r : r * k + c;
      // Nodata: the declared value, and any height that is not a finite Float32 (NaN,
      // +-Inf, or a Float64 beyond Float32 range): never a ground height (see toMetres).
      const h = heights[dst];
      if (r === nd || h - h !== 0) {
        heights[dst] = NaN;
        valid[dst] = 0;
      } else {
        valid[dst] = 1;
      }
    }
  }
}
