/**
 * `gsdplan report <out-dir>`: re-renders report.html from a finished plan's
 * report-data.json. The CLI runs in-process through the same runMain and command
 * registration as src/cli/main.ts, so exit codes and stderr are what a user sees.
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, unlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { Command } from "commander";
import { registerCommands } from "../../src/cli/commands/index.js";
import { runMain, EXIT_BAD_INPUT } from "../../src/cli/run.js";

const PLAN = resolve("fixtures/report/hills-plan.yaml");

/** Runs the CLI with `args`, capturing stdout, stderr and the exit code. */
async function cli(args: string[]): Promise<{ code: number; out: string; err: string }> {
  const program = new Command().name("gsdplan").option("--debug", "print stack traces for errors");
  registerCommands(program);
  let out = "";
  let err = "";
  const stdout = process.stdout.write.bind(process.stdout);
  const stderr = process.stderr.write.bind(process.stderr);
  process.stdout.write = ((s: string | Uint8Array) => ((out += String(s)), true)) as typeof process.stdout.write;
  process.stderr.write = ((s: string | Uint8Array) => ((err += String(s)), true)) as typeof process.stderr.write;
  const before = process.exitCode;
  process.exitCode = 0;
  try {
    await runMain(program, ["node", "gsdplan", ...args]);
  } finally {
    process.stdout.write = stdout;
    process.stderr.write = stderr;
  }
  const code = Number(process.exitCode ?? 0);
  // Leave the test runner's own exit code alone.
  process.exitCode = before;
  return { code, out, err };
}

const lines = (s: string) => s.split("\n").filter((l) => l.length > 0);

describe("gsdplan report <out-dir>", () => {
  let root: string;
  let outDir: string;
  beforeAll(async () => {
    root = mkdtempSync(join(tmpdir(), "gsdplan-report-cmd-"));
    outDir = join(root, "plan");
    const r = await cli(["plan", PLAN, "--out", outDir, "--quiet"]);
    expect(r.err).toBe("");
    expect(r.code).toBe(0);
  });
  afterAll(() => {
    if (root) rmSync(root, { recursive: true, force: true });
  });

  it("re-creates a deleted report.html, equal to the one the plan wrote", async () => {
    const original = readFileSync(join(outDir, "report.html"), "utf8");
    const filesBefore = readdirSync(outDir).sort();
    unlinkSync(join(outDir, "report.html"));
    const r = await cli(["report", outDir]);
    expect(r.err).toBe("");
    expect(r.code).toBe(0);
    expect(lines(r.out)).toEqual([`report written: ${join(outDir, "report.html")}`]);
    const again = readFileSync(join(outDir, "report.html"), "utf8");
    // report-data.json carries generatedAt and the tool version, so the page is the same
    // byte for byte; if it ever differs, only the generation stamp may.
    const stamp = (s: string) => s.replace(/ · generated [^<·]+/, "");
    expect(again.length).toBeGreaterThan(100_000);
    expect(stamp(again)).toBe(stamp(original));
    expect(again).toBe(original);
    // No temporary files left beside the outputs.
    expect(readdirSync(outDir).sort()).toEqual(filesBefore);
  });

  it("a folder without report-data.json: one line on stderr naming the file, exit 2, nothing written", async () => {
    const empty = join(root, "empty");
    mkdirSync(empty);
    const r = await cli(["report", empty]);
    expect(r.code).toBe(EXIT_BAD_INPUT);
    expect(lines(r.err)).toHaveLength(1);
    expect(r.err).toContain(join(empty, "report-data.json"));
    expect(r.out).toBe("");
    expect(readdirSync(empty)).toEqual([]);

    const missing = await cli(["report", join(root, "no-such-folder")]);
    expect(missing.code).toBe(EXIT_BAD_INPUT);
    expect(lines(missing.err)).toHaveLength(1);
    expect(existsSync(join(root, "no-such-folder"))).toBe(false);
  });

  for (const [what, corrupt] of [
    ["cut short", (t: string) => t.slice(0, Math.floor(t.length / 2))],
    ["not JSON", () => "<html>not report data</html>"],
    ["JSON of another kind", () => JSON.stringify({ format: "something-else", version: 1, input: {} })],
    ["a newer version", (t: string) => t.replace(/"version":\d+/, '"version":99')],
    ["a typed array of the wrong length", (t: string) => t.replace(/"length":(\d+)/, (_m, n) => `"length":${Number(n) + 7}`)],
  ] as const) {
    it(`a corrupted report-data.json (${what}): one line naming the file, exit 2, the old page untouched`, async () => {
      const dir = mkdtempSync(join(root, "corrupt-"));
      copyFileSync(join(outDir, "report-data.json"), join(dir, "report-data.json"));
      const text = readFileSync(join(dir, "report-data.json"), "utf8");
      const bad = corrupt(text);
      expect(bad).not.toBe(text);
      writeFileSync(join(dir, "report-data.json"), bad);
      writeFileSync(join(dir, "report.html"), "previous page");
      const r = await cli(["report", dir]);
      expect(r.code).toBe(EXIT_BAD_INPUT);
      expect(lines(r.err)).toHaveLength(1);
      expect(r.err).toMatch(/^gsdplan: /);
      expect(r.err).toContain("report-data.json");
      expect(r.err).not.toMatch(/internal error/);
      expect(readFileSync(join(dir, "report.html"), "utf8")).toBe("previous page");
      expect(readdirSync(dir).sort()).toEqual(["report-data.json", "report.html"]);
    });
  }
});
