import { existsSync, readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { ROOT, runCli, tempDir } from "./cli.js";

// `gsdplan demo`, the README's first command, run from a folder outside the repository: the
// bundled CLI (package.json's bin) must find the demo's plan file from the package's root
// (src/packageRoot.ts), not from the working folder or its own file's depth.
describe("gsdplan demo", () => {
  it("plans the bundled demo site from any working folder", () => {
    const dir = tempDir("demo");
    const r = runCli(["demo", "--out", "out", "--json"], { cwd: dir });
    expect(r.status, r.stderr).toBe(0);
    const summary = JSON.parse(r.stdout) as { site: string; photos: number };
    const plan = parse(readFileSync(path.join(ROOT, "fixtures", "demo", "corrie-vane-plan.yaml"), "utf8")) as { name: string };
    expect(summary.site).toContain(plan.name);
    expect(JSON.parse(readFileSync(path.join(dir, "out", "summary.json"), "utf8"))).toEqual(summary);
    expect(existsSync(path.join(dir, "out", "report.html"))).toBe(true);
  }, 120_000);
});
