import { InputError, InputFileError } from "../errors.js";
import type { DemGrid } from "./grid.js";
import { demHandles, remoteFailure, type DemSource } from "./source.js";
import { cellReaderOf } from "./cellReaders.js";
import { cellSizeMetres, metresPerDegree } from "./cellsize.js";
import { transformBounds, type Bounds } from "./bounds.js";
import { decodeWindowDirect } from "./tiles.js";

/** Options of readWindow. */
export interface ReadWindowOptions {
  /** CRS of the box: a proj4 string, or "native" (the DEM's own CRS; default). */
  crs?: string;
  /** Extra ground distance added on every side, metres (default 0). */
  marginM?: number;
  /** Threads the read may use (1: this one only; more: the blocks shared with a worker thread, each taking the next; default: that on large windows, see splitAllowed). */
  threads?: number;
}

/** A window in cell indices: columns [col0, col1), rows [row0, row1). */
export interface CellWindow {
  col0: number;
  row0: number;
  col1: number;
  row1: number;
}

/**
 * Cells of `source` covering a box in its native CRS, grown by a margin in metres
 * and clipped to the raster. Null when the box misses the raster.
 * @example windowForBounds(dem, { west: 500100, south: 5200100, east: 500200, north: 5200200 }, 5)
 */
export function windowForBounds(source: DemSource, native: Bounds, marginM: number): CellWindow | null {
  const { x0, y0, dx, dy } = source.transform;
  let mx: number, my: number;
  if (source.crs.geographic) {
    const [lonM, latM] = metresPerDegree((native.south + native.north) / 2);
    mx = marginM / lonM;
    my = marginM / latM;
  } else {
    mx = my = marginM / source.crs.linearUnitM;
  }
  const west = native.west - mx, east = native.east + mx, south = native.south - my, north = native.north + my;
  // Any cell the box touches, so that bilinear sampling at the box edge has its neighbours.
  const col0 = Math.max(0, Math.floor((west - x0) / dx));
  const col1 = Math.min(source.width, Math.ceil((east - x0) / dx));
  const row0 = Math.max(0, Math.floor((north - y0) / dy));
  const row1 = Math.min(source.height, Math.ceil((south - y0) / dy));
  if (!(col1 > col0 && row1 > row0)) return null;
  return { col0, row0, col1, row1 };
}

/** The whole raster's extent in its native CRS. */
export function nativeBounds(source: DemSource): Bounds {
  const { x0, y0, dx, dy } = source.transform;
  return { west: x0, north: y0, east: x0 + source.width * dx, south: y0 + source.height * dy };
}

/**
 * Reads the cells under a box (plus a margin) into a DemGrid of heights in metres.
 * Only the strips/tiles that intersect the window are fetched and decoded, each straight
 * into the output. GDAL
 * scale/offset and the vertical unit are applied; nodata, NaN and +-Inf become NaN with valid = 0.
 * @example
 * const dem = await openDem("fixtures/gdal/hills_utm33_f32.tif");
 * const grid = await readWindow(dem, { west: 500100, south: 5200100, east: 500300, north: 5200300 }, { marginM: 10 });
 */
export async function readWindow(source: DemSource, bbox: Bounds, opts: ReadWindowOptions = {}): Promise<DemGrid> {
  const marginM = opts.marginM ?? 0;
  if (!(marginM >= 0) || !Number.isFinite(marginM)) throw new InputError("marginM", opts.marginM, "a finite number of metres >= 0");
  for (const k of ["west", "south", "east", "north"] as const)
    if (!Number.isFinite(bbox[k])) throw new InputError(`bbox.${k}`, bbox[k], "a finite coordinate");
  if (bbox.east < bbox.west || bbox.north < bbox.south) throw new InputError("bbox", bbox, "west <= east and south <= north");
  const crs = opts.crs ?? "native";
  const native = crs === "native" || crs === source.crs.proj4 ? bbox : transformBounds(bbox, crs, source.crs.proj4);
  const win = windowForBounds(source, native, marginM);
  if (!win) {
    const nb = nativeBounds(source);
    throw new InputFileError(source.path, `the requested area (${fmtBox(native)}) lies outside the DEM extent (${fmtBox(nb)}) in its CRS`);
  }
  return readCells(source, win, opts.threads);
}

/**
 * Reads a window given in cell indices (see readWindow for the conversions; `threads` as
 * ReadWindowOptions.threads). A mosaic (several files, a VRT) reads through its own reader,
 * on its own grid.
 * @example const grid = await readCells(dem, { col0: 0, row0: 0, col1: 100, row1: 50 });
 */
export async function readCells(source: DemSource, win: CellWindow, threads?: number): Promise<DemGrid> {
  const width = win.col1 - win.col0;
  const height = win.row1 - win.row0;
  let heights: Float32Array;
  const custom = cellReaderOf(source);
  if (custom) {
    ({ heights } = await custom(win));
  } else {
    const { image } = demHandles(source);
    // Shared memory: the assessment's and the comparison's worker threads read them in place (no copy).
    heights = new Float32Array(new SharedArrayBuffer(4 * width * height));
    if (!(await decodeWindowDirect(source, image, win, heights, undefined, threads))) {
      // General path for layouts the direct decoder does not take (big-endian, JPEG, LERC...).
      let rasters: ArrayLike<number>[];
      try {
        rasters = (await image.readRasters({
          window: [win.col0, win.row0, win.col1, win.row1],
          samples: [source.band - 1],
          interleave: false,
        })) as unknown as ArrayLike<number>[];
      } catch (e) {
        throw remoteFailure(source) ?? e;
      }
      heights = toMetres(rasters[0], source);
    }
  }

  const { x0, y0, dx, dy } = source.transform;
  const transform = { x0: x0 + win.col0 * dx, y0: y0 + win.row0 * dy, dx, dy };
  const centreLat = source.crs.geographic ? transform.y0 + (height * dy) / 2 : NaN;
  return {
    width,
    height,
    heights,
    transform,
    crs: source.crs,
    cellSizeM: cellSizeMetres(dx, dy, source.crs.geographic, source.crs.linearUnitM, centreLat),
    verticalDatum: source.verticalDatum,
    verticalUnit: source.verticalUnit,
  };
}

/**
 * Raw samples to heights in metres: (raw * scale + offset) * metres per vertical unit,
 * NaN where raw equals the nodata value or the height is not finite
 * (NaN, +-Inf): both are nodata, never ground. A Float32 input is
 * converted in place (no second window-sized array).
 */
export function toMetres(raw: ArrayLike<number>, source: Pick<DemSource, "nodata" | "scale" | "offset" | "verticalUnitM" | "sampleFormat" | "bitsPerSample">): Float32Array {
  const n = raw.length;
  const heights = raw instanceof Float32Array ? raw : new Float32Array(n);
  const k = source.scale * source.verticalUnitM;
  const c = source.offset * source.verticalUnitM;
  // Compare in the stored precision: a Float32 nodata of -3.4e38 is not the double -3.4e38.
  const nd = source.nodata === null ? null : source.sampleFormat === "float" && source.bitsPerSample === 32 ? Math.fround(source.nodata) : source.nodata;
  const identity = k === 1 && c === 0;
  for (let i = 0; i < n; i++) {
    const r = raw[i];
    heights[i] = identity ? r : r * k + c;
    // h - h is 0 only for finite numbers: NaN and +-Inf (also a Float64 height that
    // overflows Float32) are nodata. An infinite height is never ground, only the mark
    // of a broken conversion; passing it on would break every bound computed from it.
    const h = heights[i];
    if (r === nd || h - h !== 0) heights[i] = NaN;
  }
  return heights;
}

function fmtBox(b: Bounds): string {
  const f = (v: number) => (Math.abs(v) < 1000 ? v.toFixed(6) : v.toFixed(1));
  return `west ${f(b.west)}, south ${f(b.south)}, east ${f(b.east)}, north ${f(b.north)}`;
}
