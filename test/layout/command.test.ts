import { describe, it, expect } from "vitest";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { runLayoutCommand } from "../../src/cli/commands/layout.js";
import { InputError } from "../../src/errors.js";

const PLAN = "fixtures/demo/corrie-vane-plan.yaml";

describe("gsdplan layout (demo plan: 20 MP 1-inch camera, 8.8 mm lens, 2.5 cm/px, 75/65 overlap)", () => {
  it("prints spacing and trigger distance from the footprint and overlap (spacing = footprint across x (1 - side overlap))", async () => {
    const out = await runLayoutCommand({ plan: PLAN });
    // Footprint across = 5472 px x 0.025 m = 136.8 m; along = 3648 x 0.025 = 91.2 m (domain brief, camera model).
    expect(out).toContain("footprint 136.8 m across x 91.2 m along");
    // Strip spacing = 136.8 x (1 - 0.65) = 47.88; trigger = 91.2 x (1 - 0.75) = 22.8 (domain brief, overlap).
    expect(out).toMatch(/spacing 47\.9 m, trigger distance 22\.8 m/);
    expect(out).toMatch(/ground speed [\d.]+ m\/s on strips \(limited by (cruise|interval|blur)\)/);
    expect(out).toMatch(/heading \d+ deg .*: heading \d+: /);
    expect(out).toMatch(/caution: .*pilot in command decides/);
  }, 30_000);

  it("refuses a site wholly outside the DEM with an InputError", async () => {
    const dir = mkdtempSync(path.join(tmpdir(), "gsdplan-layout-"));
    const far = path.join(dir, "far.geojson");
    // A square near 15 E 47 N, nowhere near the demo DEM (south of Scotland).
    writeFileSync(far, JSON.stringify({ type: "Polygon", coordinates: [[[15, 47], [15.01, 47], [15.01, 47.01], [15, 47.01], [15, 47]]] }));
    await expect(runLayoutCommand({ plan: PLAN, area: far })).rejects.toSatisfy((e) => e instanceof InputError || (e as Error).name === "InputFileError");
  }, 30_000);
});
