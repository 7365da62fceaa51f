/**
 * Reading a campaign file: its shape, the site names (each becomes a folder), and the
 * merge of a site's plan keys over the defaults.
 */
import { describe, expect, it } from "vitest";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { InputError, InputFileError } from "../../src/errors.js";
import { campaignSites, readCampaignFile } from "../../src/campaign/campaignFile.js";
import { mergePlanKeys } from "../../src/campaign/merge.js";
import { checkSiteName } from "../../src/campaign/siteName.js";
import { ROOT } from "../e2e/cli.js";

const site = (name: unknown, extra: Record<string, unknown> = {}) => ({ name, area: "a.geojson", ...extra });

describe("site names: one folder name each", () => {
  // POSIX.1-2017, Base Definitions 3.170 "Filename": any bytes but <slash> and NUL;
  // "." and ".." are special (the folder itself and its parent). From memory.
  it.each([
    ["", "empty"],
    ["a/b", "a path separator"],
    ["..", "not a folder name"],
    [".", "not a folder name"],
    ["../x", "a path separator"],
    // Windows separates paths with a backslash too (Microsoft "Naming Files, Paths, and Namespaces").
    ["a\\b", "a path separator"],
    ["nul\u0000byte", "a control character"],
    [" padded", "spaces at its start or end"],
    [".hidden", "a leading dot"],
    ["index.html", "the name of a campaign file"],
    ["x".repeat(201), "too long"],
  ])("refuses %j (%s)", (name, why) => {
    expect(() => checkSiteName(name, "sites[0].name")).toThrow(InputError);
    expect(() => checkSiteName(name, "sites[0].name")).toThrow(why);
  });

  it("accepts names a file system takes as one folder: spaces, commas, quotes, accents", () => {
    for (const n of ["North field", 'West, "outside" <the DEM>', "Côte 2", "a..b"]) {
      expect(() => checkSiteName(n, "sites[0].name")).not.toThrow();
      // Node's path module (outside this project) sees exactly one component.
      expect(path.posix.basename(n)).toBe(n);
    }
  });

  it("refuses a name that is not a text (YAML reads `name: 2024` as a number)", () => {
    expect(() => checkSiteName(2024, "sites[3].name")).toThrow(/sites\[3\]\.name: not a text/);
  });
});

describe("campaign file shape", () => {
  it("refuses a second site of the same name, compared ignoring case (macOS and Windows folders do)", () => {
    const data = { sites: [site("North"), site("south"), site("NORTH")] };
    expect(() => campaignSites(data)).toThrow("sites[2].name: the same as sites[0].name");
  });

  it("refuses no sites, an empty list, an unknown top-level key and a name in the defaults", () => {
    expect(() => campaignSites({ defaults: {} })).toThrow(/^sites: no sites/);
    expect(() => campaignSites({ sites: [] })).toThrow(/^sites: an empty list/);
    expect(() => campaignSites({ sites: [site("a")], site: [] })).toThrow(/^site: unknown key/);
    expect(() => campaignSites({ defaults: { name: "x" }, sites: [site("a")] })).toThrow(/^defaults\.name/);
    expect(() => campaignSites([site("a")])).toThrow(/^campaign file: not a mapping/);
  });

  it("says which format did not parse, or that the file is missing, in one line", async () => {
    const dir = mkdtempSync(path.join(tmpdir(), "gsdplan-campaign-file-"));
    try {
      writeFileSync(path.join(dir, "c.yaml"), "sites: [a, b\n  - c: :");
      writeFileSync(path.join(dir, "c.json"), "{ sites: ");
      const message = (f: string) => readCampaignFile(f).then(() => "", (e: Error) => (e instanceof InputFileError ? e.message : `not an InputFileError: ${e}`));
      const yaml = await message(path.join(dir, "c.yaml"));
      expect(yaml).toMatch(/c\.yaml: not valid YAML: /);
      expect(yaml).not.toContain("\n");
      expect(await message(path.join(dir, "c.json"))).toMatch(/c\.json: not valid JSON/);
      expect(await message(path.join(dir, "none.yaml"))).toMatch(/none\.yaml: campaign file not found$/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it("reads the fixture: three sites in order, the defaults under each site's keys, the site's name as the plan's name", async () => {
    const c = await readCampaignFile(path.join(ROOT, "fixtures/campaign/three-sites.yaml"));
    expect(c.dir).toBe(path.join(ROOT, "fixtures/campaign"));
    expect(c.sites.map((s) => s.name)).toEqual(["Gorge UTM 32", "Hills small", 'West, "outside" <the DEM>']);
    const hills = c.sites[1].planObject as Record<string, any>;
    // fixtures/e2e/hills-utm33-small-plan.yaml's values, from the site's own keys:
    expect(hills.camera).toEqual({ sensorWidthMm: 6.3, sensorHeightMm: 4.725, focalLengthMm: 4.5, imageWidthPx: 4000, imageHeightPx: 3000 });
    expect(hills.target).toEqual({ gsdCm: 3, tolerancePct: 10 });
    expect(hills.aircraft.enduranceMin).toBe(20);
    expect(hills.aircraft.speedMps).toBe(8);
    expect(hills.headingDeg).toBe(90);
    expect(hills.name).toBe("Hills small");
    expect(c.sites[0].planObject.demAccuracyM).toBe(0.5);
    expect(c.sites[1].planObject.demAccuracyM).toBeUndefined();
  });
});

describe("merging a site's keys over the defaults", () => {
  it("merges nested mappings key by key, replaces values and lists, and null removes a default", () => {
    const defaults = { camera: { focalLengthMm: 8.8, imageWidthPx: 5472 }, keepOut: ["a.geojson", "b.geojson"], takeoff: [15, 47], minImages: 3 };
    const merged = mergePlanKeys(defaults, { camera: { focalLengthMm: 4.5 }, keepOut: ["c.geojson"], takeoff: null });
    expect(merged).toEqual({ camera: { focalLengthMm: 4.5, imageWidthPx: 5472 }, keepOut: ["c.geojson"], minImages: 3 });
    // The defaults stay as they were for the next site.
    expect(defaults.camera.focalLengthMm).toBe(8.8);
    expect(defaults.takeoff).toEqual([15, 47]);
  });
});
