import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdirSync, writeFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { pathToFileURL } from "node:url";
import { launchChromium, requireChromium } from "../helpers/browser.js";
import type { Browser } from "playwright-core";
import { makeReportInput } from "./fixture.js";
import { renderReport, flattenNumbers } from "../../src/report/render.js";
import { parseReportInput, serializeReportInput } from "../../src/report/serialize.js";

const HAS_CHROMIUM = requireChromium("the report browser tests");
const OUT = resolve("test-output/report");
const HOSTILE = `<script>window.__pwned=1;alert(1)</script> "Hill" & 'Farm' <img src=x onerror="window.__pwned=2">`;

describe.skipIf(!HAS_CHROMIUM)("report in headless Chromium", () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await launchChromium();
    mkdirSync(OUT, { recursive: true });
  });
  afterAll(async () => {
    await browser?.close();
  });

  async function open(html: string, name: string) {
    const file = join(OUT, name);
    writeFileSync(file, html);
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    const consoleErrors: string[] = [];
    const requests: string[] = [];
    const dialogs: string[] = [];
    page.on("console", (m) => {
      if (m.type() === "error" || m.type() === "warning") consoleErrors.push(m.text());
    });
    page.on("pageerror", (e) => consoleErrors.push(e.message));
    page.on("request", (r) => requests.push(r.url()));
    page.on("dialog", (d) => {
      dialogs.push(d.message());
      void d.dismiss();
    });
    const url = pathToFileURL(file).href;
    await page.goto(url, { waitUntil: "load" });
    return { page, consoleErrors, requests: requests.filter((u) => u !== url), dialogs };
  }

  it("loads offline with no console errors and no network, shows every map and profile, and prints the summary's numbers", async () => {
    const input = makeReportInput();
    // Through report-data.json and back, as `gsdplan report <out-dir>` does.
    const html = renderReport(parseReportInput(serializeReportInput(input)));
    const { page, consoleErrors, requests } = await open(html, "report.html");
    expect(consoleErrors).toEqual([]);
    // Only data: URLs (the embedded PNGs) may be requested.
    expect(requests.filter((u) => !u.startsWith("data:"))).toEqual([]);

    for (const id of ["map-main", "map-gsd", "map-images", "map-flags", "gsd-histogram"]) {
      const box = await page.locator(`#${id}`).boundingBox();
      expect(box, id).not.toBeNull();
      expect(box!.width).toBeGreaterThan(200);
      expect(box!.height).toBeGreaterThan(100);
    }
    // Every embedded raster decoded (a broken PNG has naturalWidth 0 in an <img>; for SVG
    // <image> we check the rendered size instead).
    const imageBoxes = await page.locator("svg.map image").evaluateAll((els) => els.map((e) => (e as unknown as { getBBox(): { width: number } }).getBBox().width));
    expect(imageBoxes.length).toBeGreaterThanOrEqual(6);
    for (const w of imageBoxes) expect(w).toBeGreaterThan(0);

    const strips = new Set(input.legs.filter((l) => l.kind === "strip").map((l) => l.strip));
    const profiles = page.locator("figure.profile");
    expect(await profiles.count()).toBe(strips.size);
    for (let i = 0; i < strips.size; i++) {
      const box = await profiles.nth(i).boundingBox();
      expect(box && box.width > 100 && box.height > 50).toBe(true);
    }

    // Numbers on the page equal summary.json: every numeric leaf has a cell with its key,
    // and every element carrying a key shows the exact value and a matching text.
    const cells = await page.locator("[data-key]").evaluateAll((els) =>
      els.map((e) => ({ key: e.getAttribute("data-key")!, value: e.getAttribute("data-value")!, text: e.textContent ?? "" })),
    );
    const byKey = new Map<string, { value: string; text: string }[]>();
    for (const c of cells) (byKey.get(c.key) ?? byKey.set(c.key, []).get(c.key)!).push(c);
    const leaves = flattenNumbers(input.summary);
    expect(leaves.length).toBeGreaterThan(30);
    for (const [key, v] of leaves) {
      const shown = byKey.get(key);
      expect(shown, key).toBeDefined();
      for (const c of shown!) {
        expect(Number(c.value), key).toBe(v);
      }
    }
    // The summary table's text agrees with the value at its printed precision.
    const rows = await page.locator("#summary-table [data-key]").evaluateAll((els) =>
      els.map((e) => ({ key: e.getAttribute("data-key")!, text: e.textContent ?? "" })),
    );
    const summaryMap = new Map(leaves);
    for (const r of rows) {
      const printed = Number(r.text.replace(/,/g, ""));
      const v = summaryMap.get(r.key)!;
      const decimals = (r.text.split(".")[1] ?? "").length;
      expect(Math.abs(printed - v), r.key).toBeLessThanOrEqual(0.5 * 10 ** -decimals + 1e-9);
    }
    // Baseline figures too.
    const b = input.baseline!;
    const val = async (k: string) => Number(await page.locator(`[data-key="${k}"]`).first().getAttribute("data-value"));
    expect(await val("baseline.withinBandPct")).toBe(b.withinBandPct);
    expect(await val("baseline.ceilingBreaches.cells")).toBe(b.ceilingBreaches.cells);
    expect(await val("baseline.gsdCm.p95")).toBe(b.gsdCm.p95);

    // The layer toggle (the page's one script) works under the page's CSP.
    await page.locator('input[data-toggle="contours"]').uncheck();
    expect(await page.locator('#map-main [data-layer="contours"]').isVisible()).toBe(false);
    await page.locator('input[data-toggle="contours"]').check();

    await page.screenshot({ path: join(OUT, "report.png"), fullPage: true });
    await page.emulateMedia({ media: "print" });
    const pdf = await page.pdf({ format: "A4" });
    expect(pdf.byteLength).toBeGreaterThan(10_000);
    const letter = await page.pdf({ format: "Letter" });
    expect(letter.byteLength).toBeGreaterThan(10_000);
    writeFileSync(join(OUT, "report-a4.pdf"), pdf);
    await page.close();
  });

  it("keeps a hostile site name and file names as text: no script from them runs", async () => {
    const input = makeReportInput({ siteName: HOSTILE, demFile: `"><script>window.__pwned=3</script>.tif` });
    input.summary.warnings = [`</script><script>window.__pwned=4</script>`];
    const { page, consoleErrors, dialogs } = await open(renderReport(input), "hostile.html");
    expect(dialogs).toEqual([]);
    expect(await page.evaluate(() => (globalThis as unknown as { __pwned?: number }).__pwned)).toBeUndefined();
    expect(await page.locator("#site-name").textContent()).toBe(HOSTILE);
    expect(await page.title()).toBe(`GSD report — ${HOSTILE}`);
    // Our two script elements only (the JSON data block and the layer toggles); no <img>.
    expect(await page.locator("script").count()).toBe(2);
    expect(await page.locator("img").count()).toBe(0);
    // The inline JSON parses back to the same warnings.
    const warnings = await page.locator("#summary-data").evaluate((e) => JSON.parse(e.textContent!).warnings);
    expect(warnings).toEqual(input.summary.warnings);
    expect(consoleErrors).toEqual([]);
    await page.close();
  });
});
