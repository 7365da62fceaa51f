import { inflateSync } from "node:zlib";
import { BaseDecoder, addDecoder } from "geotiff";

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
  const scratch = new Uint8Array(rowBytes);
  const wc = rowSamples;
  for (let r = 0; r < rows; r++) {
    const row = new Uint8Array(block, r * rowBytes, rowBytes);
    for (let i = stride; i < rowBytes; i++) row[i] = (row[i] + row[i - stride]) & 255;
    if (bytes === 4) {
      for (let i = 0; i < wc; i++) {
        const o = 4 * i;
        scratch[o] = row[3 * wc + i];
        scratch[o + 1] = row[2 * wc + i];
        scratch[o + 2] = row[wc + i];
        scratch[o + 3] = row[i];
      }
    } else {
      for (let i = 0; i < wc; i++) for (let b = 0; b < bytes; b++) scratch[bytes * i + b] = row[(bytes - b - 1) * wc + i];
    }
    row.set(scratch);
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
    const out = inflateSync(new Uint8Array(buffer));
    if (out.byteOffset === 0 && out.byteLength === out.buffer.byteLength) return out.buffer;
    return out.buffer.slice(out.byteOffset, out.byteOffset + out.byteLength);
  }
  override async decode(buffer: ArrayBufferLike): Promise<ArrayBufferLike> {
    return undoPredictor(this.decodeBlock(buffer) as ArrayBuffer, this.parameters as unknown as DecoderParameters);
  }
}

let registered = false;

/** Registers the zlib decoder for TIFF compression codes 8 and 32946 (Deflate, Adobe Deflate). Idempotent. */
export function useNodeZlib(): void {
  if (registered) return;
  registered = true;
  addDecoder([8, 32946], async () => NodeZlibDecoder as unknown as typeof BaseDecoder, undefined, false);
}
