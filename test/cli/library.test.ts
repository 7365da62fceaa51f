import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { execFileSync } from "node:child_process";

// The package's own entry point, resolved the way a user's `import ... from "gsdplan"`
// is (package.json "exports" -> dist/bundle), and its command (package.json "bin"), after
// `npm run build`.
const pkg = JSON.parse(readFileSync("package.json", "utf8")) as { version: string; bin: { gsdplan: string } };
const BIN = pkg.bin.gsdplan;

describe("library entry", () => {
  it("exposes the stages and the composed job under the package name", () => {
    const out = execFileSync(
      process.execPath,
      ["--input-type=module", "-e", 'const m = await import("gsdplan"); console.log(JSON.stringify(["planMission","prepareMission","planOutputs","openDem","readWindow","layoutStrips","solvePlan","assessPlan","makeCamera","groundSampleDistanceM","localFrameFor","egm96UndulationM","writeOutputSet","renderReport"].filter((k) => typeof m[k] !== "function")))'],
      { encoding: "utf8" },
    );
    expect(JSON.parse(out)).toEqual([]);
  });

  it("the command in package.json's bin prints its help with every command", () => {
    const out = execFileSync(process.execPath, [BIN, "--help"], { encoding: "utf8" });
    for (const cmd of ["inspect", "layout", "plan", "report", "demo"]) expect(out).toContain(cmd);
  });

  it("--version and -V print package.json's version", () => {
    for (const flag of ["--version", "-V"]) expect(execFileSync(process.execPath, [BIN, flag], { encoding: "utf8" }).trim()).toBe(pkg.version);
  });

  it("plan --help reads one sentence per key: meaning, what is allowed, the default, the key", () => {
    const out = execFileSync(process.execPath, [BIN, "plan", "--help"], { encoding: "utf8" }).replace(/\s+/g, " ");
    expect(out).toContain("Plan name for the summary and exported files (default: the site's name). Allowed: a non-empty text. [key name]");
    expect(out).not.toMatch(/\.;/);
  });
});
