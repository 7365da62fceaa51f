/**
 * Blocks in the rendered report, in Debian's Chromium through playwright-core: the range
 * circles and take-off points are visible, laid out at the radius the model gives (SVG
 * getBBox, SVG 1.1 section 4.5, and the element's box on screen: the browser's own geometry),
 * switched by their layer toggle under the page's CSP, and the flights table fits the
 * printable width of A4.
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdirSync, writeFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { pathToFileURL } from "node:url";
import type { Browser } from "playwright-core";
import { launchChromium, requireChromium } from "../helpers/browser.js";
import { renderReport } from "../../src/report/render.js";
import { parseReportInput, serializeReportInput } from "../../src/report/serialize.js";
import { MAIN_K, RANGE_M, X0, Y0, makeBlocksInput } from "./blocksFixture.js";

const HAS_CHROMIUM = requireChromium("the blocks report browser test");
const OUT = resolve("test-output/report");

interface Box { x: number; y: number; width: number; height: number }

/** The part of the browser's document the print check reads. */
interface PageDocument {
  querySelector(selector: string): { getBoundingClientRect(): { left: number; right: number; width: number } } | null;
  documentElement: { scrollWidth: number };
}

describe.skipIf(!HAS_CHROMIUM)("blocks, ranges and flights in headless Chromium", () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await launchChromium();
    mkdirSync(OUT, { recursive: true });
  });
  afterAll(async () => {
    await browser?.close();
  });

  it("range circles and take-off points are visible at the model's radius and places; the flights table fits A4", async () => {
    const { input } = makeBlocksInput();
    // Through report-data.json, as `gsdplan report <out-dir>` renders it.
    const file = join(OUT, "blocks.html");
    writeFileSync(file, renderReport(parseReportInput(serializeReportInput(input))));
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    const errors: string[] = [];
    page.on("console", (m) => {
      if (m.type() === "error" || m.type() === "warning") errors.push(m.text());
    });
    page.on("pageerror", (e) => errors.push(e.message));
    await page.goto(pathToFileURL(file).href, { waitUntil: "load" });
    expect(errors).toEqual([]);

    const blocks = input.blocks!;
    const map = await page.locator("#map-main").boundingBox();
    const scale = map!.width / 1000; // screen px per map unit (the main map's viewBox is 1000 wide)
    const circles = page.locator("#map-main circle.range");
    expect(await circles.count()).toBe(blocks.length);
    for (let i = 0; i < blocks.length; i++) {
      const c = circles.nth(i);
      expect(await c.isVisible(), `range ${i + 1}`).toBe(true);
      const bbox = (await c.evaluate((e) => {
        const b = (e as unknown as { getBBox(): Box }).getBBox();
        return { x: b.x, y: b.y, width: b.width, height: b.height };
      })) as Box;
      // getBBox of a circle: the square of side 2r about its centre, in map units.
      const r = RANGE_M * MAIN_K;
      const cx = (blocks[i].takeoff.x - X0) * MAIN_K;
      const cy = (Y0 - blocks[i].takeoff.y) * MAIN_K;
      expect(Math.abs(bbox.width - 2 * r)).toBeLessThan(0.2);
      expect(Math.abs(bbox.height - 2 * r)).toBeLessThan(0.2);
      expect(Math.abs(bbox.x + r - cx)).toBeLessThan(0.1);
      expect(Math.abs(bbox.y + r - cy)).toBeLessThan(0.1);
      // On screen: the same circle scaled to the map's width (plus the stroke's width).
      const screen = await c.boundingBox();
      expect(Math.abs(screen!.width - 2 * r * scale)).toBeLessThan(3);
      const style = await c.evaluate((e) => {
        const s = (globalThis as unknown as { getComputedStyle(e: unknown): { stroke: string; strokeDasharray: string; strokeOpacity: string } }).getComputedStyle(e);
        return { stroke: s.stroke, dash: s.strokeDasharray, opacity: s.strokeOpacity };
      });
      expect(style.stroke).not.toBe("none");
      expect(style.dash).not.toBe("none");
      expect(Number(style.opacity)).toBeGreaterThan(0.5);
    }
    // Take-off points: one per block, visible, with their block's label.
    const markers = page.locator("#map-main g.takeoff");
    expect(await markers.count()).toBe(blocks.length);
    for (let i = 0; i < blocks.length; i++) {
      const box = await markers.nth(i).boundingBox();
      expect(box && box.width > 5 && box.height > 5, `take-off ${i + 1} on screen`).toBe(true);
      expect(await markers.nth(i).locator("text").textContent()).toBe(`Take-off ${blocks[i].index}`);
    }
    expect(await page.locator("#map-main path.block-extent").count()).toBe(blocks.length);
    expect(await page.locator("svg.blocks-legend").isVisible()).toBe(true);
    expect(await page.locator("#flights-table tbody tr").count()).toBe(input.flights!.length);
    expect(await page.locator("#flights-table").isVisible()).toBe(true);

    // The layer toggle hides the circles and outlines, and shows them again.
    await page.locator('input[data-toggle="blocks"]').uncheck();
    expect(await circles.first().isVisible()).toBe(false);
    await page.locator('input[data-toggle="blocks"]').check();
    expect(await circles.first().isVisible()).toBe(true);
    await page.locator("#map").screenshot({ path: join(OUT, "blocks-map.png") });

    // Print on A4: the printable width (210 mm - 2 x 12 mm margins = 703 CSS px at 96 px/in)
    // holds the flights table.
    await page.emulateMedia({ media: "print" });
    await page.setViewportSize({ width: 703, height: 1000 });
    const fit = await page.evaluate(() => {
      const document = (globalThis as unknown as { document: PageDocument }).document;
      const r = document.querySelector("#flights-table")!.getBoundingClientRect();
      return { left: r.left, right: r.right, scrollWidth: document.documentElement.scrollWidth };
    });
    expect(fit.left).toBeGreaterThanOrEqual(-0.5);
    expect(fit.right).toBeLessThanOrEqual(703.5);
    expect(fit.scrollWidth).toBeLessThanOrEqual(703);
    await page.close();
  });
});
