import { describe, it, expect } from "vitest";
import geodesic from "geographiclib-geodesic";
import { kml as kmlToGeoJson } from "@tmcw/togeojson";
import { DOMParser } from "@xmldom/xmldom";
import { readSite, siteFromBbox, siteCoverage } from "../../src/layout/site.js";
import { InputError } from "../../src/errors.js";
import { makeGrid } from "../../src/dem/sample.js";
import { UTM33, E0, N0, lonLatRing, polygonText, projFrame, rect } from "./frame-helper.js";

const WGS84 = geodesic.Geodesic.WGS84;

/** Geodesic area of a lon/lat ring (GeographicLib PolygonArea), m², unsigned. */
function geodesicAreaM2(ring: number[][]): number {
  const p = WGS84.Polygon(false);
  const open = ring.slice(0, -1);
  for (const [lon, lat] of open) p.AddPoint(lat, lon);
  return Math.abs(p.Compute(false, true).area ?? NaN);
}

function inputError(fn: () => unknown): InputError {
  try {
    fn();
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error("expected an InputError");
}

describe("readSite: formats (RFC 7946 GeoJSON, KML 2.2, bbox)", () => {
  const outer = rect(0, 0, 400, 300);
  const hole = [[100, 100], [100, 200], [200, 200], [200, 100], [100, 100]]; // clockwise, RFC 7946 hole winding

  it("a Polygon with a hole: area in the frame matches GeographicLib's geodesic area within 0.1 %", () => {
    const site = readSite(polygonText([outer, hole]), UTM33);
    const ref = geodesicAreaM2(lonLatRing(outer)) - geodesicAreaM2(lonLatRing(hole));
    // GeographicLib PolygonArea is the reference; UTM's scale factor near the
    // central meridian (0.9996, so area x 0.9992; Snyder, Map Projections — A
    // Working Manual, USGS PP 1395, ch. 8) is why 0.1 % is the tolerance.
    expect(Math.abs(site.areaM2 - ref) / ref).toBeLessThan(1e-3);
    // The frame's own metres: 400 x 300 - 100 x 100, up to rounding of the lon/lat round trip.
    expect(site.areaM2).toBeCloseTo(110_000, -1);
    expect(site.local.type).toBe("Polygon");
  });

  it("a FeatureCollection uses every polygon feature and takes the name property", () => {
    const fc = {
      type: "FeatureCollection",
      features: [
        { type: "Feature", properties: { name: "North field" }, geometry: { type: "Polygon", coordinates: [lonLatRing(rect(0, 0, 100, 100))] } },
        { type: "Feature", properties: {}, geometry: { type: "Point", coordinates: lonLatRing([[0, 0]])[0] } },
        { type: "Feature", properties: {}, geometry: { type: "MultiPolygon", coordinates: [[lonLatRing(rect(300, 0, 400, 100))], [lonLatRing(rect(600, 0, 700, 50))]] } },
      ],
    };
    const site = readSite(JSON.stringify(fc), UTM33);
    expect(site.local.type).toBe("MultiPolygon");
    expect(site.local.coordinates.length).toBe(3);
    expect(site.name).toBe("North field");
    expect(site.areaM2).toBeCloseTo(10_000 + 10_000 + 5_000, -1);
  });

  it("wrong winding is fixed silently and noted (RFC 7946 section 3.1.6: outer rings counter-clockwise)", () => {
    const cw = [...outer].reverse();
    const site = readSite(polygonText([cw]), UTM33);
    expect(site.notes?.some((n) => /rewound/.test(n))).toBe(true);
    const ring = (site.wgs84 as GeoJSON.Polygon).coordinates[0];
    // Shoelace in lon/lat: positive means counter-clockwise.
    let s = 0;
    for (let i = 0; i + 1 < ring.length; i++) s += ring[i][0] * ring[i + 1][1] - ring[i + 1][0] * ring[i][1];
    expect(s).toBeGreaterThan(0);
    expect(site.areaM2).toBeCloseTo(120_000, -1);
  });

  it("KML 2.2 Polygon with innerBoundaryIs and MultiGeometry gives the same rings as @tmcw/togeojson", () => {
    const coords = (r: number[][]) => lonLatRing(r).map(([lon, lat]) => `${lon},${lat},0`).join(" ");
    const kml = `<?xml version="1.0" encoding="UTF-8"?>
<kml xmlns="http://www.opengis.net/kml/2.2"><Document><name>Vineyard</name><Placemark><name>Vineyard</name>
<MultiGeometry>
<Polygon><outerBoundaryIs><LinearRing><coordinates>${coords(outer)}</coordinates></LinearRing></outerBoundaryIs>
<innerBoundaryIs><LinearRing><coordinates>${coords(hole)}</coordinates></LinearRing></innerBoundaryIs></Polygon>
<Polygon><outerBoundaryIs><LinearRing><coordinates>${coords(rect(600, 0, 700, 100))}</coordinates></LinearRing></outerBoundaryIs></Polygon>
</MultiGeometry></Placemark></Document></kml>`;
    const site = readSite(kml, UTM33);
    expect(site.name).toBe("Vineyard");
    // Reference reading: @tmcw/togeojson, an independent KML-to-GeoJSON converter.
    const ref = kmlToGeoJson(new DOMParser().parseFromString(kml, "text/xml") as never);
    const refGeom = ref.features[0].geometry as GeoJSON.GeometryCollection;
    const refPolys = refGeom.geometries.map((g) => (g as GeoJSON.Polygon).coordinates);
    const ours = (site.wgs84 as GeoJSON.MultiPolygon).coordinates;
    expect(ours.length).toBe(refPolys.length);
    ours.forEach((poly, i) => {
      expect(poly.length).toBe(refPolys[i].length);
      poly.forEach((ring, j) => {
        expect(ring.length).toBe(refPolys[i][j].length);
        ring.forEach((p, k) => {
          expect(p[0]).toBeCloseTo(refPolys[i][j][k][0], 12);
          expect(p[1]).toBeCloseTo(refPolys[i][j][k][1], 12);
        });
      });
    });
    expect(site.areaM2).toBeCloseTo(110_000 + 10_000, -1);
  });

  it("a bbox [west,south,east,north]: area matches GeographicLib within 0.1 %", () => {
    const bbox = [14.99, 46.99, 15.01, 47.0];
    const site = siteFromBbox(bbox, UTM33);
    const ring = [[14.99, 46.99], [15.01, 46.99], [15.01, 47.0], [14.99, 47.0], [14.99, 46.99]];
    const ref = geodesicAreaM2(ring);
    // UTM scale factor, see above; the straight-in-UTM vs geodesic edge difference is far below this.
    expect(Math.abs(site.areaM2 - ref) / ref).toBeLessThan(1e-3);
    expect(readSite("14.99,46.99,15.01,47.0", UTM33).areaM2).toBeCloseTo(site.areaM2, 6);
  });

  it("a polygon crossing the antimeridian stays whole: area matches GeographicLib, WGS84 copy split at 180 (RFC 7946 3.1.9)", () => {
    // Transverse Mercator on the 180th meridian: a frame for a site there.
    const frame = projFrame("+proj=tmerc +lat_0=0 +lon_0=180 +k=1 +x_0=0 +y_0=0 +datum=WGS84 +units=m +no_defs");
    const ring = [[179.99, -17.0], [-179.99, -17.0], [-179.99, -16.99], [179.99, -16.99], [179.99, -17.0]];
    const site = readSite(JSON.stringify({ type: "Polygon", coordinates: [ring] }), frame);
    const ref = geodesicAreaM2(ring);
    // GeographicLib handles the antimeridian natively; k = 1 on the central meridian.
    expect(Math.abs(site.areaM2 - ref) / ref).toBeLessThan(1e-3);
    expect(site.local.type).toBe("Polygon");
    expect(site.wgs84.type).toBe("MultiPolygon");
    for (const poly of (site.wgs84 as GeoJSON.MultiPolygon).coordinates) for (const [lon] of poly[0]) expect(Math.abs(lon)).toBeLessThanOrEqual(180);
  });
});

describe("readSite: bad input is refused with one clear line", () => {
  it("a self-intersecting ring (turf kinks): names the ring and the kink position", () => {
    const bow = [[0, 0], [100, 100], [100, 0], [0, 100], [0, 0]];
    const e = inputError(() => readSite(polygonText([bow]), UTM33));
    expect(e.message).toMatch(/outer ring/);
    expect(e.message).toMatch(/self-intersects/);
    // The crossing of the two diagonals of the bow tie is at the square's centre (50, 50).
    const [lon, lat] = UTM33.toWgs84(E0 + 50, N0 + 50);
    expect(e.message).toContain(`lon ${lon.toFixed(6)}, lat ${lat.toFixed(6)}`);
  });

  it("a hole crossing the outer ring is refused", () => {
    const e = inputError(() => readSite(polygonText([rect(0, 0, 100, 100), [[50, 50], [50, 150], [60, 150], [60, 50], [50, 50]]]), UTM33));
    expect(e.message).toMatch(/crosses/);
  });

  it("overlapping polygons in one site are refused (touching ones are fine)", () => {
    const mp = (a: number[][], b: number[][]) => JSON.stringify({ type: "MultiPolygon", coordinates: [[lonLatRing(a)], [lonLatRing(b)]] });
    const e = inputError(() => readSite(mp(rect(0, 0, 100, 100), rect(50, 50, 150, 150)), UTM33));
    expect(e.message).toMatch(/overlap/);
    expect(readSite(mp(rect(0, 0, 100, 100), rect(200, 0, 300, 100)), UTM33).areaM2).toBeCloseTo(20_000, -1);
  });

  it("fewer than three distinct corners", () => {
    const e = inputError(() => readSite(polygonText([[[0, 0], [100, 0], [0, 0], [100, 0], [0, 0]]]), UTM33));
    expect(e.message).toMatch(/only 2 distinct corners/);
  });

  it("coordinates that are not WGS84 (UTM metres given as if lon/lat)", () => {
    const text = JSON.stringify({ type: "Polygon", coordinates: [[[E0, N0], [E0 + 100, N0], [E0 + 100, N0 + 100], [E0, N0]]] });
    const e = inputError(() => readSite(text, UTM33));
    expect(e.message).toMatch(/must be WGS84/);
  });

  it("a GeoJSON crs member naming another CRS (GeoJSON 2008 style) is refused: RFC 7946 section 4 allows WGS84 only", () => {
    const text = JSON.stringify({
      type: "Polygon",
      crs: { type: "name", properties: { name: "urn:ogc:def:crs:EPSG::32633" } },
      coordinates: [lonLatRing(rect(0, 0, 100, 100))],
    });
    const e = inputError(() => readSite(text, UTM33));
    expect(e.message).toMatch(/must be WGS84/);
    expect(e.message).toContain("EPSG::32633");
    // CRS84 is WGS84 lon/lat and is accepted.
    const ok = JSON.parse(text);
    ok.crs.properties.name = "urn:ogc:def:crs:OGC:1.3:CRS84";
    expect(readSite(JSON.stringify(ok), UTM33).areaM2).toBeGreaterThan(0);
  });

  it("a FeatureCollection with only a Point says what it found", () => {
    const text = JSON.stringify({ type: "FeatureCollection", features: [{ type: "Feature", properties: {}, geometry: { type: "Point", coordinates: [15, 47] } }] });
    const e = inputError(() => readSite(text, UTM33));
    expect(e.message).toContain("a FeatureCollection with only a Point");
  });
});

describe("siteCoverage: the part of the site without DEM heights", () => {
  // DEM covering x in [E0 - 50, E0 + 150], y in [N0 - 50, N0 + 150], 1 m cells.
  const grid = makeGrid({ width: 200, height: 200, x0: E0 - 50, y0: N0 + 150, cellM: 1, heights: () => 300 });

  it("wholly inside: nothing reported", () => {
    const site = readSite(polygonText([rect(0, 0, 100, 100)]), UTM33);
    const cov = siteCoverage(site, grid);
    expect(cov.outsideAreaM2).toBe(0);
    expect(cov.message).toBe("");
  });

  it("partly outside: the uncovered area is reported (site x in [100, 200], DEM ends at 150: half uncovered)", () => {
    const site = readSite(polygonText([rect(100, 0, 200, 100)]), UTM33);
    const cov = siteCoverage(site, grid);
    // Geometry: the DEM's east edge at +150 m cuts the 100 m wide site in half.
    expect(cov.outsideFraction).toBeGreaterThan(0.49);
    expect(cov.outsideFraction).toBeLessThan(0.51);
    expect(cov.message).toMatch(/% of the site/);
  });

  it("nodata cells count as uncovered", () => {
    const holey = makeGrid({ width: 200, height: 200, x0: E0 - 50, y0: N0 + 150, cellM: 1, heights: (x) => (x < E0 + 50 ? NaN : 300) });
    const cov = siteCoverage(readSite(polygonText([rect(0, 0, 100, 100)]), UTM33), holey);
    expect(cov.outsideFraction).toBeGreaterThan(0.49);
    expect(cov.outsideFraction).toBeLessThan(0.51);
  });

  it("wholly outside: InputError", () => {
    const site = readSite(polygonText([rect(1000, 1000, 1100, 1100)]), UTM33);
    const e = inputError(() => siteCoverage(site, grid));
    expect(e.message).toMatch(/wholly outside the DEM/);
  });
});
