/**
 * The report on real plans: the bundled demo (fixtures/demo, invented site) and the hilly
 * GDAL-made fixture (fixtures/report/hills-plan.yaml on fixtures/gdal/hills_utm33_f32.tif),
 * planned in-process and opened in Debian's Chromium through playwright-core.
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { execFileSync } from "node:child_process";
import { mkdirSync, readFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { pathToFileURL } from "node:url";
import { launchChromium, requireChromium } from "../helpers/browser.js";
import type { Browser, Page } from "playwright-core";
import { HAS_PROJ } from "../helpers/tools.js";
import { loadPlanFile, resolvePlanOptions } from "../../src/plan/options.js";
import { planMission, type PlanRun } from "../../src/plan/plan.js";
import { planOutputs, reportInput } from "../../src/plan/outputs.js";
import { writeOutputSet } from "../../src/export/atomicDir.js";
import { flattenNumbers, STANDARD_CAUTIONS } from "../../src/report/render.js";
import type { ReportInput } from "../../src/report/model.js";

const HAS_CHROMIUM = requireChromium("the real-plan report browser tests");

const OUT = resolve("test-output/report");
const PLANS = {
  demo: resolve("fixtures/demo/corrie-vane-plan.yaml"),
  hills: resolve("fixtures/report/hills-plan.yaml"),
} as const;
type PlanName = keyof typeof PLANS;

interface Planned {
  run: PlanRun;
  input: ReportInput;
  dir: string;
  /** summary.json as written, read back from the file. */
  summary: Record<string, unknown>;
}

const planned = new Map<PlanName, Planned>();

/** The part of the browser's document the print check reads. */
interface PageDocument {
  querySelectorAll(selector: string): ArrayLike<{ tagName: string; id: string; getBoundingClientRect(): { left: number; right: number; width: number } }>;
  documentElement: { scrollWidth: number };
}

/** Plans a fixture and writes the report files (the GeoTIFFs and waypoint files are not needed here). */
async function plan(name: PlanName): Promise<Planned> {
  const file = await loadPlanFile(PLANS[name]);
  const run = await planMission(resolvePlanOptions(file.data, {}, file.dir));
  const meta = { planFile: file.file, toolVersion: "test", generatedAt: "2000-01-01T00:00:00Z" };
  const { files, summary } = planOutputs(run, meta);
  const dir = join(OUT, name);
  mkdirSync(dir, { recursive: true });
  await writeOutputSet(dir, files.filter((f) => ["summary.json", "report.html"].includes(f.name)), { force: true });
  return { run, input: reportInput(run, summary, meta), dir, summary: JSON.parse(readFileSync(join(dir, "summary.json"), "utf8")) };
}

beforeAll(async () => {
  mkdirSync(OUT, { recursive: true });
  for (const name of Object.keys(PLANS) as PlanName[]) planned.set(name, await plan(name));
});

/** Centre of the site's bounding box in WGS84, the point reportInput measures the convergence at. */
function siteCentreLonLat(p: Planned): [number, number] {
  const site = p.run.site.local;
  const polys = site.type === "Polygon" ? [site.coordinates] : site.coordinates;
  const xs = polys.flatMap((q) => q[0].map((c) => c[0]));
  const ys = polys.flatMap((q) => q[0].map((c) => c[1]));
  return p.run.frame.toWgs84((Math.min(...xs) + Math.max(...xs)) / 2, (Math.min(...ys) + Math.max(...ys)) / 2);
}

describe.skipIf(!HAS_PROJ)("grid convergence of the real plans' frames against PROJ", () => {
  for (const name of Object.keys(PLANS) as PlanName[]) {
    it(`${name}: the angle of true north in grid coordinates matches PROJ`, () => {
      const p = planned.get(name)!;
      const [lon, lat] = siteCentreLonLat(p);
      const ours = p.input.gridConvergenceDeg!;
      expect(Number.isFinite(ours)).toBe(true);
      // PROJ's `proj -V` prints the meridian convergence of the projection at a point
      // (PROJ manual, proj(1), option -V). Its sign convention is not the one we store, so
      // the magnitude is compared here and the direction below.
      const v = execFileSync("proj", ["-V", ...p.run.frame.proj4.split(/\s+/)], { input: `${lon} ${lat}\n` }).toString();
      const m = /Convergence\s*:.*\[\s*(-?[\d.eE+-]+)\s*\]/.exec(v);
      expect(m, v).not.toBeNull();
      expect(Math.abs(ours)).toBeCloseTo(Math.abs(Number(m![1])), 4);
      // Direction: PROJ's cs2cs projects the point and one 0.01 degree north along its
      // meridian; the grid bearing of that step is where true north points in the grid.
      const pts = execFileSync("cs2cs", ["-f", "%.4f", "+proj=longlat +datum=WGS84 +no_defs", "+to", ...p.run.frame.proj4.split(/\s+/)], {
        input: `${lon} ${lat}\n${lon} ${lat + 0.01}\n`,
      })
        .toString()
        .trim()
        .split("\n")
        .map((l) => l.trim().split(/\s+/).map(Number));
      const bearing = (Math.atan2(pts[1][0] - pts[0][0], pts[1][1] - pts[0][1]) * 180) / Math.PI;
      expect(ours).toBeCloseTo(bearing, 3);
      // Transverse Mercator: east of the central meridian in the northern hemisphere the
      // meridians lean towards it, so true north is west of grid north (common practice;
      // first-order gamma = dLon * sin(lat), from memory). Demo: UTM 30N (CM 3 W) at 2.67 W.
      if (name === "demo") expect(ours).toBeLessThan(-0.2);
    });
  }
});

describe.skipIf(!HAS_CHROMIUM)("report of real plans in headless Chromium", () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await launchChromium();
  });
  afterAll(async () => {
    await browser?.close();
  });

  async function open(file: string, viewport = { width: 1280, height: 900 }) {
    const page = await browser.newPage({ viewport });
    const consoleErrors: string[] = [];
    const requests: string[] = [];
    page.on("console", (m) => {
      if (m.type() === "error" || m.type() === "warning") consoleErrors.push(m.text());
    });
    page.on("pageerror", (e) => consoleErrors.push(e.message));
    page.on("request", (r) => requests.push(r.url()));
    const url = pathToFileURL(file).href;
    await page.goto(url, { waitUntil: "load" });
    return { page, consoleErrors, requests: requests.filter((u) => u !== url) };
  }

  async function visible(page: Page, selector: string, minW: number, minH: number): Promise<void> {
    const box = await page.locator(selector).boundingBox();
    expect(box, selector).not.toBeNull();
    expect(box!.width, selector).toBeGreaterThan(minW);
    expect(box!.height, selector).toBeGreaterThan(minH);
  }

  for (const name of Object.keys(PLANS) as PlanName[]) {
    it(`${name}: offline, all six parts present, numbers equal summary.json, prints on A4 and Letter`, async () => {
      const p = planned.get(name)!;
      const s = p.summary;
      const { page, consoleErrors, requests } = await open(join(p.dir, "report.html"));
      expect(consoleErrors).toEqual([]);
      // Only data: URLs (the embedded PNGs) may be requested: the page works offline.
      expect(requests.filter((u) => !u.startsWith("data:"))).toEqual([]);

      // 1. Map: hill shade, contours with labels, site, legs, waypoints, take-off, scale bar, north arrow.
      await visible(page, "#map-main", 600, 300);
      expect(await page.locator("#map-main image.shade").count()).toBe(1);
      expect(await page.locator("#map-main .contours path").count()).toBeGreaterThan(3);
      expect(await page.locator("#map-main .contour-labels text").count()).toBeGreaterThanOrEqual(4);
      expect(await page.locator("#map-main path.site").count()).toBe(1);
      expect(await page.locator("#map-main .legs path[stroke]").count()).toBeGreaterThan(2);
      expect(await page.locator("#map-main .waypoints circle").count()).toBeGreaterThan(Number(s.strips) * 2 - 1);
      // One take-off marker per block (one when the plan has a single block or, in
      // report-data from before blocks, none listed), each on screen; a range circle about
      // each when the plan has a range; a flights table row per flight.
      const blocks = p.input.blocks ?? [];
      const markers = page.locator("#map-main g.takeoff");
      expect(await markers.count()).toBe(Math.max(1, blocks.length));
      const markerBoxes = await markers.evaluateAll((els) =>
        els.map((e) => {
          const b = (e as unknown as { getBoundingClientRect(): { width: number; height: number } }).getBoundingClientRect();
          return { width: b.width, height: b.height };
        }),
      );
      for (const box of markerBoxes) expect(box.width > 5 && box.height > 5, "take-off marker on screen").toBe(true);
      expect(await page.locator("#map-main circle.range").count()).toBe((p.input.maxRangeM ?? 0) > 0 ? Math.max(1, blocks.length) : 0);
      expect(await page.locator("#flights-table tbody tr").count()).toBe(p.input.flights?.length ?? 0);
      if (p.input.flights) expect(p.input.flights.length).toBe(s.flights);
      await visible(page, "#map-main .scalebar", 40, 10);
      const arrow = page.locator("#map-main .north");
      await visible(page, "#map-main .north", 20, 20);
      expect(Number(await arrow.getAttribute("data-convergence-deg"))).toBeCloseTo(p.input.gridConvergenceDeg!, 3);

      // 2. GSD map with out-of-band hatching and a legend in cm/px; image-count map.
      await visible(page, "#map-gsd", 300, 200);
      await visible(page, "#map-images", 300, 200);
      expect(await page.locator("#map-gsd path[fill='url(#hatch-outband)']").count()).toBe(Number((s.withinBandPct as number) < 100));
      expect(await page.locator("#gsd svg.legend[aria-label*='cm per pixel']").count()).toBe(1);

      // 3. Flags: every kind with cells has its map layer and a row with area, share, cause and remedy.
      await visible(page, "#map-flags", 300, 200);
      const byKind = (s.flagged as { byKind: Record<string, { cells: number }> }).byKind;
      // One round trip for the table and one for the map layers (the machine may be busy).
      const rows = await page.locator("#flags tr[data-kind]").evaluateAll((els) =>
        els.map((e) => ({
          kind: e.getAttribute("data-kind")!,
          cls: e.getAttribute("class"),
          cells: Array.from((e as unknown as { children: ArrayLike<{ textContent: string | null }> }).children, (c) => c.textContent ?? ""),
        })),
      );
      const layers = await page.locator("#map-flags g.flag-layer").evaluateAll((els) => els.map((e) => e.getAttribute("data-kind")));
      expect(rows.map((r) => r.kind).sort()).toEqual(Object.keys(byKind).sort());
      for (const r of rows) {
        const f = byKind[r.kind];
        expect(r.cls, r.kind).toBe(f.cells > 0 ? "flag-present" : "flag-absent");
        expect(layers.includes(r.kind), r.kind).toBe(f.cells > 0);
        expect(r.cells.length).toBe(6);
        expect(r.cells[4].length, `${r.kind} explanation`).toBeGreaterThan(20);
        expect(r.cells[5].length, `${r.kind} remedy`).toBeGreaterThan(20);
      }

      // 4. A visible profile for every strip; unflyable stretches marked where the solver had them.
      const boxes = await page.locator("figure.profile").evaluateAll((els) =>
        els.map((e) => {
          const b = (e as unknown as { getBoundingClientRect(): { width: number; height: number } }).getBoundingClientRect();
          return { strip: e.getAttribute("data-strip"), width: b.width, height: b.height };
        }),
      );
      expect(boxes.length).toBe(s.strips);
      for (const b of boxes) expect(b.width > 200 && b.height > 80, `profile of strip ${b.strip}`).toBe(true);
      const stations = s.stations as { unflyable: number; detailLimited: number };
      expect((await page.locator("figure.profile rect.flagged.status-2").count()) > 0).toBe(stations.unflyable > 0);
      expect((await page.locator("figure.profile rect.flagged.status-1").count()) > 0).toBe(stations.detailLimited > 0);

      // 5. The constant-altitude comparison, with the baseline's figures from summary.json.
      const ca = s.constantAltitude as { altitudeAmslM: number; withinBandPct: number; gsdCm: { p95: number } };
      const val = async (k: string) => Number(await page.locator(`[data-key="${k}"]`).first().getAttribute("data-value"));
      expect(await val("baseline.withinBandPct")).toBeCloseTo(ca.withinBandPct, 2);
      expect(await val("baseline.gsdCm.p95")).toBeCloseTo(ca.gsdCm.p95, 3);
      expect(await val("baseline.altitudeAmslM")).toBeCloseTo(ca.altitudeAmslM, 1);

      // 6. Numbers equal summary.json: every numeric leaf is on the page with its exact value,
      // and the summary table prints it as summary.json holds it.
      const cells = await page.locator("[data-key]").evaluateAll((els) =>
        els.map((e) => ({ key: e.getAttribute("data-key")!, value: e.getAttribute("data-value")!, text: e.textContent ?? "" })),
      );
      const leaves = flattenNumbers(s);
      expect(leaves.length).toBeGreaterThan(40);
      for (const [key, v] of leaves) {
        const shown = cells.filter((c) => c.key === key);
        expect(shown.length, key).toBeGreaterThan(0);
        for (const c of shown) expect(Number(c.value), key).toBe(v);
      }
      const tableRows = await page.locator("#summary-table [data-key]").evaluateAll((els) => els.map((e) => ({ key: e.getAttribute("data-key")!, text: e.textContent ?? "" })));
      const summaryMap = new Map(leaves);
      expect(tableRows.length).toBe(leaves.length);
      for (const r of tableRows) expect(Number(r.text.replace(/,/g, "")), r.key).toBe(summaryMap.get(r.key));
      await visible(page, "#gsd-histogram", 300, 120);
      expect(await page.locator("#gsd-histogram .baseline-hist").count()).toBe(1);
      const numbers = (await page.locator("#numbers").textContent()) ?? "";
      expect(numbers).toContain(String(s.geoidModel));
      for (const col of ["altitude_amsl_m", "altitude_ellipsoid_m", "altitude_takeoff_m", "height_above_ground_m"]) expect(numbers).toContain(col);
      expect(numbers).toContain("DEM vertical accuracy");
      for (const c of STANDARD_CAUTIONS) expect(numbers).toContain(c);
      expect(numbers).toMatch(new RegExp(`${s.flights} flights?, ${s.batteries} batter`));

      await page.screenshot({ path: join(OUT, `${name}.png`), fullPage: true });

      // Print: the page laid out at the printable width of A4 (210 mm - 2 x 12 mm margins,
      // 703 CSS px at 96 px/in) and of US Letter (8.5 in - 24 mm, 726 px) has no element
      // wider than the page, so nothing is cut at the right edge.
      await page.emulateMedia({ media: "print" });
      for (const [format, widthPx] of [["A4", 703], ["Letter", 726]] as const) {
        await page.setViewportSize({ width: widthPx, height: 1000 });
        const overflow = await page.evaluate((w) => {
          // The test project has no DOM lib; the page's document, typed as far as used here.
          const document = (globalThis as unknown as { document: PageDocument }).document;
          const wide: string[] = [];
          for (const el of Array.from(document.querySelectorAll("svg, table, figure, img"))) {
            const r = el.getBoundingClientRect();
            if (r.width > 0 && (r.right > w + 0.5 || r.left < -0.5)) wide.push(`${el.tagName}#${el.id} ${Math.round(r.left)}..${Math.round(r.right)}`);
          }
          return { scrollWidth: document.documentElement.scrollWidth, wide };
        }, widthPx);
        expect(overflow.wide, format).toEqual([]);
        expect(overflow.scrollWidth, format).toBeLessThanOrEqual(widthPx);
        const pdf = Buffer.from(await page.pdf({ format }));
        // Page objects of the PDF (ISO 32000-1, 7.7.3.3: each page is a dictionary of /Type /Page).
        const pages = (pdf.toString("latin1").match(/\/Type\s*\/Page\b/g) ?? []).length;
        // Six sections, each from a new page, the profiles two abreast: a handful of pages
        // per section at most.
        expect(pages, format).toBeGreaterThanOrEqual(6);
        expect(pages, format).toBeLessThanOrEqual(8 + Math.ceil((s.strips as number) / 6) + 6);
      }
      await page.close();
    });
  }
});
