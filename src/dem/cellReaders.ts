import type { DemSource } from "./source.js";
import type { CellWindow } from "./window.js";

/** Heights in metres (NaN where nodata) of a window, row-major. */
export interface CellBlock {
  heights: Float32Array;
}

/** Reads a window of a source that is not one GeoTIFF (a mosaic). */
export type CellReader = (win: CellWindow) => Promise<CellBlock>;

// Kept beside the source rather than on it, so DemSource stays a plain record of header facts.
const readers = new WeakMap<DemSource, CellReader>();

/**
 * Registers how a source's cells are read (readCells asks here before the GeoTIFF path).
 * @example setCellReader(mosaic, (win) => readMosaicCells(state, win))
 */
export function setCellReader(source: DemSource, reader: CellReader): void {
  readers.set(source, reader);
}

/**
 * The registered reader of a source, or undefined for a plain GeoTIFF.
 * @example const read = cellReaderOf(dem); if (read) await read(win);
 */
export function cellReaderOf(source: DemSource): CellReader | undefined {
  return readers.get(source);
}
