#!/usr/bin/env node
// Writes the mosaic fixtures into fixtures/mosaic/ with GDAL's own tools (gdal_translate,
// gdalbuildvrt, gdalwarp), cut from the GDAL-written hilly fixture
// fixtures/gdal/hills_utm33_f32.tif (EPSG:32633 + EGM96 height, 1 m cells, origin
// 500000 E, 5200800 N). The DEM-source tests compare our mosaic reads against
// gdallocationinfo / gdalwarp on these files, so GDAL is both the writer and the reference.
//
//   tiles/hills_{a_nw,b_ne,c_sw,d_se}.tif  2 x 2 tiles of 250 x 200 cells cut with
//                                          `gdal_translate -srcwin` from columns 250..750,
//                                          rows 200..600 of the source (COG layout, 128 x 128
//                                          blocks, Deflate + predictor; d_se with overviews)
//   hills_tiles.vrt                        `gdalbuildvrt` of the four tiles (relative paths)
//   hills_patch.tif                        60 x 60 cells from the source's north-west corner
//                                          georeferenced over the tiles' common corner
//                                          (-a_ullr): different heights on the same grid
//   hills_tiles_patch.vrt                  `gdalbuildvrt` of the tiles, then the patch (last wins)
//   hills_d_se_utm32_2m.tif                tile d_se warped to EPSG:32632 + EGM96 at 2 m
//                                          (`gdalwarp -r bilinear`): another CRS and cell size
//   bad_warped.vrt                         `gdalwarp -of VRT` (a VRTWarpedDataset)
//   bad_scaled.vrt                         `gdal_translate -of VRT -scale` (ComplexSource with
//                                          ScaleOffset/ScaleRatio)
//   bad_derived.vrt, bad_raw.vrt           written here from GDAL's VRT format description
//                                          (VRTDerivedRasterBand with a pixel function;
//                                          VRTRawRasterBand), from memory
//   mosaic-site.geojson, mosaic-plan.yaml  a test site across both tile seams (UTM corners
//                                          converted to WGS84 by PROJ's cs2cs) and its plan;
//                                          its DEM window fits inside the four tiles
//
// Deterministic; committed. Usage: node scripts/make-mosaic-fixtures.mjs (needs gdal-bin)
import { execFileSync } from "node:child_process";
import { mkdirSync, rmSync, writeFileSync, readdirSync } from "node:fs";
import { join, dirname } from "node:path";
import { fileURLToPath } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const src = join(root, "fixtures", "gdal", "hills_utm33_f32.tif");
const out = join(root, "fixtures", "mosaic");
const tiles = join(out, "tiles");

function gdal(cmd, args, cwd = out) {
  execFileSync(cmd, args, { cwd, stdio: ["ignore", "ignore", "inherit"], env: { ...process.env, GDAL_PAM_ENABLED: "NO" } });
}

rmSync(out, { recursive: true, force: true });
mkdirSync(tiles, { recursive: true });

// The tiles: 2 x 2 of 250 x 200 cells. 128-cell blocks, so each tile has blocks of its own
// that straddle nothing and a window reads only some of them.
const TILE_W = 250, TILE_H = 200, COL0 = 250, ROW0 = 200;
const COG = ["-of", "COG", "-co", "BLOCKSIZE=128", "-co", "COMPRESS=DEFLATE", "-co", "LEVEL=9", "-co", "PREDICTOR=YES"];
for (const [name, i, j] of [["a_nw", 0, 0], ["b_ne", 1, 0], ["c_sw", 0, 1], ["d_se", 1, 1]]) {
  // Overviews in one tile only (they are never read; the HTTP test checks the bytes).
  const ov = name === "d_se" ? [] : ["-co", "OVERVIEWS=NONE"];
  gdal("gdal_translate", ["-q", ...COG, ...ov, "-srcwin", String(COL0 + i * TILE_W), String(ROW0 + j * TILE_H), String(TILE_W), String(TILE_H), src, join(tiles, `hills_${name}.tif`)]);
}
const tileNames = readdirSync(tiles).filter((f) => f.endsWith(".tif")).sort();
gdal("gdalbuildvrt", ["-q", "hills_tiles.vrt", ...tileNames.map((f) => `tiles/${f}`)]);

// A patch of other heights over the tiles' common corner (500500 E, 5200400 N).
const PATCH = 60;
gdal("gdal_translate", ["-q", ...COG, "-co", "OVERVIEWS=NONE", "-srcwin", "0", "0", String(PATCH), String(PATCH),
  "-a_ullr", String(500500 - PATCH / 2), String(5200400 + PATCH / 2), String(500500 + PATCH / 2), String(5200400 - PATCH / 2), src, "hills_patch.tif"]);
gdal("gdalbuildvrt", ["-q", "hills_tiles_patch.vrt", ...tileNames.map((f) => `tiles/${f}`), "hills_patch.tif"]);

// Tile d_se in another CRS and cell size (UTM 32N, 2 m), heights kept on EGM96.
// Cells the warped rectangle leaves uncovered are nodata, not 0 m of ground.
gdal("gdalwarp", ["-q", "-t_srs", "EPSG:32632+5773", "-tr", "2", "2", "-r", "bilinear", "-et", "0", "-dstnodata", "-9999",
  "-co", "TILED=YES", "-co", "BLOCKXSIZE=64", "-co", "BLOCKYSIZE=64", "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=3",
  join(tiles, "hills_d_se.tif"), "hills_d_se_utm32_2m.tif"]);

// VRT kinds the reader refuses.
gdal("gdalwarp", ["-q", "-of", "VRT", "-t_srs", "EPSG:32632", join("tiles", "hills_a_nw.tif"), "bad_warped.vrt"]);
gdal("gdal_translate", ["-q", "-of", "VRT", "-scale", "300", "500", "0", "1000", join("tiles", "hills_a_nw.tif"), "bad_scaled.vrt"]);
const band = (sub, inner) => `<VRTDataset rasterXSize="250" rasterYSize="200">
  <GeoTransform>500250, 1, 0, 5200600, 0, -1</GeoTransform>
  <VRTRasterBand dataType="Float32" band="1"${sub ? ` subClass="${sub}"` : ""}>
${inner}
  </VRTRasterBand>
</VRTDataset>
`;
writeFileSync(join(out, "bad_derived.vrt"), band("VRTDerivedRasterBand", `    <PixelFunctionType>sum</PixelFunctionType>
    <SimpleSource>
      <SourceFilename relativeToVRT="1">tiles/hills_a_nw.tif</SourceFilename>
      <SourceBand>1</SourceBand>
    </SimpleSource>`));
writeFileSync(join(out, "bad_raw.vrt"), band("VRTRawRasterBand", `    <SourceFilename relativetoVRT="1">hills_a_nw.raw</SourceFilename>
    <ImageOffset>0</ImageOffset>
    <PixelOffset>4</PixelOffset>
    <LineOffset>1000</LineOffset>`));
// The test site: a pentagon across both seams, corners in UTM 33N, to WGS84 with PROJ.
const corners = [[500380, 5200320], [500620, 5200320], [500620, 5200480], [500470, 5200480], [500380, 5200420]];
const ll = execFileSync("cs2cs", ["-f", "%.7f", "EPSG:32633", "EPSG:4326"], { input: corners.map(([e, n]) => `${e} ${n}`).join("\n") + "\n", encoding: "utf8" })
  .trim().split("\n").map((l) => l.trim().split(/\s+/).slice(0, 2).map(Number)).map(([lat, lon]) => [lon, lat]);
writeFileSync(join(out, "mosaic-site.geojson"), JSON.stringify({
  type: "FeatureCollection",
  features: [{ type: "Feature", properties: { name: "Mosaic test site" }, geometry: { type: "Polygon", coordinates: [[...ll, ll[0]]] } }],
}, null, 2) + "\n");
writeFileSync(join(out, "mosaic-plan.yaml"), `# Test plan over the four tiles of fixtures/mosaic/tiles (cut from fixtures/gdal/hills_utm33_f32.tif).
# Invented test scenario; written by scripts/make-mosaic-fixtures.mjs.
# The DEM window (site + about 103 m: safety radius 15 + half a footprint 30 + strip spacing 28
# + 30 m of transit room) fits inside the tiles, so the plan over the tiles equals the plan
# over the file they were cut from.
# CAUTION: a test plan, not a permission to fly; local rules decide.
name: Mosaic test site
dem: tiles
area: mosaic-site.geojson
camera:
  sensorWidthMm: 6.3
  sensorHeightMm: 4.725
  focalLengthMm: 4.5
  imageWidthPx: 4000
  imageHeightPx: 3000
target:
  gsdCm: 2
  tolerancePct: 10
overlap:
  frontPct: 75
  sidePct: 65
ceiling:
  heightM: 120
  reference: ground
clearance:
  minM: 30
  safetyRadiusM: 15
aircraft:
  speedMps: 6
  enduranceMin: 20
headingDeg: 90
minImages: 3
`);
process.stdout.write(`wrote ${readdirSync(out).length} entries in fixtures/mosaic\n`);
