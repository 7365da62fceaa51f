#!/usr/bin/env node
// Writes the surface/terrain fixtures into fixtures/dsm/ with GDAL's own tools: heights
// computed here on a 2 m grid (invented test scene), written as Esri ASCII grids and turned
// into GeoTIFFs by `gdal_translate` (EPSG:32633 + EGM96 height, 5773).
//
//   slope_dtm.tif       terrain (bare earth): a plane rising 6 cm/m east and 3 cm/m north
//                       from 300 m, 300 x 250 cells of 2 m, origin 500000 E, 5200500 N
//   slope_dsm.tif       the same terrain plus three buildings (flat-roofed boxes 16-25 m
//                       high) and trees (cones 15-20 m high, flat-topped discs 10-12 m)
//   slope_dtm_3m.tif    the terrain warped to 3 m cells (`gdalwarp -tr 3 3 -r bilinear`):
//                       a terrain model on other cells than the surface model
//   dsm-site.geojson    a 300 x 230 m test site over them (UTM corners to WGS84 by cs2cs)
//   dsm-plan.yaml       its plan: dem = the DSM (demSurface: dsm), dtm = the DTM
//
// Deterministic; committed. Usage: node scripts/make-dsm-fixtures.mjs (needs gdal-bin, proj-bin)
import { execFileSync } from "node:child_process";
import { mkdirSync, rmSync, writeFileSync } from "node:fs";
import { join, dirname } from "node:path";
import { fileURLToPath } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const out = join(root, "fixtures", "dsm");
const W = 300, H = 250, CELL = 2, X0 = 500000, Y0 = 5200000;

/** Terrain at local metres (u east, v north of the south-west corner). */
const terrain = (u, v) => 300 + 0.06 * u + 0.03 * v;
// [u0, v0, u1, v1, height]
const BUILDINGS = [[200, 200, 230, 220, 22], [320, 260, 346, 290, 16], [380, 170, 400, 186, 25]];
// cones [u, v, radius, height] and discs (flat canopy) [u, v, radius, height]
const CONES = [[260, 320, 6, 18], [280, 330, 5, 15], [420, 300, 7, 20], [170, 150, 6, 17]];
const DISCS = [[300, 180, 5, 12], [240, 260, 4, 10]];

function objects(u, v) {
  let h = 0;
  for (const [u0, v0, u1, v1, bh] of BUILDINGS) if (u >= u0 && u <= u1 && v >= v0 && v <= v1) h = Math.max(h, bh);
  for (const [cu, cv, r, ch] of CONES) {
    const d = Math.hypot(u - cu, v - cv);
    if (d < r) h = Math.max(h, ch * (1 - d / r));
  }
  for (const [cu, cv, r, ch] of DISCS) if (Math.hypot(u - cu, v - cv) <= r) h = Math.max(h, ch);
  return h;
}

function asciiGrid(f) {
  const lines = [`ncols ${W}`, `nrows ${H}`, `xllcorner ${X0}`, `yllcorner ${Y0}`, `cellsize ${CELL}`, "NODATA_value -9999"];
  for (let r = 0; r < H; r++) {
    const v = (H - r - 0.5) * CELL;
    const row = [];
    for (let c = 0; c < W; c++) {
      const u = (c + 0.5) * CELL;
      row.push(f(u, v).toFixed(3));
    }
    lines.push(row.join(" "));
  }
  return lines.join("\n") + "\n";
}

function gdal(cmd, args) {
  execFileSync(cmd, args, { cwd: out, stdio: ["ignore", "ignore", "inherit"], env: { ...process.env, GDAL_PAM_ENABLED: "NO" } });
}

rmSync(out, { recursive: true, force: true });
mkdirSync(out, { recursive: true });
const TIFF = ["-q", "-a_srs", "EPSG:32633+5773", "-ot", "Float32", "-co", "COMPRESS=DEFLATE", "-co", "TILED=YES", "-co", "BLOCKXSIZE=128", "-co", "BLOCKYSIZE=128"];
writeFileSync(join(out, "dtm.asc"), asciiGrid(terrain));
writeFileSync(join(out, "dsm.asc"), asciiGrid((u, v) => terrain(u, v) + objects(u, v)));
gdal("gdal_translate", [...TIFF, "dtm.asc", "slope_dtm.tif"]);
gdal("gdal_translate", [...TIFF, "dsm.asc", "slope_dsm.tif"]);
gdal("gdalwarp", ["-q", "-tr", "3", "3", "-r", "bilinear", "-co", "COMPRESS=DEFLATE", "slope_dtm.tif", "slope_dtm_3m.tif"]);
rmSync(join(out, "dtm.asc"));
rmSync(join(out, "dsm.asc"));

// The site: 300 x 230 m, u 150..450, v 135..365 (its DEM window, about 118 m around it, fits).
const corners = [[150, 135], [450, 135], [450, 365], [150, 365]].map(([u, v]) => [X0 + u, Y0 + v]);
const ll = execFileSync("cs2cs", ["-f", "%.7f", "EPSG:32633", "EPSG:4326"], { input: corners.map(([e, n]) => `${e} ${n}`).join("\n") + "\n", encoding: "utf8" })
  .trim().split("\n").map((l) => { const [lat, lon] = l.split(/\s+/).map(Number); return [lon, lat]; });
writeFileSync(join(out, "dsm-site.geojson"), JSON.stringify({
  type: "FeatureCollection",
  features: [{ type: "Feature", properties: { name: "Surface and terrain test site" }, geometry: { type: "Polygon", coordinates: [[...ll, ll[0]]] } }],
}, null, 2) + "\n");
writeFileSync(join(out, "dsm-plan.yaml"), `# Test plan over a surface model (buildings and trees) beside its terrain model.
# Invented test scenario; written by scripts/make-dsm-fixtures.mjs.
# CAUTION: a test plan, not a permission to fly; local rules decide.
name: Surface and terrain test site
dem: slope_dsm.tif
demSurface: dsm
dtm: slope_dtm.tif
area: dsm-site.geojson
camera:
  sensorWidthMm: 6.3
  sensorHeightMm: 4.725
  focalLengthMm: 4.5
  imageWidthPx: 4000
  imageHeightPx: 3000
target:
  gsdCm: 2.5
  tolerancePct: 10
overlap:
  frontPct: 75
  sidePct: 65
# 75 m: low enough that the band over the roofs meets the ceiling over the terrain.
ceiling:
  heightM: 75
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
