/**
 * Hostile plan files and flags through `gsdplan plan` and resolvePlanOptions: unknown
 * keys (named, with the nearest known key), numbers written as strings, zero or
 * negative speeds and rates. One clear line, exit code 2, nothing written (issue 8,
 * "Hardening"). The CLI runs of all cases start together in beforeAll, three at a
 * time, to keep the file quick on a shared machine.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { writeFileSync } from "node:fs";
import path from "node:path";
import { stringify as toYaml } from "yaml";
import { HAS_GDAL } from "../helpers/tools.js";
import { resolvePlanOptions } from "../../src/plan/options.js";
import {
  cliAsync, ensureBuilt, expectNothingWritten, expectOneLineError, smallScenario, tempDir, userErrorOf, type CliResult,
} from "./helpers.js";

type Plan = Record<string, any>;
interface Case {
  name: string;
  mutate: (p: Plan) => void;
  flags?: string[];
  pattern: RegExp;
}

const CASES: Case[] = [
  // Levenshtein distance 1 from "overlap" (fastest-levenshtein, the project's matcher).
  { name: "an unknown top-level key, with the nearest known key", mutate: (p) => (p.overlapp = { frontPct: 80 }), pattern: /overlapp: unknown key \(did you mean overlap\?\)/ },
  {
    name: "an unknown nested key, with its path and the nearest key of its group",
    mutate: (p) => {
      p.camera.focalLenghtMm = p.camera.focalLengthMm;
      delete p.camera.focalLengthMm;
    },
    pattern: /camera\.focalLenghtMm: unknown key \(did you mean focalLengthMm\?\)/,
  },
  { name: "an unknown key in the ceiling group", mutate: (p) => (p.ceiling.refrence = "ground"), pattern: /ceiling\.refrence: unknown key \(did you mean reference\?\)/ },
  // YAML 1.2 core schema: a quoted scalar is a string, never a number.
  ...(["target.gsdCm", "aircraft.speedMps", "camera.imageWidthPx", "ceiling.heightM"] as const).map((key): Case => ({
    name: `a number written as a string (${key})`,
    mutate: (p) => {
      const [g, k] = key.split(".");
      p[g][k] = String(p[g][k]);
    },
    pattern: new RegExp(`${key.replace(".", "\\.")}: .*text.*got "[\\d.]+"`),
  })),
  ...([["speedMps", 0], ["speedMps", -5], ["transitSpeedMps", 0], ["minSpeedMps", -1], ["maxClimbMps", 0], ["maxDescentMps", -2]] as const).map(
    ([key, value]): Case => ({
      name: `aircraft.${key} = ${value} in the plan file`,
      mutate: (p) => (p.aircraft[key] = value),
      pattern: new RegExp(`aircraft\\.${key}: .*got ${value}; allowed: a number > 0`),
    }),
  ),
  ...([["--speed-mps", "0"], ["--speed-mps", "-3"], ["--max-climb-mps", "0"], ["--speed-mps", "ten"]] as const).map(
    ([flag, value]): Case => ({ name: `${flag} ${value} on the command line`, mutate: () => undefined, flags: [`${flag}=${value}`], pattern: new RegExp(`${flag}.*got "?${value}"?`) }),
  ),
];

interface Prepared {
  dir: string;
  plan: Plan;
  out: string;
  r: CliResult;
}
const prepared = new Map<string, Prepared>();

beforeAll(async () => {
  ensureBuilt();
  if (!HAS_GDAL) return;
  // One flat DEM and site shared by every case; each case gets its own plan file and --out.
  const base = smallScenario(tempDir("planfile"), () => 250, { cells: 100, cellM: 4, siteM: 160 });
  const jobs = CASES.map((c, i) => async () => {
    const plan = structuredClone(base.plan) as Plan;
    c.mutate(plan);
    const file = path.join(base.dir, `plan-${i}.yaml`);
    writeFileSync(file, toYaml(plan));
    const out = path.join(base.dir, `out-${i}`);
    const r = await cliAsync(["plan", file, "--out", out, "--quiet", ...(c.flags ?? [])]);
    prepared.set(c.name, { dir: base.dir, plan, out, r });
  });
  for (let i = 0; i < jobs.length; i += 3) await Promise.all(jobs.slice(i, i + 3).map((j) => j()));
}, 180_000);

describe.skipIf(!HAS_GDAL)("hostile plan files and flags", () => {
  for (const c of CASES) {
    it(`${c.name}: one line naming it, exit 2, nothing written; the library agrees`, async () => {
      const p = prepared.get(c.name)!;
      expectOneLineError(p.r, c.pattern);
      expect(p.r.out).toBe("");
      expectNothingWritten(p.out);
      if (!c.flags) {
        const e = await userErrorOf(() => resolvePlanOptions(p.plan, {}, p.dir));
        expect(e.message.split("\n")).toHaveLength(1);
        expect(e.message).toMatch(c.pattern);
      }
    });
  }
});
