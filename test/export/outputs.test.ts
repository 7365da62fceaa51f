import { describe, it, expect } from "vitest";
import { mkdtempSync, readdirSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { writeOutputSet } from "../../src/export/atomicDir.js";
import { planOutputFiles } from "../../src/export/outputs.js";
import { waypointRows } from "../../src/export/rows.js";
import { buildSummary } from "../../src/export/summary.js";
import type { PlanExportInput } from "../../src/export/layers.js";
import { smallPlan } from "./legs.js";

describe("planOutputFiles + writeOutputSet", () => {
  it("writes the whole set, each file parseable", async () => {
    const flights = [smallPlan()];
    const toWgs84 = (x: number, y: number): [number, number] => [12 + (x - 500_000) / 1e5, 47 + (y - 5_216_000) / 1e5];
    const heights = { datum: "egm96" as const, undulationM: () => 48, takeoffGroundM: 440 };
    const rows = waypointRows(flights, toWgs84, heights);
    const ring = [[12, 47], [12.01, 47], [12.01, 47.01], [12, 47.01], [12, 47]];
    const map: PlanExportInput = {
      name: "set",
      site: { local: { type: "Polygon", coordinates: [] }, wgs84: { type: "Polygon", coordinates: [ring] }, areaM2: 1, name: "set" },
      flights,
      rows,
      toWgs84,
      heights,
      takeoff: { lon: 12, lat: 47, groundAmslM: 440 },
    };
    const w = 3, h = 2, n = w * h;
    const grid = {
      width: w, height: h, transform: { x0: 500_000, y0: 5_216_000, dx: 1, dy: -1 },
      gsdCm: new Float32Array(n).fill(2), images: new Uint16Array(n).fill(5), flags: new Uint16Array(n), inSite: new Uint8Array(n).fill(1),
    };
    const summary = buildSummary({
      name: "set", flights: [], rows, photos: 0, headingDeg: 0, lineSpacingM: 1, triggerDistanceM: 1,
      speed: { speedMps: 8, limit: "aircraft" }, gsdBandCm: { target: 2, low: 1.8, high: 2.2 },
      stats: { siteCells: n, cellAreaM2: 1, gsdCm: { min: 2, p5: 2, median: 2, p95: 2, max: 2 }, withinBandPct: 100, images: { min: 5, median: 5 }, flagged: { cells: 0, areaM2: 0, byKind: {}, effectCells: 0 }, perStrip: [] },
      ceiling: { heightM: 120, reference: "ground" }, verticalDatum: "egm96", takeoff: map.takeoff, warnings: [],
    });
    const out = path.join(mkdtempSync(path.join(tmpdir(), "gsdplan-set-")), "out");
    await writeOutputSet(out, planOutputFiles({ map, summary, rasters: { grid, crs: { epsg: 32633, proj4: "", geographic: false } } }));
    expect(readdirSync(out).sort()).toEqual(["flags.tif", "gsd.tif", "images.tif", "plan.geojson", "plan.gpx", "plan.kml", "summary.json", "waypoints.csv"]);
    expect(JSON.parse(readFileSync(path.join(out, "plan.geojson"), "utf8")).type).toBe("FeatureCollection");
    expect(JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8")).waypoints).toBe(rows.length);
    expect(readFileSync(path.join(out, "waypoints.csv"), "utf8").split("\r\n")).toHaveLength(rows.length + 2);
    // TIFF 6.0, section 2: little-endian files (GDAL's COG byte order) start with "II" and 42.
    expect([...readFileSync(path.join(out, "gsd.tif")).subarray(0, 4)]).toEqual([0x49, 0x49, 42, 0]);
  });
});
