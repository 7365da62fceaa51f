/**
 * Cross strips (`--cross-strips`): a second family of strips at the heading plus 90
 * degrees over the same site, flown after the first. On the small GDAL-written hills
 * fixture (fixtures/gdal/README.md; heading 90, 75 % front and 65 % side overlap).
 * Outside references: GDAL reads the written images.tif (`gdal_translate -of XYZ`,
 * Debian gdal-bin); bearings and lengths from waypoints.csv by GeographicLib's geodesic
 * inverse (geographiclib-geodesic, C. F. F. Karney, "Algorithms for geodesics",
 * J. Geodesy 87, 2013); the plan's own outputs checked by `gsdplan verify`, which
 * shares no code with the solver.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { spawnSync } from "node:child_process";
import { readFileSync } from "node:fs";
import path from "node:path";
import geodesic from "geographiclib-geodesic";
import { HAS_GDAL } from "../helpers/tools.js";
import { ROOT, parseCsv, runCli, tempDir } from "./cli.js";
import { loadPlanFile, resolvePlanOptions } from "../../src/plan/options.js";
import { planMission } from "../../src/plan/plan.js";
import { stripFamilies } from "../../src/plan/crossStrips.js";

const G = geodesic.Geodesic.WGS84;
const PLAN = path.join(ROOT, "fixtures/e2e/hills-utm33-small-plan.yaml");

interface Summary {
  flightTimeS: number;
  speedMps: number;
  strips: number;
  images: { median: number };
  crossStrips?: {
    enabled: boolean;
    first: { headingDeg: number; strips: number; photos: number; flightTimeS: number; imagesMedian: number };
    second: { headingDeg: number; strips: number; photos: number; flightTimeS: number; imagesMedian: number };
    imagesMedianBoth: number;
  };
}

/** Median of the site cells' image counts as GDAL reads images.tif (65535: outside the site). */
function gdalImagesMedian(dir: string): number {
  const r = spawnSync("gdal_translate", ["-q", "-of", "XYZ", path.join(dir, "images.tif"), "/vsistdout/"], { encoding: "utf8", maxBuffer: 1 << 28 });
  expect(r.status).toBe(0);
  const v: number[] = [];
  for (const line of r.stdout.split("\n")) {
    const z = Number(line.trim().split(/\s+/)[2]);
    if (line.trim() && z !== 65535) v.push(z);
  }
  expect(v.length).toBeGreaterThan(10_000);
  v.sort((a, b) => a - b);
  return v[Math.floor(v.length / 2)];
}

/**
 * Each strip's line from waypoints.csv: a row is labelled with the segment that leads
 * to it, so a strip starts at the row before its first `strip` row and ends at its last.
 */
function stripLines(csv: string): Map<number, { from: [number, number]; to: [number, number] }> {
  const { header, rows } = parseCsv(csv);
  const col = (n: string) => header.indexOf(n);
  const [cs, cg, clon, clat] = [col("strip"), col("segment"), col("longitude"), col("latitude")];
  const out = new Map<number, { from: [number, number]; to: [number, number] }>();
  for (let i = 1; i < rows.length; i++) {
    if (rows[i][cg] !== "strip") continue;
    const strip = Number(rows[i][cs]);
    const p: [number, number] = [Number(rows[i][clon]), Number(rows[i][clat])];
    const line = out.get(strip);
    if (line) line.to = p;
    else out.set(strip, { from: [Number(rows[i - 1][clon]), Number(rows[i - 1][clat])], to: p });
  }
  return out;
}

const azimuth = (l: { from: [number, number]; to: [number, number] }) => G.Inverse(l.from[1], l.from[0], l.to[1], l.to[0]).azi1 as number;
const lengthM = (l: { from: [number, number]; to: [number, number] }) => G.Inverse(l.from[1], l.from[0], l.to[1], l.to[0]).s12 as number;
/** Line direction difference folded to [0, 90]: a strip flown either way is the same line. */
const lineAngleDeg = (a: number, b: number) => {
  const d = (((a - b) % 180) + 180) % 180;
  return Math.min(d, 180 - d);
};

describe.skipIf(!HAS_GDAL)("cross strips (small hills fixture, heading 90)", () => {
  let withDir: string, withoutDir: string;
  let withSum: Summary, withoutSum: Summary;
  beforeAll(() => {
    withDir = path.join(tempDir("cross"), "out");
    withoutDir = path.join(tempDir("nocross"), "out");
    expect(runCli(["plan", PLAN, "--out", withDir, "--cross-strips"]).status).toBe(0);
    expect(runCli(["plan", PLAN, "--out", withoutDir]).status).toBe(0);
    withSum = JSON.parse(readFileSync(path.join(withDir, "summary.json"), "utf8"));
    withoutSum = JSON.parse(readFileSync(path.join(withoutDir, "summary.json"), "utf8"));
  }, 120_000);

  it("about doubles the median image count per ground cell (GDAL reads images.tif)", () => {
    const without = gdalImagesMedian(withoutDir);
    const both = gdalImagesMedian(withDir);
    // On flat ground one family sees each point in about 1 / ((1 - front)(1 - side)) images
    // = 1 / (0.25 x 0.35) = 11.4 (the overlap definitions; common practice); a second family
    // with the same overlaps adds as many again: 22.9. Hills move heights, so 1.7x to 2.3x.
    expect(without).toBeGreaterThanOrEqual(9);
    expect(without).toBeLessThanOrEqual(14);
    expect(both / without).toBeGreaterThanOrEqual(1.7);
    expect(both / without).toBeLessThanOrEqual(2.3);
    // The summary says the same as GDAL's reading (a median of integers: within 1).
    expect(Math.abs(withSum.crossStrips!.imagesMedianBoth - both)).toBeLessThanOrEqual(1);
    expect(Math.abs(withSum.crossStrips!.first.imagesMedian - without)).toBeLessThanOrEqual(1);
    expect(withSum.crossStrips!.second.imagesMedian).toBeGreaterThanOrEqual(9);
  });

  it("lays every second-family strip at right angles to every first-family strip (GeographicLib, 90 +- 0.5 deg)", () => {
    const lines = stripLines(readFileSync(path.join(withDir, "waypoints.csv"), "utf8"));
    const n1 = withSum.crossStrips!.first.strips;
    const n2 = withSum.crossStrips!.second.strips;
    expect(n1).toBe(withoutSum.strips);
    expect(n2).toBeGreaterThanOrEqual(3);
    // Strip numbers of the second family continue after the first's.
    expect([...lines.keys()].sort((a, b) => a - b)).toEqual(Array.from({ length: n1 + n2 }, (_, i) => i + 1));
    let checked = 0;
    for (const [s1, l1] of lines) {
      if (s1 > n1) continue;
      for (const [s2, l2] of lines) {
        if (s2 <= n1) continue;
        expect(Math.abs(lineAngleDeg(azimuth(l1), azimuth(l2)) - 90)).toBeLessThanOrEqual(0.5);
        checked++;
      }
    }
    expect(checked).toBe(n1 * n2);
  });

  it("adds the second family's flight time: at least its strips at the photo speed, and the first family's time unchanged", () => {
    const lines = stripLines(readFileSync(path.join(withDir, "waypoints.csv"), "utf8"));
    const n1 = withSum.crossStrips!.first.strips;
    let stripM = 0;
    for (const [s, l] of lines) if (s > n1) stripM += lengthM(l);
    const added = withSum.flightTimeS - withoutSum.flightTimeS;
    // summary.json rounds to 0.1 s.
    expect(Math.abs(added - withSum.crossStrips!.second.flightTimeS)).toBeLessThanOrEqual(0.2);
    expect(Math.abs(withSum.crossStrips!.first.flightTimeS - withoutSum.flightTimeS)).toBeLessThanOrEqual(0.1);
    expect(added).toBeGreaterThan(stripM / withSum.speedMps);
  });

  it("passes gsdplan verify on the outputs (exit 0)", () => {
    const r = runCli(["verify", withDir, "--plan", PLAN]);
    expect(r.stderr).toBe("");
    expect(r.status).toBe(0);
  });

  it("leaves the first family's waypoints as without the flag: waypoints.csv without it is byte-equal to the start of the file with it", () => {
    const without = readFileSync(path.join(withoutDir, "waypoints.csv"));
    const withCross = readFileSync(path.join(withDir, "waypoints.csv"));
    expect(withCross.length).toBeGreaterThan(without.length);
    expect(withCross.subarray(0, without.length).equals(without)).toBe(true);
    expect(withoutSum.crossStrips).toBeUndefined();
  });

  it("shows both families in the report with what the cross strips add", () => {
    const html = readFileSync(path.join(withDir, "report.html"), "utf8");
    expect(html).toContain('id="cross-strips"');
    expect(html).toContain(`data-key="crossStrips.second.photos" data-value="${withSum.crossStrips!.second.photos}"`);
    expect(readFileSync(path.join(withoutDir, "report.html"), "utf8")).not.toContain('id="cross-strips"');
  });
});

describe("cross strips over blocks (small hills fixture, 110 m range)", () => {
  it("numbers the second family's strips and blocks after the first's, one family per flight, and the plan's own check finds no breach", async () => {
    const f = await loadPlanFile(PLAN);
    const run = await planMission(resolvePlanOptions(f.data, { crossStrips: true, "aircraft.maxRangeM": 110 }, f.dir));
    const family = stripFamilies(run.layout.legs, run.layout.headingDeg);
    const first = [...family].filter(([, v]) => v === 1).map(([k]) => k);
    const second = [...family].filter(([, v]) => v === 2).map(([k]) => k);
    expect(run.blocks.length).toBeGreaterThan(2);
    expect(second.length).toBeGreaterThan(0);
    expect(Math.min(...second)).toBe(Math.max(...first) + 1);
    const flights = run.flights.flights;
    for (const fl of flights) expect(new Set(fl.strips.map((s) => family.get(s))).size).toBe(1);
    // Flights of the second family follow all of the first's, in blocks numbered after them.
    const fam = flights.map((fl) => family.get(fl.strips[0])!);
    expect(fam).toEqual([...fam].sort());
    const lastFirstBlock = Math.max(...flights.filter((fl, i) => fam[i] === 1).map((fl) => fl.block!));
    for (const [i, fl] of flights.entries()) if (fam[i] === 2) expect(fl.block!).toBeGreaterThan(lastFirstBlock);
    expect(run.verification.breaches).toEqual([]);
  }, 120_000);
});

describe("cross strips on a line site", () => {
  it("are refused in one line naming the key (exit 2): a line site's strips follow the line", () => {
    const r = runCli(["plan", path.join(ROOT, "fixtures/line/hills-line-plan.yaml"), "--out", path.join(tempDir("cross-line"), "out"), "--cross-strips"]);
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/crossStrips/);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
  });
});
