/**
 * The overview map: its projection against PROJ's equidistant cylindrical (eqc) on a
 * sphere, and a fixture site's drawn area against the size it was made with.
 */
import { describe, expect, it } from "vitest";
import { execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
import path from "node:path";
import { HAS_PROJ } from "../helpers/tools.js";
import { ROOT } from "../e2e/cli.js";
import { parseSiteText } from "../../src/layout/site-parse.js";
import { MEAN_EARTH_RADIUS_M, niceLengthM, overviewMap, projectLocal } from "../../src/campaign/overviewMap.js";

describe.skipIf(!HAS_PROJ)("the map's projection", () => {
  it("is PROJ's eqc with lat_ts = lat_0 = the centre, on the GRS 80 mean-radius sphere, within 1 mm", () => {
    const lon0 = 11.4845, lat0 = 46.7288;
    const points: [number, number][] = [[7.96, 46.5], [15.0, 46.96], [16.3, 47.5], [11.4845, 46.7288], [9.1, 45.2]];
    const out = execFileSync("proj", ["-f", "%.4f", `+proj=eqc`, `+lat_ts=${lat0}`, `+lat_0=${lat0}`, `+lon_0=${lon0}`, `+R=${MEAN_EARTH_RADIUS_M}`], {
      input: points.map(([lo, la]) => `${lo} ${la}`).join("\n") + "\n",
      encoding: "utf8",
    });
    const ref = out.trim().split("\n").map((l) => l.trim().split(/\s+/).map(Number));
    points.forEach(([lo, la], i) => {
      const [x, y] = projectLocal(lo, la, lon0, lat0);
      expect(Math.abs(x - ref[i][0])).toBeLessThan(0.001);
      expect(Math.abs(y - ref[i][1])).toBeLessThan(0.001);
    });
  });
});

describe("the overview map", () => {
  const gorge = parseSiteText(readFileSync(path.join(ROOT, "fixtures/truth/gorge_utm-site.geojson"), "utf8")).polygons;

  it("draws a site with the area it has on the ground: the gorge site, 140 m x 140 m in UTM 32N", () => {
    // fixtures/truth/README.md: site columns/rows 80-220 of 1 m cells, corners to WGS84 by PROJ's cs2cs.
    // UTM's scale factor is 0.9996 on its central meridian and grows away from it (from memory):
    // at 8 E in zone 32 (central meridian 9 E) it is within 0.9996-0.9997, so the true area
    // is 19600 / k^2, within 0.1 % of 19600 m2.
    const map = overviewMap([{ number: 1, name: "gorge", failed: false, polygons: gorge }])!;
    const d = /<path d="([^"]+)" class="outline"/.exec(map.svg)![1];
    const pts = d.replace(/[MZ]/g, "").split("L").map((p) => p.trim().split(/\s+/).map(Number));
    let twice = 0;
    for (let i = 0; i < pts.length; i++) {
      const [x1, y1] = pts[i], [x2, y2] = pts[(i + 1) % pts.length];
      twice += x1 * y2 - x2 * y1;
    }
    const areaM2 = Math.abs(twice) / 2;
    expect(areaM2).toBeGreaterThan(19600 * 0.995);
    expect(areaM2).toBeLessThan(19600 * 1.005 / 0.9996 ** 2);
  });

  it("has a scale bar whose drawn length in map metres is the length it is labelled with", () => {
    const far = [{ number: 1, name: "a", failed: false, polygons: gorge }, { number: 2, name: "b", failed: true, polygons: [[[[15, 47], [15.001, 47], [15.001, 47.001], [15, 47]]]] }];
    const map = overviewMap(far)!;
    const bar = /<g id="scale-bar" data-metres="(\d+)"><line x1="([-\d.]+)" y1="[-\d.]+" x2="([-\d.]+)"[^]*?<text[^>]*>([^<]+)<\/text>/.exec(map.svg)!;
    const metres = Number(bar[1]);
    expect(Number(bar[3]) - Number(bar[2])).toBeCloseTo(metres, 0);
    expect(bar[4]).toBe(metres >= 1000 ? `${metres / 1000} km` : `${metres} m`);
    // About a quarter of the drawn width, and a 1-2-5 step.
    expect(metres / map.metresPerPx).toBeGreaterThan(0.4 * 140);
    expect(metres / map.metresPerPx).toBeLessThan(140);
    expect(map.svg).toContain('class="outline failed"');
  });

  it("picks 1, 2 or 5 times a power of ten for the bar, and draws nothing without outlines", () => {
    expect([0.9, 1, 4.99, 730, 1999, 2000, 120_000].map(niceLengthM)).toEqual([0.5, 1, 2, 500, 1000, 2000, 100_000]);
    expect(overviewMap([{ number: 1, name: "x", failed: true, polygons: [] }])).toBeNull();
  });

  it("escapes site names in the map's titles", () => {
    const map = overviewMap([{ number: 1, name: "<b>&\"x\"", failed: false, polygons: gorge }])!;
    expect(map.svg).toContain("<title>&lt;b&gt;&amp;&quot;x&quot;</title>");
    expect(map.svg).not.toContain("<b>");
  });
});
