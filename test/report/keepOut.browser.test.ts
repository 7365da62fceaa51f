/**
 * Keep-out zones in the rendered report, in Debian's Chromium through playwright-core:
 * the zones' hatched paths are laid out where the model puts them (SVG getBBox, the
 * browser's own geometry), visible, and switched by their layer toggle under the page's CSP.
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdirSync, writeFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { pathToFileURL } from "node:url";
import type { Browser } from "playwright-core";
import { launchChromium, requireChromium } from "../helpers/browser.js";
import { renderReport } from "../../src/report/render.js";
import { parseReportInput, serializeReportInput } from "../../src/report/serialize.js";
import { DEM_WIDTH_M, X0, Y0, makeKeepOutInput } from "./keepOutFixture.js";

const HAS_CHROMIUM = requireChromium("the keep-out report browser test");
const OUT = resolve("test-output/report");

interface Box { x: number; y: number; width: number; height: number }

describe.skipIf(!HAS_CHROMIUM)("keep-out zones in headless Chromium", () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await launchChromium();
    mkdirSync(OUT, { recursive: true });
  });
  afterAll(async () => {
    await browser?.close();
  });

  it("every zone's hatched path is visible where its rings lie, and the toggle hides them", async () => {
    const input = makeKeepOutInput();
    const zones = input.keepOut!.zones;
    // Through report-data.json, as `gsdplan report <out-dir>` renders it.
    const file = join(OUT, "keep-out.html");
    writeFileSync(file, renderReport(parseReportInput(serializeReportInput(input))));
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    const errors: string[] = [];
    page.on("console", (m) => {
      if (m.type() === "error" || m.type() === "warning") errors.push(m.text());
    });
    page.on("pageerror", (e) => errors.push(e.message));
    await page.goto(pathToFileURL(file).href, { waitUntil: "load" });
    expect(errors).toEqual([]);

    const k = 1000 / DEM_WIDTH_M; // main map units per metre (1000 across the DEM window)
    const areas = page.locator("#map-main g.keep-out-zone path.zone-area");
    expect(await areas.count()).toBe(zones.length);
    for (let i = 0; i < zones.length; i++) {
      const outer = zones[i].polygons.map((p) => p[0]).flat();
      const xs = outer.map((p) => (p[0] - X0) * k);
      const ys = outer.map((p) => (Y0 - p[1]) * k);
      const bbox = (await areas.nth(i).evaluate((e) => {
        const b = (e as unknown as { getBBox(): Box }).getBBox();
        return { x: b.x, y: b.y, width: b.width, height: b.height };
      })) as Box;
      // getBBox: the path's extent in user units (SVG 1.1, 4.5); 0.1-unit rounding of the data.
      expect(Math.abs(bbox.x - Math.min(...xs))).toBeLessThan(0.11);
      expect(Math.abs(bbox.y - Math.min(...ys))).toBeLessThan(0.11);
      expect(Math.abs(bbox.width - (Math.max(...xs) - Math.min(...xs)))).toBeLessThan(0.21);
      expect(Math.abs(bbox.height - (Math.max(...ys) - Math.min(...ys)))).toBeLessThan(0.21);
      const screen = await areas.nth(i).boundingBox();
      expect(screen && screen.width > 10 && screen.height > 10, `zone ${i} on screen`).toBe(true);
      expect(await areas.nth(i).isVisible()).toBe(true);
    }
    // The buffer is outside the zone: its box contains the zone's.
    const buf = await page.locator("#map-main g.keep-out-zone[data-zone='1'] path.zone-buffer").boundingBox();
    const zone = await areas.nth(1).boundingBox();
    expect(buf!.width).toBeGreaterThan(zone!.width);
    expect(buf!.x).toBeLessThan(zone!.x);
    // Zones on the flags map too, with the keep-out flag's own layer.
    expect(await page.locator("#map-flags g.keep-out-zone path.zone-area").first().isVisible()).toBe(true);
    expect(await page.locator('#map-flags g.flag-layer[data-kind="keepOut"]').isVisible()).toBe(true);
    expect(await page.locator("#keep-out-table tbody tr").count()).toBe(zones.length);

    await page.locator('input[data-toggle="keep-out"]').uncheck();
    expect(await page.locator('#map-main [data-layer="keep-out"]').isVisible()).toBe(false);
    await page.locator('input[data-toggle="keep-out"]').check();
    expect(await page.locator('#map-main [data-layer="keep-out"]').isVisible()).toBe(true);
    await page.screenshot({ path: join(OUT, "keep-out.png"), fullPage: true });
    await page.close();
  });
});
