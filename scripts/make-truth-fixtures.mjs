#!/usr/bin/env node
// Writes the "truth" fixtures into fixtures/truth/: small GeoTIFF DEMs written by GDAL's own
// gdal_translate (Debian gdal-bin), each with a WGS84 site outline (GeoJSON) and a plan file
// (YAML). They hold the terrain that breaks naive checks: steep ridges on geographic grids
// (where resampling to a metric grid smooths the crests), one-cell walls, a mast-like spike,
// a pit and a nodata hole. Tests compare our reads and checks on them against GDAL
// (gdallocationinfo) and against brute-force references. See fixtures/truth/README.md.
//
// Deterministic: heights are analytic (no random numbers), rounded to 0.01 m, written as raw
// little-endian Float32 behind a VRT and translated by GDAL; site corners go from the DEM's CRS
// to WGS84 through PROJ's cs2cs (Debian proj-bin) and are rounded to 1e-7 degrees.
//
// Usage: node scripts/make-truth-fixtures.mjs   (needs gdal-bin and proj-bin)
import { execFileSync } from "node:child_process";
import { mkdirSync, writeFileSync, rmSync, statSync } from "node:fs";
import { join, dirname, basename } from "node:path";
import { fileURLToPath } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const out = join(root, "fixtures", "truth");
const tmp = join(out, ".tmp");
mkdirSync(tmp, { recursive: true });
const ENV = { ...process.env, GDAL_PAM_ENABLED: "NO" };

function run(cmd, args, input) {
  try {
    return execFileSync(cmd, args, { input, encoding: "utf8", env: ENV, stdio: ["pipe", "pipe", "pipe"] });
  } catch (e) {
    if (e.code === "ENOENT") throw new Error(`${cmd} not found: install Debian's ${cmd === "cs2cs" ? "proj-bin" : "gdal-bin"}`);
    throw new Error(`${cmd} failed: ${e.stderr || e.message}`);
  }
}

/** Raw Float32 LE + VRT (geotransform, nodata), then gdal_translate to a Deflate GeoTIFF. */
function writeDem(name, { width, height, x0, y0, dx, dy, srs, nodata, value, tiled = false }) {
  const buf = Buffer.alloc(width * height * 4);
  for (let r = 0; r < height; r++)
    for (let c = 0; c < width; c++) {
      const z = value(c, r);
      // Centimetres: exact enough for any check, and the Deflate predictor packs them well.
      buf.writeFloatLE(Number.isNaN(z) ? nodata : Math.round(z * 100) / 100, (r * width + c) * 4);
    }
  const bin = join(tmp, `${name}.bin`);
  writeFileSync(bin, buf);
  const vrt = join(tmp, `${name}.vrt`);
  writeFileSync(
    vrt,
    `<VRTDataset rasterXSize="${width}" rasterYSize="${height}">
  <GeoTransform>${x0}, ${dx}, 0, ${y0}, 0, ${dy}</GeoTransform>
  <VRTRasterBand dataType="Float32" band="1" subClass="VRTRawRasterBand">
${nodata === undefined ? "" : `    <NoDataValue>${nodata}</NoDataValue>\n`}    <SourceFilename relativeToVRT="1">${basename(bin)}</SourceFilename>
    <ImageOffset>0</ImageOffset>
    <PixelOffset>4</PixelOffset>
    <LineOffset>${width * 4}</LineOffset>
    <ByteOrder>LSB</ByteOrder>
  </VRTRasterBand>
</VRTDataset>
`,
  );
  const dst = join(out, `${name}.tif`);
  rmSync(dst, { force: true });
  const co = ["COMPRESS=DEFLATE", "PREDICTOR=3", "ZLEVEL=9"];
  if (tiled) co.push("TILED=YES", "BLOCKXSIZE=128", "BLOCKYSIZE=128");
  run("gdal_translate", ["-q", "-of", "GTiff", "-a_srs", srs, ...co.flatMap((c) => ["-co", c]), vrt, dst]);
  return dst;
}

/** Corners [x, y] in `srs` to WGS84 [lon, lat] through cs2cs (EPSG:4326 prints latitude first). */
function toWgs84(srs, pts) {
  if (srs === "EPSG:4326") return pts.map(([x, y]) => [round7(x), round7(y)]);
  const text = run("cs2cs", ["-f", "%.9f", srs, "EPSG:4326"], pts.map((p) => `${p[0]} ${p[1]}`).join("\n") + "\n");
  return text
    .trim()
    .split("\n")
    .map((l) => l.trim().split(/\s+/).slice(0, 2).map(Number))
    .map(([lat, lon]) => [round7(lon), round7(lat)]);
}
const round7 = (v) => Math.round(v * 1e7) / 1e7;

/** A rectangle [west, south, east, north] in the DEM's CRS as a WGS84 GeoJSON polygon. */
function writeSite(name, title, srs, [w, s, e, n]) {
  const ring = toWgs84(srs, [[w, s], [e, s], [e, n], [w, n]]);
  ring.push(ring[0]);
  const fc = { type: "FeatureCollection", features: [{ type: "Feature", properties: { name: title }, geometry: { type: "Polygon", coordinates: [ring] } }] };
  writeFileSync(join(out, `${name}-site.geojson`), JSON.stringify(fc, null, 2) + "\n");
}

/** The plan file: the same generic camera and limits for every fixture (see README.md). */
function writePlan(name, { title, dem, comment, site = `${name}-site.geojson`, extra = "" }) {
  writeFileSync(
    join(out, `${name}-plan.yaml`),
    `# Test plan over fixtures/truth/${dem} (written by scripts/make-truth-fixtures.mjs).
# ${comment}
# Invented test scenario. CAUTION: a test plan, not a permission to fly; local rules decide.
name: ${title}
dem: ${dem}
area: ${site}
# A generic 20 MP 1-inch camera: 13.2 x 8.8 mm sensor, 8.8 mm lens, 5472 x 3648 px.
# Pitch 2.412 um: 2.5 cm/px at H = 0.025 * 8.8 / 0.002412 = 91.2 m above ground (band 82.1-100.3 m).
camera:
  sensorWidthMm: 13.2
  sensorHeightMm: 8.8
  focalLengthMm: 8.8
  imageWidthPx: 5472
  imageHeightPx: 3648
target:
  gsdCm: 2.5
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
  obstacleMarginM: 0
aircraft:
  type: multirotor
  speedMps: 8
  maxClimbMps: 3
  maxDescentMps: 2
  enduranceMin: 25
  maxWaypoints: 99
headingDeg: auto
minImages: 3
${extra}`,
  );
}

// ---------------------------------------------------------------------------------------------
// 1-2. Steep ridges on geographic grids (WGS84 + EGM96 height), centred on 46.5 N, 9.3 E.
// Terrain in metres east/north of the centre (equirectangular, only to define the shape):
// tent-shaped ridges, h = A * max(0, 1 - |d| / w) with d the distance to the crest line, so
// flanks have slope A / w (45 degrees for A = w) and the crests are sharp, the case where
// resampling to another grid costs metres.
const LAT0 = 46.5;
const LON0 = 9.3;
const M_PER_DEG_LAT = 111_132.954 - 559.822 * Math.cos(2 * LAT0 * Math.PI / 180); // about, only for the shape
const M_PER_DEG_LON = (Math.PI / 180) * 6_378_137 * Math.cos(LAT0 * Math.PI / 180);
function ridge(x, y, ax, ay, angleDeg, a, w) {
  const t = (angleDeg * Math.PI) / 180;
  const d = (x - ax) * Math.cos(t) - (y - ay) * Math.sin(t); // distance across a crest at bearing angleDeg
  return a * Math.max(0, 1 - Math.abs(d) / w);
}
function ridgesM(x, y) {
  return (
    1400 +
    0.03 * x -
    0.02 * y +
    ridge(x, y, -150, 0, 60, 420, 420) + // main crest, 45-degree flanks
    ridge(x, y, 700, -500, 60, 300, 380) + // a parallel crest 860 m away, 38-degree flanks
    ridge(x, y, -1500, 1400, 60, 250, 500) + // a gentler one beyond the main crest
    60 * Math.sin(x / 700) * Math.cos(y / 900)
  );
}
function geoRidges(name, arcSec, cells) {
  const d = arcSec / 3600;
  const x0 = LON0 - (cells / 2) * d;
  const y0 = LAT0 + (cells / 2) * d;
  writeDem(name, {
    width: cells, height: cells, x0, y0, dx: d, dy: -d, srs: "EPSG:4326+5773",
    value: (c, r) => ridgesM((x0 + (c + 0.5) * d - LON0) * M_PER_DEG_LON, (y0 - (r + 0.5) * d - LAT0) * M_PER_DEG_LAT),
  });
}
geoRidges("ridges_geo3s", 3, 80); // 80 x 80 cells of 3": about 5.1 km x 7.4 km
geoRidges("ridges_geo1s", 1, 100); // 100 x 100 cells of 1": about 2.1 km x 3.1 km
// Site: 560 m x 360 m around the centre, across the main crest and its 45-degree flanks.
const siteLon = 280 / M_PER_DEG_LON;
const siteLat = 180 / M_PER_DEG_LAT;
for (const [name, cellNote] of [["ridges_geo3s", "3-arc-second"], ["ridges_geo1s", "1-arc-second"]]) {
  writeSite(name, `Ridges ${cellNote} test site`, "EPSG:4326", [LON0 - siteLon, LAT0 - siteLat, LON0 + siteLon, LAT0 + siteLat]);
  writePlan(name, {
    title: `Ridges ${cellNote} test site`,
    dem: `${name}.tif`,
    comment: `Geographic DEM (EPSG:4326 + EGM96 height), ${cellNote} cells, sharp ridges with flanks up to 45 degrees.`,
  });
}

// ---------------------------------------------------------------------------------------------
// 3. Gorge: UTM 32N + EGM96 height, 300 x 300 cells of 1 m. A gently tilted plateau cut by a
// 24 m wide gorge whose walls drop 30 m between two neighbouring cells (a one-cell wall),
// a 2-cell mast 80 m tall and a 6 x 6-cell pit 25 m deep with vertical walls.
const G = { x0: 420000, y0: 5150300, n: 300 };
function gorgeM(c, r) {
  const u = c + 0.5; // metres east of the west edge
  const v = r + 0.5; // metres south of the north edge
  let z = 900 + 0.02 * u - 0.01 * v + 2 * Math.sin(u / 40) * Math.cos(v / 55);
  const axis = 150 + 0.25 * (v - 150); // the gorge runs NNE-SSW
  if (Math.abs(u - axis) < 12) z -= 30 + 0.02 * v; // floor falls gently to the south
  if ((c === 200 || c === 201) && r === 90) z += 80; // mast
  if (c >= 95 && c < 101 && r >= 200 && r < 206) z -= 25; // pit
  return z;
}
writeDem("gorge_utm", {
  width: G.n, height: G.n, x0: G.x0, y0: G.y0, dx: 1, dy: -1, srs: "EPSG:32632+5773", tiled: true,
  value: gorgeM,
});
writeSite("gorge_utm", "Gorge UTM 32 test site", "EPSG:32632", [G.x0 + 80, G.y0 - 220, G.x0 + 220, G.y0 - 80]);
writePlan("gorge_utm", {
  title: "Gorge UTM 32 test site",
  dem: "gorge_utm.tif",
  comment: "UTM 32N (EPSG:32632 + EGM96 height), 1 m cells: one-cell walls 30 m high, an 80 m mast, a pit.",
  extra: "# Lidar-like DEM accuracy (invented).\ndemAccuracyM: 0.5\n",
});

// ---------------------------------------------------------------------------------------------
// 4. Hole: UTM 33N + EGM96 height, 250 x 250 cells of 2 m, a gentle slope with a round nodata
// hole 80 m across in the middle of the site (nodata -9999 declared in the file).
const H = { x0: 600000, y0: 5260500, n: 250, cell: 2 };
writeDem("hole_utm", {
  width: H.n, height: H.n, x0: H.x0, y0: H.y0, dx: H.cell, dy: -H.cell, srs: "EPSG:32633+5773", nodata: -9999,
  value: (c, r) => {
    const x = (c + 0.5) * H.cell;
    const y = (r + 0.5) * H.cell;
    if ((x - 250) ** 2 + (y - 250) ** 2 < 40 * 40) return NaN;
    return 450 + 0.05 * x - 0.03 * y + 3 * Math.sin(x / 60) * Math.sin(y / 80);
  },
});
writeSite("hole_utm", "Hole UTM 33 test site", "EPSG:32633", [H.x0 + 140, H.y0 - 360, H.x0 + 360, H.y0 - 140]);
writePlan("hole_utm", {
  title: "Hole UTM 33 test site",
  dem: "hole_utm.tif",
  comment: "UTM 33N (EPSG:32633 + EGM96 height), 2 m cells, gentle slope, an 80 m nodata hole mid-site.",
});
writePlan("hole_utm-assume", {
  title: "Hole UTM 33 test site, assumed ground",
  dem: "hole_utm.tif",
  comment: "The hole fixture with assumeGroundM: crossings of the hole become warnings, not breaches.",
  site: "hole_utm-site.geojson",
  extra: "# Ground assumed where the DEM has none (invented: above the highest ground around the hole).\nassumeGroundM: 480\n",
});

rmSync(tmp, { recursive: true, force: true });
for (const f of ["ridges_geo3s", "ridges_geo1s", "gorge_utm", "hole_utm"]) {
  const size = statSync(join(out, `${f}.tif`)).size;
  if (size > 320_000) throw new Error(`${f}.tif is ${size} bytes; keep fixtures under about 300 KB`);
}
process.stdout.write(`truth fixtures written to ${out}\n`);
