import { execFileSync } from "node:child_process";
import { mkdirSync, mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { booleanClockwise } from "@turf/turf";
import { describe, expect, it } from "vitest";
import { InputError, InputFileError } from "../../src/errors.js";
import { parseKeepOutText, readKeepOutFiles, type ParsedKeepOut } from "../../src/route/zoneFile.js";
import { HAS_GDAL } from "../helpers/tools.js";

// Keep-out zone files. The fixtures (fixtures/keepout/README.md) are test cases: rectangles
// beside the hole fixture, taken from UTM 33N to WGS84 by PROJ's cs2cs. What is asserted
// about them comes from GDAL/OGR reading the same files, and from turf for ring winding.

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..");
const GEOJSON = path.join(ROOT, "fixtures/keepout/hole-zones.geojson");
const KML = path.join(ROOT, "fixtures/keepout/hole-zones.kml");

const ring = (pts: number[][]) => [...pts, pts[0]];
/** A small square near 16.33 E, 47.49 N, counter-clockwise, closed. */
const square = (lon: number, lat: number, d = 0.001) => ring([[lon, lat], [lon + d, lat], [lon + d, lat + d], [lon, lat + d]]);

function thrown(fn: () => unknown): Error {
  try {
    fn();
  } catch (e) {
    return e as Error;
  }
  throw new Error("expected an error");
}

async function rejected(p: Promise<unknown>): Promise<Error> {
  try {
    await p;
  } catch (e) {
    return e as Error;
  }
  throw new Error("expected a rejection");
}

/** A ring as a set of "lon,lat" corners (open), to compare rings whatever their start and winding. */
const corners = (r: number[][]) => new Set((r[0][0] === r[r.length - 1][0] && r[0][1] === r[r.length - 1][1] ? r.slice(0, -1) : r).map((p) => `${p[0]},${p[1]}`));

/** GDAL's reading of a vector file: ogr2ogr -f GeoJSON to stdout. */
function ogrFeatures(file: string): { properties: Record<string, unknown>; geometry: { type: string; coordinates: number[][][] | number[][][][] } }[] {
  return JSON.parse(execFileSync("ogr2ogr", ["-f", "GeoJSON", "/vsistdout/", file], { encoding: "utf8", stdio: ["ignore", "pipe", "ignore"] })).features;
}

/** OGR's polygons of a feature as rings of corner sets. */
function ogrPolygons(g: { type: string; coordinates: number[][][] | number[][][][] }): Set<string>[][] {
  const polys = (g.type === "Polygon" ? [g.coordinates] : g.coordinates) as number[][][][];
  return polys.map((p) => p.map((r) => corners(r.map((c) => [c[0], c[1]]))));
}

const ourPolygons = (z: ParsedKeepOut) => z.polygons.map((p) => p.map(corners));

/** OGR's SQLite dialect (SpatiaLite ST_IsValid, OGC Simple Features validity) on a GeoJSON geometry. */
function ogrValid(geometry: object): boolean {
  const dir = mkdtempSync(path.join(tmpdir(), "gsdplan-zone-valid-"));
  const file = path.join(dir, "g.geojson");
  writeFileSync(file, JSON.stringify({ type: "FeatureCollection", features: [{ type: "Feature", properties: {}, geometry }] }));
  const out = execFileSync("ogrinfo", [file, "-dialect", "sqlite", "-sql", "SELECT ST_IsValid(geometry) AS v FROM g"], { encoding: "utf8", stdio: ["ignore", "pipe", "ignore"] });
  return /v \(Integer\) = 1/.test(out);
}

describe("parseKeepOutText: GeoJSON (RFC 7946)", () => {
  it("a bare Polygon is one zone named after the file (stem and number), rings open and outer counter-clockwise", () => {
    const cw = [...square(16.33, 47.49)].reverse();
    const zones = parseKeepOutText(JSON.stringify({ type: "Polygon", coordinates: [cw] }), "/data/school.geojson");
    expect(zones).toHaveLength(1);
    expect(zones[0].name).toBe("school 1");
    expect(zones[0].source).toBe("school.geojson");
    expect(zones[0].bufferM).toBeUndefined();
    expect(zones[0].polygons[0][0]).toHaveLength(4); // closing repeat dropped
    // RFC 7946 section 3.1.6: exterior rings counter-clockwise; turf's booleanClockwise (shoelace sign) says so.
    expect(booleanClockwise(ring(zones[0].polygons[0][0]))).toBe(false);
    expect(corners(zones[0].polygons[0][0])).toEqual(corners(cw));
  });

  it("a MultiPolygon feature is one zone with several polygons", () => {
    const f = { type: "Feature", properties: { name: "Pylons" }, geometry: { type: "MultiPolygon", coordinates: [[square(16.33, 47.49)], [square(16.34, 47.49)], [square(16.35, 47.49)]] } };
    const zones = parseKeepOutText(JSON.stringify(f), "p.json");
    expect(zones.map((z) => [z.name, z.polygons.length])).toEqual([["Pylons", 3]]);
  });

  it("a polygon with a hole keeps the hole, wound clockwise (RFC 7946 3.1.6), whatever the file's winding", () => {
    const hole = square(16.3303, 47.4903, 0.0004); // given counter-clockwise: the wrong way for a hole
    const zones = parseKeepOutText(JSON.stringify({ type: "Polygon", coordinates: [square(16.33, 47.49), hole] }), "yard.geojson");
    const rings = zones[0].polygons[0];
    expect(rings).toHaveLength(2);
    expect(booleanClockwise(ring(rings[0]))).toBe(false);
    expect(booleanClockwise(ring(rings[1]))).toBe(true);
    expect(corners(rings[1])).toEqual(corners(hole));
  });

  it("names from name, Name or title; a blank one falls back to <file stem> <k>", () => {
    const feat = (props: object) => ({ type: "Feature", properties: props, geometry: { type: "Polygon", coordinates: [square(16.33, 47.49)] } });
    const fc = { type: "FeatureCollection", features: [feat({ name: "a" }), feat({ Name: "b" }), feat({ title: "c" }), feat({ name: "  " }), feat({})] };
    expect(parseKeepOutText(JSON.stringify(fc), "z.geojson").map((z) => z.name)).toEqual(["a", "b", "c", "z 4", "z 5"]);
  });

  describe.skipIf(!HAS_GDAL)("the fixture FeatureCollection against GDAL/OGR", () => {
    it("three zones with GDAL's names, coordinates and feature count, and their own buffers", async () => {
      const ours = await readKeepOutFiles([GEOJSON]);
      const ogr = ogrFeatures(GEOJSON);
      // ogrinfo / ogr2ogr: 3 features; ours: one zone per feature.
      expect(ours).toHaveLength(ogr.length);
      expect(ogr).toHaveLength(3);
      ours.forEach((z, i) => {
        expect(ourPolygons(z)).toEqual(ogrPolygons(ogr[i].geometry));
        if (typeof ogr[i].properties.name === "string") expect(z.name).toBe(ogr[i].properties.name);
        const b = ogr[i].properties.bufferM;
        expect(z.bufferM).toBe(b === undefined || b === null ? undefined : Number(b));
      });
      expect(ours.map((z) => z.name)).toEqual(["Farm yard", "Pylons", "hole-zones 3"]);
      expect(ours.map((z) => z.bufferM)).toEqual([10, undefined, 2.5]);
      expect(ours[0].polygons[0]).toHaveLength(2); // the yard's courtyard hole
      expect(ours[1].polygons).toHaveLength(2); // two pylons
    });
  });
});

describe("parseKeepOutText: KML 2.2", () => {
  it("Placemarks with names, a MultiGeometry, an innerBoundaryIs and ExtendedData bufferM: the same zones as the GeoJSON fixture", async () => {
    const kml = await readKeepOutFiles([KML]);
    const json = await readKeepOutFiles([GEOJSON]);
    expect(kml.map((z) => z.name)).toEqual(["Farm yard", "Pylons", "hole-zones 3"]);
    expect(kml.map((z) => z.bufferM)).toEqual([10, undefined, 2.5]);
    expect(kml.map((z) => z.polygons)).toEqual(json.map((z) => z.polygons));
    expect(kml[0].source).toBe("hole-zones.kml");
  });

  describe.skipIf(!HAS_GDAL)("against GDAL/OGR", () => {
    it("ogr2ogr -f GeoJSON of the KML: the same names (its Name field) and coordinates", async () => {
      const ours = await readKeepOutFiles([KML]);
      const ogr = ogrFeatures(KML);
      expect(ours).toHaveLength(ogr.length);
      ours.forEach((z, i) => {
        expect(ourPolygons(z)).toEqual(ogrPolygons(ogr[i].geometry));
        if (ogr[i].properties.Name !== undefined) expect(z.name).toBe(ogr[i].properties.Name);
        // GDAL's LIBKML driver reads <Data name="bufferM"><value> as a text field.
        expect(z.bufferM).toBe(ogr[i].properties.bufferM === undefined ? undefined : Number(ogr[i].properties.bufferM));
      });
    });

    it("the GeoJSON GDAL writes from the KML (a CRS84 crs member, Name, bufferM as text) reads as the same zones", () => {
      const text = execFileSync("ogr2ogr", ["-f", "GeoJSON", "/vsistdout/", KML], { encoding: "utf8", stdio: ["ignore", "pipe", "ignore"] });
      expect(text).toContain("urn:ogc:def:crs:OGC:1.3:CRS84");
      const zones = parseKeepOutText(text, "converted.geojson");
      expect(zones.map((z) => [z.name, z.bufferM])).toEqual([["Farm yard", 10], ["Pylons", undefined], ["converted 3", 2.5]]);
    });

    it("the KML GDAL writes from the GeoJSON (ExtendedData SchemaData/SimpleData) keeps names and buffers", () => {
      const text = execFileSync("ogr2ogr", ["-f", "KML", "/vsistdout/", GEOJSON], { encoding: "utf8", stdio: ["ignore", "pipe", "ignore"] });
      expect(text).toContain('<SimpleData name="bufferM">');
      const zones = parseKeepOutText(text, "converted.kml");
      expect(zones.map((z) => [z.name, z.bufferM, z.polygons.length])).toEqual([["Farm yard", 10, 1], ["Pylons", undefined, 2], ["converted 3", 2.5, 1]]);
    });
  });
});

describe("parseKeepOutText: refusals, one line each", () => {
  const feature = (name: string | undefined, geometry: object, props: object = {}) => ({ type: "Feature", properties: { ...(name ? { name } : {}), ...props }, geometry });
  const poly = { type: "Polygon", coordinates: [square(16.33, 47.49)] };

  it("a Point among the zones names the feature and what it is", () => {
    const fc = { type: "FeatureCollection", features: [feature("yard", poly), feature("gate", { type: "Point", coordinates: [16.33, 47.49] })] };
    const e = thrown(() => parseKeepOutText(JSON.stringify(fc), "zones.geojson"));
    expect(e).toBeInstanceOf(InputFileError);
    expect(e.message).toBe('zones.geojson: feature 2 ("gate") is a Point, not a polygon; a keep-out zone must be a Polygon or MultiPolygon');
  });

  it("a file with only points or lines says what it found", () => {
    const fc = { type: "FeatureCollection", features: [feature("a", { type: "Point", coordinates: [16.33, 47.49] }), feature("b", { type: "Point", coordinates: [16.34, 47.49] }), feature("c", { type: "LineString", coordinates: [[16.33, 47.49], [16.34, 47.5]] })] };
    const e = thrown(() => parseKeepOutText(JSON.stringify(fc), "pts.geojson"));
    expect(e).toBeInstanceOf(InputError);
    expect(e.message).toMatch(/^pts\.geojson: no polygon found \(got "a FeatureCollection with only 2 Points and a LineString"/);
    const kml = `<kml xmlns="http://www.opengis.net/kml/2.2"><Placemark><name>path</name><LineString><coordinates>16.33,47.49 16.34,47.5</coordinates></LineString></Placemark></kml>`;
    expect(thrown(() => parseKeepOutText(kml, "line.kml")).message).toMatch(/^line\.kml: no polygon found \(got "a KML document with only a LineString"/);
    const mixed = `<kml><Placemark><name>yard</name><MultiGeometry><Polygon><outerBoundaryIs><LinearRing><coordinates>16.33,47.49 16.331,47.49 16.331,47.491 16.33,47.49</coordinates></LinearRing></outerBoundaryIs></Polygon><Point><coordinates>16.33,47.49</coordinates></Point></MultiGeometry></Placemark></kml>`;
    expect(thrown(() => parseKeepOutText(mixed, "mixed.kml")).message).toBe('mixed.kml: Placemark 1 ("yard") holds a Point besides its polygons; a keep-out zone must be polygons only (put other geometries in another file)');
  });

  it("an empty file, an empty FeatureCollection, a file that is neither GeoJSON nor KML", () => {
    expect(thrown(() => parseKeepOutText(" \n", "e.geojson")).message).toBe("e.geojson: the keepOut file is empty");
    expect(thrown(() => parseKeepOutText('{"type":"FeatureCollection","features":[]}', "e.geojson")).message).toMatch(/no polygon found \(got "an empty FeatureCollection"/);
    expect(thrown(() => parseKeepOutText("name,lon,lat", "z.csv")).message).toMatch(/^z\.csv: not a keep-out zone file/);
  });

  it("a bufferM that is negative or not a number names the feature and the value", () => {
    const e = thrown(() => parseKeepOutText(JSON.stringify(feature("school", poly, { bufferM: -5 })), "s.geojson"));
    expect(e).toBeInstanceOf(InputFileError);
    expect(e.message).toBe('s.geojson: feature ("school"): bufferM must be a number of metres >= 0 (got -5)');
    const kml = `<kml><Document><Placemark><name>road</name><ExtendedData><Data name="bufferM"><value>ten</value></Data></ExtendedData><Polygon><outerBoundaryIs><LinearRing><coordinates>16.33,47.49 16.331,47.49 16.331,47.491 16.33,47.49</coordinates></LinearRing></outerBoundaryIs></Polygon></Placemark></Document></kml>`;
    expect(thrown(() => parseKeepOutText(kml, "r.kml")).message).toBe('r.kml: Placemark 1 ("road"): bufferM must be a number of metres >= 0 (got "ten")');
    // null or blank: no buffer of its own (the plan's keepOutBufferM applies).
    expect(parseKeepOutText(JSON.stringify(feature("x", poly, { bufferM: null })), "n.geojson")[0].bufferM).toBeUndefined();
  });

  it("a crs member naming another CRS is refused as for sites (RFC 7946 section 4: WGS84 only)", () => {
    const e = thrown(() => parseKeepOutText(JSON.stringify({ ...poly, crs: { type: "name", properties: { name: "urn:ogc:def:crs:EPSG::32633" } } }), "utm.geojson"));
    expect(e).toBeInstanceOf(InputError);
    expect(e.message).toMatch(/^utm\.geojson crs: keep-out zones must be WGS84; reproject it first/);
  });

  it("UTM metres given as longitude/latitude are refused", () => {
    const utm = { type: "Polygon", coordinates: [ring([[600180, 5260360], [600300, 5260360], [600300, 5260440]])] };
    expect(thrown(() => parseKeepOutText(JSON.stringify(utm), "m.geojson")).message).toMatch(/^m\.geojson geometry outer ring: coordinates are not WGS84/);
  });

  it("a ring across the antimeridian is refused (zones must be cut at 180 degrees, RFC 7946 3.1.9)", () => {
    const across = { type: "Polygon", coordinates: [ring([[179.9, -17], [-179.9, -17], [-179.9, -16.9], [179.9, -16.9]])] };
    expect(thrown(() => parseKeepOutText(JSON.stringify(across), "fiji.geojson")).message).toMatch(/crosses the antimeridian/);
  });

  describe.skipIf(!HAS_GDAL)("invalid rings: refused where OGR's ST_IsValid (SpatiaLite) says invalid", () => {
    it("a self-intersecting ring (bow tie)", () => {
      const bowtie = { type: "Polygon", coordinates: [ring([[16.33, 47.49], [16.331, 47.491], [16.331, 47.49], [16.33, 47.491]])] };
      expect(ogrValid(bowtie)).toBe(false);
      const e = thrown(() => parseKeepOutText(JSON.stringify(feature("tie", bowtie)), "t.geojson"));
      expect(e.message).toMatch(/^t\.geojson feature \("tie"\) outer ring: the ring self-intersects \(got "kink at lon 16\.330500, lat 47\.490500"/);
    });

    it("a hole outside its outer ring", () => {
      const g = { type: "Polygon", coordinates: [square(16.33, 47.49), square(16.34, 47.49).reverse()] };
      expect(ogrValid(g)).toBe(false);
      expect(thrown(() => parseKeepOutText(JSON.stringify(g), "h.geojson")).message).toMatch(/hole 1: the hole lies outside the outer ring/);
    });

    it("the fixtures' zones are valid for OGR too", () => {
      for (const f of ogrFeatures(GEOJSON)) expect(ogrValid(f.geometry)).toBe(true);
    });
  });

  it("fewer than three distinct corners", () => {
    const g = { type: "Polygon", coordinates: [[[16.33, 47.49], [16.331, 47.49], [16.33, 47.49], [16.331, 47.49]]] };
    expect(thrown(() => parseKeepOutText(JSON.stringify(g), "d.geojson")).message).toMatch(/only 2 distinct corners/);
  });
});

describe("readKeepOutFiles", () => {
  it("zones of every file in order, repeated names made unique", async () => {
    const zones = await readKeepOutFiles([GEOJSON, KML]);
    expect(zones.map((z) => z.name)).toEqual(["Farm yard", "Pylons", "hole-zones 3", "Farm yard (2)", "Pylons (2)", "hole-zones 3 (2)"]);
    expect(zones.map((z) => z.source)).toEqual(["hole-zones.geojson", "hole-zones.geojson", "hole-zones.geojson", "hole-zones.kml", "hole-zones.kml", "hole-zones.kml"]);
  });

  it("a missing file and a folder: InputFileError naming the path", async () => {
    const dir = mkdtempSync(path.join(tmpdir(), "gsdplan-zones-"));
    const missing = path.join(dir, "nope.geojson");
    const e = await rejected(readKeepOutFiles([GEOJSON, missing]));
    expect(e).toBeInstanceOf(InputFileError);
    expect(e.message).toBe(`${missing}: keepOut file not found`);
    const folder = path.join(dir, "zones.kml");
    mkdirSync(folder);
    expect((await rejected(readKeepOutFiles([folder]))).message).toBe(`${folder}: keepOut names a folder, not a file`);
  });

  it("a bad file is named by its path in the message", async () => {
    const dir = mkdtempSync(path.join(tmpdir(), "gsdplan-zones-"));
    const file = path.join(dir, "bad.geojson");
    writeFileSync(file, "{ not json");
    expect((await rejected(readKeepOutFiles([file]))).message).toMatch(new RegExp(`^${file.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")}: not valid JSON`));
  });
});
