/**
 * Block decoders used instead of geotiff's own: Deflate through Node's zlib
 * (speed), a strict LZW (a damaged block is an error, not plausible heights),
 * a Zstandard guard (a damaged block is an error, not a hang), and the
 * predictors undone in place.
 */
import { inflate, inflateSync } from "node:zlib";
import { promisify } from "node:util";
import { BaseDecoder, addDecoder } from "geotiff";
import { LITTLE_ENDIAN_HOST } from "../hostEndian.js";
import { floatPredictorRow32 } from "./floatBlocks.js";
import { blockChunk } from "./inflateChunk.js";

interface DecoderParameters {
  tileWidth: number;
  tileHeight: number;
  predictor: number;
  bitsPerSample: number | ArrayLike<number>;
  planarConfiguration: number;
}

/**
 * Undoes TIFF predictor 2 (horizontal differencing, TIFF 6.0 section 14) and predictor 3
 * (floating-point: byte planes differenced, Adobe Photoshop TIFF Technical Note 3) in place.
 * Written here because geotiff's version copies every row and dominates large reads.
 * Output bytes of predictor 3 are little-endian, as geotiff's are.
 */
export function undoPredictor(block: ArrayBuffer, p: DecoderParameters): ArrayBuffer {
  if (!p.predictor || p.predictor === 1) return block;
  const bits = typeof p.bitsPerSample === "number" ? [p.bitsPerSample] : Array.from(p.bitsPerSample);
  const bytes = bits[0] / 8;
  const stride = p.planarConfiguration === 2 ? 1 : bits.length;
  const rowSamples = p.tileWidth * stride;
  const rowBytes = rowSamples * bytes;
  const rows = Math.min(p.tileHeight, Math.floor(block.byteLength / rowBytes));
  if (p.predictor === 2) {
    for (let r = 0; r < rows; r++) {
      const row = bytes === 1 ? new Uint8Array(block, r * rowBytes, rowSamples) : bytes === 2 ? new Uint16Array(block, r * rowBytes, rowSamples) : new Uint32Array(block, r * rowBytes, rowSamples);
      for (let i = stride; i < rowSamples; i++) row[i] += row[i - stride];
    }
    return block;
  }
  if (p.predictor !== 3) throw new Error(`unsupported predictor ${p.predictor}`);
  const wc = rowSamples;
  if (bytes === 4 && LITTLE_ENDIAN_HOST) return undoFloatPredictor32(block, rows, rowBytes, stride, wc);
  const scratch = new Uint8Array(rowBytes);
  for (let r = 0; r < rows; r++) {
    const row = new Uint8Array(block, r * rowBytes, rowBytes);
    for (let i = stride; i < rowBytes; i++) row[i] = (row[i] + row[i - stride]) & 255;
    for (let i = 0; i < wc; i++) for (let b = 0; b < bytes; b++) scratch[bytes * i + b] = row[(bytes - b - 1) * wc + i];
    row.set(scratch);
  }
  return block;
}

/**
 * Predictor 3 on 32-bit samples (the usual Float32 DEM), the same bytes as the general
 * loop above, about twice as fast (see floatPredictorRow32).
 */
function undoFloatPredictor32(block: ArrayBuffer, rows: number, rowBytes: number, stride: number, wc: number): ArrayBuffer {
  const bytes = new Uint8Array(block, 0, rows * rowBytes);
  const words = new Uint32Array(block, 0, rows * wc);
  const scratch = new Uint32Array(wc);
  for (let r = 0; r < rows; r++) {
    floatPredictorRow32(bytes, r * rowBytes, rowBytes, stride, wc, 0, wc, scratch, 0);
    words.set(scratch, r * wc);
  }
  return block;
}

/**
 * Deflate tiles through Node's built-in zlib instead of geotiff's JavaScript
 * inflater: the same format (RFC 1950/1951), several times faster, which
 * matters for large windows.
 */
class NodeZlibDecoder extends BaseDecoder {
  override decodeBlock(buffer: ArrayBufferLike): ArrayBufferLike {
    return ownBuffer(inflateSync(new Uint8Array(buffer), inflateOptions(this.parameters as unknown as DecoderParameters)));
  }
  /**
   * Inflates on libuv's thread pool (zlib's asynchronous form), so the blocks in flight
   * inflate on the other cores while this thread undoes predictors and places blocks.
   */
  override async decode(buffer: ArrayBufferLike): Promise<ArrayBufferLike> {
    const out = ownBuffer(await inflateAsync(new Uint8Array(buffer), inflateOptions(this.parameters as unknown as DecoderParameters)));
    return undoPredictor(out as ArrayBuffer, this.parameters as unknown as DecoderParameters);
  }
}

const inflateAsync = promisify(inflate);

/**
 * zlib's output chunk as large as the block: the inflated bytes come in one buffer, instead
 * of 16 KB chunks (zlib's default) joined into another. A DEM window is thousands of blocks,
 * and those chunks, freed in between longer-lived allocations, stayed in the allocator's
 * arenas: at 4 km2 the process held 10-30 MB less after the load with block-sized chunks.
 */
export function inflateOptions(p: Pick<DecoderParameters, "tileWidth" | "tileHeight" | "bitsPerSample" | "planarConfiguration">): { chunkSize?: number } {
  const bits = typeof p.bitsPerSample === "number" ? [p.bitsPerSample] : Array.from(p.bitsPerSample ?? []);
  const samples = p.planarConfiguration === 2 ? 1 : bits.length;
  const bytes = p.tileWidth * p.tileHeight * samples * ((bits[0] ?? 0) / 8);
  return blockChunk(bytes);
}

/** The bytes of a zlib result as an ArrayBuffer of their own (Node may hand back a view into a larger one). */
function ownBuffer(out: Buffer): ArrayBufferLike {
  if (out.byteOffset === 0 && out.byteLength === out.buffer.byteLength) return out.buffer;
  return out.buffer.slice(out.byteOffset, out.byteOffset + out.byteLength);
}

let registered = false;

/** Registers the zlib decoder for TIFF compression codes 8 and 32946 (Deflate, Adobe Deflate). Idempotent. */
export function useNodeZlib(): void {
  if (registered) return;
  registered = true;
  addDecoder([8, 32946], async () => NodeZlibDecoder as unknown as typeof BaseDecoder, undefined, false);
}

/**
 * TIFF LZW (TIFF 6.0 section 13: codes MSB first, 9 to 12 bits, Clear 256,
 * EndOfInformation 257, one code early width change) that refuses what libtiff
 * refuses. geotiff's LZW decoder takes a code beyond the table as if it were
 * the next one and carries on, so damaged bytes decode to plausible heights;
 * under a terrain-following plan that is worse than an error. Output stops at
 * `maxBytes` (the block's size), as libtiff's does.
 * @example lzwDecode(blockBytes, 256 * 256 * 4) // the tile's bytes; throws on a damaged block
 */
export function lzwDecode(input: Uint8Array, maxBytes: number): Uint8Array {
  const CLEAR = 256;
  const EOI = 257;
  const prefix = new Int16Array(4096);
  const suffix = new Uint8Array(4096);
  const first = new Uint8Array(4096);
  const length = new Uint16Array(4096);
  for (let i = 0; i < 256; i++) {
    prefix[i] = -1;
    suffix[i] = i;
    first[i] = i;
    length[i] = 1;
  }
  const out = new Uint8Array(maxBytes);
  const totalBits = input.length * 8;
  let pos = 0;
  let bit = 0;
  let next = 258;
  let width = 9;
  let old = -1;
  while (pos < maxBytes && bit + width <= totalBits) {
    // Up to 12 bits spread over at most 3 bytes, most significant bit first.
    const byte = bit >> 3;
    const word = (input[byte] << 16) | ((input[byte + 1] ?? 0) << 8) | (input[byte + 2] ?? 0);
    const code = (word >> (24 - (bit & 7) - width)) & ((1 << width) - 1);
    bit += width;
    if (code === EOI) break;
    if (code === CLEAR) {
      next = 258;
      width = 9;
      old = -1;
      continue;
    }
    let head: number;
    if (old === -1) {
      if (code > 255) throw new Error(`LZW code ${code} where a literal byte must follow a clear code`);
      out[pos++] = code;
      old = code;
      continue;
    }
    if (code < next) {
      head = first[code];
      pos = writeString(code, pos);
    } else if (code === next) {
      // The KwKwK case: the string of the previous code plus its own first byte.
      head = first[old];
      pos = writeString(old, pos);
      if (pos < maxBytes) out[pos++] = head;
    } else {
      throw new Error(`LZW code ${code} not yet in the table (next free code ${next})`);
    }
    if (next < 4096) {
      prefix[next] = old;
      suffix[next] = head;
      first[next] = first[old];
      length[next] = length[old] + 1;
      next++;
    }
    old = code;
    if (next >= (1 << width) - 1 && width < 12) width++;
  }
  return pos === maxBytes ? out : out.subarray(0, pos);

  /** Writes the string of `code` at `at` (back to front along the prefix chain); returns the new end. */
  function writeString(code: number, at: number): number {
    const n = length[code];
    for (let c = code, k = at + n - 1; c !== -1; c = prefix[c], k--) if (k < maxBytes) out[k] = suffix[c];
    return Math.min(maxBytes, at + n);
  }
}

/** geotiff decoder around lzwDecode, with our in-place predictors. */
export class StrictLzwDecoder extends BaseDecoder {
  override decodeBlock(buffer: ArrayBufferLike): ArrayBufferLike {
    const p = this.parameters as unknown as DecoderParameters;
    const bits = typeof p.bitsPerSample === "number" ? [p.bitsPerSample] : Array.from(p.bitsPerSample);
    const samples = p.planarConfiguration === 2 ? 1 : bits.length;
    const out = lzwDecode(new Uint8Array(buffer), p.tileWidth * p.tileHeight * samples * (bits[0] / 8));
    return out.byteLength === out.buffer.byteLength ? out.buffer : out.slice().buffer;
  }
  override async decode(buffer: ArrayBufferLike): Promise<ArrayBufferLike> {
    return undoPredictor(this.decodeBlock(buffer) as ArrayBuffer, this.parameters as unknown as DecoderParameters);
  }
}

/**
 * A Zstandard decoder (geotiff's) given one block's decoded size. GDAL writes
 * frames without a content size (RFC 8878 section 3.1.1.1.2), which sends
 * geotiff's decoder down its streaming path, and that loops for ever on a
 * damaged frame. Written into the frame header, the size sends it down the
 * one-shot path, which reports damage (as a short result). A frame whose block
 * headers do not add up to the bytes given is refused before decoding.
 * @example const d = withZstdContentSize(await getDecoder(50000, params), 256 * 256 * 4)
 */
export function withZstdContentSize(inner: { decode(b: ArrayBufferLike): Promise<ArrayBufferLike> }, contentBytes: number): { decode(b: ArrayBufferLike): Promise<ArrayBufferLike> } {
  return { decode: async (buffer: ArrayBufferLike) => inner.decode(zstdWithContentSize(new Uint8Array(buffer), contentBytes)) };
}

/**
 * The frame with a 4-byte Frame_Content_Size added when it has none (RFC 8878
 * section 3.1.1); throws when its block headers run past the bytes given.
 * @example zstdWithContentSize(tileBytes, 256 * 256 * 4) // the same frame, header flag 0x80 and the size added
 */
export function zstdWithContentSize(frame: Uint8Array, contentBytes: number): ArrayBufferLike {
  const dv = new DataView(frame.buffer, frame.byteOffset, frame.byteLength);
  if (frame.length < 6 || dv.getUint32(0, true) !== 0xfd2fb528) throw new Error("not a Zstandard frame (bad magic number)");
  const fhd = frame[4];
  const fcsFlag = fhd >> 6;
  const single = (fhd >> 5) & 1;
  const dictBytes = [0, 1, 2, 4][fhd & 3];
  const fcsBytes = fcsFlag === 0 ? single : [0, 2, 4, 8][fcsFlag];
  const headerEnd = 5 + (single ? 0 : 1) + dictBytes + fcsBytes;
  // Walk the blocks: 3-byte headers, last-block bit, type, size (section 3.1.1.2).
  let at = headerEnd;
  for (;;) {
    if (at + 3 > frame.length) throw new Error("Zstandard frame cut short (block header past the end)");
    const h = frame[at] | (frame[at + 1] << 8) | (frame[at + 2] << 16);
    const type = (h >> 1) & 3;
    if (type === 3) throw new Error(`Zstandard block of reserved type at byte ${at}`);
    at += 3 + (type === 1 ? 1 : h >>> 3);
    if (h & 1) break;
  }
  if ((fhd >> 2) & 1) at += 4;
  if (at > frame.length) throw new Error("Zstandard frame cut short (block past the end)");
  // Only a lone frame without a size is rewritten; anything else goes as it came.
  if (at !== frame.length || fcsFlag !== 0 || single || contentBytes >= 2 ** 32) {
    return frame.byteOffset === 0 && frame.byteLength === frame.buffer.byteLength ? frame.buffer : frame.slice().buffer;
  }
  const out = new Uint8Array(frame.length + 4);
  out.set(frame.subarray(0, headerEnd), 0);
  out[4] = fhd | (2 << 6);
  new DataView(out.buffer).setUint32(headerEnd, contentBytes, true);
  out.set(frame.subarray(headerEnd), headerEnd + 4);
  return out.buffer;
}
