#!/usr/bin/env node
// Writes the GDAL-made test fixtures into fixtures/gdal/. Deterministic: the
// terrain is analytic (sum of Gaussian hills on a slope), written as raw
// little-endian samples behind a VRT, then turned into GeoTIFFs by GDAL's own
// gdal_translate with creation options. The loader tests compare our reads of
// these files against gdallocationinfo / gdalinfo, so GDAL is both the writer
// and the reference.
//
// Usage: node scripts/make-gdal-fixtures.mjs   (needs gdal-bin)
import { execFileSync } from "node:child_process";
import { mkdirSync, writeFileSync, readFileSync, rmSync, existsSync } from "node:fs";
import { join, dirname, basename } from "node:path";
import { fileURLToPath } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const out = join(root, "fixtures", "gdal");
const tmp = join(out, ".tmp");
mkdirSync(tmp, { recursive: true });

function gdal(cmd, args) {
  execFileSync(cmd, args, { stdio: ["ignore", "ignore", "inherit"], env: { ...process.env, GDAL_PAM_ENABLED: "NO" } });
}

/**
 * Hilly analytic terrain in metres at normalised coordinates u, v in [0, 1]
 * (u east, v south): a regional slope, two hills, a saddle and a valley.
 */
function terrainM(u, v) {
  const g = (cu, cv, s, a) => a * Math.exp(-((u - cu) ** 2 + (v - cv) ** 2) / (2 * s * s));
  return 300 + 40 * u - 25 * v + g(0.3, 0.35, 0.14, 150) + g(0.72, 0.68, 0.11, 95) - g(0.55, 0.2, 0.08, 35) + g(0.15, 0.85, 0.06, 40);
}

const TYPES = {
  Int16: { bytes: 2, set: (dv, o, x) => dv.setInt16(o, x, true) },
  Int32: { bytes: 4, set: (dv, o, x) => dv.setInt32(o, x, true) },
  Float32: { bytes: 4, set: (dv, o, x) => dv.setFloat32(o, x, true) },
  Float64: { bytes: 8, set: (dv, o, x) => dv.setFloat64(o, x, true) },
};

/**
 * Writes raw bands and a VRT describing them. `value(band, col, row)` gives
 * the stored sample (already scaled / converted to the stored unit).
 */
function rawVrt(name, width, height, type, bands, value) {
  const t = TYPES[type];
  const buf = Buffer.alloc(width * height * t.bytes * bands);
  const dv = new DataView(buf.buffer, buf.byteOffset, buf.byteLength);
  for (let b = 0; b < bands; b++)
    for (let r = 0; r < height; r++)
      for (let c = 0; c < width; c++) t.set(dv, ((b * height + r) * width + c) * t.bytes, value(b, c, r));
  const bin = join(tmp, `${name}.bin`);
  writeFileSync(bin, buf);
  let xml = `<VRTDataset rasterXSize="${width}" rasterYSize="${height}">\n`;
  for (let b = 0; b < bands; b++) {
    xml += `  <VRTRasterBand dataType="${type}" band="${b + 1}" subClass="VRTRawRasterBand">
    <SourceFilename relativetoVRT="1">${basename(bin)}</SourceFilename>
    <ImageOffset>${b * width * height * t.bytes}</ImageOffset>
    <PixelOffset>${t.bytes}</PixelOffset>
    <LineOffset>${width * t.bytes}</LineOffset>
    <ByteOrder>LSB</ByteOrder>
  </VRTRasterBand>\n`;
  }
  xml += `</VRTDataset>\n`;
  const vrt = join(tmp, `${name}.vrt`);
  writeFileSync(vrt, xml);
  return vrt;
}

/** gdal_translate a VRT into fixtures/gdal/<name>.tif with georeferencing and creation options. */
function make(name, { width, height, type, bands = 1, value, srs, ullr, co = [], extra = [] }) {
  const vrt = rawVrt(name, width, height, type, bands, value);
  const dst = join(out, `${name}.tif`);
  rmSync(dst, { force: true });
  const args = ["-q", "-of", "GTiff"];
  if (srs) args.push("-a_srs", srs);
  if (ullr) args.push("-a_ullr", ...ullr.map(String));
  for (const c of co) args.push("-co", c);
  args.push(...extra, vrt, dst);
  gdal("gdal_translate", args);
  return dst;
}

const nodataPatch = (c, r, c0, r0, rad) => (c - c0) ** 2 + (r - r0) ** 2 < rad * rad;

// 1. Hilly fixture for the later stages: UTM 33N (+EGM96 heights), 1000 x 800 cells of 1 m,
//    Float32, 256x256 tiles, Deflate with floating-point predictor. Relief about 150 m.
make("hills_utm33_f32", {
  width: 1000, height: 800, type: "Float32",
  value: (_b, c, r) => Math.round(terrainM((c + 0.5) / 1000, (r + 0.5) / 800) * 100) / 100,
  srs: "EPSG:32633+5773", ullr: [500000, 5200800, 501000, 5200000],
  co: ["TILED=YES", "BLOCKXSIZE=256", "BLOCKYSIZE=256", "COMPRESS=DEFLATE", "PREDICTOR=3", "ZLEVEL=9"],
});

// 2. Hilly fixture in US survey feet: NAD83 / California zone 3 (ftUS) + NAVD88 height (ftUS),
//    600 x 500 cells of 3 ftUS, heights stored in ftUS, striped, LZW, floating-point predictor.
const FTUS_M = 1200 / 3937;
make("hills_ca3_ftus_f32", {
  width: 600, height: 500, type: "Float32",
  value: (_b, c, r) => Math.round((terrainM((c + 0.5) / 600, (r + 0.5) / 500) / FTUS_M) * 100) / 100,
  srs: "EPSG:2227+6360", ullr: [6060000, 2130000, 6061800, 2128500],
  co: ["TILED=NO", "BLOCKYSIZE=32", "COMPRESS=LZW", "PREDICTOR=3"],
});

// 3. Geographic 1-arc-second-like tile: WGS84 + EGM96 heights, Int16, striped, LZW with
//    horizontal predictor, nodata -32768 in a round patch.
make("geo4326_i16_lzw", {
  width: 360, height: 300, type: "Int16",
  value: (_b, c, r) => (nodataPatch(c, r, 280, 60, 18) ? -32768 : Math.round(5 * terrainM(c / 360, r / 300))),
  srs: "EPSG:4326+5773", ullr: [7.4, 46.6, 7.4 + 360 / 3600, 46.6 - 300 / 3600],
  co: ["TILED=NO", "BLOCKYSIZE=20", "COMPRESS=LZW", "PREDICTOR=2"],
  extra: ["-a_nodata", "-32768"],
});

// 4. Int32 with GDAL scale/offset metadata (height = 0.01 * raw + 200), UTM 32N, tiled 128,
//    uncompressed; no vertical CRS declared.
make("utm32_i32_scaled_raw", {
  width: 300, height: 200, type: "Int32",
  value: (_b, c, r) => Math.round((terrainM(c / 300, r / 200) - 200) / 0.01),
  srs: "EPSG:32632", ullr: [400000, 5100400, 400600, 5100000],
  co: ["TILED=YES", "BLOCKXSIZE=128", "BLOCKYSIZE=128", "COMPRESS=NONE"],
  extra: ["-a_scale", "0.01", "-a_offset", "200"],
});

// 5. Float64, pixel-is-point, Deflate with floating-point predictor, striped, nodata -9999.
make("utm33_f64_point_deflate", {
  width: 250, height: 180, type: "Float64",
  value: (_b, c, r) => (nodataPatch(c, r, 40, 150, 12) ? -9999 : terrainM(c / 250, r / 180) + 0.125),
  srs: "EPSG:32633", ullr: [510000, 5201800, 512500, 5200000],
  co: ["TILED=NO", "BLOCKYSIZE=7", "COMPRESS=DEFLATE", "PREDICTOR=3"],
  extra: ["-a_nodata", "-9999", "-mo", "AREA_OR_POINT=Point"],
});

// 6. Three bands, pixel-interleaved Int16: band 2 carries the heights, bands 1/3 offsets of it.
make("utm33_i16_3band", {
  width: 120, height: 90, type: "Int16", bands: 3,
  value: (b, c, r) => Math.round(terrainM(c / 120, r / 90)) + (b - 1) * 1000,
  srs: "EPSG:32633", ullr: [500000, 5200900, 501200, 5200000],
  co: ["TILED=NO", "INTERLEAVE=PIXEL", "COMPRESS=DEFLATE", "PREDICTOR=2"],
});

// 7. User-defined projections (ProjectedCSTypeGeoKey = 32767) from proj strings. Parameters are
//    deliberately not those of an EPSG CRS so GDAL writes the individual GeoKeys.
const small = (name, srs, ullr, type = "Float32", co = ["COMPRESS=DEFLATE"]) =>
  make(name, {
    width: 64, height: 48, type, srs, ullr, co,
    value: (_b, c, r) => (type === "Int16" ? Math.round(terrainM(c / 64, r / 48)) : terrainM(c / 64, r / 48)),
  });
small("userdef_lcc2sp", "+proj=lcc +lat_1=49 +lat_2=44 +lat_0=46.3 +lon_0=3.2 +x_0=700000 +y_0=6600000 +ellps=GRS80 +units=m +no_defs",
  [700000, 6500000 + 4800, 706400, 6500000]);
small("userdef_lcc1sp", "+proj=lcc +lat_1=45.5 +lat_0=45.5 +lon_0=10.5 +k_0=0.99987 +x_0=600000 +y_0=200000 +ellps=intl +units=m +no_defs",
  [610000, 210000 + 4800, 616400, 210000]);
small("userdef_sterea_i16", "+proj=sterea +lat_0=52.1 +lon_0=5.4 +k=0.9999079 +x_0=155000 +y_0=463000 +ellps=bessel +units=m +no_defs",
  [150000, 460000 + 4800, 156400, 460000], "Int16", ["COMPRESS=LZW", "PREDICTOR=2"]);
small("userdef_aea", "+proj=aea +lat_1=29.5 +lat_2=45.5 +lat_0=23 +lon_0=-96.5 +x_0=0 +y_0=0 +datum=NAD83 +units=m +no_defs",
  [-500000, 1500000 + 4800, -493600, 1500000]);
small("userdef_polarstere", "+proj=stere +lat_0=90 +lat_ts=71 +lon_0=-39 +x_0=0 +y_0=0 +datum=WGS84 +units=m +no_defs",
  [200000, -2000000 + 4800, 206400, -2000000]);
small("userdef_tm_ft", "+proj=tmerc +lat_0=40.5 +lon_0=-105.25 +k=0.9999 +x_0=914400 +y_0=304800 +ellps=GRS80 +units=ft +no_defs",
  [3000000, 1000000 + 15000, 3020000, 1000000]);

// 8. Rotated geotransform (not north-up): a VRT with rotation terms, translated to GeoTIFF
//    (GDAL then writes ModelTransformationTag).
{
  const vrt = rawVrt("rotated", 40, 30, "Float32", 1, (_b, c, r) => terrainM(c / 40, r / 30));
  const xml = readFileSync(vrt, "utf8").replace(
    "<VRTRasterBand",
    `<SRS>EPSG:32633</SRS>\n  <GeoTransform>500000, 0.866, 0.5, 5200000, 0.5, -0.866</GeoTransform>\n  <VRTRasterBand`,
  );
  writeFileSync(vrt, xml);
  rmSync(join(out, "bad_rotated.tif"), { force: true });
  gdal("gdal_translate", ["-q", "-of", "GTiff", vrt, join(out, "bad_rotated.tif")]);
}

// 9. A plain TIFF without any georeferencing.
make("bad_nogeoref", {
  width: 20, height: 10, type: "Float32", value: (_b, c, r) => c + r,
  co: ["PROFILE=BASELINE"],
});

// 10. Not a TIFF at all.
writeFileSync(join(out, "bad_notatiff.tif"), "This file is plain text, not a TIFF.\n");

// 11. A truncated TIFF: the first 40 % of an uncompressed striped file (header and IFD kept).
{
  const src = make("tmp_full", {
    width: 100, height: 100, type: "Float32", value: (_b, c, r) => terrainM(c / 100, r / 100),
    srs: "EPSG:32633", ullr: [500000, 5200100, 500100, 5200000], co: ["TILED=NO", "COMPRESS=NONE"],
  });
  const bytes = readFileSync(src);
  writeFileSync(join(out, "bad_truncated.tif"), bytes.subarray(0, Math.floor(bytes.length * 0.4)));
  rmSync(src);
}

// 12. A header claiming absurd dimensions (3 000 000 x 3 000 000 cells) on a tiny file.
{
  const src = make("tmp_small", {
    width: 16, height: 16, type: "Float32", value: () => 1,
    srs: "EPSG:32633", ullr: [500000, 5200016, 500016, 5200000], co: ["TILED=NO", "COMPRESS=NONE"],
  });
  const bytes = readFileSync(src);
  // ImageWidth (256) and ImageLength (257) as LONG values
  const ifd = bytes.readUInt32LE(4);
  const n = bytes.readUInt16LE(ifd);
  for (let i = 0; i < n; i++) {
    const e = ifd + 2 + i * 12;
    const tag = bytes.readUInt16LE(e);
    if (tag === 256 || tag === 257) {
      bytes.writeUInt16LE(4, e + 2); // LONG
      bytes.writeUInt32LE(3_000_000, e + 8);
    }
  }
  writeFileSync(join(out, "bad_absurd_dims.tif"), bytes);

  // 13. An unknown EPSG code: ProjectedCSTypeGeoKey 32633 rewritten to 32699 (unassigned).
  const b2 = readFileSync(src);
  const key = Buffer.from([0x00, 0x0c, 0x00, 0x00, 0x01, 0x00, 0x79, 0x7f]); // 3072, 0, 1, 32633
  const at = b2.indexOf(key);
  if (at < 0) throw new Error("ProjectedCSTypeGeoKey not found");
  b2.writeUInt16LE(32699, at + 6);
  writeFileSync(join(out, "bad_unknown_epsg.tif"), b2);
  rmSync(src);
}

rmSync(tmp, { recursive: true, force: true });
for (const f of ["hills_utm33_f32.tif", "hills_ca3_ftus_f32.tif"]) if (!existsSync(join(out, f))) throw new Error(`missing ${f}`);
process.stdout.write(`fixtures written to ${out}\n`);
