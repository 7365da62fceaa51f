import type { CrsInfo, GeoTransform, VerticalDatum } from "./grid.js";
import type { VerticalOverrides } from "./crs.js";
import type { HttpOptions } from "./remote.js";
import { openSources } from "./open.js";

export { demHandles, remoteFailure } from "./tiffSource.js";

export { MAX_SIDE_CELLS, MAX_CELLS } from "./limits.js";

/** An opened DEM: header facts only, no cells decoded. Close it when done. */
export interface DemSource {
  path: string;
  width: number;
  height: number;
  /** Number of bands (samples per pixel). */
  bands: number;
  /** The band heights are read from (1-based). */
  band: number;
  /** Corner-based north-up transform (pixel-is-point files already shifted by half a cell). */
  transform: GeoTransform;
  crs: CrsInfo;
  /** True when the file declares pixel-is-point (GTRasterTypeGeoKey = 2). */
  pixelIsPoint: boolean;
  tiled: boolean;
  /** Tile or strip size in cells. */
  blockWidth: number;
  blockHeight: number;
  compression: string;
  compressionCode: number;
  predictor: number;
  sampleFormat: "int" | "uint" | "float";
  bitsPerSample: number;
  /** Raw nodata value from GDAL_NODATA (NaN allowed), or null. */
  nodata: number | null;
  /** GDAL scale/offset: value = raw * scale + offset (in the vertical unit). */
  scale: number;
  offset: number;
  verticalUnit: string;
  /** Metres per vertical unit. */
  verticalUnitM: number;
  verticalDatum: VerticalDatum;
  /** Declared vertical CRS (e.g. "EGM96 height"), or null. */
  verticalCrsName: string | null;
  verticalEpsg: number | null;
  /** Reduced-resolution images (overviews) in the file. */
  overviewCount: number;
  /** Things the user should know (undeclared vertical datum, assumed units...). */
  warnings: string[];
  close(): Promise<void>;
}

/** Options of openDem. */
export interface OpenDemOptions extends VerticalOverrides {
  /** Band to read heights from, 1-based (default 1). */
  band?: number;
  /** Time-out, retries and block cache of sources read over HTTP(S). */
  http?: HttpOptions;
}

/**
 * Opens a DEM and reads its header only (no cell is decoded). `spec` is one source or a
 * list of them; a source is a GeoTIFF file, an http(s) URL of a GeoTIFF (read by range
 * requests), a folder (every .tif/.tiff in it, by name) or a GDAL VRT mosaic. One GeoTIFF
 * comes back as itself; anything else as a mosaic on one grid (see mosaic.ts), where a
 * later source wins over an earlier one. Bad input is refused with one-line
 * InputFileErrors (not a TIFF, truncated, no georeferencing, rotated, absurd size,
 * unknown CRS, a VRT kind other than a mosaic, a server without Range support...).
 * @example
 * const dem = await openDem("fixtures/gdal/hills_utm33_f32.tif");
 * dem.crs.epsg; // 32633
 * await dem.close();
 * const tiles = await openDem(["fixtures/mosaic/tiles/hills_a_nw.tif", "fixtures/mosaic/tiles/hills_b_ne.tif"]);
 */
export async function openDem(spec: string | readonly string[], opts: OpenDemOptions = {}): Promise<DemSource> {
  return openSources(spec, opts);
}

