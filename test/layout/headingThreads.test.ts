import { describe, it, expect } from "vitest";
import { makeGrid } from "../../src/dem/sample.js";
import { readSite } from "../../src/layout/site.js";
import type { layoutStrips as LayoutStrips, LayoutOptions } from "../../src/layout/strips.js";
import type { bandPool as BandPoolOf } from "../../src/assess/bandThreads.js";
import { builtModule } from "../helpers/dist.js";
import { UTM33, E0, N0, polygonText } from "./frame-helper.js";

// Worker threads run only from the built library (`npm test` builds it first).
const strips = builtModule("layout/strips.js", ["../assess/coverageWorker.js"]);

describe.skipIf(!strips.available)("auto heading with the band workers", () => {
  it("scores every candidate as this thread alone does, bit for bit", async () => {
    const { layoutStrips } = (await import(strips.href)) as { layoutStrips: typeof LayoutStrips };
    const { bandPool } = (await import(new URL("../assess/bandThreads.js", strips.href).href)) as { bandPool: typeof BandPoolOf };
    // Ridges running south-east over 1.1 M cells of 0.5 m (enough for the band workers), its
    // heights in shared memory as the DEM window's are (dem/window.ts).
    const made = makeGrid({ width: 1100, height: 1000, x0: E0, y0: N0 + 500, cellM: 0.5, heights: (x, y) => 300 + 40 * Math.sin(((x - E0) + (y - N0)) / 90) });
    const heights = new Float32Array(new SharedArrayBuffer(made.heights.byteLength));
    heights.set(made.heights);
    const grid = { ...made, heights };
    const site = readSite(polygonText([[[60, 60], [480, 80], [500, 440], [90, 470], [60, 60]]]), UTM33);
    const opts: LayoutOptions = { headingDeg: "auto", spacingM: 20, triggerM: 10, footprintAcrossM: 50, footprintAlongM: 33, photoSpeedMps: 8, transitSpeedMps: 12, grid };
    const alone = layoutStrips(site, opts);
    const pool = bandPool();
    try {
      // The worker up before the choice, so it takes candidates of its own.
      pool.start(1);
      await new Promise((r) => setTimeout(r, 500));
      const shared = layoutStrips(site, { ...opts, bandPool: pool, threads: 2 });
      expect(pool.workers.length).toBe(1);
      expect(shared.headingCandidates).toEqual(alone.headingCandidates);
      expect(shared.headingDeg).toBe(alone.headingDeg);
    } finally {
      pool.close();
    }
    // 36 candidates every 5 degrees, each with its own terrain term.
    expect(alone.headingCandidates.length).toBe(36);
    expect(new Set(alone.headingCandidates.map((c) => c.altitudeChangeM)).size).toBe(36);
    // The ground's contours run along 135 degrees (x + y constant): a strip along them stays
    // level (plane geometry), so that is the choice within a step.
    expect(Math.abs(alone.headingDeg - 135)).toBeLessThanOrEqual(5);
  });
});
