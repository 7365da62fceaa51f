/**
 * Rasters to PNG data URIs, so the report embeds its maps with no network and no side
 * files. Cells outside the site or without data are transparent.
 *
 * The encoder is written here rather than taken from pngjs: pngjs chooses each row's
 * filter by running five separate passes through generic per-byte function calls, which
 * made PNG filtering one of the larger costs of the page. This one measures the five
 * candidates in one pass with the very same rule (the least sum of absolute differences,
 * the first filter winning a tie, as pngjs does) and deflates with pngjs's settings
 * (level 9, RLE strategy), so the files come out the same byte for byte.
 */
import { deflateSync } from "node:zlib";
import type { ReportRasters } from "./model.js";
import { divergingTable256, gsdScalePosition, viridisTable256 } from "./colour.js";

/**
 * Encode RGBA bytes (row-major, 4 per cell) as a `data:image/png;base64,` URI.
 *
 * @example const uri = pngDataUri(2, 1, new Uint8Array([255,0,0,255, 0,0,255,255]));
 */
export function pngDataUri(width: number, height: number, rgba: Uint8Array): string {
  return "data:image/png;base64," + encodePngRgba(width, height, rgba).toString("base64");
}

/** PNG signature (PNG specification, 5.2). */
const SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];

/**
 * An 8-bit RGBA PNG (colour type 6, no interlace) of `rgba` (4 bytes per pixel, rows from
 * the top): one IHDR, one IDAT, IEND.
 *
 * @example encodePngRgba(1, 1, new Uint8Array([0, 0, 0, 255])).subarray(1, 4).toString() // "PNG"
 */
export function encodePngRgba(width: number, height: number, rgba: Uint8Array): Buffer {
  if (rgba.length !== width * height * 4) throw new Error(`encodePngRgba: ${rgba.length} bytes for ${width} x ${height} RGBA pixels`);
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 6; // colour type: RGBA
  // compression 0, filter method 0, no interlace
  const idat = deflateSync(filterRows(rgba, width * 4, height, 4), { chunkSize: 32 * 1024, level: 9, strategy: 3 });
  return Buffer.concat([Buffer.from(SIGNATURE), chunk("IHDR", ihdr), chunk("IDAT", idat), chunk("IEND", Buffer.alloc(0))]);
}

/**
 * PNG filtering (PNG specification, 9), each row by the filter type whose output has the
 * least sum of absolute values, the differences taken as signed integers (-255..255) and
 * the lower type winning a tie. Output: per row its filter type byte then the filtered bytes.
 */
function filterRows(px: Uint8Array, byteWidth: number, height: number, bpp: number): Uint8Array {
  const out = new Uint8Array((byteWidth + 1) * height);
  // The row above; zeros above the first row, as the specification reads it.
  let prevRow: Uint8Array = new Uint8Array(byteWidth);
  for (let y = 0; y < height; y++) {
    const row = px.subarray(y * byteWidth, (y + 1) * byteWidth);
    const o = y * (byteWidth + 1) + 1;
    const dst = out.subarray(o, o + byteWidth);
    // The sums pass leaves the Paeth row in dst (the usual winner on shaded ground); another
    // winner overwrites it.
    const type = bestFilter(row, prevRow, dst, byteWidth, bpp);
    out[o - 1] = type;
    if (type === 0) dst.set(row);
    else if (type !== 4) applyFilter(type, row, prevRow, dst, byteWidth, bpp);
    prevRow = row;
  }
  return out;
}

/**
 * The filter type with the least sum of absolute differences over the row (the lower type
 * on a tie); writes the row filtered by Paeth into `paethOut` on the way.
 */
function bestFilter(row: Uint8Array, up: Uint8Array, paethOut: Uint8Array, n: number, bpp: number): number {
  let sNone = 0, sSub = 0, sUp = 0, sAvg = 0, sPaeth = 0;
  // The first pixel has no left neighbour (left and upper left read as 0): Paeth predicts up.
  const head = Math.min(bpp, n);
  for (let x = 0; x < head; x++) {
    const c = row[x];
    const u = up[x];
    sNone += c;
    sSub += c;
    sUp += Math.abs(c - u);
    sAvg += Math.abs(c - (u >> 1));
    sPaeth += Math.abs(c - u);
    paethOut[x] = c - u;
  }
  for (let x = bpp; x < n; x++) {
    const c = row[x];
    const l = row[x - bpp];
    const u = up[x];
    const ul = up[x - bpp];
    sNone += c;
    sSub += Math.abs(c - l);
    sUp += Math.abs(c - u);
    sAvg += Math.abs(c - ((l + u) >> 1));
    const dp = c - paeth(l, u, ul);
    sPaeth += Math.abs(dp);
    paethOut[x] = dp;
  }
  let type = 0;
  let min = sNone;
  if (sSub < min) (type = 1), (min = sSub);
  if (sUp < min) (type = 2), (min = sUp);
  if (sAvg < min) (type = 3), (min = sAvg);
  if (sPaeth < min) type = 4;
  return type;
}

/** Filter a row by type 1 (Sub), 2 (Up) or 3 (Average) into `dst` (bytes wrap modulo 256). */
function applyFilter(type: number, row: Uint8Array, up: Uint8Array, dst: Uint8Array, n: number, bpp: number): void {
  const head = Math.min(bpp, n);
  if (type === 1) {
    for (let x = 0; x < head; x++) dst[x] = row[x];
    for (let x = bpp; x < n; x++) dst[x] = row[x] - row[x - bpp];
  } else if (type === 2) {
    for (let x = 0; x < n; x++) dst[x] = row[x] - up[x];
  } else {
    for (let x = 0; x < head; x++) dst[x] = row[x] - (up[x] >> 1);
    for (let x = bpp; x < n; x++) dst[x] = row[x] - ((row[x - bpp] + up[x]) >> 1);
  }
}

/**
 * The Paeth predictor (PNG specification, 9.4): of left, up and upLeft the one nearest
 * left + up - upLeft, ties to left, then up (the distances as the specification's sample
 * code writes them: |up - upLeft|, |left - upLeft|, |left + up - 2 upLeft|).
 */
function paeth(left: number, up: number, upLeft: number): number {
  const pa = Math.abs(up - upLeft);
  const pb = Math.abs(left - upLeft);
  const pc = Math.abs(left + up - 2 * upLeft);
  if (pa <= pb && pa <= pc) return left;
  return pb <= pc ? up : upLeft;
}

/** A PNG chunk: length, type, data, CRC-32 of type and data (PNG specification, 5.3). */
function chunk(type: string, data: Buffer): Buffer {
  const buf = Buffer.alloc(12 + data.length);
  buf.writeUInt32BE(data.length, 0);
  buf.write(type, 4, "latin1");
  data.copy(buf, 8);
  buf.writeUInt32BE(crc32(buf, 4, 8 + data.length), 8 + data.length);
  return buf;
}

/** CRC-32 (ISO 3309, the polynomial PNG uses), table-driven. */
const CRC_TABLE = (() => {
  const t = new Int32Array(256);
  for (let i = 0; i < 256; i++) {
    let c = i;
    for (let j = 0; j < 8; j++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    t[i] = c;
  }
  return t;
})();

function crc32(buf: Uint8Array, start: number, end: number): number {
  let c = -1;
  for (let i = start; i < end; i++) c = CRC_TABLE[(c ^ buf[i]) & 0xff] ^ (c >>> 8);
  return (c ^ -1) >>> 0;
}

/**
 * Hill shade (0..1, NaN nodata) as grey RGBA. The grey range starts at 60, not 0, so
 * the lines and labels drawn on top stay readable in the deepest shadows.
 *
 * @example shadeRgba(hillshade()(grid))
 */
export function shadeRgba(shade: Float32Array): Uint8Array {
  const out = new Uint8Array(shade.length * 4);
  for (let i = 0; i < shade.length; i++) {
    const s = shade[i];
    if (s !== s) continue;
    const g = Math.round(60 + 195 * s);
    out[4 * i] = g;
    out[4 * i + 1] = g;
    out[4 * i + 2] = g;
    out[4 * i + 3] = 255;
  }
  return out;
}

/**
 * GSD on the diverging scale centred on the target (colour.ts gsdScalePosition).
 *
 * @example gsdRgba(rasters, 3, 2.7, 3.3)
 */
export function gsdRgba(r: ReportRasters, targetCm: number, lowCm: number, highCm: number): Uint8Array {
  const table = divergingTable256();
  const out = new Uint8Array(r.width * r.height * 4);
  for (let i = 0; i < r.gsdCm.length; i++) {
    const v = r.gsdCm[i];
    if (!r.inSite[i] || v !== v) continue;
    const k = Math.round(gsdScalePosition(v, targetCm, lowCm, highCm) * 255);
    out[4 * i] = table[3 * k];
    out[4 * i + 1] = table[3 * k + 1];
    out[4 * i + 2] = table[3 * k + 2];
    out[4 * i + 3] = 255;
  }
  return out;
}

/**
 * Image count on viridis, 0 at the dark end and `maxCount` (or more) at the light end.
 *
 * @example imagesRgba(rasters, 12)
 */
export function imagesRgba(r: ReportRasters, maxCount: number): Uint8Array {
  const table = viridisTable256();
  const out = new Uint8Array(r.width * r.height * 4);
  const m = Math.max(1, maxCount);
  for (let i = 0; i < r.images.length; i++) {
    if (!r.inSite[i]) continue;
    const k = Math.round(Math.min(1, r.images[i] / m) * 255);
    out[4 * i] = table[3 * k];
    out[4 * i + 1] = table[3 * k + 1];
    out[4 * i + 2] = table[3 * k + 2];
    out[4 * i + 3] = 255;
  }
  return out;
}
