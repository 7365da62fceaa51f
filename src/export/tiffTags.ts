/**
 * Image file directories (IFDs) of a little-endian classic TIFF, TIFF 6.0
 * section 2: a 2-byte entry count, 12-byte entries sorted by tag (tag, field
 * type, count, value or offset), the 4-byte offset of the next IFD, and the
 * values longer than 4 bytes after it, each starting on a word boundary.
 * Pure byte layout: the COG writer (cog.ts) decides where each IFD goes.
 */

/** Field types used here, TIFF 6.0 section 2 ("Types"): code and bytes per value. */
const FIELD_TYPES = {
  ASCII: [2, 1],
  SHORT: [3, 2],
  LONG: [4, 4],
  DOUBLE: [12, 8],
} as const;

export type TiffFieldType = keyof typeof FIELD_TYPES;

export interface TiffField {
  tag: number;
  type: TiffFieldType;
  /** Numbers, or for ASCII the text (written with its terminating NUL, which the count includes). */
  values: ArrayLike<number> | string;
  /**
   * Where the value already lies in the file, for data several IFDs share (one colour map
   * for every resolution of a palette image): the entry points there and the IFD does not
   * carry a copy.
   */
  at?: number;
}

/** Tags this project writes (TIFF 6.0 baseline and extensions, GeoTIFF 1.0, GDAL's private tags). */
export const TAG = {
  NewSubfileType: 254,
  ImageWidth: 256,
  ImageLength: 257,
  BitsPerSample: 258,
  Compression: 259,
  PhotometricInterpretation: 262,
  SamplesPerPixel: 277,
  PlanarConfiguration: 284,
  Predictor: 317,
  ColorMap: 320,
  TileWidth: 322,
  TileLength: 323,
  TileOffsets: 324,
  TileByteCounts: 325,
  SampleFormat: 339,
  ModelPixelScale: 33550,
  ModelTiepoint: 33922,
  GeoKeyDirectory: 34735,
  GeoDoubleParams: 34736,
  GeoAsciiParams: 34737,
  /** GDAL's XML metadata (band description, unit, items), registered private tag. */
  GdalMetadata: 42112,
  /** GDAL's nodata value as ASCII text, registered private tag. */
  GdalNodata: 42113,
} as const;

/**
 * Number of values the entry declares (ASCII: characters plus the NUL).
 * @example fieldCount({ tag: 42113, type: "ASCII", values: "255" }) // 4
 */
export function fieldCount(f: TiffField): number {
  return typeof f.values === "string" ? f.values.length + 1 : f.values.length;
}

function fieldBytes(f: TiffField): number {
  return fieldCount(f) * FIELD_TYPES[f.type][1];
}

/** Bytes a value takes after the IFD: none when it fits the entry or lies elsewhere, else its length padded to a word. */
function outOfLineBytes(f: TiffField): number {
  const n = fieldBytes(f);
  return n <= 4 || f.at !== undefined ? 0 : n + (n & 1);
}

/**
 * Bytes of one IFD with its out-of-line values: what the IFD at `offset` occupies, so
 * the next thing can start at `offset + ifdByteSize(fields)`.
 * @example ifdByteSize([{ tag: 256, type: "LONG", values: [5] }]) // 2 + 12 + 4 = 18
 */
export function ifdByteSize(fields: readonly TiffField[]): number {
  let n = 2 + 12 * fields.length + 4;
  for (const f of fields) n += outOfLineBytes(f);
  return n;
}

/**
 * Writes one IFD at `offset` (even), entries sorted by tag as TIFF 6.0 requires, its
 * out-of-line values right after it, and `next` (0 for the last IFD) as the offset of the
 * next IFD. Returns the end offset (`offset + ifdByteSize(fields)`).
 * @example writeIfd(new DataView(new ArrayBuffer(64)), 8, [{ tag: 256, type: "LONG", values: [5] }], 0) // 26
 */
export function writeIfd(view: DataView, offset: number, fields: readonly TiffField[], next: number): number {
  if (offset & 1) throw new Error(`IFD offset ${offset} is odd (TIFF 6.0 wants word alignment)`);
  const sorted = [...fields].sort((a, b) => a.tag - b.tag);
  for (let i = 1; i < sorted.length; i++) {
    if (sorted[i].tag === sorted[i - 1].tag) throw new Error(`TIFF tag ${sorted[i].tag} given twice`);
  }
  view.setUint16(offset, sorted.length, true);
  let data = offset + 2 + 12 * sorted.length + 4;
  sorted.forEach((f, i) => {
    const e = offset + 2 + 12 * i;
    const [code] = FIELD_TYPES[f.type];
    view.setUint16(e, f.tag, true);
    view.setUint16(e + 2, code, true);
    view.setUint32(e + 4, fieldCount(f), true);
    if (f.at !== undefined) {
      view.setUint32(e + 8, f.at, true);
      return;
    }
    const inline = fieldBytes(f) <= 4;
    const at = inline ? e + 8 : data;
    if (!inline) {
      view.setUint32(e + 8, data, true);
      data += outOfLineBytes(f);
    }
    writeValues(view, at, f);
  });
  view.setUint32(offset + 2 + 12 * sorted.length, next, true);
  return data;
}

function writeValues(view: DataView, at: number, f: TiffField): void {
  if (typeof f.values === "string") {
    // TIFF 6.0: 7-bit ASCII; anything else is replaced so the byte count stays the character count.
    for (let i = 0; i < f.values.length; i++) {
      const c = f.values.charCodeAt(i);
      view.setUint8(at + i, c < 128 ? c : 63);
    }
    view.setUint8(at + f.values.length, 0);
    return;
  }
  const v = f.values;
  for (let i = 0; i < v.length; i++) {
    if (f.type === "SHORT") view.setUint16(at + 2 * i, v[i], true);
    else if (f.type === "LONG") view.setUint32(at + 4 * i, v[i], true);
    else view.setFloat64(at + 8 * i, v[i], true);
  }
}
