/**
 * `gsdplan plan` behaviour from the user's side (issue 6, "Behaviour"): exit
 * codes, --json, --force, --fail-on-flags, no progress in pipes,
 * inputs never written. Runs the built CLI on a small site over the
 * GDAL-written hilly fixture (fixtures/e2e/hills-utm33-small-plan.yaml).
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { readFileSync, readdirSync, rmSync, statSync } from "node:fs";
import path from "node:path";
import { HAS_GDAL } from "../helpers/tools.js";
import { ROOT, runCli, sha256, tempDir, type CliResult } from "./cli.js";
import { OUTPUT_FILES } from "./hillsSuite.js";

const PLAN = "fixtures/e2e/hills-utm33-small-plan.yaml";
const INPUTS = [PLAN, "fixtures/gdal/hills_utm33_f32.tif", "fixtures/e2e/hills-utm33-small-site.geojson"].map((f) => path.join(ROOT, f));

/** Every file of a folder with its hash and modification time. */
function snapshot(dir: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const f of readdirSync(dir).sort()) out[f] = `${sha256(path.join(dir, f))} ${statSync(path.join(dir, f)).mtimeMs}`;
  return out;
}

// The stage bar "[#####.....] solve" and its carriage returns (planProgress.test.ts shows it on a terminal).
const PROGRESS = /\[[#.]{20}\]|\r/;

describe.skipIf(!HAS_GDAL)("gsdplan plan: behaviour", () => {
  let work = "";
  let first: CliResult;
  let inputsBefore: string[] = [];
  const outA = () => path.join(work, "a");

  beforeAll(() => {
    work = tempDir("behaviour");
    inputsBefore = INPUTS.map(sha256);
    first = runCli(["plan", PLAN, "--out", outA(), "--json"]);
  }, 60_000);
  afterAll(() => {
    if (work) rmSync(work, { recursive: true, force: true });
  });

  it("--json prints summary.json to stdout, and only that", () => {
    expect(first.status, first.stderr).toBe(0);
    const printed = JSON.parse(first.stdout);
    expect(printed).toEqual(JSON.parse(readFileSync(path.join(outA(), "summary.json"), "utf8")));
    expect(readdirSync(outA()).sort()).toEqual(OUTPUT_FILES);
  });

  it("exits 0 when the plan is written even with flagged cells (issue 6: exit codes)", () => {
    const s = JSON.parse(first.stdout);
    // Guard: this site over the analytic hills does flag cells, so the exit code is the one under test.
    expect(s.flagged.cells).toBeGreaterThan(0);
    expect(first.status).toBe(0);
  });

  it("refuses to overwrite outputs without --force: exit 2, one line, files untouched", () => {
    const before = snapshot(outA());
    const r = runCli(["plan", PLAN, "--out", outA()]);
    expect(r.status).toBe(2);
    expect(r.stderr.trimEnd().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(/--out/);
    expect(r.stderr).toMatch(/--force/);
    expect(r.stdout).toBe("");
    expect(snapshot(outA())).toEqual(before);
  });

  it("--force replaces the set, leaving no temporary files", () => {
    const before = snapshot(outA());
    const r = runCli(["plan", PLAN, "--out", outA(), "--force", "--quiet"]);
    expect(r.status).toBe(0);
    expect(readdirSync(outA()).sort()).toEqual(OUTPUT_FILES);
    const after = snapshot(outA());
    // report-data.json carries the generation time, so at least it is new.
    expect(after["report-data.json"]).not.toBe(before["report-data.json"]);
  }, 60_000);

  it("--fail-on-flags exits 0 on a plan without flags", () => {
    // Not every plan is flagged: with a 60 % tolerance, one image required and the
    // ceiling raised to 200 m, the small site's relief fits the band everywhere.
    const out = path.join(work, "c");
    const r = runCli(["plan", PLAN, "--out", out, "--fail-on-flags", "--json", "--tolerance-pct", "60", "--min-images", "1", "--ceiling-m", "200"]);
    expect(r.stderr).toBe("");
    const s = JSON.parse(r.stdout);
    expect(s.flagged.cells).toBe(0);
    expect(r.status).toBe(0);
  }, 60_000);

  it("stderr in a pipe carries no progress characters", () => {
    expect(first.stderr).not.toMatch(PROGRESS);
  });

  it("never writes the inputs (DEM, site, plan file checksums unchanged after every run)", () => {
    expect(INPUTS.map(sha256)).toEqual(inputsBefore);
  });
});
