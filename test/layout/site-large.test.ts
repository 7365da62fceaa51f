/**
 * Site outlines with hundreds of thousands of vertices, as exported from a
 * cadastre: read, validated, simplified in the local frame and laid out
 * without overflowing the stack, the area kept to 0.1 % of the outline's
 * geodesic area (GeographicLib and turf as the outside references).
 */
import { describe, it, expect } from "vitest";
import geodesic from "geographiclib-geodesic";
import { area as turfArea } from "@turf/turf";
import { readSite, siteFromLonLat } from "../../src/layout/site.js";
import { layoutStrips } from "../../src/layout/strips.js";
import { projFrame } from "./frame-helper.js";

const WGS84 = geodesic.Geodesic.WGS84;

/** Transverse Mercator centred on the parcel with k = 1: frame areas equal geodesic ones to ~1e-8 here. */
const FRAME = projFrame("+proj=tmerc +lat_0=47 +lon_0=15 +k=1 +x_0=0 +y_0=0 +datum=WGS84 +units=m +no_defs", "TM 15E 47N");

/**
 * A wobbly, roughly round parcel of `n` vertices about 600 m across, centred
 * on 15 E 47 N: two slow wobbles (tens of metres), a fine one (0.5 m) and
 * digitising noise of +-1 cm. Radius as a function of angle, so the ring is
 * simple whatever the noise. Counter-clockwise, closed. Invented data.
 */
function wobblyParcel(n: number, radiusM = 300): number[][] {
  const ring: number[][] = [];
  let seed = 12345;
  const noise = () => ((seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31 - 0.5) * 0.02;
  for (let i = 0; i < n; i++) {
    const t = (2 * Math.PI * i) / n;
    const r = radiusM * (1 + 0.08 * Math.sin(3 * t) + 0.03 * Math.cos(11 * t)) + 0.5 * Math.sin(300 * t) + noise();
    ring.push(FRAME.toWgs84(r * Math.cos(t), r * Math.sin(t)));
  }
  ring.push(ring[0]);
  return ring;
}

/** Geodesic area of a closed lon/lat ring (GeographicLib PolygonArea), m², unsigned. */
function geodesicAreaM2(ring: number[][]): number {
  const p = WGS84.Polygon(false);
  for (const [lon, lat] of ring.slice(0, -1)) p.AddPoint(lat, lon);
  return Math.abs(p.Compute(false, true).area ?? NaN);
}

const LAYOUT = { headingDeg: "auto" as const, spacingM: 40, triggerM: 20, footprintAcrossM: 60, footprintAlongM: 40, photoSpeedMps: 8, transitSpeedMps: 12 };

describe("a 200 000-vertex parcel", () => {
  const ring = wobblyParcel(200_000);
  const refAreaM2 = geodesicAreaM2(ring);

  it("GeographicLib and turf agree on the reference area (both ellipsoidal/spherical outside references)", () => {
    // turf.area is spherical (mean radius 6371008.8 m); at 47 N it differs from the
    // ellipsoidal area by a few tenths of a percent (from memory), so 0.5 % here.
    const turf = turfArea({ type: "Polygon", coordinates: [ring] });
    expect(Math.abs(turf - refAreaM2) / refAreaM2).toBeLessThan(5e-3);
    // The parcel is about pi * 300² = 283 000 m² (the wobbles average out to first order).
    expect(refAreaM2).toBeGreaterThan(270_000);
    expect(refAreaM2).toBeLessThan(300_000);
  });

  it("GeoJSON: read without a stack overflow, simplified by default, area within 0.1 % of GeographicLib's", () => {
    const site = readSite(JSON.stringify({ type: "Polygon", coordinates: [ring] }), FRAME, { fileName: "parcel.geojson" });
    const s = site.simplification;
    expect(s).toBeDefined();
    expect(s!.fromVertices).toBe(200_000);
    // A 0.05 m tolerance keeps the 0.5 m wobble but not the 1 cm noise: far fewer vertices.
    expect(s!.toVertices).toBeLessThan(200_000 / 5);
    expect(s!.toVertices).toBeGreaterThan(1_000);
    expect(s!.areaChangePct).toBeLessThanOrEqual(0.1);
    const outer = (site.local as GeoJSON.Polygon).coordinates[0];
    expect(outer.length - 1).toBe(s!.toVertices);
    expect((site.wgs84 as GeoJSON.Polygon).coordinates[0].length).toBe(outer.length);
    // The brief's requirement: the site area exact to 0.1 % (GeographicLib on the unsimplified outline).
    expect(Math.abs(site.areaM2 - refAreaM2) / refAreaM2).toBeLessThan(1e-3);
    expect(site.notes?.join("\n")).toMatch(/outline simplified from 200,000 to [\d,]+ vertices within 0\.05 m .*area changed by [\d.e-]+ %/);
  });

  it("every dropped vertex lies within the tolerance of the kept outline (Douglas and Peucker 1973)", () => {
    const site = siteFromLonLat([[ring]], FRAME, { name: "parcel", simplifyToleranceM: 0.1 });
    const kept = (site.local as GeoJSON.Polygon).coordinates[0];
    expect(site.simplification!.toleranceM).toBe(0.1);
    // Sample every 97th original vertex: its distance to the kept outline (brute force
    // over the kept edges; plain plane geometry, independent of the simplifier).
    let worst = 0;
    for (let i = 0; i < ring.length - 1; i += 97) {
      const [x, y] = FRAME.fromWgs84(ring[i][0], ring[i][1]);
      let best = Infinity;
      for (let k = 0; k + 1 < kept.length; k++) best = Math.min(best, distToSegment(x, y, kept[k], kept[k + 1]));
      worst = Math.max(worst, best);
    }
    expect(worst).toBeLessThanOrEqual(0.1 + 1e-9);
    expect(worst).toBeGreaterThan(0.01); // vertices were really dropped, and not only trivial ones
  });

  it("with simplification off (tolerance 0) all 200 000 vertices are read and kept, area within 0.1 %", () => {
    const site = siteFromLonLat([[ring]], FRAME, { name: "parcel", simplifyToleranceM: 0 });
    expect(site.simplification).toBeUndefined();
    expect((site.wgs84 as GeoJSON.Polygon).coordinates[0].length).toBe(200_001);
    expect(Math.abs(site.areaM2 - refAreaM2) / refAreaM2).toBeLessThan(1e-3);
  });

  it("the layout stage lays strips over it (heading auto, 36 candidates)", () => {
    const site = readSite(JSON.stringify({ type: "Polygon", coordinates: [ring] }), FRAME);
    const t0 = performance.now();
    const layout = layoutStrips(site, LAYOUT);
    const ms = performance.now() - t0;
    // Reported, not asserted: speed lives in the benchmarks.
    const s = site.simplification;
    process.stdout.write(`layout of the 200k-vertex parcel (${s?.toVertices} vertices kept, area change ${s?.areaChangePct.toPrecision(2)} %): ${Math.round(ms)} ms\n`);
    const strips = layout.legs.filter((l) => l.kind === "strip");
    // About 600 m across at 40 m spacing: 14 to 17 strips whatever the heading (width 2 * 300 * (1 +- 0.11)).
    const n = new Set(strips.map((l) => l.strip)).size;
    expect(n).toBeGreaterThanOrEqual(14);
    expect(n).toBeLessThanOrEqual(17);
  });

  it("KML 2.2 with the same outline reads the same (the KML walk does not recurse per element)", () => {
    const coords = ring.map(([lon, lat]) => `${lon},${lat}`).join(" ");
    const kml = `<?xml version="1.0" encoding="UTF-8"?><kml xmlns="http://www.opengis.net/kml/2.2"><Placemark><name>Parcel</name><Polygon><outerBoundaryIs><LinearRing><coordinates>${coords}</coordinates></LinearRing></outerBoundaryIs></Polygon></Placemark></kml>`;
    const site = readSite(kml, FRAME);
    expect(site.simplification?.fromVertices).toBe(200_000);
    expect(Math.abs(site.areaM2 - refAreaM2) / refAreaM2).toBeLessThan(1e-3);
  });
});

describe("simplification keeps the area to 0.1 %", () => {
  it("a sawtooth edge whose teeth a coarse tolerance would cut: the tolerance is halved until the area holds", () => {
    // A 100 m square whose south edge has 1 m deep teeth every 0.5 m: the teeth add
    // 100 m * 1 m / 2 = 50 m² to 10 000 m² (0.5 %), so dropping them breaks the 0.1 % rule.
    // The other three sides carry 1 000 collinear vertices each, which any tolerance drops.
    const local: number[][] = [];
    for (let i = 0; i < 200; i++) local.push([i * 0.5, 0], [i * 0.5 + 0.25, -1]);
    for (let i = 0; i < 1000; i++) local.push([100, i / 10]);
    for (let i = 0; i < 1000; i++) local.push([100 - i / 10, 100]);
    for (let i = 0; i < 1000; i++) local.push([0, 100 - i / 10]);
    local.push([0, 0]);
    const ring = local.map(([x, y]) => FRAME.toWgs84(x, y));
    const site = siteFromLonLat([[ring]], FRAME, { name: "saw", simplifyToleranceM: 4 });
    // A line through the middle of the teeth lies within 0.5 m of every corner, so from
    // 4 m down to 0.5 m Douglas-Peucker may flatten them; below that the area decides.
    expect(site.simplification?.toleranceM).toBeLessThan(0.5);
    expect(site.simplification?.areaChangePct).toBeLessThanOrEqual(0.1);
    // All 400 teeth corners stay, plus three square corners; the collinear vertices go.
    expect(site.simplification?.toVertices).toBe(400 + 3);
    expect(Math.abs(site.areaM2 - 10_050) / 10_050).toBeLessThan(1e-3);
  });

  it("a tolerance of 0 keeps every vertex; outlines up to 2 000 vertices are not simplified by default, larger ones are", () => {
    const ring = wobblyParcel(1_500);
    expect(siteFromLonLat([[ring]], FRAME, { name: "a", simplifyToleranceM: 0 }).simplification).toBeUndefined();
    expect(siteFromLonLat([[ring]], FRAME, { name: "a" }).simplification).toBeUndefined();
    expect(siteFromLonLat([[ring]], FRAME, { name: "a", simplifyToleranceM: 0.1 }).simplification?.toVertices).toBeLessThan(1_500);
    expect(siteFromLonLat([[wobblyParcel(2_500)]], FRAME, { name: "a" }).simplification?.toleranceM).toBe(0.05);
  });
});

describe("deeply nested site files (the walks keep an explicit stack)", () => {
  const square = [[15, 47], [15.001, 47], [15.001, 47.001], [15, 47.001], [15, 47]];
  const plain = readSite(JSON.stringify({ type: "Polygon", coordinates: [square] }), FRAME).areaM2;

  it("GeoJSON: a polygon at the bottom of 20 000 nested GeometryCollections (RFC 7946 3.1.8 allows nesting)", () => {
    const depth = 20_000;
    const text = '{"type":"GeometryCollection","geometries":['.repeat(depth) + JSON.stringify({ type: "Polygon", coordinates: [square] }) + "]}".repeat(depth);
    expect(readSite(text, FRAME).areaM2).toBe(plain);
  });

  it("KML: a polygon inside 50 000 nested Folders (OGC 07-147r2 lets Folders nest)", () => {
    const depth = 50_000;
    const coords = square.map(([lon, lat]) => `${lon},${lat}`).join(" ");
    const kml = `<kml xmlns="http://www.opengis.net/kml/2.2">${"<Folder>".repeat(depth)}<Placemark><Polygon><outerBoundaryIs><LinearRing><coordinates>${coords}</coordinates></LinearRing></outerBoundaryIs></Polygon></Placemark>${"</Folder>".repeat(depth)}</kml>`;
    expect(readSite(kml, FRAME).areaM2).toBe(plain);
  });
});

function distToSegment(x: number, y: number, a: number[], b: number[]): number {
  const dx = b[0] - a[0], dy = b[1] - a[1];
  const len2 = dx * dx + dy * dy;
  const t = len2 > 0 ? Math.max(0, Math.min(1, ((x - a[0]) * dx + (y - a[1]) * dy) / len2)) : 0;
  return Math.hypot(x - a[0] - t * dx, y - a[1] - t * dy);
}
