/**
 * `gsdplan campaign` end to end (issue 15, item 3), on the built CLI: three fixture
 * sites, one outside its DEM. Each planned site equals `gsdplan plan` of its own plan
 * file (fixtures/truth/gorge_utm-plan.yaml, fixtures/e2e/hills-utm33-small-plan.yaml),
 * campaign.csv is read by Python's csv module, index.html by Python's XML and HTML
 * parsers and by Chromium. Re-runs skip current sites, re-plan changed ones and retry
 * the failed one.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { copyFileSync, existsSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from "node:fs";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { HAS_GDAL, requireTool } from "../helpers/tools.js";
import { launchChromium, requireChromium } from "../helpers/browser.js";
import { ROOT, runCli, runCliOnTty, tempDir } from "../e2e/cli.js";
import { OUTPUT_FILES } from "../e2e/hillsSuite.js";
import { HAS_PYTHON, pythonCsvRows, pythonHtml } from "./helpers.js";

const CAMPAIGN = "fixtures/campaign/three-sites.yaml";
const GORGE = "Gorge UTM 32";
const HILLS = "Hills small";
const BROKEN = 'West, "outside" <the DEM>';
/** Each planned site and the plan file that plans it alone (with --name, the campaign's site name). */
const ALONE: Record<string, string> = { [GORGE]: "fixtures/truth/gorge_utm-plan.yaml", [HILLS]: "fixtures/e2e/hills-utm33-small-plan.yaml" };
const HAS_SCRIPT = requireTool("script", "bsdutils", ["--version"]);
const HAS_CHROMIUM = requireChromium("the campaign index.html browser check");
// The bar of the campaign's progress line, and a carriage return that is not the end of a line.
const PROGRESS = /\[[#.]{20}\] \d+\/\d+ sites|\r(?!\n)/;

type Summary = Record<string, any>;
const readJson = (f: string) => JSON.parse(readFileSync(f, "utf8")) as Summary;
const mtimes = (dir: string) => Object.fromEntries(readdirSync(dir).map((f) => [f, statSync(path.join(dir, f)).mtimeMs]));
const csvRows = (out: string) => pythonCsvRows(readFileSync(path.join(out, "campaign.csv"), "utf8"));
const statusOf = (out: string) => Object.fromEntries(csvRows(out).slice(1).map((r) => [r[0], r[8]]));

/** The campaign file with its relative paths made absolute, written elsewhere (with edits). */
function campaignCopy(dir: string, edit: (text: string) => string = (t) => t): string {
  const text = readFileSync(path.join(ROOT, CAMPAIGN), "utf8").replace(/\.\.\//g, `${path.join(ROOT, "fixtures")}/`);
  const file = path.join(dir, "campaign.yaml");
  writeFileSync(file, edit(text));
  return file;
}

describe.skipIf(!HAS_GDAL || !HAS_PYTHON)("gsdplan campaign", () => {
  let work = "";
  let out = "";
  let first: ReturnType<typeof runCli>;
  beforeAll(() => {
    work = tempDir("campaign");
    out = path.join(work, "out");
    first = runCli(["campaign", CAMPAIGN, "--out", out, "--jobs", "2"]);
  }, 120_000);
  afterAll(() => {
    if (work) rmSync(work, { recursive: true, force: true });
  });

  it("exits 3 with one site failed, and writes a folder per planned site, campaign.csv and index.html", () => {
    expect(first.stderr).toBe("");
    expect(first.status).toBe(3);
    expect(readdirSync(out).sort()).toEqual([GORGE, HILLS, "campaign.csv", "index.html"].sort());
    for (const site of [GORGE, HILLS]) expect(readdirSync(path.join(out, site)).sort()).toEqual(OUTPUT_FILES);
    expect(first.stdout).toMatch(/3 sites, 2 planned or current, 1 failed/);
  });

  it("writes each planned site exactly as `gsdplan plan` plans it alone", () => {
    for (const [site, plan] of Object.entries(ALONE)) {
      const ref = path.join(work, `alone-${site.replace(/\W/g, "")}`);
      const r = runCli(["plan", plan, "--name", site, "--out", ref, "--quiet"]);
      expect(r.status, r.stderr).toBe(0);
      const dir = path.join(out, site);
      for (const f of ["waypoints.csv", "plan.geojson", "plan.kml", "plan.gpx", "gsd.tif", "images.tif", "flags.tif"]) {
        expect(readFileSync(path.join(dir, f)).equals(readFileSync(path.join(ref, f))), `${site}/${f}`).toBe(true);
      }
      // summary.json: byte-equal once the campaign's inputsHash line is taken out.
      const ours = readFileSync(path.join(dir, "summary.json"), "utf8");
      expect(ours).toMatch(/,\n {2}"inputsHash": "sha256:[0-9a-f]{64}"\n}\n$/);
      expect(ours.replace(/,\n {2}"inputsHash": "sha256:[0-9a-f]{64}"\n}\n$/, "\n}\n")).toBe(readFileSync(path.join(ref, "summary.json"), "utf8"));
      // report-data.json: equal apart from the time stamp and the plan file's name.
      const strip = (f: string) => withoutKeys(readJson(f), ["generatedAt", "planFile"]);
      expect(strip(path.join(dir, "report-data.json"))).toEqual(strip(path.join(ref, "report-data.json")));
    }
  }, 120_000);

  it("campaign.csv, read by Python's csv module: the ten columns, one row per site in file order, figures equal to each summary.json", () => {
    const rows = csvRows(out);
    expect(rows[0]).toEqual(["name", "area_m2", "flights", "batteries", "photos", "flight_time_s", "within_band_pct", "flagged_pct", "status", "error"]);
    expect(rows.map((r) => r[0]).slice(1)).toEqual([GORGE, HILLS, BROKEN]);
    for (const row of rows.slice(1, 3)) {
      const s = readJson(path.join(out, row[0], "summary.json"));
      expect(row.slice(1).map(Number).slice(0, 7)).toEqual([s.areaM2, s.flights, s.batteries, s.photos, s.flightTimeS, s.withinBandPct, s.flagged.pct]);
      expect(row[8]).toBe("planned");
      expect(row[9]).toBe("");
    }
    // Same figures as `gsdplan plan` gives this site alone (gorge: 140 m x 140 m, fixtures/truth/README.md).
    expect(Number(rows[1][1])).toBeCloseTo(19600, -2);
    const broken = rows[3];
    expect(broken.slice(1, 8)).toEqual(["", "", "", "", "", "", ""]);
    expect(broken[8]).toBe("failed");
    // The planner's own one-line message for a site outside its DEM.
    expect(broken[9]).toMatch(/hills_utm33_f32\.tif: the requested area .* lies outside the DEM extent/);
    expect(broken[9]).not.toContain("\n");
  });

  it("index.html is well-formed (Python's XML parser), names every site escaped, and links only to the site reports that exist", () => {
    const html = readFileSync(path.join(out, "index.html"), "utf8");
    const page = pythonHtml(path.join(out, "index.html"));
    expect(page.root).toBe("html");
    // No external resource: no http(s) URL anywhere, every link a relative file here.
    expect(html).not.toMatch(/https?:\/\//i);
    expect(page.links.filter((l) => l.attr === "src")).toEqual([]);
    const hrefs = page.links.map((l) => l.value);
    expect(hrefs).toHaveLength(2);
    for (const h of hrefs) {
      expect(h).toMatch(/^[^/:]+\/report\.html$/);
      expect(existsSync(path.join(out, decodeURIComponent(h)))).toBe(true);
    }
    expect(hrefs.map((h) => decodeURIComponent(h))).toEqual([`${GORGE}/report.html`, `${HILLS}/report.html`]);
    // The hostile name reads back as text (the parser decoded the escapes), never as markup.
    const bodyRows = page.rows.filter((r) => /^\d+$/.test(r[0] ?? ""));
    expect(bodyRows.map((r) => r[1])).toEqual([GORGE, HILLS, BROKEN]);
    expect(bodyRows[2][2]).toBe("failed");
    expect(html).not.toContain("<the DEM>");
    // Headline figures: photos as in summary.json.
    expect(Number(bodyRows[0][6])).toBe(readJson(path.join(out, GORGE, "summary.json")).photos);
    // The map: one outline per planned site, the failed one dashed from its outline file, a scale bar.
    expect(html.match(/<path d="M[^"]+" class="outline"/g)).toHaveLength(2);
    expect(html.match(/class="outline failed"/g)).toHaveLength(1);
    expect(html).toMatch(/<g id="scale-bar" data-metres="\d+">/);
  });

  it.skipIf(!HAS_CHROMIUM)("index.html loads in Chromium with no console errors and no request beyond its own file", async () => {
    const browser = await launchChromium();
    try {
      const page = await browser.newPage();
      const errors: string[] = [];
      const requests: string[] = [];
      page.on("console", (m) => {
        if (m.type() === "error" || m.type() === "warning") errors.push(m.text());
      });
      page.on("pageerror", (e) => errors.push(e.message));
      page.on("request", (r) => requests.push(r.url()));
      const url = pathToFileURL(path.join(out, "index.html")).href;
      await page.goto(url, { waitUntil: "load" });
      expect(errors).toEqual([]);
      expect(requests).toEqual([url]);
      const box = await page.locator("svg.overview").boundingBox();
      expect(box!.width).toBeGreaterThan(300);
      // Following a link opens that site's report.
      await page.locator("a", { hasText: HILLS }).click();
      await page.waitForLoadState("load");
      expect(decodeURIComponent(page.url())).toBe(pathToFileURL(path.join(out, HILLS, "report.html")).href.replace(/%20/g, " "));
    } finally {
      await browser.close();
    }
  }, 60_000);

  it.skipIf(!HAS_SCRIPT)("re-run: skips both planned sites (their files untouched), retries the failed one; shows progress on a terminal", () => {
    const before: Record<string, Record<string, number>> = { [GORGE]: mtimes(path.join(out, GORGE)), [HILLS]: mtimes(path.join(out, HILLS)) };
    const r = runCliOnTty(["campaign", CAMPAIGN, "--out", out, "--jobs", "2"]);
    expect(r.status).toBe(3);
    expect(r.stdout).toMatch(PROGRESS);
    // One site to plan, the failed one, tried again (and failing again).
    expect(r.stdout).toMatch(/\] 0\/1 sites {2}West, "outside" <the DEM>: load/);
    expect(r.stdout).toMatch(/\] 1\/1 sites \(1 failed\)/);
    expect(statusOf(out)).toEqual({ [GORGE]: "skipped (current)", [HILLS]: "skipped (current)", [BROKEN]: "failed" });
    for (const site of [GORGE, HILLS]) expect(mtimes(path.join(out, site))).toEqual(before[site]);
    // Skipped rows keep their figures.
    const gorge = csvRows(out)[1];
    expect(Number(gorge[4])).toBe(readJson(path.join(out, GORGE, "summary.json")).photos);
  }, 120_000);

  it("--jobs 1 writes the same outputs as --jobs 2", () => {
    const one = path.join(work, "jobs1");
    const r = runCli(["campaign", CAMPAIGN, "--out", one, "--jobs", "1"]);
    expect(r.status).toBe(3);
    for (const site of [GORGE, HILLS]) {
      for (const f of OUTPUT_FILES.filter((n) => n !== "report.html" && n !== "report-data.json")) {
        expect(readFileSync(path.join(one, site, f)).equals(readFileSync(path.join(out, site, f))), `${site}/${f}`).toBe(true);
      }
    }
    expect(readFileSync(path.join(one, "campaign.csv"), "utf8")).toBe(readFileSync(path.join(out, "campaign.csv"), "utf8").replace(/skipped \(current\)/g, "planned"));
  }, 120_000);

  it.skipIf(!HAS_SCRIPT)("a changed default re-plans every site; a fixed site is planned on the next run while the others stay current", () => {
    // The same campaign with absolute paths (they resolve to the same options) and edits, over the first run's outputs.
    const area = path.join(work, "edit-area.geojson");
    copyFileSync(path.join(ROOT, "fixtures/e2e/bad-site-outside-dem.geojson"), area);
    const photos = (site: string) => readJson(path.join(out, site, "summary.json")).photos as number;
    const base: Record<string, number> = { [GORGE]: photos(GORGE), [HILLS]: photos(HILLS) };
    const hash = readJson(path.join(out, GORGE, "summary.json")).inputsHash;

    // Front overlap 75 % -> 80 %: the trigger distance, footprint x (1 - overlap) (common
    // practice), shrinks from 0.25 to 0.20 of the footprint, so about 25 % more photos.
    const file = campaignCopy(work, (t) =>
      t.replace("    frontPct: 75", "    frontPct: 80").replace(/area: \S+bad-site-outside-dem\.geojson/, `area: ${area}`),
    );
    const r = runCliOnTty(["campaign", file, "--out", out, "--jobs", "2", "--quiet"]);
    expect(r.status).toBe(3);
    expect(r.stdout).not.toMatch(PROGRESS);
    expect(statusOf(out)).toEqual({ [GORGE]: "planned", [HILLS]: "planned", [BROKEN]: "failed" });
    expect(readJson(path.join(out, GORGE, "summary.json")).inputsHash).not.toBe(hash);
    for (const site of [GORGE, HILLS]) {
      expect(photos(site) / base[site]).toBeGreaterThan(1.1);
      expect(photos(site) / base[site]).toBeLessThan(1.4);
    }

    // The broken site's outline moved onto the DEM: only that site is planned.
    const before = mtimes(path.join(out, GORGE));
    copyFileSync(path.join(ROOT, "fixtures/e2e/hills-utm33-small-site.geojson"), area);
    const fixed = runCli(["campaign", file, "--out", out, "--jobs", "2"]);
    expect(fixed.status, fixed.stdout).toBe(0);
    expect(statusOf(out)).toEqual({ [GORGE]: "skipped (current)", [HILLS]: "skipped (current)", [BROKEN]: "planned" });
    expect(mtimes(path.join(out, GORGE))).toEqual(before);
    expect(readdirSync(path.join(out, BROKEN)).sort()).toEqual(OUTPUT_FILES);
  }, 120_000);
});

/** A parsed JSON value without the given keys at any depth. */
function withoutKeys(v: unknown, keys: string[]): any {
  if (Array.isArray(v)) return v.map((x) => withoutKeys(x, keys));
  if (typeof v !== "object" || v === null) return v;
  return Object.fromEntries(Object.entries(v).filter(([k]) => !keys.includes(k)).map(([k, x]) => [k, withoutKeys(x, keys)]));
}
