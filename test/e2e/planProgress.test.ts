/**
 * The progress display of `gsdplan plan` (issue 6, "Behaviour"): a bar on
 * stderr when it is a terminal, none with --quiet, none in pipes (the pipe
 * case is checked in every other e2e run). A terminal is given by util-linux
 * `script`, which also returns the child's exit code (-e).
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { readdirSync, rmSync } from "node:fs";
import path from "node:path";
import { HAS_GDAL, requireTool } from "../helpers/tools.js";
import { runCliOnTty, tempDir } from "./cli.js";
import { OUTPUT_FILES } from "./hillsSuite.js";

const PLAN = "fixtures/e2e/hills-utm33-small-plan.yaml";
const HAS_SCRIPT = requireTool("script", "bsdutils", ["--version"]);
// The stage bar, "[#####.....] solve", and a carriage return that is not the
// terminal's own end of line (a pty turns "\n" into "\r\n").
const PROGRESS = /\[[#.]{20}\]|\r(?!\n)/;

describe.skipIf(!HAS_GDAL || !HAS_SCRIPT)("gsdplan plan: progress display", () => {
  let work = "";
  beforeAll(() => {
    work = tempDir("progress");
  });
  afterAll(() => {
    if (work) rmSync(work, { recursive: true, force: true });
  });

  it("shows the stage bar on a terminal (positive control for the check below)", () => {
    const r = runCliOnTty(["plan", PLAN, "--out", path.join(work, "loud")]);
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(PROGRESS);
  }, 60_000);

  it("shows nothing of it on a terminal with --quiet; --fail-on-flags exits 3 on this flagged plan", () => {
    const out = path.join(work, "quiet");
    const r = runCliOnTty(["plan", PLAN, "--out", out, "--quiet", "--fail-on-flags"]);
    expect(r.status).toBe(3);
    expect(r.stdout).not.toMatch(PROGRESS);
    expect(r.stdout).toMatch(/flagged/);
    expect(readdirSync(out).sort()).toEqual(OUTPUT_FILES);
  }, 60_000);
});
