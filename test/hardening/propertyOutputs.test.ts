/**
 * Property test over random terrains and random valid plans (issue 8, "Hardening"):
 * the run never throws anything but InputError / InputFileError, and every output
 * file parses back with an outside reader: waypoints.csv (RFC 4180 rows = the
 * summary's waypoint count), plan.geojson (JSON.parse, turf booleanValid on every
 * polygon), plan.kml and plan.gpx (@tmcw/togeojson over @xmldom/xmldom), the three
 * GeoTIFFs (the geotiff package), summary.json and report-data.json (JSON.parse).
 * fast-check with a fixed seed, 20 runs on 100 x 100-cell DEMs.
 */
import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { readFileSync } from "node:fs";
import path from "node:path";
import { DOMParser } from "@xmldom/xmldom";
import { gpx, kml } from "@tmcw/togeojson";
import { booleanValid } from "@turf/turf";
import { fromArrayBuffer } from "geotiff";
import { HAS_GDAL } from "../helpers/tools.js";
import { InputError, InputFileError } from "../../src/errors.js";
import { planMission } from "../../src/plan/plan.js";
import { planOutputs, OUTPUT_NAMES } from "../../src/plan/outputs.js";
import { writeOutputSet } from "../../src/export/atomicDir.js";
import { tempDir } from "./helpers.js";
import { planArb, terrainArb, writeCase } from "./property.helpers.js";

describe.skipIf(!HAS_GDAL)("property: any run ends in a plan whose files parse back, or in a user error", () => {
  it("random terrains x random plans (20 runs)", async () => {
    let planned = 0;
    await fc.assert(
      fc.asyncProperty(terrainArb, planArb, async (terrain, draw) => {
        const dir = tempDir("prop-out");
        let run;
        try {
          run = await planMission(writeCase(dir, terrain, draw));
        } catch (e) {
          if (e instanceof InputError || e instanceof InputFileError) return;
          throw e;
        }
        planned++;
        const out = path.join(dir, "out");
        const { files, summary } = planOutputs(run);
        await writeOutputSet(out, files);
        const read = (n: string) => readFileSync(path.join(out, n), "utf8");

        // RFC 4180: header + one record per waypoint, CRLF line breaks.
        const csv = read("waypoints.csv").split("\r\n").filter((l) => l.length);
        expect(csv.length - 1).toBe(summary.waypoints);
        const cols = csv[0].split(",").length;
        for (const l of csv.slice(1)) {
          expect(l.split(",")).toHaveLength(cols);
          expect(l).not.toMatch(/NaN|Infinity|undefined/);
        }

        // RFC 7946 GeoJSON; turf's booleanValid checks the OGC simple-feature rules.
        const gj = JSON.parse(read("plan.geojson"));
        expect(gj.type).toBe("FeatureCollection");
        for (const f of gj.features) {
          if (f.geometry?.type === "Polygon" || f.geometry?.type === "MultiPolygon") expect(booleanValid(f), JSON.stringify(f.properties)).toBe(true);
        }

        // KML 2.2 and GPX 1.1 through an outside converter.
        const kmlFc = kml(new DOMParser().parseFromString(read("plan.kml"), "text/xml") as never);
        expect(kmlFc.features.length).toBeGreaterThan(0);
        const gpxFc = gpx(new DOMParser().parseFromString(read("plan.gpx"), "text/xml") as never);
        const gpxPoints = gpxFc.features.reduce((a, f) => a + (f.geometry?.type === "LineString" ? f.geometry.coordinates.length : f.geometry?.type === "Point" ? 1 : 0), 0);
        expect(gpxPoints).toBeGreaterThan(0);

        // GeoTIFFs: readable, the assessment grid's size, one band.
        for (const name of ["gsd.tif", "images.tif", "flags.tif"]) {
          const buf = readFileSync(path.join(out, name));
          const tiff = await fromArrayBuffer(buf.buffer.slice(buf.byteOffset, buf.byteOffset + buf.byteLength));
          const img = await tiff.getImage();
          expect(img.getWidth()).toBeGreaterThan(0);
          expect(img.getHeight()).toBeGreaterThan(0);
          const r = (await img.readRasters()) as unknown as ArrayLike<number>[];
          expect(r[0].length).toBe(img.getWidth() * img.getHeight());
        }

        expect(JSON.parse(read("summary.json")).waypoints).toBe(summary.waypoints);
        expect(typeof JSON.parse(read("report-data.json"))).toBe("object");
        expect(read("report.html")).toMatch(/^<!DOCTYPE html>/i);
        expect(OUTPUT_NAMES.every((n) => read(n).length > 0)).toBe(true);
      }),
      { numRuns: 20, seed: 4242, endOnFailure: true },
    );
    expect(planned).toBeGreaterThan(5);
  }, 300_000);

  it("regression: the first counterexample found (seed 8008) ends in a plan or a user error", async () => {
    // Found by propertySolver.test.ts: "solver: no path through the gates of strip 4
    // (internal error)" from solvePiece. Kept as a fixed case until the solver is fixed.
    const terrain = {
      baseM: 10, slope: [0, -0.11285365776599732] as [number, number], holes: [],
      hills: [
        { x: -250, y: 105, sigmaM: 81, ampM: 17 }, { x: 175, y: -237, sigmaM: 112, ampM: 36 }, { x: -51, y: -80, sigmaM: 42, ampM: 89 },
        { x: -163, y: 45, sigmaM: 90, ampM: 134 }, { x: -49, y: -191, sigmaM: 126, ampM: 4 },
      ],
    };
    const draw = {
      sensorWidthMm: 6.1900106640487955, focalLengthMm: 4.000000000000008, imageWidthPx: 4834, aspect: 0.75, targetHeightM: 55, tolerancePct: 6,
      frontPct: 84, sidePct: 58, ceilingM: 95, ceilingReference: "takeoff" as const, clearanceM: 14, safetyRadiusM: 1, obstacleMarginM: 9,
      type: "multirotor" as const, speedMps: 18, minSpeedMps: 3, maxClimbMps: 1.459190172074574, maxDescentMps: 5.999999999999996,
      onConflict: "clearance" as const, siteM: 130, headingDeg: 169,
    };
    try {
      await planMission(writeCase(tempDir("prop-reg"), terrain, draw));
    } catch (e) {
      if (!(e instanceof InputError || e instanceof InputFileError)) throw e;
    }
  });
});
