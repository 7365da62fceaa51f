#!/usr/bin/env node
/**
 * Regenerates the demo scenario in fixtures/demo/: the synthetic DEM of the
 * invented "Corrie Vane quarry parcel" as a GeoTIFF (written by GDAL's
 * gdal_translate from Debian's gdal-bin), the site polygon as RFC 7946 GeoJSON
 * and a plan file in YAML.
 *
 * Usage: node scripts/make-demo.mjs [--out <dir>]
 *
 * Deterministic: the heights come from scripts/demo-terrain.mjs (no random
 * numbers) rounded to 0.01 m, so the same GDAL version writes the same bytes.
 * Every file is written under a temporary name first and renamed at the end,
 * so a failed run leaves the previous set in place.
 */
import { execFileSync } from "node:child_process";
import { createHash } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { createRequire } from "node:module";
import proj4 from "proj4";
import YAML from "yaml";
import * as T from "./demo-terrain.mjs";

const require = createRequire(import.meta.url);
const here = path.dirname(fileURLToPath(import.meta.url));

function parseArgs(argv) {
  const args = { out: path.join(here, "..", "fixtures", "demo") };
  for (let i = 0; i < argv.length; i++) {
    if (argv[i] === "--out" && argv[i + 1]) args.out = path.resolve(argv[++i]);
    else if (argv[i] === "--help" || argv[i] === "-h") {
      process.stdout.write("Usage: node scripts/make-demo.mjs [--out <dir>]  (default: fixtures/demo)\n");
      process.exit(0);
    } else {
      process.stderr.write(`make-demo: unknown argument ${argv[i]}; allowed: --out <dir>\n`);
      process.exit(2);
    }
  }
  return args;
}

function gdal(cmd, args, env = {}) {
  try {
    return execFileSync(cmd, args, { encoding: "utf8", env: { ...process.env, GDAL_PAM_ENABLED: "NO", ...env }, stdio: ["ignore", "pipe", "pipe"] });
  } catch (e) {
    if (e.code === "ENOENT") throw new Error(`${cmd} not found: install Debian's gdal-bin to regenerate the demo DEM`);
    throw new Error(`${cmd} failed: ${e.stderr || e.message}`);
  }
}

/** Raw little-endian Float32 bytes of the DEM window, whatever the machine's byte order. */
function float32LeBytes(values) {
  const buf = Buffer.alloc(values.length * 4);
  for (let i = 0; i < values.length; i++) buf.writeFloatLE(values[i], i * 4);
  return buf;
}

/** A VRT that tells GDAL how to read the raw file: geotransform, type, byte order, nodata. */
function rawVrt(rawName) {
  const w = T.DEM_WINDOW;
  return `<VRTDataset rasterXSize="${w.width}" rasterYSize="${w.height}">
  <GeoTransform>${w.x0}, ${w.cellM}, 0, ${w.y0}, 0, ${-w.cellM}</GeoTransform>
  <VRTRasterBand dataType="Float32" band="1" subClass="VRTRawRasterBand">
    <NoDataValue>${T.NODATA}</NoDataValue>
    <SourceFilename relativeToVRT="1">${rawName}</SourceFilename>
    <ImageOffset>0</ImageOffset>
    <PixelOffset>4</PixelOffset>
    <LineOffset>${4 * w.width}</LineOffset>
    <ByteOrder>LSB</ByteOrder>
  </VRTRasterBand>
</VRTDataset>
`;
}

/** Writes the GeoTIFF to `target` through GDAL; returns the vertical CRS it ended up with. */
function writeGeoTiff(target) {
  const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "gsdplan-demo-"));
  try {
    fs.writeFileSync(path.join(tmp, "dem.f32"), float32LeBytes(T.demHeights()));
    fs.writeFileSync(path.join(tmp, "dem.vrt"), rawVrt("dem.f32"));
    const common = ["-of", "GTiff", "-a_nodata", String(T.NODATA), "-co", "TILED=YES", "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=3",
      "-mo", `TIFFTAG_IMAGEDESCRIPTION=${T.SITE_NAME}: synthetic demo terrain for gsdplan (invented, not a survey; heights in metres above EGM96)`,
      "-mo", "AREA_OR_POINT=Area"];
    // Horizontal UTM plus EGM96 height, so readers learn the vertical datum from the file.
    gdal("gdal_translate", [...common, "-a_srs", `EPSG:${T.EPSG_HORIZONTAL}+${T.EPSG_VERTICAL}`, path.join(tmp, "dem.vrt"), target]);
    const info = JSON.parse(gdal("gdalinfo", ["-json", target]));
    const wkt = info.coordinateSystem?.wkt ?? "";
    if (wkt.includes(`ID["EPSG",${T.EPSG_VERTICAL}]`)) return "EGM96 height (EPSG:5773)";
    // The compound CRS did not survive: keep the horizontal CRS only and say so.
    gdal("gdal_translate", [...common, "-a_srs", `EPSG:${T.EPSG_HORIZONTAL}`, path.join(tmp, "dem.vrt"), target]);
    return "none declared (compound CRS not kept by this GDAL; heights are EGM96: set demVerticalDatum: egm96)";
  } finally {
    fs.rmSync(tmp, { recursive: true, force: true });
  }
}

/** UTM zone 30N -> WGS84 lon/lat, from the EPSG table's proj4 definition. */
function lonLatConverter() {
  const def = require(`epsg-index/s/${T.EPSG_HORIZONTAL}.json`).proj4;
  const conv = proj4(def, "WGS84");
  // 7 decimals: about 1 cm, finer than the 1 m DEM cells.
  return ([x, y]) => conv.forward([x, y]).map((d) => Math.round(d * 1e7) / 1e7);
}

/** Twice the signed area of a ring (shoelace): positive when counter-clockwise. */
function signedArea2(ring) {
  let a = 0;
  for (let i = 0; i + 1 < ring.length; i++) a += ring[i][0] * ring[i + 1][1] - ring[i + 1][0] * ring[i][1];
  return a;
}

function siteGeoJson(toLonLat) {
  const exterior = T.FEATURES.site.exterior.map(toLonLat);
  const hole = T.FEATURES.site.hole.map(toLonLat);
  // RFC 7946 section 3.1.6: exterior rings counter-clockwise, holes clockwise.
  if (!(signedArea2(exterior) > 0) || !(signedArea2(hole) < 0)) throw new Error("site ring winding is not RFC 7946 right-hand");
  const ring = (r) => "[\n" + r.map((p) => `          [${p[0]}, ${p[1]}]`).join(",\n") + "\n        ]";
  return `{
  "type": "FeatureCollection",
  "features": [
    {
      "type": "Feature",
      "properties": { "name": ${JSON.stringify(T.SITE_NAME)} },
      "geometry": {
        "type": "Polygon",
        "coordinates": [
        ${ring(exterior)},
        ${ring(hole)}
        ]
      }
    }
  ]
}
`;
}

function planYaml(demFile, siteFile) {
  return `# gsdplan plan file for the demo: ${T.SITE_NAME}.
# An invented site with synthetic terrain, made by scripts/make-demo.mjs
# (run \`node scripts/make-demo.mjs\` to regenerate this folder).
#
# CAUTION: a plan is not a permission to fly. Local rules, airspace restrictions
# and temporary notices override every number in this file: fly within the law
# where you are, with the permissions it requires, and keep visual line of sight
# where required. The DEM is a bare-earth model, not a survey of obstacles: trees,
# masts, wires and buildings are not in it. Check the first waypoint heights on
# site. The tool plans; the pilot in command decides.

name: ${T.SITE_NAME}

# Elevation model: GeoTIFF in UTM zone 30N (EPSG:${T.EPSG_HORIZONTAL}), 1 m cells, heights in
# metres above the EGM96 geoid. Relative paths start at this file's folder.
dem: ${demFile}
# The file declares EGM96 height (EPSG:${T.EPSG_VERTICAL}); set this only to override what it says.
# demVerticalDatum: egm96

# Site outline: WGS84 GeoJSON polygon with a notch in the north edge and an
# excluded yard (a hole) in the south-west.
area: ${siteFile}

# Camera: a generic 20 MP 1-inch sensor with an 8.8 mm lens. Pixel pitch
# 13.2 mm / 5472 px = 2.41 um, so the height above ground for a nadir GSD is
# H = GSD * focal length / pitch: 2.5 cm/px -> 91.2 m.
camera:
  sensorWidthMm: 13.2
  sensorHeightMm: 8.8
  focalLengthMm: 8.8
  imageWidthPx: 5472
  imageHeightPx: 3648
  exposureS: 0.001      # shutter time: caps ground speed by motion blur
  minIntervalS: 2       # fastest the camera can take photos one after another

# Detail wanted: nadir GSD 2.5 cm/px, +/-10 % -> heights above ground 82.1-100.3 m.
# The 120 m ceiling leaves room over open ground, but not beside the quarry face
# and in the ravine, where the plan must give up detail (and say where).
target:
  gsdCm: 2.5
  tolerancePct: 10

# Overlap between photos along a strip (front) and between strips (side):
# footprint 136.8 m x 91.2 m at 2.5 cm -> strips 47.9 m apart, a photo every 22.8 m.
overlap:
  frontPct: 75
  sidePct: 65

# Height ceiling: 120 m above the ground straight below (reference: ground).
# Other rules: "surface" (closest point of the surface) or "takeoff".
# Use the limit and the reference your local rules set.
ceiling:
  heightM: 120
  reference: ground

# Clearance: stay at least minM above the highest ground within safetyRadiusM
# of the aircraft, plus obstacleMarginM for what the bare-earth DEM does not show
# (0 here: the demo site is open hill ground; raise it for trees and buildings).
clearance:
  minM: 30
  safetyRadiusM: 15
  obstacleMarginM: 0

# Aircraft: a small multirotor (typical figures; use your aircraft's own).
aircraft:
  type: multirotor
  speedMps: 10          # ground speed along the strips
  minSpeedMps: 2        # slowest it may fly to follow steep ground
  maxClimbMps: 3
  maxDescentMps: 2
  enduranceMin: 25      # one battery; the plan keeps a reserve on top
  maxWaypoints: 99      # the autopilot's waypoint budget per flight

# Strip direction: auto picks one for the site, or give degrees clockwise from north.
headingDeg: auto

# Fewest photos that must see each ground cell (2 is the bare minimum for stereo).
minImages: 3
`;
}

function sha256(file) {
  return createHash("sha256").update(fs.readFileSync(file)).digest("hex");
}

function main() {
  const { out } = parseArgs(process.argv.slice(2));
  fs.mkdirSync(out, { recursive: true });
  const names = { dem: `${T.SLUG}.tif`, site: `${T.SLUG}-site.geojson`, plan: `${T.SLUG}-plan.yaml` };
  const tmp = (n) => path.join(out, `.${n}.tmp-${process.pid}`);
  const written = [];
  try {
    const vertical = writeGeoTiff(tmp(names.dem));
    written.push(names.dem);
    const toLonLat = lonLatConverter();
    fs.writeFileSync(tmp(names.site), siteGeoJson(toLonLat));
    written.push(names.site);
    const plan = planYaml(names.dem, names.site);
    YAML.parse(plan); // fail here, not in the demo, if the template is broken
    fs.writeFileSync(tmp(names.plan), plan);
    written.push(names.plan);
    for (const n of written) fs.renameSync(tmp(n), path.join(out, n));
    report(out, names, vertical, toLonLat);
  } catch (e) {
    for (const n of Object.values(names)) fs.rmSync(tmp(n), { force: true });
    process.stderr.write(`make-demo: ${e.message}\n`);
    process.exit(1);
  }
}

function report(out, names, vertical, toLonLat) {
  const rel = (n) => path.relative(process.cwd(), path.join(out, n)) || n;
  const size = (n) => `${(fs.statSync(path.join(out, n)).size / 1e6).toFixed(2)} MB`;
  const w = T.DEM_WINDOW;
  const F = T.FEATURES;
  const at = ([x, y]) => {
    const [lon, lat] = toLonLat([x, y]);
    return `E ${x.toFixed(1)} N ${y.toFixed(1)} (lon ${lon.toFixed(5)}, lat ${lat.toFixed(5)})`;
  };
  const [fx, fy] = F.quarry.faceCentre;
  const top = T.terrainHeightM(fx, fy + 10);
  const floor = T.terrainHeightM(fx, fy - 10);
  const [rx, ry] = F.ravine.crestCrossing;
  const lines = [
    `${T.SITE_NAME} (${T.SLUG}), synthetic demo terrain`,
    `  ${rel(names.dem)}  ${size(names.dem)}  ${w.width} x ${w.height} cells of ${w.cellM} m, EPSG:${T.EPSG_HORIZONTAL}, vertical: ${vertical}`,
    `     top-left E ${w.x0} N ${w.y0}; site bbox E ${T.SITE_ORIGIN.eastingM}-${T.SITE_ORIGIN.eastingM + T.SITE_SIZE.widthM}, N ${T.SITE_ORIGIN.northingM}-${T.SITE_ORIGIN.northingM + T.SITE_SIZE.heightM}; sha256 ${sha256(path.join(out, names.dem)).slice(0, 16)}`,
    `  ${rel(names.site)}  ${size(names.site)}`,
    `  ${rel(names.plan)}  ${size(names.plan)}`,
    "Features:",
    `  ridge crest at E ${rx}: N ${T.ridgeCrestNorthingM(rx).toFixed(1)}, ${T.naturalHeightM(rx, ry).toFixed(2)} m`,
    `  quarry floor ${F.quarry.floorM} m; north face centre ${at(F.quarry.faceCentre)}: ${top.toFixed(2)} m above it, step ${(top - floor).toFixed(2)} m over ${F.quarry.edgeM} m`,
    `  ravine crosses the crest at ${at(F.ravine.crestCrossing)}: floor ${F.ravine.floorAtCrossingM} m, ${F.ravine.depthAtCrossingM} m deep, ${2 * F.ravine.topHalfWidthM} m wide at the top, ${2 * F.ravine.floorHalfWidthM} m floor`,
    `  nodata void ${F.nodata.cells} cells, SW corner ${at(F.nodata.ring[0])}`,
    `  excluded yard (site hole) SW corner ${at(F.site.hole[0])}`,
  ];
  process.stdout.write(lines.join("\n") + "\n");
}

main();
