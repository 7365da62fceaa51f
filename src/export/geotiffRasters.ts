/**
 * gsd.tif (Float32, cm/px), images.tif (UInt16 image count) and flags.tif
 * (UInt16 bitmask, see assess/flags.ts) on the assessment grid, as cloud-optimized
 * GeoTIFFs (cog.ts: 512 x 512 tiles, overviews, GDAL's COG layout).
 *
 * Overviews (each half the size of the one before, until the image fits one tile):
 *   gsd.tif     mean of the full-resolution cells with a value in the block (a GSD
 *               zoomed out is the typical GSD there; nodata ignored);
 *   images.tif  nearest-neighbour decimation, preferring a cell with a value (counts stay
 *               counts the plan gives somewhere);
 *   flags.tif   bitwise OR of the block's cells with a value, so a flagged cell stays
 *               visible at every zoom (decimation would drop three in four lone flags).
 * Compression: Deflate without predictor for image counts and flags (runs of equal values:
 * on the 4 km2 benchmark the horizontal predictor made counts 7 % smaller for a third more
 * time, and flags larger); none for gsd.tif (GSD_COMPRESSION).
 *
 * Georeferencing follows the GeoTIFF 1.0 spec: ModelTiepointTag and
 * ModelPixelScaleTag for the north-up grid, RasterPixelIsArea, and the CRS as
 * an EPSG code in ProjectedCSTypeGeoKey (or GeographicTypeGeoKey). A CRS
 * without an EPSG code is written as a user-defined key set, mapped from the
 * proj4 string for the transverse Mercator family (tmerc, utm), the
 * projections a local metric frame uses. We encode the GeoKey directory
 * ourselves (GeoTIFF 1.0, 2.4).
 * Nodata is GDAL's GDAL_NODATA tag (42113): NaN for gsd.tif, 65535 and 255
 * (values the data cannot take) for the others. Band description and unit are
 * GDAL's GDAL_METADATA tag (42112), the XML `gdal_edit.py -units` and a band
 * description write; flags.tif is a palette image (flagPalette.ts) and names its bits
 * there too (FLAG_1 ... FLAG_256).
 */
import type { CrsInfo, GeoTransform } from "../dem/grid.js";
import type { AssessmentRasters } from "../assess/types.js";
import { ASSESSMENT_FLAG_KINDS, FLAG_FINE } from "../assess/flags.js";
import { writeCog, type CogImage } from "./cog.js";
import type { Predictor } from "./cogTiles.js";
import { flagColorMap } from "./flagPalette.js";
import { meanOverviews, nearestOverview, orOverview, overviewSizes } from "./overviews.js";
import { TAG, type TiffField } from "./tiffTags.js";
import { escapeXml } from "./xml.js";

export const IMAGES_NODATA = 65535;
/** 255 would set both "coarser" (1) and "finer" (2), which no cell can be: safe as nodata whatever bits are in use. */
export const FLAGS_NODATA = 255;
/** Tile width and height: the default BLOCKSIZE of GDAL's COG driver. */
export const COG_TILE_SIZE = 512;

export type RasterCrs = Pick<CrsInfo, "epsg" | "proj4" | "geographic"> & { name?: string };

export interface AssessmentTiffs {
  "gsd.tif": ArrayBuffer;
  "images.tif": ArrayBuffer;
  "flags.tif": ArrayBuffer;
}

/**
 * gsd.tif is stored without compression. Measured on the 4 km2 benchmark (4557 x 4558
 * cells, four overviews): Deflate with predictor 3 shrinks it from 126 to 31 MB but costs
 * about 1.3 s of CPU more (the low bytes of each GSD value are noise to zlib), three times
 * what the single-strip writer took for gsd.tif; image counts and flags shrink from 63 MB
 * each to 3.7 and 0.7 MB for about 0.2 s together, so they are compressed. For a smaller
 * gsd.tif set { compression: "deflate", predictor: 3 } here.
 */
const GSD_COMPRESSION = { compression: "none", predictor: 1 } as const;

type Grid = { width: number; height: number; transform: GeoTransform };

/** Band description, unit and further band metadata items, as GDAL_METADATA holds them. */
export interface BandMetadata {
  description?: string;
  unit?: string;
  items?: Record<string, string>;
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
  const { width, height, inSite } = r;
  const n = width * height;
  const grid = { width, height, transform: r.transform };
  const levels = overviewSizes(width, height, COG_TILE_SIZE).length;
  if (which === "gsd.tif") {
    const gsd = new Float32Array(n);
    const g = r.gsdCm;
    for (let i = 0; i < n; i++) gsd[i] = inSite[i] === 1 ? g[i] : NaN;
    const overviews = meanOverviews(gsd, width, height, levels);
    return cogGeoTiff([{ width, height, values: gsd }, ...overviews], grid, crs, {
      nodata: NaN,
      ...GSD_COMPRESSION,
      band: { description: "nadir GSD from the most nadir image, cm per image pixel", unit: "cm" },
    });
  }
  if (which === "images.tif") {
    const images = new Uint16Array(n);
    const v = r.images;
    // Counts saturate just below nodata.
    for (let i = 0; i < n; i++) images[i] = inSite[i] === 1 ? Math.min(v[i], IMAGES_NODATA - 1) : IMAGES_NODATA;
    const levelsOut = halvings({ width, height, values: images }, levels, (l) => nearestOverview(l.values, l.width, l.height, IMAGES_NODATA));
    return cogGeoTiff(levelsOut, grid, crs, {
      nodata: IMAGES_NODATA,
      compression: "deflate",
      predictor: 1,
      band: { description: "number of images covering the cell" },
    });
  }
  const flags = new Uint16Array(n);
  const f = r.flags;
  // No cell can be both coarser and finer, so no cell is 255; should one be, it keeps its other bits.
  for (let i = 0; i < n; i++) flags[i] = inSite[i] !== 1 ? FLAGS_NODATA : f[i] === FLAGS_NODATA ? f[i] & ~FLAG_FINE : f[i];
  const levelsOut = halvings({ width, height, values: flags }, levels, (l) => orOverview(l.values, l.width, l.height, FLAGS_NODATA, FLAG_FINE));
  const items: Record<string, string> = {};
  for (const k of ASSESSMENT_FLAG_KINDS) items[`FLAG_${k.bit}`] = k.label;
  return cogGeoTiff(levelsOut, grid, crs, {
    nodata: FLAGS_NODATA,
    compression: "deflate",
    predictor: 1,
    colorMap: flagColorMap(FLAGS_NODATA),
    band: { description: "assessment flag bits: a cell holds the sum of the values of its FLAG_n items", items },
  });
}

/** The image and `count` overviews, each made from the one before by `reduce`. */
function halvings(first: { width: number; height: number; values: Uint16Array }, count: number, reduce: (l: { width: number; height: number; values: Uint16Array }) => Uint16Array): CogImage[] {
  const out = [first];
  for (let k = 0; k < count; k++) {
    const prev = out[out.length - 1];
    out.push({ width: (prev.width + 1) >> 1, height: (prev.height + 1) >> 1, values: reduce(prev) });
  }
  return out;
}

/**
 * One single-band GeoTIFF, tiled and Deflate-compressed in the COG layout, without
 * overviews (the assessment rasters get theirs from assessmentGeoTiff). The sample type
 * follows the array (Float32Array -> Float32, Uint16Array -> UInt16, Uint8Array -> Byte).
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
  const nd = nodata === undefined ? undefined : Number(nodata);
  return cogGeoTiff([{ width: grid.width, height: grid.height, values }], grid, crs, {
    nodata: nd,
    compression: "deflate",
    predictor: values instanceof Float32Array ? 3 : 2,
  });
}

/** A COG of `images` (full resolution first) with georeferencing, nodata and band metadata. */
function cogGeoTiff(
  images: CogImage[],
  grid: Grid,
  crs: RasterCrs,
  o: { nodata?: number; compression: "deflate" | "none"; predictor: Predictor; colorMap?: Uint16Array; band?: BandMetadata },
): ArrayBuffer {
  const common: TiffField[] = o.nodata === undefined ? [] : [{ tag: TAG.GdalNodata, type: "ASCII", values: gdalNodataText(o.nodata) }];
  const main = [...georeferenceFields(grid, crs)];
  const xml = o.band ? gdalMetadataXml(o.band) : undefined;
  if (xml) main.push({ tag: TAG.GdalMetadata, type: "ASCII", values: xml });
  return writeCog(images, {
    tileSize: COG_TILE_SIZE,
    compression: o.compression,
    predictor: o.predictor,
    fill: o.nodata ?? 0,
    mainFields: main,
    commonFields: common,
    colorMap: o.colorMap,
  });
}

/**
 * GDAL_NODATA's text: the value as GDAL prints it ("nan" for NaN, which GDAL reads back as NaN).
 * @example gdalNodataText(NaN) // "nan"
 */
export function gdalNodataText(v: number): string {
  return Number.isNaN(v) ? "nan" : String(v);
}

/**
 * The GDAL_METADATA XML for band 1 (sample 0) as GDAL itself writes it (a test compares with
 * GDAL's copy of the file): further items as plain band metadata, sorted by name ignoring
 * case, then the unit and the description with the roles GDAL gives them (`gdal_edit.py
 * -units`, a band description).
 * @example gdalMetadataXml({ unit: "cm" }) // '<GDALMetadata>\n  <Item name="UNITTYPE" sample="0" role="unittype">cm</Item>\n</GDALMetadata>\n'
 */
export function gdalMetadataXml(band: BandMetadata): string | undefined {
  const lines: string[] = [];
  const items = Object.entries(band.items ?? {}).sort(([a], [b]) => (a.toLowerCase() < b.toLowerCase() ? -1 : a.toLowerCase() > b.toLowerCase() ? 1 : 0));
  for (const [name, value] of items) lines.push(`  <Item name="${escapeXml(name)}" sample="0">${escapeXml(value)}</Item>`);
  if (band.unit) lines.push(`  <Item name="UNITTYPE" sample="0" role="unittype">${escapeXml(band.unit)}</Item>`);
  if (band.description) lines.push(`  <Item name="DESCRIPTION" sample="0" role="description">${escapeXml(band.description)}</Item>`);
  return lines.length ? `<GDALMetadata>\n${lines.join("\n")}\n</GDALMetadata>\n` : undefined;
}

/** ModelPixelScale, ModelTiepoint and the GeoKey directory of a north-up grid (GeoTIFF 1.0). */
function georeferenceFields(grid: Grid, crs: RasterCrs): TiffField[] {
  const t = grid.transform;
  const keys = encodeGeoKeys({
    // GeoTIFF 1.0, 6.3.1.2: RasterPixelIsArea (the grid's corners are cell corners).
    GTRasterTypeGeoKey: 1,
    ...crsGeoKeys(crs),
  });
  const fields: TiffField[] = [
    { tag: TAG.ModelPixelScale, type: "DOUBLE", values: [t.dx, -t.dy, 0] },
    { tag: TAG.ModelTiepoint, type: "DOUBLE", values: [0, 0, 0, t.x0, t.y0, 0] },
    { tag: TAG.GeoKeyDirectory, type: "SHORT", values: keys.GeoKeyDirectory },
  ];
  if (keys.GeoDoubleParams) fields.push({ tag: TAG.GeoDoubleParams, type: "DOUBLE", values: keys.GeoDoubleParams });
  if (keys.GeoAsciiParams) fields.push({ tag: TAG.GeoAsciiParams, type: "ASCII", values: keys.GeoAsciiParams });
  return fields;
}

/**
 * GeoKeys for a CRS: EPSG code when known, else a user-defined transverse Mercator key set.
 * @example crsGeoKeys({ epsg: 4326, proj4: "", geographic: true }) // { GTModelTypeGeoKey: 2, GeographicTypeGeoKey: 4326 }
 */
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
 * @example encodeGeoKeys({ GTModelTypeGeoKey: 1 }).GeoKeyDirectory // [1, 1, 0, 1, 1024, 0, 1, 1]
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
