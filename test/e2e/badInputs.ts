/**
 * The table-driven bad-input check: each case runs the built CLI and must
 * give exit code 2, exactly one line on stderr that names the problem (no
 * stack trace), nothing on stdout, and no files in --out (the folder absent
 * or empty). The rule is the project's (src/errors.ts, issues 2-4 "Bad input").
 */
import { it, expect } from "vitest";
import path from "node:path";
import { listDir, runCli, tempDir } from "./cli.js";

export interface BadCase {
  /** What is wrong, as the issue names it. */
  name: string;
  /** CLI arguments; the literal OUT is replaced by a fresh --out folder. */
  args: string[];
  /** The one line must match this (it names the field, value or file). */
  says: RegExp;
}

/** The small plan over the GDAL hilly fixture that every plan case starts from. */
export const BASE_PLAN = "fixtures/e2e/hills-utm33-small-plan.yaml";

/** Registers one vitest case per row. */
export function badInputCases(cases: BadCase[]): void {
  it.each(cases)("$name: exit 2, one line, no outputs", ({ args, says }) => {
    const out = path.join(tempDir("bad"), "out");
    const r = runCli(args.map((a) => (a === "OUT" ? out : a)));
    const lines = r.stderr.replace(/\n$/, "").split("\n");
    expect(r.status, r.stderr).toBe(2);
    expect(lines, r.stderr).toHaveLength(1);
    expect(lines[0]).toMatch(/^gsdplan: /);
    expect(lines[0]).not.toMatch(/internal error|\bat .*\.js:\d+/);
    expect(lines[0]).toMatch(says);
    expect(r.stdout).toBe("");
    const left = listDir(out);
    expect(left === null || left.length === 0, `left in --out: ${left?.join(", ")}`).toBe(true);
  }, 60_000);
}
