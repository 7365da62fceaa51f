/**
 * Hostile site files and output folders through `gsdplan plan` and the
 * library (resolvePlanOptions / planMission / writeOutputSet): one clear error line,
 * exit code 2, nothing written (issue 8, "Hardening"). A wrongly wound polygon is the
 * one case that is accepted: rewound, and said so.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { mkdirSync, readFileSync, writeFileSync, existsSync } from "node:fs";
import path from "node:path";
import { HAS_GDAL } from "../helpers/tools.js";
import { writeOutputSet } from "../../src/export/atomicDir.js";
import {
  cliAsync, ensureBuilt, expectNothingWritten, expectOneLineError, planFromFile, smallScenario, tempDir, userErrorOf, lonLatRing, siteGeoJson, UTM33,
} from "./helpers.js";

beforeAll(() => ensureBuilt(), 120_000);

describe.skipIf(!HAS_GDAL)("site files", () => {
  it("GeoJSON with wrong winding (clockwise outer ring): accepted, rewound, and noted in the summary", async () => {
    const s = smallScenario(tempDir("winding"), () => 250, { cells: 120, cellM: 4, siteM: 200 });
    const ccw = lonLatRing(UTM33, 500000 - 100, 5200000 - 100, 500000 + 100, 5200000 + 100);
    // RFC 7946 section 3.1.6: exterior rings counter-clockwise; parsers should not reject
    // rings of the other winding. This one is clockwise.
    writeFileSync(s.area, siteGeoJson([...ccw].reverse()));
    const out = path.join(s.dir, "out");
    const r = await cliAsync(["plan", s.planFile, "--out", out, "--quiet", "--json"]);
    expect(r.code, r.err).toBe(0);
    const summary = JSON.parse(r.out);
    expect(summary.warnings.join("\n")).toMatch(/rewound/);
    // The same area as the counter-clockwise ring: 200 m x 200 m (to the projection's scale).
    expect(summary.areaM2).toBeGreaterThan(0.99 * 40000);
    expect(summary.areaM2).toBeLessThan(1.01 * 40000);
    const gj = JSON.parse(readFileSync(path.join(out, "plan.geojson"), "utf8"));
    const polys = gj.features.filter((f: any) => f.geometry?.type === "Polygon" && /site/i.test(JSON.stringify(f.properties)));
    expect(polys.length).toBeGreaterThan(0);
    // Shoelace sum over the written outer ring: positive = counter-clockwise (RFC 7946).
    const ring = polys[0].geometry.coordinates[0] as number[][];
    let twice = 0;
    for (let i = 0; i + 1 < ring.length; i++) twice += ring[i][0] * ring[i + 1][1] - ring[i + 1][0] * ring[i][1];
    expect(twice).toBeGreaterThan(0);
    const run = await planFromFile(s.planFile);
    expect(run.site.notes?.join("\n")).toMatch(/rewound/);
    const { planSummary } = await import("../../src/plan/summary.js");
    expect(planSummary(run).warnings.join("\n")).toMatch(/rewound/);
  });

  it("a FeatureCollection with a point only: one line saying no polygon was found", async () => {
    const s = smallScenario(tempDir("point"), () => 250, { cells: 120, cellM: 4, siteM: 200 });
    writeFileSync(s.area, JSON.stringify({
      type: "FeatureCollection",
      features: [{ type: "Feature", properties: {}, geometry: { type: "Point", coordinates: [15, 46.95] } }],
    }));
    const out = path.join(s.dir, "out");
    const r = await cliAsync(["plan", s.planFile, "--out", out, "--quiet"]);
    expectOneLineError(r, /site\.geojson.*(Point|point).*|no polygon/i);
    expectNothingWritten(out);
    const e = await userErrorOf(() => planFromFile(s.planFile));
    expect(e.message).toMatch(/site\.geojson/);
    expect(e.message).toMatch(/Point|polygon/i);
  });
});

describe.skipIf(!HAS_GDAL)("output folders that cannot be written", () => {
  it("--out under a regular file, --out that is a regular file, --out in /proc: one line each, nothing made", async () => {
    const s = smallScenario(tempDir("outdir"), () => 250, { cells: 120, cellM: 4, siteM: 200 });
    const file = path.join(s.dir, "a-file");
    writeFileSync(file, "not a folder\n");
    const targets = [path.join(file, "out"), file, "/proc/gsdplan-hardening-out"];
    const results = await Promise.all(targets.map((t) => cliAsync(["plan", s.planFile, "--out", t, "--quiet"])));
    results.forEach((r, i) => {
      expectOneLineError(r, /--out/);
      expect(r.out).toBe("");
      if (i !== 1) expect(existsSync(targets[i])).toBe(false);
    });
    expect(readFileSync(file, "utf8")).toBe("not a folder\n");
    // The library's writer refuses the same way (InputError naming the field).
    const run = await planFromFile(s.planFile);
    const { planOutputs } = await import("../../src/plan/outputs.js");
    for (const t of targets) {
      const e = await userErrorOf(() => writeOutputSet(t, planOutputs(run).files));
      expect(e.message).toMatch(/^--out: /);
    }
    mkdirSync(path.join(s.dir, "fine"));
    // Control: a writable folder works with the same run (the refusals are about the folder).
    const { OUTPUT_NAMES } = await import("../../src/plan/outputs.js");
    expect(await writeOutputSet(path.join(s.dir, "fine"), planOutputs(run).files)).toHaveLength(OUTPUT_NAMES.length);
  });
});
