import { closeSync, openSync } from "node:fs";
import { getDecoder, type GeoTIFFImage } from "geotiff";
import { InputFileError } from "../errors.js";
import type { DemSource } from "./source.js";
import { remoteClient, remoteFailure } from "./tiffSource.js";
import { fetchRuns, type RangeBlock, type RangeClient } from "./remote.js";
import type { CellWindow } from "./window.js";
import { StrictLzwDecoder, withZstdContentSize } from "./zlib-decoder.js";
import { LITTLE_ENDIAN_HOST } from "../hostEndian.js";
import { blockCellsInWindow, markNodata, placeFloatPredicted } from "./floatBlocks.js";
import { blocksInBackground, type BlockJob, type BlockRef } from "./blocksInBackground.js";
import { TAKEN_BY_WORKER, TAKEN_HERE, takeBlocks } from "./blockTake.js";
import { NOT_IN_BACKGROUND, splitAllowed, type Background } from "../background.js";

type Raw = Int8Array | Uint8Array | Int16Array | Uint16Array | Int32Array | Uint32Array | Float32Array | Float64Array;

// Compressions whose decoders need only the default parameters (LERC and JPEG need more).
const SIMPLE_COMPRESSIONS = new Set([1, 5, 8, 32946, 32773, 50000]);
// Blocks in flight at once: bounds the compressed and decoded blocks alive together. A pool
// rather than lockstep batches, so that fetching some blocks (over HTTP above all) overlaps
// decoding others.
const IN_FLIGHT = 16;

function rawView(fmt: DemSource["sampleFormat"], bits: number, buf: ArrayBuffer): Raw {
  if (fmt === "float") return bits === 64 ? new Float64Array(buf, 0, buf.byteLength >> 3) : new Float32Array(buf, 0, buf.byteLength >> 2);
  if (fmt === "int") return bits === 8 ? new Int8Array(buf) : bits === 16 ? new Int16Array(buf, 0, buf.byteLength >> 1) : new Int32Array(buf, 0, buf.byteLength >> 2);
  return bits === 8 ? new Uint8Array(buf) : bits === 16 ? new Uint16Array(buf, 0, buf.byteLength >> 1) : new Uint32Array(buf, 0, buf.byteLength >> 2);
}

/** Where a window lands in a larger output: its first cell at (col, row) of rows `stride` cells wide. */
export interface OutputPlace {
  stride: number;
  col: number;
  row: number;
}

/**
 * Decodes the strips/tiles under a cell window and writes heights in metres straight
 * into the output (one pass: no intermediate window of raw samples), by default as a
 * window-sized grid, or at `place` in a larger one (a mosaic's). Returns false, having
 * written nothing, when the file's layout needs geotiff's general reader (big-endian,
 * mixed sample sizes, JPEG/LERC), so the caller can fall back to it.
 * @example if (!(await decodeWindowDirect(dem, image, win, heights))) { ... }
 */
export async function decodeWindowDirect(
  source: DemSource,
  image: GeoTIFFImage,
  win: CellWindow,
  heights: Float32Array,
  place: OutputPlace = { stride: win.col1 - win.col0, col: 0, row: 0 },
  threads?: number,
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
  const k = source.scale * source.verticalUnitM;
  const c = source.offset * source.verticalUnitM;
  // The usual DEM (Float32 samples, one per block pixel, heights as stored, floating-point
  // predictor): the decoder only inflates, and each block row is un-predicted straight into
  // the window (placeFloatPredicted), without an un-predicted copy of the block.
  const fused = source.predictor === 3 && source.sampleFormat === "float" && bitsAll[0] === 32 && (planar === 2 || spp === 1) && k === 1 && c === 0 && LITTLE_ENDIAN_HOST;
  const params = {
    tileWidth: tw,
    tileHeight: th,
    planarConfiguration: planar,
    bitsPerSample: bitsAll,
    predictor: fused ? 1 : source.predictor,
  };
  // Bytes a block holds: tiles are whole; the last strip may be shorter.
  const blockBytes = (ty: number): number => tw * image.getBlockHeight(ty) * (bitsAll[0] / 8) * (planar === 2 ? 1 : spp);
  // LZW through our strict decoder (geotiff's turns a damaged block into plausible
  // heights); Zstandard told each block's size (see withZstdContentSize).
  const decoder = source.compressionCode === 5 ? new StrictLzwDecoder(params) : await getDecoder(source.compressionCode, params as never);
  // Blocks still carrying the predictor: those the decoder made. geotiff fills a sparse block
  // (none in the file) with the nodata value itself, without the decoder: placed as it is.
  const stillPredicted = new WeakSet<ArrayBufferLike>();
  const base = fused
    ? {
        decode: async (b: ArrayBufferLike) => {
          const d = await decoder.decode(b);
          stillPredicted.add(d);
          return d;
        },
      }
    : decoder;
  const decoderFor = source.compressionCode === 50000 ? (ty: number) => withZstdContentSize(base, blockBytes(ty)) : () => base;

  const outW = place.stride;
  // Output index of cell (col, row): (row - wr0) * outW + (col - wc0).
  const wc0 = win.col0 - place.col, wr0 = win.row0 - place.row;
  const nd = source.nodata === null ? NaN : source.sampleFormat === "float" && source.bitsPerSample === 32 ? Math.fround(source.nodata) : source.nodata;
  const pixStride = planar === 2 ? 1 : spp;
  const sampleOff = planar === 2 ? 0 : s;

  const tx0 = Math.floor(win.col0 / tw), tx1 = Math.ceil(win.col1 / tw);
  const ty0 = Math.floor(win.row0 / th), ty1 = Math.ceil(win.row1 / th);
  const jobs: [number, number][] = [];
  for (let ty = ty0; ty < ty1; ty++) for (let tx = tx0; tx < tx1; tx++) jobs.push([tx, ty]);

  const sample = planar === 2 ? s : 0;
  const words = fused ? new Uint32Array(heights.buffer, heights.byteOffset, heights.length) : undefined;
  const place1 = (tx: number, ty: number, data: ArrayBuffer) => {
    const [colA, colB, rowA, rowB] = blockCellsInWindow(tx, ty, tw, th, win, source.height);
    if (words && stillPredicted.has(data)) {
      placeFloatPredicted(new Uint8Array(data), tw, tx * tw, ty * th, colA, colB, rowA, rowB, wc0, wr0, outW, words, heights, nd);
      return;
    }
    const raw = rawView(source.sampleFormat, source.bitsPerSample, data);
    copyBlock(raw, tw, tx * tw, ty * th, pixStride, sampleOff, colA, colB, rowA, rowB, wc0, wr0, outW, heights, k, c, nd);
  };

  const client = remoteClient(source);
  if (client) {
    await decodeRemote(source, image, client, jobs, sample, decoderFor, blockBytes, place1);
    return true;
  }
  const decodeHere = async (list: [number, number][]) => {
    let next = 0;
    const worker = async () => {
      while (next < list.length) {
        const [tx, ty] = list[next++];
        place1(tx, ty, await readBlock(source, image, decoderFor(ty), tx, ty, sample, blockBytes(ty)));
      }
    };
    await Promise.all(Array.from({ length: Math.min(IN_FLIGHT, list.length) }, worker));
  };
  // A large window of the usual local Deflate DEM (see splitAllowed): its blocks are taken
  // one by one by a worker thread and by this thread, both decoding synchronously straight
  // into the window (blockTake.ts); sparse blocks (no bytes: geotiff fills them with nodata),
  // a block this thread could not decode and, should the worker fail, the blocks it took go
  // through geotiff's reader below (with its errors naming the block).
  if (words && (source.compressionCode === 8 || source.compressionCode === 32946) && jobs.length >= 8 && splitAllowed((win.col1 - win.col0) * (win.row1 - win.row0), threads)) {
    const across = Math.ceil(source.width / tw), down = Math.ceil(source.height / th);
    const tag = image.isTiled ? "Tile" : "Strip";
    const blocks: BlockRef[] = [];
    const elsewhere: [number, number][] = [];
    for (const [tx, ty] of jobs) {
      const index = (planar === 2 ? sample * across * down : 0) + ty * across + tx;
      const length = Number(await fd.loadValueIndexed(`${tag}ByteCounts`, index));
      if (length === 0) elsewhere.push([tx, ty]);
      else blocks.push({ offset: Number(await fd.loadValueIndexed(`${tag}Offsets`, index)), length, tx, ty, need: blockBytes(ty) });
    }
    const job: BlockJob = {
      path: source.path, blocks, tw, th, win: { col0: win.col0, col1: win.col1, row0: win.row0, row1: win.row1 }, sourceHeight: source.height, wc0, wr0, outW, heights, nd,
      next: new Int32Array(new SharedArrayBuffer(4)),
      taken: new Uint8Array(new SharedArrayBuffer(blocks.length)),
    };
    // Opened before the worker starts: a file this thread cannot open by its path is read by
    // geotiff's reader alone, as before.
    const file = openedForReading(source.path);
    if (file !== undefined) {
      let inWorker: Background<boolean> = NOT_IN_BACKGROUND;
      try {
        inWorker = blocksInBackground(job);
        if (inWorker !== NOT_IN_BACKGROUND) takeBlocks(job, file, TAKEN_HERE, (k) => elsewhere.push([blocks[k].tx, blocks[k].ty]));
      } finally {
        closeSync(file);
      }
      if (inWorker !== NOT_IN_BACKGROUND) {
        await decodeHere(elsewhere);
        if ((await inWorker.result()) !== true) await decodeHere(blocks.filter((_, k) => Atomics.load(job.taken, k) === TAKEN_BY_WORKER).map((b) => [b.tx, b.ty]));
        return true;
      }
    }
  }
  await decodeHere(jobs);
  return true;
}

/** A file descriptor for reading `path`, or undefined where it cannot be opened. */
function openedForReading(path: string): number | undefined {
  try {
    return openSync(path, "r");
  } catch {
    return undefined;
  }
}

/**
 * Over HTTP, the blocks of a window are fetched by the runs they form in the file (the
 * tiles of a row of a COG lie one after another), a few runs at a time, each decoded as it
 * arrives: exactly the bytes the window needs, in few requests, with fetching overlapping
 * decoding. geotiff's block cache stays for the header, where reads are small and scattered.
 */
async function decodeRemote(
  source: DemSource, image: GeoTIFFImage, client: RangeClient, jobs: [number, number][], sample: number,
  decoderFor: (ty: number) => unknown, blockBytes: (ty: number) => number, place1: (tx: number, ty: number, data: ArrayBuffer) => void,
): Promise<void> {
  const fd = image.fileDirectory;
  const across = Math.ceil(source.width / image.getTileWidth()), down = Math.ceil(source.height / image.getTileHeight());
  const tag = image.isTiled ? "Tile" : "Strip";
  const blocks: RangeBlock<[number, number]>[] = [];
  for (const job of jobs) {
    const index = (image.planarConfiguration === 2 ? sample * across * down : 0) + job[1] * across + job[0];
    const offset = Number(await fd.loadValueIndexed(`${tag}Offsets`, index));
    const length = Number(await fd.loadValueIndexed(`${tag}ByteCounts`, index));
    blocks.push({ offset, length, key: job });
  }
  await fetchRuns(client, blocks, async (key, bytes) => {
    const [tx, ty] = key;
    let data: ArrayBuffer;
    try {
      // A block of 0 bytes is sparse (GDAL leaves empty blocks out): geotiff's reader fills it.
      data = bytes.byteLength === 0 ? ((await image.getTileOrStrip(tx, ty, sample, decoderFor(ty) as never)).data as ArrayBuffer) : ((await (decoderFor(ty) as { decode(b: ArrayBuffer): Promise<ArrayBuffer> }).decode(bytes)) as ArrayBuffer);
    } catch (e) {
      throw await damagedBlock(source, image, tx, ty, sample, String((e as Error)?.message ?? e).split("\n")[0]);
    }
    if (data.byteLength < blockBytes(ty)) throw await damagedBlock(source, image, tx, ty, sample, `decodes to ${data.byteLength} bytes, ${blockBytes(ty)} expected`);
    place1(tx, ty, data);
  });
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
    // Over HTTP, a failed fetch is the server's fault, not damage in the file.
    const remote = remoteFailure(source);
    if (remote) throw remote;
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
  heights: Float32Array, k: number, c: number, nd: number,
): void {
  const identity = k === 1 && c === 0;
  if (identity && pixStride === 1 && raw instanceof Float32Array) {
    copyFloat32Rows(raw, tw, bx0, by0, sampleOff, colA, colB, rowA, rowB, wc0, wr0, outW, heights, nd);
    return;
  }
  for (let row = rowA; row < rowB; row++) {
    let src = ((row - by0) * tw + (colA - bx0)) * pixStride + sampleOff;
    let dst = (row - wr0) * outW + (colA - wc0);
    for (let col = colA; col < colB; col++, src += pixStride, dst++) {
      const r = raw[src];
      heights[dst] = identity ? r : r * k + c;
      // Nodata: the declared value, and any height that is not a finite Float32 (NaN,
      // +-Inf, or a Float64 beyond Float32 range): never a ground height (see toMetres).
      const h = heights[dst];
      if (r === nd || h - h !== 0) heights[dst] = NaN;
    }
  }
}

/**
 * copyBlock for the usual DEM (Float32 samples, one band, heights as stored): each row
 * copied at once, then nodata and non-finite cells made NaN: the same heights.
 */
function copyFloat32Rows(
  raw: Float32Array, tw: number, bx0: number, by0: number, sampleOff: number,
  colA: number, colB: number, rowA: number, rowB: number, wc0: number, wr0: number, outW: number,
  heights: Float32Array, nd: number,
): void {
  const n = colB - colA;
  for (let row = rowA; row < rowB; row++) {
    const src = (row - by0) * tw + (colA - bx0) + sampleOff;
    const dst = (row - wr0) * outW + (colA - wc0);
    heights.set(raw.subarray(src, src + n), dst);
    markNodata(heights, dst, dst + n, nd);
  }
}
