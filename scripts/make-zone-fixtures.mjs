#!/usr/bin/env node
// Writes the keep-out zone fixtures into fixtures/zones/: small zone files (GeoJSON RFC 7946 and
// KML 2.2, WGS84) and plan files over two existing DEMs (fixtures/gdal/hills_utm33_f32.tif and
// fixtures/truth/hole_utm.tif, both UTM 33N). Zones are drawn as polygons in UTM 33N metres
// (below), so the tests can reason about them in metres; their corners go to WGS84 through PROJ's
// cs2cs (Debian proj-bin), rounded to 1e-7 degrees (about 1 cm). Invented test data: the names are
// made up and stand for no real place. See fixtures/zones/README.md.
//
// The plan files are the existing plans' text (same camera, limits, DEM and site) with only the
// keep-out keys and, where a fixture needs one, a take-off point added, so a test can compare a
// plan with zones against the same plan without them.
//
// Deterministic. Usage: node scripts/make-zone-fixtures.mjs   (needs proj-bin)
import { execFileSync } from "node:child_process";
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { join, dirname } from "node:path";
import { fileURLToPath } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const out = join(root, "fixtures", "zones");
mkdirSync(out, { recursive: true });
const UTM33 = "EPSG:32633";

/** UTM 33N [x, y] to WGS84 [lon, lat] through cs2cs (EPSG:4326 prints latitude first). */
function toWgs84(pts) {
  let text;
  try {
    text = execFileSync("cs2cs", ["-f", "%.9f", UTM33, "EPSG:4326"], { input: pts.map((p) => `${p[0]} ${p[1]}`).join("\n") + "\n", encoding: "utf8" });
  } catch (e) {
    if (e.code === "ENOENT") throw new Error("cs2cs not found: install Debian's proj-bin");
    throw e;
  }
  const rows = text.trim().split("\n").map((l) => l.trim().split(/\s+/).slice(0, 2).map(Number));
  if (rows.length !== pts.length || rows.some((r) => !r.every(Number.isFinite))) throw new Error(`unexpected cs2cs output: ${text.slice(0, 200)}`);
  return rows.map(([lat, lon]) => [round7(lon), round7(lat)]);
}
const round7 = (v) => Math.round(v * 1e7) / 1e7;

/** Signed area (shoelace), positive counter-clockwise. */
const signedArea = (r) => r.reduce((s, p, i) => s + p[0] * r[(i + 1) % r.length][1] - r[(i + 1) % r.length][0] * p[1], 0) / 2;
/** RFC 7946 3.1.6: outer rings counter-clockwise, holes clockwise; closed. */
function wgsRing(utmRing, hole) {
  const ccw = signedArea(utmRing) > 0;
  const r = ccw === !hole ? utmRing : [...utmRing].reverse();
  const ll = toWgs84(r);
  return [...ll, ll[0]];
}
const rect = (w, s, e, n) => [[w, s], [e, s], [e, n], [w, n]];

function geojsonFile(file, features) {
  const fc = {
    type: "FeatureCollection",
    features: features.map(({ name, bufferM, rings }) => ({
      type: "Feature",
      properties: bufferM === undefined ? { name } : { name, bufferM },
      geometry: { type: "Polygon", coordinates: rings.map((r, i) => wgsRing(r, i > 0)) },
    })),
  };
  writeFileSync(join(out, file), JSON.stringify(fc, null, 2) + "\n");
}

function kmlFile(file, docName, features) {
  const coords = (r) => r.map(([lon, lat]) => `${lon},${lat}`).join(" ");
  const placemarks = features.map(({ name, bufferM, rings }) => {
    const ext = bufferM === undefined ? "" : `\n      <ExtendedData><Data name="bufferM"><value>${bufferM}</value></Data></ExtendedData>`;
    const [outer, ...holes] = rings.map((r, i) => wgsRing(r, i > 0));
    const inner = holes.map((h) => `\n        <innerBoundaryIs><LinearRing><coordinates>${coords(h)}</coordinates></LinearRing></innerBoundaryIs>`).join("");
    return `    <Placemark>
      <name>${name}</name>${ext}
      <Polygon>
        <outerBoundaryIs><LinearRing><coordinates>${coords(outer)}</coordinates></LinearRing></outerBoundaryIs>${inner}
      </Polygon>
    </Placemark>`;
  });
  writeFileSync(
    join(out, file),
    `<?xml version="1.0" encoding="UTF-8"?>
<kml xmlns="http://www.opengis.net/kml/2.2">
  <Document>
    <name>${docName}</name>
    <description>Invented test data (scripts/make-zone-fixtures.mjs): no real place.</description>
${placemarks.join("\n")}
  </Document>
</kml>
`,
  );
}

/**
 * A plan file: the base plan's text with dem/area paths made relative to fixtures/zones and the
 * keep-out keys (and a take-off point) appended.
 */
function planFile(file, { base, dem, area, title, comment, keepOut, bufferM, takeoffUtm }) {
  let text = readFileSync(join(root, base), "utf8");
  text = text.replace(/^name: .*$/m, `name: ${title}`);
  text = text.replace(/^dem: .*$/m, `dem: ${dem}`);
  text = text.replace(/^area: .*$/m, `area: ${area}`);
  text = text.replace(/^((?:#.*\n)+)/, `# Keep-out test plan, written by scripts/make-zone-fixtures.mjs from\n# ${base}: the same camera, limits, DEM and site,\n# with keep-out zones added. ${comment}\n# Invented test scenario. CAUTION: a test plan, not a permission to fly; local rules decide.\n#\n# The base plan's own header follows.\n$1`);
  let extra = `keepOut: ${keepOut.length === 1 ? keepOut[0] : `[${keepOut.join(", ")}]`}\n`;
  if (bufferM !== undefined) extra += `keepOutBufferM: ${bufferM}\n`;
  if (takeoffUtm) {
    const [[lon, lat]] = toWgs84([takeoffUtm]);
    extra += `# Take-off at UTM 33N ${takeoffUtm[0]} E, ${takeoffUtm[1]} N.\ntakeoff: [${lon}, ${lat}]\n`;
  }
  writeFileSync(join(out, file), text.replace(/\n*$/, "\n") + extra);
}

// Hills site (fixtures/e2e/hills-utm33-small-*): UTM 500600..500800 E, 5200300..5200500 N;
// strips run east-west (headingDeg 90); DEM 500000..501000 E, 5200000..5200800 N.
const HILLS = { base: "fixtures/e2e/hills-utm33-small-plan.yaml", dem: "../gdal/hills_utm33_f32.tif", area: "../e2e/hills-utm33-small-site.geojson" };

// (a) A hedge across the way: a 15 m x 310 m strip of land west of the site (500520..500535 E,
// 5200250..5200560 N), between the take-off point (500505 E, 5200330 N) and every strip; no buffer
// of its own, the plan's 10 m. All of it lies inside the DEM window the plan reads (the site
// widened by about 130 m): the window's edge is unknown ground, which a route cannot cross either.
geojsonFile("hills-hedge.geojson", [{ name: "Test hedge west", rings: [rect(500520, 5200250, 500535, 5200560)] }]);
planFile("hills-hedge-plan.yaml", {
  ...HILLS,
  title: "Hills keep-out test, hedge across the way",
  comment: "A 15 m x 310 m zone between the take-off point and the site.",
  keepOut: ["hills-hedge.geojson"],
  bufferM: 10,
  takeoffUtm: [500505, 5200330],
});

// (b) Zones inside the site (KML): an L-shaped pond with its own 12 m buffer, and a 6 m square
// mast base that takes the plan's 20 m buffer. No take-off point: the layout picks a site corner.
kmlFile("hills-pond.kml", "Invented keep-out zones inside the hills test site", [
  { name: "Test pond", bufferM: 12, rings: [[[500670, 5200370], [500730, 5200370], [500730, 5200390], [500690, 5200390], [500690, 5200430], [500670, 5200430]]] },
  { name: "Test mast", rings: [rect(500637, 5200457, 500643, 5200463)] },
]);
planFile("hills-pond-plan.yaml", {
  ...HILLS,
  title: "Hills keep-out test, pond and mast inside the site",
  comment: "An L-shaped zone (own bufferM 12) and a small square (plan default 20 m).",
  keepOut: ["hills-pond.kml"],
  bufferM: 20,
});

// (c) A zone with a hole: a fence ring from 500560..500840 E, 5200260..5200540 N (beyond the site)
// around a U-shaped hole 500630..500770 E, 5200330..5200470 N whose notch 500680..500720 E,
// 5200400..5200470 N belongs to the zone. The site ground left to fly is the hole shrunk by the
// plan's 5 m buffer; the take-off point (500650 E, 5200350 N) is in the hole, and the strips
// across the U's arms are cut by the notch, so the way between the two arms goes round the notch.
geojsonFile("hills-ring.geojson", [
  {
    name: "Test fence ring",
    rings: [
      rect(500560, 5200260, 500840, 5200540),
      [[500630, 5200330], [500770, 5200330], [500770, 5200470], [500720, 5200470], [500720, 5200400], [500680, 5200400], [500680, 5200470], [500630, 5200470]],
    ],
  },
]);
planFile("hills-ring-plan.yaml", {
  ...HILLS,
  title: "Hills keep-out test, a ring-shaped zone",
  comment: "A zone with a U-shaped hole; the take-off point and the ground to fly are in the hole.",
  keepOut: ["hills-ring.geojson"],
  bufferM: 5,
  takeoffUtm: [500650, 5200350],
});

// A zone over the whole hills site and more (500550..500850 E, 5200250..5200550 N), for the
// refusal of a site wholly inside zones (the test gives a take-off point outside it).
geojsonFile("hills-cover.geojson", [{ name: "Test whole-site cover", rings: [rect(500550, 5200250, 500850, 5200550)] }]);

// (d) The nodata hole DEM (fixtures/truth/hole_utm.tif: site 600140..600360 E, 5260140..5260360 N,
// an 80 m nodata hole centred at 600250 E, 5260250 N) with a barn east of the hole that reaches
// past the site's north edge, bufferM 6 of its own. Unknown ground and the zone are both routed around.
geojsonFile("hole-barn.geojson", [{ name: "Test barn", bufferM: 6, rings: [rect(600295, 5260285, 600325, 5260400)] }]);
planFile("hole-barn-plan.yaml", {
  base: "fixtures/truth/hole_utm-plan.yaml",
  dem: "../truth/hole_utm.tif",
  area: "../truth/hole_utm-site.geojson",
  title: "Hole keep-out test, a barn beside the nodata hole",
  comment: "The 80 m nodata hole fixture with a zone east of the hole.",
  keepOut: ["hole-barn.geojson"],
});

process.stdout.write(`wrote fixtures/zones\n`);
