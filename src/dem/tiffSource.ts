import { statSync } from "node:fs";
import { fromFile, type GeoTIFF, type GeoTIFFImage } from "geotiff";
import { InputError, InputFileError } from "../errors.js";
import type { GeoTransform } from "./grid.js";
import { horizontalCrs, verticalInfo, type GeoKeys } from "./crs.js";
import { useNodeZlib } from "./zlib-decoder.js";
import { openRemoteTiff, type RangeClient } from "./remote.js";
import { MAX_CELLS, MAX_SIDE_CELLS } from "./limits.js";
import type { DemSource, OpenDemOptions } from "./source.js";

// One GeoTIFF, on disk or over HTTP(S): its header read and checked, no cell decoded.

const COMPRESSION_NAMES: Record<number, string> = {
  1: "none",
  5: "LZW",
  7: "JPEG",
  8: "Deflate",
  32946: "Deflate",
  32773: "PackBits",
  34887: "LERC",
  50000: "ZSTD",
  50001: "WebP",
};

interface Handles {
  tiff: GeoTIFF;
  image: GeoTIFFImage;
  overviews: GeoTIFFImage[];
  /** The HTTP client of a remote file (its first failure is the error to report). */
  remote?: RangeClient;
}
const handles = new WeakMap<DemSource, Handles>();

/**
 * geotiff handles behind a GeoTIFF source (for the window and statistics readers).
 * @example const { image } = demHandles(dem)
 */
export function demHandles(source: DemSource): Handles {
  const h = handles.get(source);
  if (!h) throw new Error("DemSource is closed or was not made by openDem");
  return h;
}

/**
 * The error to report for a failed read: the remote client's own one-line failure when
 * there is one (geotiff's block cache reports only "Request failed"), else `e`.
 * @example throw remoteFailure(source) ?? e
 */
export function remoteFailure(source: DemSource): InputFileError | null {
  return handles.get(source)?.remote?.failure ?? null;
}

/**
 * The HTTP client behind a remote GeoTIFF source, or undefined for a file on disk.
 * @example if (remoteClient(dem)) { ... }
 */
export function remoteClient(source: DemSource): RangeClient | undefined {
  return handles.get(source)?.remote;
}

function wrap(file: string, e: unknown, remote?: RangeClient): InputFileError {
  if (remote?.failure) return remote.failure;
  if (e instanceof InputFileError) return e;
  const msg = (e as Error)?.message ?? String(e);
  if (/byte order|magic number/i.test(msg)) return new InputFileError(file, "not a TIFF file (bad TIFF header)");
  return new InputFileError(file, `damaged or truncated TIFF (${msg.split("\n")[0]})`);
}

/**
 * Opens a GeoTIFF DEM file and reads its header (byte-range reads only: no cell is decoded).
 * Refuses, with one-line InputFileErrors, files that are not TIFFs, truncated, without
 * georeferencing, rotated, of absurd size, or with an unknown CRS.
 * @example
 * const dem = await openTiffFile("fixtures/gdal/hills_utm33_f32.tif");
 * dem.crs.epsg; // 32633
 * await dem.close();
 */
export async function openTiffFile(path: string, opts: OpenDemOptions = {}): Promise<DemSource> {
  let fileSize: number;
  try {
    const st = statSync(path);
    if (!st.isFile()) throw new InputFileError(path, "not a regular file");
    fileSize = st.size;
  } catch (e) {
    if (e instanceof InputFileError) throw e;
    throw new InputFileError(path, "cannot open the file (missing or unreadable)");
  }
  if (fileSize < 8) throw new InputFileError(path, "not a TIFF file (too short for a TIFF header)");
  useNodeZlib();

  let tiff: GeoTIFF;
  try {
    tiff = await fromFile(path);
  } catch (e) {
    throw wrap(path, e);
  }
  return headerOrClose(path, tiff, fileSize, opts);
}

/**
 * Opens a GeoTIFF over HTTP(S) (a cloud-optimized GeoTIFF at best): only the header is
 * fetched now, and later only the blocks a window needs, by HTTP range requests
 * (see remote.ts for the time-out, retries and the refusal of servers without Range).
 * @example const dem = await openTiffUrl("https://example.org/dem_cog.tif", { http: { timeoutMs: 10_000 } })
 */
export async function openTiffUrl(url: string, opts: OpenDemOptions = {}): Promise<DemSource> {
  useNodeZlib();
  let opened: Awaited<ReturnType<typeof openRemoteTiff>> | undefined;
  try {
    opened = await openRemoteTiff(url, opts.http);
  } catch (e) {
    throw wrap(url, e);
  }
  return headerOrClose(url, opened.tiff, opened.fileSize ?? Number.MAX_SAFE_INTEGER, opts, opened.client);
}

async function headerOrClose(path: string, tiff: GeoTIFF, fileSize: number, opts: OpenDemOptions, remote?: RangeClient): Promise<DemSource> {
  try {
    return await readHeader(path, tiff, fileSize, opts, remote);
  } catch (e) {
    await Promise.resolve(tiff.close()).catch(() => undefined);
    if (e instanceof InputError && !remote?.failure) throw e;
    throw wrap(path, e, remote);
  }
}

async function readHeader(path: string, tiff: GeoTIFF, fileSize: number, opts: OpenDemOptions, remote?: RangeClient): Promise<DemSource> {
  if (tiff.firstIFDOffset + 2 > fileSize) throw new InputFileError(path, "truncated TIFF (the image directory lies past the end of the file)");
  const image = await tiff.getImage(0);
  const fd = image.fileDirectory;

  // Validate the size before anything is allocated from it.
  const width = Number(fd.getValue("ImageWidth"));
  const height = Number(fd.getValue("ImageLength"));
  if (!Number.isInteger(width) || !Number.isInteger(height) || width <= 0 || height <= 0)
    throw new InputFileError(path, `invalid image size ${width} x ${height} in the TIFF header`);
  if (width > MAX_SIDE_CELLS || height > MAX_SIDE_CELLS || width * height > MAX_CELLS)
    throw new InputFileError(path, `header claims ${width} x ${height} cells; at most ${MAX_SIDE_CELLS} cells per side and 2^31 cells in all are accepted`);

  const bands = image.getSamplesPerPixel();
  const band = opts.band ?? 1;
  if (!Number.isInteger(band) || band < 1 || band > bands) throw new InputError("band", opts.band, `an integer from 1 to ${bands} (the file has ${bands} band${bands === 1 ? "" : "s"})`);

  const fmtCode = image.getSampleFormat(band - 1);
  const bits = image.getBitsPerSample(band - 1);
  const sampleFormat = fmtCode === 3 ? "float" : fmtCode === 2 ? "int" : fmtCode === 1 ? "uint" : null;
  if (!sampleFormat || (sampleFormat === "float" ? ![32, 64].includes(bits) : ![8, 16, 32].includes(bits)))
    throw new InputFileError(path, `unsupported sample type (SampleFormat ${fmtCode}, ${bits} bits); DEMs of 8/16/32-bit integers or 32/64-bit floats are supported`);

  const compressionCode = Number(fd.getValue("Compression") ?? 1);
  const compression = COMPRESSION_NAMES[compressionCode];
  if (!compression) throw new InputFileError(path, `unsupported TIFF compression code ${compressionCode}`);

  // Every strip/tile must lie inside the file, or reads would silently return zeros.
  const tiled = image.isTiled;
  const offsets = await fd.loadValue(tiled ? "TileOffsets" : "StripOffsets");
  const counts = await fd.loadValue(tiled ? "TileByteCounts" : "StripByteCounts");
  if (!offsets || !counts) throw new InputFileError(path, "damaged TIFF (no strip or tile offsets)");
  let end = 0;
  for (let i = 0; i < (offsets as ArrayLike<number>).length; i++) {
    const e = Number((offsets as ArrayLike<number>)[i]) + Number((counts as ArrayLike<number>)[i]);
    if (e > end) end = e;
  }
  if (end > fileSize) throw new InputFileError(path, `truncated TIFF (image data runs to byte ${end} but the file has ${fileSize} bytes)`);

  const keys = image.getGeoKeys() as GeoKeys | null;
  const { transform, pixelIsPoint } = northUpTransform(path, image, keys);
  if (!keys) throw new InputFileError(path, "no georeferencing (no GeoKey directory, so no CRS)");
  const crs = horizontalCrs(keys, path);

  const meta = (await image.getGDALMetadata(band - 1)) ?? {};
  const scale = meta.SCALE !== undefined ? Number(meta.SCALE) : 1;
  const offset = meta.OFFSET !== undefined ? Number(meta.OFFSET) : 0;
  if (!Number.isFinite(scale) || !Number.isFinite(offset) || scale === 0) throw new InputFileError(path, `invalid GDAL scale/offset metadata (${meta.SCALE}, ${meta.OFFSET})`);
  const vertical = verticalInfo(keys, path, opts, typeof meta.UNITTYPE === "string" ? meta.UNITTYPE : undefined);

  const overviews: GeoTIFFImage[] = [];
  let next = image;
  for (let i = 1; i < 32 && next.fileDirectory.nextIFDByteOffset; i++) {
    try {
      next = await tiff.getImage(i);
    } catch {
      break;
    }
    const sub = Number(next.fileDirectory.getValue("NewSubfileType") ?? 0);
    if ((sub & 1) === 1 && next.getSamplesPerPixel() === bands) overviews.push(next);
  }

  const source: DemSource = {
    path,
    width,
    height,
    bands,
    band,
    transform,
    crs,
    pixelIsPoint,
    tiled,
    blockWidth: image.getTileWidth(),
    blockHeight: image.getTileHeight(),
    compression,
    compressionCode,
    predictor: Number(await fd.loadValue("Predictor")) || 1,
    sampleFormat,
    bitsPerSample: bits,
    nodata: image.getGDALNoData(),
    scale,
    offset,
    verticalUnit: vertical.unit,
    verticalUnitM: vertical.unitM,
    verticalDatum: vertical.datum,
    verticalCrsName: vertical.name,
    verticalEpsg: vertical.epsg,
    overviewCount: overviews.length,
    warnings: vertical.warnings,
    close: async () => {
      if (!handles.has(source)) return;
      handles.delete(source);
      await tiff.close();
    },
  };
  handles.set(source, { tiff, image, overviews, remote });
  return source;
}

/**
 * Corner-based north-up transform from ModelPixelScale + ModelTiepoint or a
 * ModelTransformation without rotation terms (GeoTIFF 1.0 spec, 2.6.1). A
 * pixel-is-point raster's tiepoint is a cell centre: shifted by half a cell,
 * as GDAL does.
 */
function northUpTransform(path: string, image: GeoTIFFImage, keys: GeoKeys | null): { transform: GeoTransform; pixelIsPoint: boolean } {
  const fd = image.fileDirectory;
  const scale = fd.getValue("ModelPixelScale") as number[] | undefined;
  const tie = fd.getValue("ModelTiepoint") as number[] | undefined;
  const mt = fd.getValue("ModelTransformation") as number[] | undefined;
  let t: GeoTransform;
  if (mt && mt.length >= 16) {
    if (mt[1] !== 0 || mt[4] !== 0) throw new InputFileError(path, "rotated transforms are not supported: north-up only (the ModelTransformation has rotation terms)");
    t = { x0: mt[3], y0: mt[7], dx: mt[0], dy: mt[5] };
  } else if (scale && tie && tie.length >= 6) {
    if (tie.length > 6) throw new InputFileError(path, "georeferenced by ground control points only: north-up affine georeferencing is required");
    t = { x0: tie[3] - tie[0] * scale[0], y0: tie[4] + tie[1] * scale[1], dx: scale[0], dy: -scale[1] };
  } else if (tie && tie.length > 6) {
    throw new InputFileError(path, "georeferenced by ground control points only: north-up affine georeferencing is required");
  } else {
    throw new InputFileError(path, "no georeferencing (no ModelPixelScale/ModelTiepoint or ModelTransformation tags)");
  }
  if (!(t.dx > 0) || !(t.dy < 0) || ![t.x0, t.y0, t.dx, t.dy].every(Number.isFinite))
    throw new InputFileError(path, `transforms other than north-up are not supported (cell size ${t.dx} x ${t.dy}): north-up only`);
  const pixelIsPoint = keys?.GTRasterTypeGeoKey === 2;
  if (pixelIsPoint) t = { ...t, x0: t.x0 - t.dx / 2, y0: t.y0 - t.dy / 2 };
  return { transform: t, pixelIsPoint };
}
