/**
 * The end-to-end suite of `gsdplan plan` on one GDAL-written hilly fixture:
 * run the built CLI once, then read every output back with a reader that is
 * not ours (GDAL, PROJ, turf, togeojson over xmldom, the geotiff package) and
 * check it against the contract and against those references.
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { execFileSync } from "node:child_process";
import { readFileSync, readdirSync, rmSync } from "node:fs";
import path from "node:path";
import { DOMParser } from "@xmldom/xmldom";
import { gpx, kml } from "@tmcw/togeojson";
import { booleanClockwise, booleanValid } from "@turf/turf";
import type { Feature, FeatureCollection, Geometry, LineString, Point, Position } from "geojson";
import { fromArrayBuffer } from "geotiff";
import geodesic from "geographiclib-geodesic";
import { HAS_GDAL, HAS_PROJ } from "../helpers/tools.js";
import { ROOT, parseCsv, runCli, sha256, tempDir, type CliResult } from "./cli.js";
import { cs2csFromWgs84, gdalBilinearM, gdalCellValues, gdalinfoJson, projEgm96UndulationsM } from "./reference.js";

/** The exact header of waypoints.csv (issue 6, "Outputs"; issue 13 added height_above_terrain_m after the contract columns). */
export const CSV_HEADER =
  "flight,strip,index,segment,longitude,latitude,altitude_amsl_m,altitude_ellipsoid_m,altitude_takeoff_m,ground_amsl_m,height_above_ground_m,speed_m_s,height_above_terrain_m";

/** The output set of one run (issue 6, "Outputs in --out"). */
export const OUTPUT_FILES = [
  "flags.tif",
  "flights.csv",
  "gsd.tif",
  "images.tif",
  "plan.geojson",
  "plan.gpx",
  "plan.kml",
  "report-data.json",
  "report.html",
  "summary.json",
  "waypoints.csv",
];

export interface HillsCase {
  title: string;
  /** Plan file, relative to the repository root. */
  planFile: string;
  /** DEM and site files named by the plan (checksummed before and after). */
  dem: string;
  site: string;
  /** EPSG code of the DEM's horizontal CRS (for cs2cs). */
  demEpsg: number;
  /** Stored height unit to metres. */
  demUnitToM: number;
  /** Expected summary.verticalDatum (what the file declares). */
  verticalDatum: string;
  /** EPSG code of the working frame the tool should choose (null: the DEM's own CRS taken in metres). */
  frameEpsg: number | null;
  /** Working-grid cell size in metres. */
  cellSizeM: number;
  /** Plan figures for the camera checks (domain formulas). */
  plan: { gsdCm: number; tolerancePct: number; imageWidthPx: number; imageHeightPx: number; frontPct: number; sidePct: number; speedMps: number; ceilingM: number; clearanceM: number };
  /** Rough EGM96 undulation there, from memory, only to check PROJ's sign convention. */
  undulationRoughM: number;
}

const TYPE_7 = (sorted: Float64Array, p: number): number => {
  // Hyndman & Fan (1996) sample quantile type 7 (R's default, numpy's "linear").
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(sorted.length - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
};

interface Row {
  flight: number;
  strip: number;
  index: number;
  segment: string;
  lon: number;
  lat: number;
  amsl: number;
  ell: number;
  takeoff: number;
  ground: number;
  agl: number;
  speed: number;
}

// togeojson's types name the DOM's Document; xmldom's document is what it reads.
type Doc = Parameters<typeof kml>[0];
function parseXml(text: string): Doc {
  const errors: string[] = [];
  const doc = new DOMParser({ onError: (level, msg) => { if (level !== "warning") errors.push(msg); } }).parseFromString(text, "text/xml");
  if (errors.length) throw new Error(`XML errors: ${errors.join("; ")}`);
  return doc as unknown as Doc;
}

/** `ogrinfo -ro -al -so` layer names and feature counts (GDAL's own vector readers). */
function ogrLayers(file: string): { name: string; count: number }[] {
  const out = execFileSync("ogrinfo", ["-ro", "-al", "-so", file], { encoding: "utf8", env: { ...process.env, GDAL_PAM_ENABLED: "NO" } });
  const layers: { name: string; count: number }[] = [];
  for (const line of out.split("\n")) {
    const n = /^Layer name: (.*)$/.exec(line);
    if (n) layers.push({ name: n[1].trim(), count: NaN });
    const c = /^Feature Count: (\d+)/.exec(line);
    if (c && layers.length) layers[layers.length - 1].count = Number(c[1]);
  }
  return layers;
}

function allPositions(g: Geometry): Position[] {
  switch (g.type) {
    case "Point":
      return [g.coordinates];
    case "LineString":
    case "MultiPoint":
      return g.coordinates;
    case "Polygon":
    case "MultiLineString":
      return g.coordinates.flat();
    case "MultiPolygon":
      return g.coordinates.flat(2);
    case "GeometryCollection":
      return g.geometries.flatMap(allPositions);
  }
}

const near = (a: number, b: number, tol: number) => Math.abs(a - b) <= tol;

/** Defines the suite for one fixture. */
export function hillsPlanSuite(c: HillsCase): void {
  describe.skipIf(!HAS_GDAL || !HAS_PROJ)(`gsdplan plan end to end: ${c.title}`, () => {
    let work = "";
    let out = "";
    let run: CliResult;
    let rows: Row[] = [];
    let header: string[] = [];
    let summary: Record<string, any> = {};
    /** Each flight's take-off point and ground, from flights.csv (blocks take off from their own points). */
    let takeoffOf = new Map<number, { lon: number; lat: number; groundAmslM: number }>();
    const inputs = [c.planFile, c.dem, c.site].map((f) => path.join(ROOT, f));
    let before: string[] = [];

    beforeAll(() => {
      work = tempDir("hills");
      out = path.join(work, "out");
      before = inputs.map(sha256);
      run = runCli(["plan", c.planFile, "--out", out]);
      if (run.status !== 0) throw new Error(`plan failed (${run.status}): ${run.stderr}`);
      const csv = parseCsv(readFileSync(path.join(out, "waypoints.csv"), "utf8"));
      const fl = parseCsv(readFileSync(path.join(out, "flights.csv"), "utf8"));
      takeoffOf = new Map(fl.rows.map((r) => [Number(r[0]), { lon: Number(r[2]), lat: Number(r[3]), groundAmslM: Number(r[4]) }]));
      header = csv.header;
      rows = csv.rows.map((r) => ({
        flight: Number(r[0]),
        strip: Number(r[1]),
        index: Number(r[2]),
        segment: r[3],
        lon: Number(r[4]),
        lat: Number(r[5]),
        amsl: Number(r[6]),
        ell: Number(r[7]),
        takeoff: Number(r[8]),
        ground: Number(r[9]),
        agl: Number(r[10]),
        speed: Number(r[11]),
      }));
      summary = JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8"));
    }, 120_000);
    afterAll(() => {
      if (work) rmSync(work, { recursive: true, force: true });
    });

    it("exits 0 and writes the whole output set and nothing else (issue 6: atomic output set)", () => {
      expect(run.status).toBe(0);
      expect(readdirSync(out).sort()).toEqual(OUTPUT_FILES);
    });

    it("never writes its inputs: DEM, site and plan file keep their bytes (issue 6, Behaviour)", () => {
      expect(inputs.map(sha256)).toEqual(before);
    });

    it("prints no progress display when stderr is a pipe (issue 6, Behaviour)", () => {
      expect(run.stderr).not.toMatch(/\r|\[#|\x1b\[/);
    });

    describe("waypoints.csv", () => {
      it("has exactly the contract header, twelve finite contract fields per row, and an empty height above terrain without a dtm", () => {
        expect(header.join(",")).toBe(CSV_HEADER);
        expect(rows.length).toBeGreaterThan(2);
        expect(rows.length).toBe(summary.waypoints);
        for (const r of rows) {
          for (const v of [r.flight, r.strip, r.index, r.lon, r.lat, r.amsl, r.ell, r.takeoff, r.ground, r.agl, r.speed]) expect(Number.isFinite(v)).toBe(true);
          expect(["strip", "transit"]).toContain(r.segment);
        }
        for (const line of readFileSync(path.join(out, "waypoints.csv"), "utf8").trim().split(/\r?\n/).slice(1)) expect(line.endsWith(",")).toBe(true);
      });

      it("ground equals GDAL's height at each waypoint within 0.05 m (bilinear from gdallocationinfo's four cells)", () => {
        // Reference: PROJ cs2cs takes each lon/lat into the DEM's CRS; GDAL's
        // gdallocationinfo gives the four cell values around it (GDAL 3.6 has no
        // bilinear option); the bilinear weights are computed here.
        const xy = cs2csFromWgs84(c.demEpsg, rows.map((r) => [r.lon, r.lat]));
        const gdal = gdalBilinearM(path.join(ROOT, c.dem), xy, c.demUnitToM);
        const worst = Math.max(...rows.map((r, i) => Math.abs(r.ground - gdal[i])));
        expect(worst).toBeLessThanOrEqual(0.05);
      });

      it("height above ground = AMSL - ground (to the CSV's 0.01 m rounding)", () => {
        for (const r of rows) expect(Math.abs(r.agl - (r.amsl - r.ground))).toBeLessThanOrEqual(0.0151);
      });

      it("ellipsoidal - AMSL equals PROJ's EGM96 undulation (egm96_15.gtx) within 0.1 m", () => {
        const n = projEgm96UndulationsM(rows.map((r) => [r.lon, r.lat]));
        // Sign check of the reference itself: N is about +47 m over south-east
        // Austria and about -32 m around San Francisco Bay (from memory).
        expect(Math.abs(n[0] - c.undulationRoughM)).toBeLessThan(5);
        const worst = Math.max(...rows.map((r, i) => Math.abs(r.ell - r.amsl - n[i])));
        expect(worst).toBeLessThanOrEqual(0.1);
      });

      it("above take-off = AMSL - the flight's take-off ground, and that ground is GDAL's height at its take-off point", () => {
        for (const r of rows) expect(Math.abs(r.takeoff - (r.amsl - takeoffOf.get(r.flight)!.groundAmslM))).toBeLessThanOrEqual(0.0151);
        const points = [...new Map([...takeoffOf.values()].map((t) => [`${t.lon},${t.lat}`, t])).values()];
        const xy = cs2csFromWgs84(c.demEpsg, points.map((t) => [t.lon, t.lat]));
        const g = gdalBilinearM(path.join(ROOT, c.dem), xy, c.demUnitToM);
        points.forEach((t, i) => expect(Math.abs(t.groundAmslM - g[i])).toBeLessThanOrEqual(0.05));
      });

      it("every flight starts and ends over its take-off point; its first row is a transit at speed 0 (issue 6)", () => {
        const flights = [...new Set(rows.map((r) => r.flight))];
        expect(flights).toEqual(Array.from({ length: summary.flights }, (_, i) => i + 1));
        for (const f of flights) {
          const t = takeoffOf.get(f)!;
          const fr = rows.filter((r) => r.flight === f);
          const first = fr[0];
          const last = fr[fr.length - 1];
          expect(first.segment).toBe("transit");
          expect(first.speed).toBe(0);
          for (const p of [first, last]) {
            expect(near(p.lon, t.lon, 2e-7) && near(p.lat, t.lat, 2e-7)).toBe(true);
            expect(Math.abs(p.ground - t.groundAmslM)).toBeLessThanOrEqual(0.011);
          }
        }
      });

      it("strips are numbered from 1 in flight order and index counts from 1 within a strip (issue 6)", () => {
        const seen: number[] = [];
        for (const r of rows) if (r.segment === "strip" && !seen.includes(r.strip)) seen.push(r.strip);
        expect(seen).toEqual(Array.from({ length: summary.strips }, (_, i) => i + 1));
        for (let i = 0; i < rows.length; i++) {
          const p = rows[i - 1];
          const r = rows[i];
          const continues = p && p.flight === r.flight && p.strip === r.strip;
          expect(r.index).toBe(continues ? p.index + 1 : 1);
        }
      });

      it("transit rows carry the strip they lead into", () => {
        for (let i = 0; i + 1 < rows.length; i++) {
          const r = rows[i];
          const n = rows[i + 1];
          if (r.segment === "transit" && n.segment === "strip" && n.flight === r.flight) expect(r.strip).toBe(n.strip);
        }
      });

      it("keeps the minimum clearance above the ground below and photo legs within the planned speed (issue 4: hard lower bound)", () => {
        // The hard lower bound is clearance above the highest ground within the safety
        // radius, so it is at least clearance above the ground straight below.
        for (const r of rows) expect(r.agl).toBeGreaterThanOrEqual(c.plan.clearanceM - 0.02);
        for (const r of rows) if (r.segment === "strip") {
          expect(r.speed).toBeGreaterThan(0);
          expect(r.speed).toBeLessThanOrEqual(summary.speedMps + 0.01);
        }
      });
    });

    describe("summary.json", () => {
      it("has every contract key, numbers finite (issue 6, Outputs)", () => {
        const num = (v: unknown) => expect(typeof v === "number" && Number.isFinite(v), String(v)).toBe(true);
        for (const k of ["strips", "waypoints", "photos", "flights", "pathLengthM", "flightTimeS", "headingDeg", "lineSpacingM", "triggerDistanceM", "speedMps"]) num(summary[k]);
        expect(typeof summary.speedLimit).toBe("string");
        for (const k of ["target", "low", "high", "min", "p5", "median", "p95", "max"]) num(summary.gsdCm[k]);
        num(summary.withinBandPct);
        num(summary.images.min);
        num(summary.images.median);
        num(summary.flagged.cells);
        num(summary.flagged.areaM2);
        expect(typeof summary.flagged.byKind).toBe("object");
        for (const v of Object.values(summary.flagged.byKind) as { cells: number; areaM2: number }[]) {
          num(v.cells);
          num(v.areaM2);
        }
        num(summary.ceiling.heightM);
        expect(["ground", "surface", "takeoff"]).toContain(summary.ceiling.reference);
        expect(typeof summary.verticalDatum).toBe("string");
        for (const k of ["lon", "lat", "groundAmslM"]) num(summary.takeoff[k]);
        expect(Array.isArray(summary.warnings) && summary.warnings.every((w: unknown) => typeof w === "string")).toBe(true);
        expect(Array.isArray(summary.cautions) && summary.cautions.length > 0).toBe(true);
      });

      it("states the datum the DEM declares and the plan's ceiling", () => {
        expect(summary.verticalDatum).toBe(c.verticalDatum);
        expect(summary.ceiling).toMatchObject({ heightM: c.plan.ceilingM, reference: "ground" });
      });

      it("spacing and trigger distance follow the camera: footprint * (1 - overlap) (domain: Overlap, spacing, speed)", () => {
        // Footprint on flat ground = image size px * GSD; long side across the track.
        const gsdM = c.plan.gsdCm / 100;
        expect(summary.lineSpacingM).toBeCloseTo(c.plan.imageWidthPx * gsdM * (1 - c.plan.sidePct / 100), 1);
        expect(summary.triggerDistanceM).toBeCloseTo(c.plan.imageHeightPx * gsdM * (1 - c.plan.frontPct / 100), 1);
        // GSD band [target(1 - t), target(1 + t)] (issue 3, Requirement).
        expect(summary.gsdCm.target).toBeCloseTo(c.plan.gsdCm, 6);
        expect(summary.gsdCm.low).toBeCloseTo(c.plan.gsdCm * (1 - c.plan.tolerancePct / 100), 4);
        expect(summary.gsdCm.high).toBeCloseTo(c.plan.gsdCm * (1 + c.plan.tolerancePct / 100), 4);
      });

      it("figures hang together: counts match the files, time covers the path, quantiles ordered", () => {
        const g = summary.gsdCm;
        expect(g.min <= g.p5 && g.p5 <= g.median && g.median <= g.p95 && g.p95 <= g.max).toBe(true);
        expect(summary.withinBandPct).toBeGreaterThanOrEqual(0);
        expect(summary.withinBandPct).toBeLessThanOrEqual(100);
        // No leg is flown faster than the fastest speed the plan allows.
        const fastest = Math.max(...rows.map((r) => r.speed));
        expect(summary.flightTimeS).toBeGreaterThanOrEqual(summary.pathLengthM / fastest - 1);
        expect(summary.flights).toBe(new Set(rows.map((r) => r.flight)).size);
      });

      it("path length = geodesic length through the waypoints, within 0.1 % (GeographicLib)", () => {
        // Legs are straight between waypoints; the tool measures them on its projected
        // frame, whose scale differs from 1 by well under 0.1 % near a UTM central meridian.
        const geod = geodesic.Geodesic.WGS84;
        let sumM = 0;
        for (let i = 1; i < rows.length; i++) {
          if (rows[i].flight !== rows[i - 1].flight) continue;
          sumM += geod.Inverse(rows[i - 1].lat, rows[i - 1].lon, rows[i].lat, rows[i].lon).s12 ?? NaN;
        }
        expect(Math.abs(sumM - summary.pathLengthM) / sumM).toBeLessThan(0.001);
      });

      it("carries the usual cautions: local rules, airspace, obstacles not in the DEM, on-site check, pilot decides (domain: Cautions)", () => {
        const all = summary.cautions.join(" ").toLowerCase();
        for (const w of ["law", "airspace", "obstacle", "verify", "pilot in command"]) expect(all).toContain(w);
      });
    });

    describe("plan.geojson (RFC 7946)", () => {
      let fc: FeatureCollection;
      beforeAll(() => {
        fc = JSON.parse(readFileSync(path.join(out, "plan.geojson"), "utf8"));
      });

      it("is a FeatureCollection without the removed crs member, WGS84 positions in range (RFC 7946 sections 3.3, 4)", () => {
        expect(fc.type).toBe("FeatureCollection");
        expect("crs" in fc).toBe(false);
        for (const f of fc.features) for (const p of allPositions(f.geometry)) {
          expect(p.length === 2 || p.length === 3).toBe(true);
          expect(p[0]).toBeGreaterThanOrEqual(-180);
          expect(p[0]).toBeLessThanOrEqual(180);
          expect(p[1]).toBeGreaterThanOrEqual(-90);
          expect(p[1]).toBeLessThanOrEqual(90);
        }
      });

      it("polygons are valid (turf booleanValid) and wound by the right-hand rule (RFC 7946 section 3.1.6)", () => {
        const polys = fc.features.filter((f) => f.geometry.type === "Polygon" || f.geometry.type === "MultiPolygon");
        expect(polys.length).toBeGreaterThan(0);
        for (const f of polys) {
          expect(booleanValid(f)).toBe(true);
          const list = f.geometry.type === "Polygon" ? [f.geometry.coordinates] : (f.geometry as { coordinates: Position[][][] }).coordinates;
          for (const rings of list) {
            expect(booleanClockwise(rings[0])).toBe(false);
            for (const hole of rings.slice(1)) expect(booleanClockwise(hole)).toBe(true);
          }
        }
      });

      it("waypoint Points carry the CSV's values; their third coordinate is the ellipsoidal height (RFC 7946 section 4)", () => {
        const pts = fc.features.filter((f) => f.properties?.layer === "waypoint") as Feature<Point>[];
        expect(pts.length).toBe(rows.length);
        pts.forEach((f, i) => {
          const r = rows[i];
          const p = f.properties!;
          expect([p.flight, p.strip, p.index, p.segment]).toEqual([r.flight, r.strip, r.index, r.segment]);
          expect(near(f.geometry.coordinates[0], r.lon, 1e-7) && near(f.geometry.coordinates[1], r.lat, 1e-7)).toBe(true);
          expect(f.geometry.coordinates[2]).toBeCloseTo(r.ell, 2);
          for (const [k, v] of [["altitude_amsl_m", r.amsl], ["altitude_takeoff_m", r.takeoff], ["ground_amsl_m", r.ground], ["height_above_ground_m", r.agl], ["speed_m_s", r.speed]] as const) {
            expect(Math.abs(p[k] - v), k).toBeLessThanOrEqual(0.006);
          }
        });
      });

      it("leg LineStrings run through the CSV's waypoints at their altitudes", () => {
        const legs = fc.features.filter((f) => f.properties?.layer === "leg") as Feature<LineString>[];
        expect(legs.length).toBeGreaterThan(0);
        for (const leg of legs) for (const [k, p] of leg.geometry.coordinates.entries()) {
          const match = rows.find((r) => near(r.lon, p[0], 1e-7) && near(r.lat, p[1], 1e-7) && Math.abs(r.amsl - leg.properties!.altitude_amsl_m[k]) <= 0.006);
          expect(match, `leg vertex ${p.join(",")}`).toBeDefined();
          expect(p[2]).toBeCloseTo(match!.ell, 1);
        }
      });

      it("has the site and the take-off point of summary.json", () => {
        expect(fc.features.filter((f) => f.properties?.layer === "site").length).toBe(1);
        const t = fc.features.filter((f) => f.properties?.layer === "takeoff") as Feature<Point>[];
        expect(t.length).toBe(1);
        expect(near(t[0].geometry.coordinates[0], summary.takeoff.lon, 1e-7) && near(t[0].geometry.coordinates[1], summary.takeoff.lat, 1e-7)).toBe(true);
      });

      it("GDAL's GeoJSON reader sees every feature (ogrinfo)", () => {
        const layers = ogrLayers(path.join(out, "plan.geojson"));
        expect(layers.reduce((s, l) => s + l.count, 0)).toBe(fc.features.length);
      });
    });

    describe("plan.kml (OGC KML 2.2) read by togeojson and GDAL", () => {
      let text = "";
      let fc: FeatureCollection<Geometry | null>;
      beforeAll(() => {
        text = readFileSync(path.join(out, "plan.kml"), "utf8");
        fc = kml(parseXml(text));
      });

      it("waypoint Points equal the CSV's positions and AMSL altitudes, in order", () => {
        const pts = fc.features.filter((f) => f.geometry?.type === "Point") as Feature<Point>[];
        // The take-off point may be a Placemark of its own: match the waypoints by name order.
        const wps = pts.filter((f) => f.properties?.name !== undefined && !/take-?off/i.test(String(f.properties.name)));
        expect(wps.length).toBe(rows.length);
        wps.forEach((f, i) => {
          const [lon, lat, alt] = f.geometry.coordinates;
          expect(near(lon, rows[i].lon, 1e-7) && near(lat, rows[i].lat, 1e-7)).toBe(true);
          expect(Math.abs(alt - rows[i].amsl)).toBeLessThanOrEqual(0.006);
        });
      });

      it("leg LineStrings pass through CSV waypoints at AMSL altitudes", () => {
        const lines = fc.features.filter((f) => f.geometry?.type === "LineString") as Feature<LineString>[];
        expect(lines.length).toBeGreaterThan(0);
        for (const l of lines) for (const p of l.geometry.coordinates) {
          expect(rows.some((r) => near(r.lon, p[0], 1e-7) && near(r.lat, p[1], 1e-7) && Math.abs(r.amsl - p[2]) <= 0.006)).toBe(true);
        }
      });

      it("every Point and LineString uses altitudeMode absolute (KML 2.2: above sea level)", () => {
        const doc = parseXml(text) as unknown as { getElementsByTagName(n: string): ArrayLike<{ getElementsByTagName(n: string): ArrayLike<{ textContent: string | null }> }> };
        for (const tag of ["Point", "LineString"]) {
          const els = Array.from(doc.getElementsByTagName(tag));
          expect(els.length).toBeGreaterThan(0);
          for (const el of els) expect(el.getElementsByTagName("altitudeMode")[0]?.textContent).toBe("absolute");
        }
      });

      it("GDAL's KML reader (ogrinfo) counts one point per waypoint", () => {
        const layers = ogrLayers(path.join(out, "plan.kml"));
        const wp = layers.filter((l) => /^Waypoints/.test(l.name)).reduce((s, l) => s + l.count, 0);
        expect(wp).toBe(rows.length);
      });
    });

    describe("plan.gpx (GPX 1.1) read by togeojson and GDAL", () => {
      it("one route per flight, its points the flight's CSV rows with ele = AMSL", () => {
        const fc = gpx(parseXml(readFileSync(path.join(out, "plan.gpx"), "utf8")));
        const routes = fc.features.filter((f) => f.geometry?.type === "LineString") as Feature<LineString>[];
        expect(routes.length).toBe(summary.flights);
        routes.forEach((rte, fi) => {
          const fr = rows.filter((r) => r.flight === fi + 1);
          expect(rte.geometry.coordinates.length).toBe(fr.length);
          rte.geometry.coordinates.forEach(([lon, lat, ele], i) => {
            expect(near(lon, fr[i].lon, 1e-7) && near(lat, fr[i].lat, 1e-7)).toBe(true);
            expect(Math.abs(ele - fr[i].amsl)).toBeLessThanOrEqual(0.006);
          });
        });
      });

      it("GDAL's GPX reader (ogrinfo): routes = flights, route points = waypoints", () => {
        const layers = ogrLayers(path.join(out, "plan.gpx"));
        expect(layers.find((l) => l.name === "routes")?.count).toBe(summary.flights);
        expect(layers.find((l) => l.name === "route_points")?.count).toBe(rows.length);
      });
    });

    describe("GeoTIFFs read by GDAL (gdalinfo, gdallocationinfo)", () => {
      const tifs = [
        { name: "gsd.tif", type: "Float32", nodata: NaN },
        { name: "images.tif", type: "UInt16", nodata: 65535 },
        { name: "flags.tif", type: "UInt16", nodata: 255 },
      ];
      let grid: { width: number; height: number; transform: { x0: number; y0: number; dx: number; dy: number }; crs: { epsg: number | null } };
      beforeAll(() => {
        grid = JSON.parse(readFileSync(path.join(out, "report-data.json"), "utf8")).input.dem;
      });

      it.each(tifs)("$name: data type, nodata, and the DEM's own cells and CRS", ({ name, type, nodata }) => {
        const info = gdalinfoJson(path.join(out, name));
        expect(info.bands.length).toBe(1);
        expect(info.bands[0].type).toBe(type);
        const nd = Number(info.bands[0].noDataValue);
        if (Number.isNaN(nodata)) expect(Number.isNaN(nd)).toBe(true);
        else expect(nd).toBe(nodata);
        const [x0, dx, rx, y0, ry, dy] = info.geoTransform;
        expect([rx, ry]).toEqual([0, 0]);
        // The working grid is the DEM's window with its geotransform scaled to metres (no resampling).
        const t = grid.transform;
        expect(t.dx).toBeCloseTo(c.cellSizeM, 9);
        expect(t.dy).toBeCloseTo(-c.cellSizeM, 9);
        expect(dx).toBeCloseTo(t.dx / c.demUnitToM, 9);
        expect(dy).toBeCloseTo(t.dy / c.demUnitToM, 9);
        // The files hold the site's box of that window: whole cells in from its corner, within it.
        const c0 = (x0 - t.x0 / c.demUnitToM) / dx;
        const r0 = (y0 - t.y0 / c.demUnitToM) / dy;
        expect(Math.abs(c0 - Math.round(c0))).toBeLessThan(1e-6);
        expect(Math.abs(r0 - Math.round(r0))).toBeLessThan(1e-6);
        const [w, h] = info.size;
        expect(Math.round(c0)).toBeGreaterThanOrEqual(0);
        expect(Math.round(r0)).toBeGreaterThanOrEqual(0);
        expect(Math.round(c0) + w).toBeLessThanOrEqual(grid.width);
        expect(Math.round(r0) + h).toBeLessThanOrEqual(grid.height);
        expect(grid.crs.epsg).toBe(c.frameEpsg);
        expect(summary.frame.epsg).toBe(c.frameEpsg);
        // The rasters are in the DEM's own CRS; GDAL names it by its EPSG code when the GeoKeys carry it.
        expect(info.coordinateSystem.wkt.replace(/\s+/g, "")).toMatch(new RegExp(`ID\\["EPSG",${c.demEpsg}\\]\\]$`));
      });

      it("the rasters line up with the DEM's own cells (no resampling)", () => {
        const dem = gdalinfoJson(path.join(ROOT, c.dem));
        const [x0, dx, , y0, , dy] = gdalinfoJson(path.join(out, "gsd.tif")).geoTransform;
        expect(dx).toBeCloseTo(dem.geoTransform[1], 12);
        expect(dy).toBeCloseTo(dem.geoTransform[5], 12);
        const ci = (x0 - dem.geoTransform[0]) / dx;
        const ri = (y0 - dem.geoTransform[3]) / dy;
        expect(Math.abs(ci - Math.round(ci))).toBeLessThan(1e-6);
        expect(Math.abs(ri - Math.round(ri))).toBeLessThan(1e-6);
      });

      it("the rasters cover the whole site (site corners by PROJ cs2cs inside the raster extent)", () => {
        const info = gdalinfoJson(path.join(out, "gsd.tif"));
        const [x0, dx, , y0, , dy] = info.geoTransform;
        const [w, h] = info.size;
        const site = JSON.parse(readFileSync(path.join(out, "plan.geojson"), "utf8")).features.find((f: Feature) => f.properties?.layer === "site");
        const corners = allPositions(site.geometry).map((p) => [p[0], p[1]] as [number, number]);
        for (const [x, y] of cs2csFromWgs84(c.demEpsg, corners)) {
          expect(x).toBeGreaterThan(x0);
          expect(x).toBeLessThan(x0 + w * dx);
          expect(y).toBeLessThan(y0);
          expect(y).toBeGreaterThan(y0 + h * dy);
        }
      });

      it("GDAL reads the same values as the geotiff package, and they give summary.json's figures", async () => {
        const read = async (name: string) => {
          const buf = readFileSync(path.join(out, name));
          const tiff = await fromArrayBuffer(buf.buffer.slice(buf.byteOffset, buf.byteOffset + buf.byteLength));
          const img = await tiff.getImage();
          return { data: (await img.readRasters({ interleave: true })) as unknown as ArrayLike<number>, w: img.getWidth(), h: img.getHeight() };
        };
        const gsd = await read("gsd.tif");
        const images = await read("images.tif");
        const flags = await read("flags.tif");
        // 200 cells spread over the grid, and the values GDAL reads there.
        const cells: [number, number][] = [];
        let s = 7;
        for (let k = 0; k < 200; k++) {
          s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
          const col = s % gsd.w;
          s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
          cells.push([col, s % gsd.h]);
        }
        for (const [name, r] of [["gsd.tif", gsd], ["images.tif", images], ["flags.tif", flags]] as const) {
          const g = gdalCellValues(path.join(out, name), cells);
          cells.forEach(([col, row], k) => {
            const ours = r.data[row * r.w + col];
            if (Number.isNaN(ours)) expect(Number.isNaN(g[k])).toBe(true);
            else expect(g[k]).toBeCloseTo(ours, 5);
          });
        }
        // GSD quantiles over the cells with a value (type 7, as R and numpy compute them).
        const valid = Float64Array.from(Array.from(gsd.data).filter((v) => Number.isFinite(v))).sort();
        expect(valid.length).toBeGreaterThan(1000);
        expect(TYPE_7(valid, 0.5)).toBeCloseTo(summary.gsdCm.median, 3);
        expect(TYPE_7(valid, 0.05)).toBeCloseTo(summary.gsdCm.p5, 3);
        expect(TYPE_7(valid, 0.95)).toBeCloseTo(summary.gsdCm.p95, 3);
        expect(valid[0]).toBeCloseTo(summary.gsdCm.min, 3);
        expect(valid[valid.length - 1]).toBeCloseTo(summary.gsdCm.max, 3);
        // Image counts and flags over the site cells (not nodata).
        let minImages = Infinity;
        for (let i = 0; i < images.data.length; i++) if (images.data[i] !== 65535) minImages = Math.min(minImages, images.data[i]);
        expect(minImages).toBe(summary.images.min);
        let flagged = 0;
        const byBit = new Map<number, number>();
        for (let i = 0; i < flags.data.length; i++) {
          const v = flags.data[i];
          if (v === 255 || v === 0) continue;
          flagged++;
          for (let bit = 1; bit < 256; bit <<= 1) if (v & bit) byBit.set(bit, (byBit.get(bit) ?? 0) + 1);
        }
        expect(flagged).toBe(summary.flagged.cells);
        // Each kind's cell count is the number of cells with its bit set (bits as in src/assess/flags.ts).
        const BITS: Record<string, number> = { coarse: 1, fine: 2, fewImages: 4, ceiling: 8, clearance: 16, nodata: 32, unflyable: 64, relief: 128 };
        for (const [kind, v] of Object.entries(summary.flagged.byKind) as [string, { cells: number }][]) {
          expect(byBit.get(BITS[kind]) ?? 0, kind).toBe(v.cells);
        }
      });
    });
  });
}
