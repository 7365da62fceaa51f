import { describe, it, expect } from "vitest";
import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { makeReportInput } from "./fixture.js";
import { renderReport } from "../../src/report/render.js";
import type { reportHtmlInBackground as Background } from "../../src/report/background.js";
import { demLayersOfGrid, type demLayersInBackground as LayersInBackground } from "../../src/report/demLayers.js";
import { makeGrid } from "../../src/dem/sample.js";

// The worker thread runs only from the built library (`npm test` builds it first).
const dist = new URL("../../dist/report/background.js", import.meta.url);
const HAS_DIST = existsSync(fileURLToPath(dist)) && existsSync(fileURLToPath(new URL("renderWorker.js", dist)));
if (!HAS_DIST && process.env.CI === "true") throw new Error("dist/ is required under CI=true (npm test builds it first)");

describe.skipIf(!HAS_DIST)("report page rendered in a worker thread", () => {
  it("is the page rendered on this thread, character for character", async () => {
    const { reportHtmlInBackground } = (await import(dist.href)) as { reportHtmlInBackground: typeof Background };
    const input = makeReportInput({ siteName: "Worker check" });
    const page = reportHtmlInBackground(input);
    const html = await page.html();
    expect(html.length).toBeGreaterThan(10_000);
    expect(html).toContain("Worker check");
    expect(html).toBe(renderReport(input));
  });
});

describe("the report's DEM layers made beforehand", () => {
  it("give the page the report draws itself, and layers of another DEM are not used", () => {
    const input = makeReportInput({ siteName: "Layers check" });
    const own = renderReport(input);
    expect(renderReport(input, demLayersOfGrid(input.dem))).toBe(own);
    // Layers of other ground (the heights raised 40 m): drawn from the wrong DEM, they must
    // not reach the page; a wrong key makes the page draw its own.
    const other = demLayersOfGrid({ ...input.dem, heights: input.dem.heights.map((z) => z + 40) });
    expect(other.contours.svg).not.toBe(demLayersOfGrid(input.dem).contours.svg);
    expect(renderReport(input, { ...other, key: "another DEM" })).toBe(own);
  });
});

const layersDist = new URL("../../dist/report/demLayers.js", import.meta.url);
describe.skipIf(!HAS_DIST)("the report's DEM layers made in a worker thread", () => {
  it("are the layers made on this thread", async () => {
    const { demLayersInBackground } = (await import(layersDist.href)) as { demLayersInBackground: typeof LayersInBackground };
    // 1200 x 900 cells of hills (over the worker's threshold), 2 m cells.
    const grid = makeGrid({ width: 1200, height: 900, x0: 500000, y0: 6000000, cellM: 2, heights: (x, y) => 200 + 40 * Math.sin(x / 300) * Math.cos(y / 250) });
    const layers = await demLayersInBackground(grid).layers();
    expect(layers).toBeDefined();
    expect(layers).toEqual(demLayersOfGrid(grid));
    expect(layers!.contours.svg.length).toBeGreaterThan(1000);
    // One thread requested: none is started, and the page draws the layers itself.
    expect(await demLayersInBackground(grid, 1).layers()).toBeUndefined();
  });
});
