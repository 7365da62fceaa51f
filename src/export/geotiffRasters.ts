/**
 * gsd.tif (Float32, cm/px), images.tif (UInt16 image count) and flags.tif
 * (UInt16 bitmask, see assess/flags.ts) on the assessment grid, written with
 * geotiff.js's writer (uncompressed, one strip).
 *
 * Georeferencing follows the GeoTIFF 1.0 spec: ModelTiepointTag and
 * ModelPixelScaleTag for the north-up grid, RasterPixelIsArea, and the CRS as
 * an EPSG code in ProjectedCSTypeGeoKey (or GeographicTypeGeoKey). A CRS
 * without an EPSG code is written as a user-defined key set, mapped from the
 * proj4 string for the transverse Mercator family (tmerc, utm), the
 * projections a local metric frame uses. geotiff.js 3.0.5 only knows the
 * value types of a few GeoKeys (not ProjCoordTransGeoKey or the projection
 * parameters) and silently drops the others, so we encode the GeoKey
 * directory ourselves (GeoTIFF 1.0, 2.4) and hand it to the writer.
 * Nodata is GDAL's GDAL_NODATA tag (42113): NaN for gsd.tif, 65535 and 255
 * (values the data cannot take) for the others.
 */
import { writeArrayBuffer, type GeotiffWriterMetadata } from "geotiff";
import type { CrsInfo, GeoTransform } from "../dem/grid.js";
import type { AssessmentRasters } from "../assess/types.js";

export const IMAGES_NODATA = 65535;
/** 255 would set both "coarser" (1) and "finer" (2), which no cell can be: safe as nodata whatever bits are in use. */
export const FLAGS_NODATA = 255;

export type RasterCrs = Pick<CrsInfo, "epsg" | "proj4" | "geographic"> & { name?: string };

export interface AssessmentTiffs {
  "gsd.tif": ArrayBuffer;
  "images.tif": ArrayBuffer;
  "flags.tif": ArrayBuffer;
}

/**
 * The three assessment rasters as GeoTIFF bytes, nodata outside the site.
 *
 * @example
 *   const tiffs = assessmentGeoTiffs(assessment.rasters, dem.crs);
 *   await writeOutputSet(out, Object.entries(tiffs).map(([name, data]) => ({ name, data })));
 */
export function assessmentGeoTiffs(r: AssessmentRasters, crs: RasterCrs): AssessmentTiffs {
  return {
    "gsd.tif": assessmentGeoTiff(r, crs, "gsd.tif"),
    "images.tif": assessmentGeoTiff(r, crs, "images.tif"),
    "flags.tif": assessmentGeoTiff(r, crs, "flags.tif"),
  };
}

/**
 * One of the three assessment rasters (so a writer can make them one at a time).
 *
 * @example assessmentGeoTiff(assessment.rasters, dem.crs, "gsd.tif")
 */
export function assessmentGeoTiff(r: AssessmentRasters, crs: RasterCrs, which: keyof AssessmentTiffs): ArrayBuffer {
  const n = r.width * r.height;
  const grid = { width: r.width, height: r.height, transform: r.transform };
  const { inSite } = r;
  if (which === "gsd.tif") {
    const meta = rasterMeta(grid, crs, "nan");
    const shell = tiffShell(new Float32Array(1), n, meta);
    if (LITTLE_ENDIAN_HOST && shell.offset % 4 === 0) {
      // Mask and byte swap straight into the file: one pass, no intermediate arrays.
      const dst = new Uint32Array(shell.out.buffer, shell.offset, n);
      const g = r.gsdCm;
      const bits = new Uint32Array(g.buffer, g.byteOffset, n);
      for (let i = 0; i < n; i++) {
        const v = bits[i];
        dst[i] = inSite[i] === 1 && g[i] === g[i] ? bswap32(v) : NAN_F32_SWAPPED;
      }
      return shell.out.buffer as ArrayBuffer;
    }
    const gsd = new Float32Array(n);
    for (let i = 0; i < n; i++) gsd[i] = inSite[i] === 1 ? r.gsdCm[i] : NaN;
    return rasterGeoTiff(gsd, grid, crs, "nan");
  }
  if (which === "images.tif") return uint16GeoTiff(r.images, inSite, IMAGES_NODATA, grid, crs);
  return uint16GeoTiff(r.flags, inSite, FLAGS_NODATA, grid, crs);
}

/**
 * A UInt16 raster: site cells' values (capped below nodata), nodata elsewhere;
 * on a little-endian host masked and byte-swapped straight into the file.
 */
function uint16GeoTiff(values: Uint16Array, inSite: Uint8Array, nodata: number, grid: Parameters<typeof rasterMeta>[0], crs: Parameters<typeof rasterMeta>[1]): ArrayBuffer {
  const n = values.length;
  const shell = tiffShell(new Uint16Array(1), n, rasterMeta(grid, crs, String(nodata)));
  if (LITTLE_ENDIAN_HOST && shell.offset % 2 === 0) {
    const dst = new Uint16Array(shell.out.buffer, shell.offset, n);
    for (let i = 0; i < n; i++) {
      const v = inSite[i] === 1 ? Math.min(values[i], nodata - 1) : nodata;
      dst[i] = ((v & 0xff) << 8) | (v >>> 8);
    }
    return shell.out.buffer as ArrayBuffer;
  }
  const out = new Uint16Array(n);
  for (let i = 0; i < n; i++) out[i] = inSite[i] === 1 ? Math.min(values[i], nodata - 1) : nodata;
  return rasterGeoTiff(out, grid, crs, String(nodata));
}

/** Float32 NaN as JavaScript stores it (0x7fc00000), byte-swapped. */
const NAN_F32_SWAPPED = 0x0000c07f;

function bswap32(v: number): number {
  return ((v << 24) | ((v & 0xff00) << 8) | ((v >>> 8) & 0xff00) | (v >>> 24)) >>> 0;
}

/**
 * One single-band GeoTIFF. The sample type follows the array (Float32Array
 * -> Float32, Uint16Array -> UInt16, Uint8Array -> Byte).
 *
 * @example rasterGeoTiff(new Float32Array(4), { width: 2, height: 2, transform: { x0: 0, y0: 2, dx: 1, dy: -1 } }, { epsg: 32633, proj4: "", geographic: false }, "nan")
 */
export function rasterGeoTiff(
  values: Float32Array | Uint16Array | Uint8Array,
  grid: { width: number; height: number; transform: GeoTransform },
  crs: RasterCrs,
  nodata?: string,
): ArrayBuffer {
  if (values.length !== grid.width * grid.height) throw new Error("raster size does not match its grid");
  return withPixels(values, rasterMeta(grid, crs, nodata));
}

/** The writer's metadata for one single-band raster on `grid` (georeferencing, CRS keys, nodata). */
function rasterMeta(
  grid: { width: number; height: number; transform: GeoTransform },
  crs: RasterCrs,
  nodata?: string,
): GeotiffWriterMetadata & Record<string, unknown> {
  const t = grid.transform;
  const meta: GeotiffWriterMetadata & Record<string, unknown> = {
    width: grid.width,
    height: grid.height,
    ModelPixelScale: [t.dx, -t.dy, 0],
    ModelTiepoint: [0, 0, 0, t.x0, t.y0, 0],
    ...encodeGeoKeys({
      // GeoTIFF 1.0, 6.3.1.2: RasterPixelIsArea (the grid's corners are cell corners).
      GTRasterTypeGeoKey: 1,
      ...crsGeoKeys(crs),
    }),
    // Present only so the writer does not add its default WGS84 keys; the directory above is what is written.
    ProjectedCSTypeGeoKey: 0,
  };
  if (nodata !== undefined) meta.GDAL_NODATA = nodata;
  return meta;
}

/**
 * geotiff.js 3.0.5 encodes pixels one by one through a fresh DataView each
 * (about 1 µs a pixel: 18 s for 4000 x 4000), so we let it write the header
 * for a one-pixel stand-in with the real sizes declared, then append the
 * pixels ourselves, big-endian like its header ("MM"), in one pass.
 */
function withPixels(values: Float32Array | Uint16Array | Uint8Array, meta: GeotiffWriterMetadata & Record<string, unknown>): ArrayBuffer {
  const { out, offset } = tiffShell(values.subarray(0, 1), values.length, meta);
  const size = values.BYTES_PER_ELEMENT;
  if (size === 1) out.set(values, offset);
  else if (LITTLE_ENDIAN_HOST) out.set(bigEndianBytes(values as Float32Array | Uint16Array), offset);
  else {
    const view = new DataView(out.buffer, offset);
    if (values instanceof Float32Array) for (let i = 0; i < values.length; i++) view.setFloat32(4 * i, values[i], false);
    else for (let i = 0; i < values.length; i++) view.setUint16(2 * i, values[i], false);
  }
  return out.buffer;
}

/**
 * The file for `n` samples of `first`'s type: geotiff.js's header, written for
 * a one-pixel stand-in with the real sizes declared, and room for the pixels
 * from `offset` (where the writer put its stand-in: the strip offset).
 */
function tiffShell(
  first: Float32Array | Uint16Array | Uint8Array,
  n: number,
  meta: GeotiffWriterMetadata & Record<string, unknown>,
): { out: Uint8Array<ArrayBuffer>; offset: number } {
  const size = first.BYTES_PER_ELEMENT;
  const head = new Uint8Array(
    writeArrayBuffer(first, {
      ...meta,
      SamplesPerPixel: 1,
      BitsPerSample: [8 * size],
      SampleFormat: [first instanceof Float32Array ? 3 : 1],
      StripByteCounts: [n * size],
    }),
  );
  const offset = head.length - size;
  const out = new Uint8Array(offset + n * size);
  out.set(head.subarray(0, offset));
  return { out, offset };
}

/** True on the usual little-endian hosts, where typed arrays hold their samples low byte first. */
const LITTLE_ENDIAN_HOST = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/**
 * The samples' bytes in big-endian order, on a little-endian host: a byte swap of
 * each 32- or 16-bit word as an integer (bit-exact, NaN payloads included), many
 * times faster than one DataView call per sample.
 * @example bigEndianBytes(new Uint16Array([0x0102])) // Uint8Array [1, 2]
 */
function bigEndianBytes(values: Float32Array | Uint16Array): Uint8Array {
  const n = values.length;
  if (values instanceof Float32Array) {
    const src = new Uint32Array(values.buffer, values.byteOffset, n);
    const dst = new Uint32Array(n);
    for (let i = 0; i < n; i++) {
      const v = src[i];
      dst[i] = (v << 24) | ((v & 0xff00) << 8) | ((v >>> 8) & 0xff00) | (v >>> 24);
    }
    return new Uint8Array(dst.buffer);
  }
  const dst = new Uint16Array(n);
  for (let i = 0; i < n; i++) {
    const v = values[i];
    dst[i] = ((v & 0xff) << 8) | (v >>> 8);
  }
  return new Uint8Array(dst.buffer);
}

/** GeoKeys for a CRS: EPSG code when known, else a user-defined transverse Mercator key set. */
export function crsGeoKeys(crs: RasterCrs): Record<string, number | string | number[]> {
  if (crs.epsg !== null) {
    return crs.geographic
      ? { GTModelTypeGeoKey: 2, GeographicTypeGeoKey: crs.epsg }
      : { GTModelTypeGeoKey: 1, ProjectedCSTypeGeoKey: crs.epsg, ...(crs.name ? { GTCitationGeoKey: crs.name } : {}) };
  }
  // A user-defined geographic CRS (a DEM's own degrees, written on its own cells).
  if (crs.geographic) return { GTModelTypeGeoKey: 2, ...geographicKeys(parseProj4(crs.proj4)) };
  return userDefinedKeys(crs);
}

const USER_DEFINED = 32767;

/** GeoKey codes and value types, GeoTIFF 1.0 spec 6.2. */
const GEOKEYS: Record<string, [number, "SHORT" | "DOUBLE" | "ASCII"]> = {
  GTModelTypeGeoKey: [1024, "SHORT"],
  GTRasterTypeGeoKey: [1025, "SHORT"],
  GTCitationGeoKey: [1026, "ASCII"],
  GeographicTypeGeoKey: [2048, "SHORT"],
  GeogCitationGeoKey: [2049, "ASCII"],
  GeogGeodeticDatumGeoKey: [2050, "SHORT"],
  GeogPrimeMeridianGeoKey: [2051, "SHORT"],
  GeogAngularUnitsGeoKey: [2054, "SHORT"],
  GeogEllipsoidGeoKey: [2056, "SHORT"],
  GeogSemiMajorAxisGeoKey: [2057, "DOUBLE"],
  GeogInvFlatteningGeoKey: [2059, "DOUBLE"],
  ProjectedCSTypeGeoKey: [3072, "SHORT"],
  PCSCitationGeoKey: [3073, "ASCII"],
  ProjectionGeoKey: [3074, "SHORT"],
  ProjCoordTransGeoKey: [3075, "SHORT"],
  ProjLinearUnitsGeoKey: [3076, "SHORT"],
  ProjLinearUnitSizeGeoKey: [3077, "DOUBLE"],
  ProjNatOriginLongGeoKey: [3080, "DOUBLE"],
  ProjNatOriginLatGeoKey: [3081, "DOUBLE"],
  ProjFalseEastingGeoKey: [3082, "DOUBLE"],
  ProjFalseNorthingGeoKey: [3083, "DOUBLE"],
  ProjScaleAtNatOriginGeoKey: [3092, "DOUBLE"],
};

/**
 * The GeoKeyDirectoryTag with its GeoDoubleParamsTag and GeoAsciiParamsTag
 * (GeoTIFF 1.0, 2.4): header [1, 1, 0, count], then per key, in key order,
 * [id, location tag (0: value inline), count, value or offset]. ASCII values
 * end with "|".
 */
export function encodeGeoKeys(keys: Record<string, number | string | number[]>): {
  GeoKeyDirectory: number[];
  GeoDoubleParams?: number[];
  GeoAsciiParams?: string;
} {
  const entries = Object.entries(keys)
    .map(([name, value]) => {
      const def = GEOKEYS[name];
      if (!def) throw new Error(`GeoKey ${name} not mapped`);
      return { id: def[0], type: def[1], value };
    })
    .sort((a, b) => a.id - b.id);
  const dir = [1, 1, 0, entries.length];
  const doubles: number[] = [];
  let ascii = "";
  for (const e of entries) {
    if (e.type === "SHORT") dir.push(e.id, 0, 1, Number(e.value));
    else if (e.type === "DOUBLE") {
      const v = Array.isArray(e.value) ? e.value : [Number(e.value)];
      dir.push(e.id, 34736, v.length, doubles.length);
      doubles.push(...v);
    } else {
      const text = String(e.value).replace(/\|/g, "/") + "|";
      dir.push(e.id, 34737, text.length, ascii.length);
      ascii += text;
    }
  }
  return { GeoKeyDirectory: dir, ...(doubles.length ? { GeoDoubleParams: doubles } : {}), ...(ascii ? { GeoAsciiParams: ascii } : {}) };
}

function userDefinedKeys(crs: RasterCrs): Record<string, number | string | number[]> {
  const p = parseProj4(crs.proj4);
  let lon0: number;
  let k0: number;
  let x0: number;
  let y0: number;
  if (p.proj === "utm") {
    const zone = Number(p.zone);
    if (!(zone >= 1 && zone <= 60)) throw new Error(`UTM zone missing in ${crs.proj4}`);
    lon0 = zone * 6 - 183;
    k0 = 0.9996;
    x0 = 500000;
    y0 = "south" in p ? 10000000 : 0;
  } else if (p.proj === "tmerc") {
    lon0 = num(p.lon_0, 0);
    k0 = num(p.k_0 ?? p.k, 1);
    x0 = num(p.x_0, 0);
    y0 = num(p.y_0, 0);
  } else {
    throw new Error(`cannot write CRS without EPSG code to GeoTIFF (projection ${p.proj ?? "?"} not mapped): ${crs.proj4}`);
  }
  const toMeter = p.to_meter !== undefined ? Number(p.to_meter) : unitToMeter(p.units ?? "m");
  return {
    GTModelTypeGeoKey: 1,
    GTCitationGeoKey: crs.name ?? "user-defined transverse Mercator",
    ...geographicKeys(p),
    ProjectedCSTypeGeoKey: USER_DEFINED,
    ProjectionGeoKey: USER_DEFINED,
    // GeoTIFF 1.0, 6.3.3.3: CT_TransverseMercator = 1.
    ProjCoordTransGeoKey: 1,
    ...(toMeter === 1
      ? { ProjLinearUnitsGeoKey: 9001 }
      : Math.abs(toMeter - 0.3048006096012192) < 1e-12
        ? { ProjLinearUnitsGeoKey: 9003 }
        : Math.abs(toMeter - 0.3048) < 1e-12
          ? { ProjLinearUnitsGeoKey: 9002 }
          : { ProjLinearUnitsGeoKey: USER_DEFINED, ProjLinearUnitSizeGeoKey: toMeter }),
    ProjNatOriginLongGeoKey: lon0,
    ProjNatOriginLatGeoKey: num(p.lat_0, 0),
    ProjFalseEastingGeoKey: x0,
    ProjFalseNorthingGeoKey: y0,
    ProjScaleAtNatOriginGeoKey: k0,
  };
}

function geographicKeys(p: Record<string, string>): Record<string, number | string> {
  const e = (p.datum === "WGS84" ? "WGS84" : p.ellps) ?? "WGS84";
  if (e === "WGS84" && (p.datum === "WGS84" || p.towgs84 === undefined || /^0(,0)*$/.test(p.towgs84))) {
    return { GeographicTypeGeoKey: 4326 };
  }
  // Ellipsoid parameters from the defining documents (WGS84: NIMA TR8350.2; GRS80: Moritz 1980), from memory.
  const ellipsoids: Record<string, [number, number]> = {
    WGS84: [6378137, 298.257223563],
    GRS80: [6378137, 298.257222101],
    intl: [6378388, 297],
    bessel: [6377397.155, 299.1528128],
  };
  const a = p.a !== undefined ? Number(p.a) : ellipsoids[e]?.[0];
  const rf = p.rf !== undefined ? Number(p.rf) : p.b !== undefined && a !== undefined ? a / (a - Number(p.b)) : ellipsoids[e]?.[1];
  if (a === undefined || rf === undefined || !Number.isFinite(a) || !Number.isFinite(rf)) {
    throw new Error(`cannot write the ellipsoid ${e} to GeoTIFF`);
  }
  return {
    GeographicTypeGeoKey: USER_DEFINED,
    GeogGeodeticDatumGeoKey: USER_DEFINED,
    GeogEllipsoidGeoKey: USER_DEFINED,
    GeogSemiMajorAxisGeoKey: a,
    GeogInvFlatteningGeoKey: rf,
    // Greenwich, degrees (EPSG 8901, 9102).
    GeogPrimeMeridianGeoKey: 8901,
    GeogAngularUnitsGeoKey: 9102,
  };
}

function parseProj4(def: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const tok of def.trim().split(/\s+/)) {
    const m = /^\+([a-z_0-9]+)(?:=(.*))?$/i.exec(tok);
    if (m) out[m[1]] = m[2] ?? "";
  }
  return out;
}

function num(v: string | undefined, dflt: number): number {
  return v === undefined ? dflt : Number(v);
}

function unitToMeter(u: string): number {
  if (u === "m") return 1;
  if (u === "us-ft") return 0.3048006096012192;
  if (u === "ft") return 0.3048;
  if (u === "km") return 1000;
  throw new Error(`unit ${u} not mapped for GeoTIFF`);
}
