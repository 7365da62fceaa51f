import { describe, it, expect } from "vitest";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { distance } from "fastest-levenshtein";
import { InputError, InputFileError } from "../../src/errors.js";
import {
  PLAN_OPTION_SPECS,
  PlanOptionsError,
  flagOverridesFromParsed,
  loadPlanFile,
  resolvePlanOptions,
} from "../../src/plan/options.js";

const good = () => ({
  dem: "dem.tif",
  area: "site.geojson",
  // A generic 20 MP 1-inch camera with an 8.8 mm lens (sizes only).
  camera: { sensorWidthMm: 13.2, sensorHeightMm: 8.8, focalLengthMm: 8.8, imageWidthPx: 5472, imageHeightPx: 3648 },
  target: { gsdCm: 2 },
});

function errorOf(fn: () => unknown): InputError {
  try {
    fn();
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error("expected an InputError");
}

describe("resolvePlanOptions: a valid plan", () => {
  it("applies the documented defaults", () => {
    const o = resolvePlanOptions(good(), {}, "/data/site");
    // Regulation (EU) 2019/947 UAS.OPEN.010: 120 m; reference chosen as ground straight below.
    expect(o.ceiling).toEqual({ heightM: 120, reference: "ground" });
    // 80/70 overlaps, common practice for mapping.
    expect(o.overlap).toEqual({ frontPct: 80, sidePct: 70 });
    expect(o.clearance).toEqual({ minM: 30, safetyRadiusM: 15, obstacleMarginM: 0 });
    expect(o.minImages).toBe(2);
    expect(o.reservePct).toBe(20);
    expect(o.blurPx).toBe(0.5);
    expect(o.target).toEqual({ by: "gsd", gsdCm: 2, tolerancePct: 10 });
    expect(o.headingDeg).toBe("auto");
    expect(o.camera.model).toBe("sensor");
    expect(o.aircraft.transitSpeedMps).toBe(o.aircraft.speedMps);
    expect(o.aircraft.maxWaypoints).toBeNull();
  });

  it("resolves relative paths against the plan file's folder, flag paths against the shell's", () => {
    const o = resolvePlanOptions(good(), { area: "other.kml" }, "/data/site", "/home/me");
    expect(o.dem).toBe(path.resolve("/data/site", "dem.tif"));
    expect(o.area).toBe(path.resolve("/home/me", "other.kml"));
    const abs = resolvePlanOptions({ ...good(), dem: "/abs/dem.tif" }, {}, "/data/site");
    expect(abs.dem).toBe("/abs/dem.tif");
  });

  it("lets flags override the file", () => {
    const o = resolvePlanOptions(good(), { "target.gsdCm": 3, "ceiling.reference": "takeoff", headingDeg: 45 }, "/d");
    expect(o.target).toMatchObject({ gsdCm: 3 });
    expect(o.ceiling.reference).toBe("takeoff");
    expect(o.headingDeg).toBe(45);
  });

  it("accepts a field of view camera and a feature target", () => {
    const o = resolvePlanOptions(
      { ...good(), camera: { dfovDeg: 84, imageWidthPx: 5472, imageHeightPx: 3648 }, target: { smallestFeatureCm: 20, rule: "detection" } },
      {},
      "/d",
    );
    expect(o.camera).toMatchObject({ model: "dfov", dfovDeg: 84 });
    expect(o.target).toEqual({ by: "feature", smallestFeatureCm: 20, rule: "detection", tolerancePct: 10 });
  });
});

describe("resolvePlanOptions: unknown keys", () => {
  it("names the key and the nearest known key", () => {
    const plan: any = good();
    plan.camera.focalLenghtMm = plan.camera.focalLengthMm;
    delete plan.camera.focalLengthMm;
    const e = errorOf(() => resolvePlanOptions(plan, {}, "/d"));
    expect(e.message.split("\n")).toHaveLength(1);
    expect(e.message).toMatch(/^camera\.focalLenghtMm: unknown key \(did you mean focalLengthMm\?\)/);
  });

  it("suggests at the top level too, and the suggestion is the Levenshtein-nearest key", () => {
    const e = errorOf(() => resolvePlanOptions({ ...good(), celing: { heightM: 100 } }, {}, "/d"));
    expect(e.message).toMatch(/^celing: unknown key \(did you mean ceiling\?\)/);
    // Independent check with the reference distance: "ceiling" is nearer than any other top-level key.
    const top = [...new Set(PLAN_OPTION_SPECS.map((s) => s.key.split(".")[0]))];
    const best = top.reduce((a, b) => (distance("celing", b) < distance("celing", a) ? b : a));
    expect(best).toBe("ceiling");
  });

  it("reports each unknown key on its own line", () => {
    const e = errorOf(() => resolvePlanOptions({ ...good(), foo: 1, overlap: { front: 80 } }, {}, "/d"));
    expect(e).toBeInstanceOf(PlanOptionsError);
    const lines = e.message.split("\n");
    expect(lines).toHaveLength(2);
    expect(lines.some((l) => l.startsWith("overlap.front: unknown key (did you mean frontPct?)"))).toBe(true);
    expect(lines.some((l) => l.startsWith("foo: unknown key"))).toBe(true);
  });

  it("rejects an unknown flag override key, preferring a key that contains the shortened name", () => {
    const e = errorOf(() => resolvePlanOptions(good(), { "camera.focal": 8 }, "/d"));
    expect(e.message).toMatch(/^camera\.focal: unknown key \(did you mean focalLengthMm\?\)/);
  });
});

describe("resolvePlanOptions: bad values", () => {
  const cases: [string, (p: any) => void, RegExp][] = [
    ["number as a string", (p) => (p.camera.focalLengthMm = "8.8"), /^camera\.focalLengthMm: a number written as text; remove the quotes \(got "8\.8"; allowed: a number > 0\)$/],
    ["integer as a string", (p) => (p.minImages = "5"), /^minImages: a number written as text.*allowed: a whole number >= 1/],
    ["heading as a string", (p) => (p.headingDeg = "45"), /^headingDeg: a number written as text/],
    ["take-off coordinate as a string", (p) => (p.takeoff = ["12.5", 47]), /^takeoff\[0\]: a number written as text/],
    ["zero speed", (p) => (p.aircraft = { speedMps: 0 }), /^aircraft\.speedMps: out of range \(got 0; allowed: a number > 0\)$/],
    ["negative speed", (p) => (p.aircraft = { speedMps: -3 }), /^aircraft\.speedMps: out of range \(got -3; allowed: a number > 0\)$/],
    ["zero minimum speed", (p) => (p.aircraft = { minSpeedMps: 0 }), /^aircraft\.minSpeedMps: out of range \(got 0;/],
    ["negative transit speed", (p) => (p.aircraft = { transitSpeedMps: -1 }), /^aircraft\.transitSpeedMps: out of range/],
    ["zero climb rate", (p) => (p.aircraft = { maxClimbMps: 0 }), /^aircraft\.maxClimbMps: out of range/],
    ["minimum above strip speed", (p) => (p.aircraft = { speedMps: 5, minSpeedMps: 8 }), /^aircraft\.minSpeedMps: slowest speed above the strip speed/],
    ["fixed-wing without minimum speed", (p) => (p.aircraft = { type: "fixed-wing", speedMps: 18 }), /^aircraft\.minSpeedMps: required/],
    ["bad enum", (p) => (p.ceiling = { reference: "sea" }), /^ceiling\.reference: not one of the choices \(got "sea"; allowed: one of ground, surface, takeoff\)$/],
    ["bad datum", (p) => (p.demVerticalDatum = "navd88"), /^demVerticalDatum: not one of the choices .*egm96, egm2008, ellipsoid/],
    ["overlap of 100 %", (p) => (p.overlap = { sidePct: 100 }), /^overlap\.sidePct: out of range \(got 100; allowed: a number >= 0 and < 100\)$/],
    ["fractional image width", (p) => (p.camera.imageWidthPx = 5472.5), /^camera\.imageWidthPx: wrong type, expected a whole number/],
    ["heading of 360", (p) => (p.headingDeg = 360), /^headingDeg: out of range \(got 360; allowed: auto, or degrees/],
    ["latitude beyond the pole", (p) => (p.takeoff = [10, 91]), /^takeoff\[1\]: out of range \(got 91;/],
    ["take-off with one value", (p) => (p.takeoff = [10]), /^takeoff: wrong number of values/],
    ["group given as a number", (p) => (p.ceiling = 120), /^ceiling: wrong type, expected an object \(got 120; allowed: an object with heightM, reference\)$/],
    ["NaN from YAML", (p) => (p.ceiling = { heightM: NaN }), /^ceiling\.heightM: .*\(got NaN;/],
    ["missing dem", (p) => delete p.dem, /^dem: required \(--dem\)/],
    ["missing image size", (p) => delete p.camera.imageHeightPx, /^camera\.imageHeightPx: required/],
    ["two optics descriptions", (p) => (p.camera.hfovDeg = 70), /^camera: give one description of the optics, not sensor and hfov/],
    ["no optics", (p) => (p.camera = { imageWidthPx: 10, imageHeightPx: 10 }), /^camera: no optics given/],
    ["sensor without focal length", (p) => delete p.camera.focalLengthMm, /^camera\.focalLengthMm: required/],
    ["both gsd and feature", (p) => (p.target = { gsdCm: 2, smallestFeatureCm: 20 }), /^target: give gsdCm or smallestFeatureCm, not both/],
    ["no target", (p) => (p.target = { tolerancePct: 5 }), /^target: no target detail given/],
    ["rule with gsd", (p) => (p.target = { gsdCm: 2, rule: "tenth" }), /^target\.rule: a rule needs smallestFeatureCm/],
    ["bad rule", (p) => (p.target = { smallestFeatureCm: 2, rule: "tenths" }), /^target\.rule: not one of the choices/],
    ["boolean as text", (p) => (p.camera.portrait = "yes"), /^camera\.portrait: wrong type, expected boolean \(got "yes"; allowed: true or false\)$/],
  ];
  for (const [name, edit, re] of cases) {
    it(`rejects ${name} in one line naming key, value and what is allowed`, () => {
      const p = good();
      edit(p);
      const e = errorOf(() => resolvePlanOptions(p, {}, "/d"));
      expect(e.message.split("\n")).toHaveLength(1);
      expect(e.message).toMatch(re);
    });
  }

  it("rejects a plan that is not a mapping", () => {
    expect(errorOf(() => resolvePlanOptions([1, 2], {}, "/d")).message).toMatch(/^plan file: not a set of keys/);
  });

  it("names the flag when the bad value came from a flag", () => {
    const e = errorOf(() => resolvePlanOptions(good(), flagOverridesFromParsed({ speedMps: "-2" }), "/d"));
    expect(e.message).toMatch(/^--speed-mps \(aircraft\.speedMps\): out of range \(got -2; allowed: a number > 0\)$/);
  });
});

describe("flag parsing", () => {
  it("gives one flag per key, with no two flags alike", () => {
    const flags = PLAN_OPTION_SPECS.map((s) => s.flag);
    expect(new Set(flags).size).toBe(flags.length);
    for (const f of flags) expect(f).toMatch(/^--[a-z][a-z0-9-]*$/);
  });

  it("parses flag strings into numbers, pairs, booleans and headings", () => {
    expect(flagOverridesFromParsed({ gsdCm: "2.5", takeoff: "12.5, 47.25", portrait: "true", headingDeg: "auto", minImages: "5" })).toEqual({
      "target.gsdCm": 2.5,
      takeoff: [12.5, 47.25],
      "camera.portrait": true,
      headingDeg: "auto",
      minImages: 5,
    });
  });

  it("rejects a flag that is not a number, naming the flag", () => {
    expect(errorOf(() => flagOverridesFromParsed({ gsdCm: "two" })).message).toBe('--gsd-cm: not a number (got "two"; allowed: a number > 0)');
    expect(errorOf(() => flagOverridesFromParsed({ takeoff: "12.5" })).message).toMatch(/^--takeoff: not a longitude,latitude pair/);
  });
});

describe("loadPlanFile", () => {
  const dir = mkdtempSync(path.join(tmpdir(), "gsdplan-opt-"));

  it("reads YAML, where a quoted number stays text and is rejected", async () => {
    // YAML 1.2.2, 7.3.1: a double-quoted scalar is a string; a plain 8.8 is a float (core schema).
    const f = path.join(dir, "plan.yaml");
    writeFileSync(f, 'dem: dem.tif\narea: site.geojson\ncamera:\n  sensorWidthMm: 13.2\n  focalLengthMm: "8.8"\n  imageWidthPx: 5472\n  imageHeightPx: 3648\ntarget:\n  gsdCm: 2\n');
    const loaded = await loadPlanFile(f);
    expect(loaded.dir).toBe(dir);
    const e = errorOf(() => resolvePlanOptions(loaded.data, {}, loaded.dir));
    expect(e.message).toMatch(/^camera\.focalLengthMm: a number written as text/);
  });

  it("reads JSON and resolves paths against its folder", async () => {
    const f = path.join(dir, "plan.json");
    writeFileSync(f, JSON.stringify(good()));
    const loaded = await loadPlanFile(f);
    expect(resolvePlanOptions(loaded.data, {}, loaded.dir).dem).toBe(path.join(dir, "dem.tif"));
  });

  it("sniffs JSON content without an extension", async () => {
    const f = path.join(dir, "plan");
    writeFileSync(f, JSON.stringify(good()));
    expect(((await loadPlanFile(f)).data as any).dem).toBe("dem.tif");
  });

  it("reports unreadable and malformed files as InputFileError", async () => {
    await expect(loadPlanFile(path.join(dir, "missing.yaml"))).rejects.toBeInstanceOf(InputFileError);
    const bad = path.join(dir, "bad.json");
    writeFileSync(bad, "{ dem: ");
    await expect(loadPlanFile(bad)).rejects.toThrow(/bad\.json: not valid JSON/);
    const dup = path.join(dir, "dup.yaml");
    // YAML 1.2.2, 3.2.1.1: mapping keys are unique.
    writeFileSync(dup, "dem: a.tif\ndem: b.tif\n");
    await expect(loadPlanFile(dup)).rejects.toThrow(/dup\.yaml: not valid YAML: Map keys must be unique/);
  });
});

describe("documentation tables", async () => {
  const { planOptionsHelp, planOptionsMarkdown } = await import("../../src/plan/optionsSchema.js");
  it("lists every key once in the README table and the help", () => {
    const md = planOptionsMarkdown().split("\n");
    expect(md).toHaveLength(PLAN_OPTION_SPECS.length + 2);
    for (const s of PLAN_OPTION_SPECS) expect(md.filter((l) => l.startsWith(`| \`${s.key}\` |`))).toHaveLength(1);
    expect(planOptionsHelp().map((h) => h.flags.split(" ")[0])).toEqual(PLAN_OPTION_SPECS.map((s) => s.flag));
  });
});

describe("keep-out keys", () => {
  it("takes one path or a list, resolved against the plan file's folder; none by default, buffer 0", () => {
    expect(resolvePlanOptions(good(), {}, "/data/site").keepOut).toEqual([]);
    expect(resolvePlanOptions(good(), {}, "/data/site").keepOutBufferM).toBe(0);
    expect(resolvePlanOptions({ ...good(), keepOut: "yard.geojson" }, {}, "/data/site").keepOut).toEqual(["/data/site/yard.geojson"]);
    expect(resolvePlanOptions({ ...good(), keepOut: ["a.kml", "/abs/b.geojson"] }, {}, "/data/site").keepOut).toEqual(["/data/site/a.kml", "/abs/b.geojson"]);
  });

  it("a repeated --keep-out flag gives every file, resolved against the shell's folder, and replaces the file's list", () => {
    const flags = flagOverridesFromParsed({ keepOut: ["x.geojson", "y.kml"], keepOutBufferM: "12.5" });
    expect(flags).toEqual({ keepOut: ["x.geojson", "y.kml"], keepOutBufferM: 12.5 });
    const o = resolvePlanOptions({ ...good(), keepOut: "yard.geojson" }, flags, "/data/site", "/home/pilot");
    expect(o.keepOut).toEqual(["/home/pilot/x.geojson", "/home/pilot/y.kml"]);
    expect(o.keepOutBufferM).toBe(12.5);
  });

  it("refuses a negative buffer and an empty list, naming the key", () => {
    expect(errorOf(() => resolvePlanOptions({ ...good(), keepOutBufferM: -1 }, {}, "/d")).message).toMatch(/^keepOutBufferM: out of range \(got -1; allowed: a number >= 0\)/);
    expect(errorOf(() => resolvePlanOptions({ ...good(), keepOut: [] }, {}, "/d")).message).toMatch(/^keepOut: /);
  });
});

describe("dem sources", () => {
  it("one source stays a string; a list, a URL and a comma-separated or repeated flag are kept as given (URLs unresolved)", () => {
    expect(resolvePlanOptions(good(), {}, "/data/site").dem).toBe("/data/site/dem.tif");
    expect(resolvePlanOptions({ ...good(), dem: ["t1.tif", "tiles/", "https://example.org/dem.tif"] }, {}, "/data/site").dem).toEqual([
      "/data/site/t1.tif",
      "/data/site/tiles",
      "https://example.org/dem.tif",
    ]);
    expect(flagOverridesFromParsed({ dem: ["a.tif,b.tif", "c.vrt"] })).toEqual({ dem: ["a.tif", "b.tif", "c.vrt"] });
    expect(flagOverridesFromParsed({ dem: ["a.tif"] })).toEqual({ dem: "a.tif" });
  });
});

describe("surface and terrain, line sites, cross strips", () => {
  it("takes dtm only beside a surface model, in the forms dem takes", () => {
    expect(resolvePlanOptions({ ...good(), demSurface: "dsm", dtm: "dtm.tif" }, {}, "/data/site").dtm).toBe("/data/site/dtm.tif");
    expect(errorOf(() => resolvePlanOptions({ ...good(), dtm: "dtm.tif" }, {}, "/d")).message).toMatch(/^dtm: dtm given without a surface model/);
  });
  it("line keys and cross strips: checked ranges, cross strips off by default", () => {
    const o = resolvePlanOptions({ ...good(), lineWidthM: 60, lineStrips: 3 }, {}, "/d");
    expect([o.lineWidthM, o.lineStrips, o.crossStrips]).toEqual([60, 3, false]);
    expect(errorOf(() => resolvePlanOptions({ ...good(), lineWidthM: 0 }, {}, "/d")).message).toMatch(/^lineWidthM: out of range/);
    expect(resolvePlanOptions(good(), flagOverridesFromParsed({ crossStrips: true }), "/d").crossStrips).toBe(true);
  });
});
