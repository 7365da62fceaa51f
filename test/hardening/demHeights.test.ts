/**
 * NaN and infinite heights, and windows with no height at all, through `gsdplan plan`,
 * `gsdplan inspect` and the library (issue 8, "Hardening").
 */
import { describe, it, expect, beforeAll } from "vitest";
import { readFileSync } from "node:fs";
import path from "node:path";
import { HAS_GDAL } from "../helpers/tools.js";
import { inspectDem } from "../../src/dem/inspect.js";
import { cli, cliAsync, ensureBuilt, expectNothingWritten, expectOneLineError, expectRefusedEverywhere, readWholeDem, smallScenario, tempDir } from "./helpers.js";

beforeAll(() => ensureBuilt(), 120_000);

describe.skipIf(!HAS_GDAL)("NaN and infinite heights", () => {
  // Decision (documented in src/dem/window.ts): a height that is not a finite number is
  // nodata. NaN is the usual nodata of float DEMs (GDAL writes NaN nodata as "nan");
  // +-Inf is never a ground height, only the mark of a broken conversion or an
  // overflowed filter, so it is treated the same way: no height there, with the same
  // flags and refusals as any nodata cell. Never is Infinity passed on as ground.
  function demWithBadCells(dir: string, bad: number) {
    // Sloping ground with a 3 x 3 block of bad cells in the middle of the site, and a
    // bad cell in each corner (outside the site).
    return smallScenario(dir, (x, y) => {
      const inBlock = Math.abs(x - 500000) < 6 && Math.abs(y - 5200000) < 6;
      const corner = Math.abs(x - 500000) > 395 && Math.abs(y - 5200000) > 395;
      return inBlock || corner ? bad : 300 + 0.05 * (x - 500000);
    });
  }

  const BAD = [["NaN", NaN], ["+Inf", Infinity], ["-Inf", -Infinity]] as const;
  for (const [name, bad] of BAD) {
    it(`${name} cells read as nodata in readWindow and inspect`, async () => {
      const dir = tempDir(`bad${name}`);
      const s = demWithBadCells(dir, bad);
      // GDAL's own reading of the file: the bad values are really in it.
      const g = await readWholeDem(s.dem);
      let invalid = 0, nonFinite = 0;
      for (let i = 0; i < g.heights.length; i++) {
        if (Number.isNaN(g.heights[i])) invalid++;
        else if (!Number.isFinite(g.heights[i])) nonFinite++;
      }
      // The block |x|,|y| < 6 m at 4 m cells holds the centres -2 and +2 on each axis
      // (2 x 2 = 4 cells); each corner test |x|,|y| > 395 m holds one cell (centre 398).
      expect(nonFinite).toBe(0);
      expect(invalid).toBe(4 + 4);
      const rep = await inspectDem(s.dem);
      expect(Number.isFinite(rep.elevationM.min) && Number.isFinite(rep.elevationM.max)).toBe(true);
      expect(rep.nodataFraction).toBeCloseTo(8 / (200 * 200), 9);
    });
  }

  it("NaN, +Inf and -Inf under the site give the same plan (nodata): flagged, never an infinite altitude", async () => {
    const results = await Promise.all(
      BAD.map(async ([name, bad]) => {
        const dir = tempDir(`plan${name}`);
        const s = demWithBadCells(dir, bad);
        const out = path.join(dir, "out");
        return { out, r: await cliAsync(["plan", s.planFile, "--out", out, "--quiet", "--json", "--fail-on-flags"]) };
      }),
    );
    for (const { out, r } of results) {
      // Exit 3 with --fail-on-flags: planned, with cells flagged (the nodata block
      // cannot be flown without an assumed ground height); see `gsdplan plan --help`.
      expect(r.code, r.err).toBe(3);
      const csv = readFileSync(path.join(out, "waypoints.csv"), "utf8");
      expect(csv).not.toMatch(/Infinity|NaN/i);
      expect(r.out).not.toMatch(/Infinity/);
    }
    const summaries = results.map(({ r }) => JSON.parse(r.out));
    expect(summaries[0].flagged.byKind.nodata.cells).toBeGreaterThan(0);
    for (const sm of summaries.slice(1)) {
      expect(sm.flagged).toEqual(summaries[0].flagged);
      expect(sm.waypoints).toBe(summaries[0].waypoints);
      expect(sm.stations).toEqual(summaries[0].stations);
    }
  });
});

describe.skipIf(!HAS_GDAL)("a nodata-only window", () => {
  it("a DEM whose cells under the site are all nodata: one clear line, nothing written", async () => {
    const dir = tempDir("nodata");
    // Heights only in a 40 m rim around the raster; the whole window under the site
    // and its margin is nodata (-9999, declared as the band's nodata value).
    const s = smallScenario(dir, (x, y) => (Math.abs(x - 500000) > 360 || Math.abs(y - 5200000) > 360 ? 250 : -9999), { nodata: -9999 });
    await expectRefusedEverywhere(s.planFile, s.dem, /site: the site lies wholly outside the DEM \(or over nodata only\)/, { inspect: false });
    // inspect describes such a file (it has some data): it must succeed.
    expect(cli(["inspect", s.dem]).code).toBe(0);
  });

  it("a DEM that is nodata everywhere: plan refuses in one line; inspect reports it without crashing", async () => {
    const dir = tempDir("nodata-all");
    const s = smallScenario(dir, () => NaN);
    await expectRefusedEverywhere(s.planFile, s.dem, /site: the site lies wholly outside the DEM \(or over nodata only\)/, { inspect: false });
    const r = cli(["inspect", "--json", s.dem]);
    expect([0, 2]).toContain(r.code);
    if (r.code === 2) expectOneLineError(r);
    else expect(JSON.parse(r.out).nodataFraction).toBe(1);
  });
});

