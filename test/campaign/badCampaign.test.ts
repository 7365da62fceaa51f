/**
 * A bad campaign file is refused in one line with exit 2 and nothing written (the CLI's
 * rule for input a user can fix); so are a bad --jobs and an --out that is a file.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { existsSync, mkdirSync, rmSync, writeFileSync } from "node:fs";
import path from "node:path";
import { runCli, tempDir } from "../e2e/cli.js";

describe("gsdplan campaign: bad campaign files", () => {
  let work = "";
  beforeAll(() => {
    work = tempDir("campaign-bad");
  });
  afterAll(() => {
    if (work) rmSync(work, { recursive: true, force: true });
  });

  const site = (name: string) => `  - name: ${JSON.stringify(name)}\n    area: site.geojson\n`;
  it.each([
    ["not YAML", "sites: [a, b\n  - : :\n", /not valid YAML/],
    ["not JSON", '{ "sites": [', /not valid JSON/],
    ["no sites", "defaults:\n  minImages: 3\n", /sites: no sites/],
    ["an empty list of sites", "sites: []\n", /sites: an empty list/],
    ["a duplicate name (ignoring case)", `sites:\n${site("North")}${site("north")}`, /sites\[1\]\.name: the same as sites\[0\]\.name/],
    ["a name with a path separator", `sites:\n${site("a/b")}`, /sites\[0\]\.name: a path separator/],
    ["a name of ..", `sites:\n${site("..")}`, /sites\[0\]\.name: not a folder name/],
    ["an empty name", `sites:\n${site("")}`, /sites\[0\]\.name: empty/],
    ["a site without a name", "sites:\n  - area: site.geojson\n", /sites\[0\]\.name: every site needs a name/],
  ])("refuses %s: exit 2, one line, nothing written", (what, text, message) => {
    const ext = what === "not JSON" ? "json" : "yaml";
    const file = path.join(work, `${what.replace(/\W+/g, "-")}.${ext}`);
    writeFileSync(file, text);
    const out = path.join(work, `out-${path.basename(file)}`);
    const r = runCli(["campaign", file, "--out", out]);
    expect(r.status).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toMatch(message);
    expect(r.stderr.trimEnd().split("\n")).toHaveLength(1);
    expect(existsSync(out)).toBe(false);
  });

  it("refuses --jobs 0 and an --out that is a file, before writing anything", () => {
    const file = path.join(work, "ok.yaml");
    writeFileSync(file, `sites:\n${site("a")}`);
    const r = runCli(["campaign", file, "--out", path.join(work, "o1"), "--jobs", "0"]);
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/--jobs: not a number of threads \(got "0"; allowed: a whole number >= 1\)/);
    expect(existsSync(path.join(work, "o1"))).toBe(false);
    const asFile = path.join(work, "afile");
    writeFileSync(asFile, "x");
    const r2 = runCli(["campaign", file, "--out", asFile]);
    expect(r2.status).toBe(2);
    expect(r2.stderr).toMatch(/--out: it is a file, not a folder/);
  });

  it("a site whose plan keys are wrong fails alone (exit 3), with its problem in campaign.csv", () => {
    const dir = path.join(work, "keys");
    mkdirSync(dir);
    const file = path.join(dir, "c.yaml");
    writeFileSync(file, `sites:\n  - name: a\n    area: site.geojson\n    minImagez: 3\n`);
    const out = path.join(dir, "out");
    const r = runCli(["campaign", file, "--out", out]);
    expect(r.status).toBe(3);
    expect(existsSync(path.join(out, "campaign.csv"))).toBe(true);
    expect(existsSync(path.join(out, "a"))).toBe(false);
    expect(r.stdout).toMatch(/minImagez: unknown key \(did you mean minImages\?\)/);
  });
});
