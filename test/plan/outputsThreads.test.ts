// The outputs of one plan made on one thread and on two: with threads, gsd.tif is made and
// written by a worker thread of its own while the other files are written (plan/outputs.ts,
// export/cogFileWorker.ts), the other rasters on this thread either way. Every file must hold the
// same bytes either way. The demo's plan and DEM (invented terrain, bundled with the project)
// are only the input here; the check is of the outputs against each other.
import { describe, it, expect } from "vitest";
import { mkdtempSync, readdirSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { builtModule } from "../helpers/dist.js";
import type * as Library from "../../src/index.js";

const built = builtModule("index.js", ["export/cogFileWorker.js"]);
const PLAN = path.join(import.meta.dirname, "../../fixtures/demo/corrie-vane-plan.yaml");

describe.skipIf(!built.available)("a plan's outputs on one thread and on two", () => {
  it("are the same bytes, gsd.tif written by its own worker on two", async () => {
    const lib = (await import(built.href)) as typeof Library;
    const file = await lib.loadPlanFile(PLAN);
    const outputs = async (threads: number) => {
      const run = await lib.planMission(lib.resolvePlanOptions(file.data, {}, file.dir), { threads });
      const { files } = lib.planOutputs(run, { generatedAt: "2026-01-01T00:00:00.000Z" });
      // Whether gsd.tif was written by its worker (true), could not be (false), or was not offered one.
      let gsdByWorker: boolean | undefined;
      const watched = files.map((f) => (f.background ? { ...f, background: async (p: string) => (gsdByWorker = await f.background!(p)) } : f));
      const out = mkdtempSync(path.join(tmpdir(), `gsdplan-threads${threads}-`));
      await lib.writeOutputSet(out, watched);
      return { out, gsdByWorker };
    };
    const one = await outputs(1);
    const two = await outputs(2);
    expect(one.gsdByWorker).toBeUndefined();
    expect(two.gsdByWorker).toBe(true);
    const names = readdirSync(one.out).sort();
    expect(readdirSync(two.out).sort()).toEqual(names);
    expect(names).toContain("gsd.tif");
    for (const name of names) {
      const a = readFileSync(path.join(one.out, name));
      const b = readFileSync(path.join(two.out, name));
      expect(b.equals(a), name).toBe(true);
    }
  }, 60_000);
});
