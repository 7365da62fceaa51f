// planOutputs keeps, for the files it makes later, only what they write: a caller that lets go
// of the run once it returns (planToFolder) lets the DEM window go while the files are written,
// the run's memory peak (plan/outputs.ts). Checked with the engine's own bookkeeping: weak
// references to the window's arrays are cleared by a full collection (fullGc.ts), while the
// files made afterwards are still whole. The demo's plan and DEM (invented terrain, bundled
// with the project) are only the input; one thread, so no worker holds the window either.
import { describe, it, expect } from "vitest";
import { mkdtempSync, readFileSync, readdirSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { loadPlanFile, resolvePlanOptions } from "../../src/plan/options.js";
import { planMission } from "../../src/plan/plan.js";
import { OUTPUT_NAMES, planOutputs } from "../../src/plan/outputs.js";
import { writeOutputSet } from "../../src/export/atomicDir.js";
import { collectGarbage } from "../../src/cli/fullGc.js";

const PLAN = path.join(import.meta.dirname, "../../fixtures/demo/corrie-vane-plan.yaml");

describe("a plan's output set", () => {
  it("does not hold the run's DEM window once built", async () => {
    const file = await loadPlanFile(PLAN);
    const made = await (async () => {
      const run = await planMission(resolvePlanOptions(file.data, {}, file.dir), { threads: 1 });
      const cells = run.grid.width * run.grid.height;
      return { cells, heights: new WeakRef(run.grid.heights), ...planOutputs(run, { generatedAt: "2026-01-01T00:00:00.000Z" }) };
    })();
    expect(made.cells).toBeGreaterThan(1_000_000);
    // Once the report's input is reduced (runReleased), one collection clears the window. A
    // weak reference's target is kept alive until the running job's microtasks are done
    // (ECMAScript, AddToKeptObjects / ClearKeptObjects): a timer ends them first.
    await made.runReleased;
    await new Promise((r) => setTimeout(r, 0));
    collectGarbage();
    expect(made.heights.deref()).toBeUndefined();
    const out = mkdtempSync(path.join(tmpdir(), "gsdplan-letgo-"));
    await writeOutputSet(out, made.files);
    expect(readdirSync(out).sort()).toEqual([...OUTPUT_NAMES].sort());
    // The page still draws the DEM's hill shade (from the reduced DEM).
    expect(readFileSync(path.join(out, "report.html"), "utf8")).toMatch(/data:image\/png;base64,/);
  }, 120_000);
});
