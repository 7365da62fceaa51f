import { describe, it, expect } from "vitest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, writeFileSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { hillshade, slopeAspect, type HeightGrid } from "../../src/report/hillshade.js";
import { HAS_GDAL } from "../helpers/tools.js";

/** A plane z = z0 + gx * x + gy * y on a north-up grid (x east, y north, rows run south). */
function plane(w: number, h: number, cellM: number, gx: number, gy: number, z0 = 0): HeightGrid {
  const heights = new Float32Array(w * h);
  for (let r = 0; r < h; r++) {
    const y = -(r + 0.5) * cellM;
    for (let c = 0; c < w; c++) heights[r * w + c] = z0 + gx * (c + 0.5) * cellM + gy * y;
  }
  return { width: w, height: h, heights, cellSizeM: [cellM, cellM] };
}

const rad = (d: number) => (d * Math.PI) / 180;

/**
 * Horn, B.K.P. (1981) "Hill shading and the reflectance map", Proc. IEEE 69(1): for a
 * Lambertian surface the shade is the cosine of the angle between the normal and the sun,
 * cos(zenith)cos(slope) + sin(zenith)sin(slope)cos(azimuth - aspect), aspect being the
 * downhill compass direction. On a plane the analytic slope and aspect are known exactly.
 */
function hornAnalytic(slopeDeg: number, aspectDeg: number, sunAzDeg: number, sunAltDeg: number): number {
  const zen = rad(90 - sunAltDeg);
  const v = Math.cos(zen) * Math.cos(rad(slopeDeg)) + Math.sin(zen) * Math.sin(rad(slopeDeg)) * Math.cos(rad(sunAzDeg - aspectDeg));
  return Math.max(0, v);
}

describe("Horn slope and aspect on planes of known slope and aspect", () => {
  // Plane with downhill direction `aspect` and slope `slope`: the gradient points uphill,
  // i.e. grad z = tan(slope) * (-sin(aspect), -cos(aspect)) in (east, north).
  const cases = [
    { slope: 10, aspect: 90 },
    { slope: 30, aspect: 315 },
    { slope: 45, aspect: 135 },
    { slope: 20, aspect: 200 },
    { slope: 5, aspect: 0.5 },
  ];
  for (const { slope, aspect } of cases) {
    it(`slope ${slope} deg facing ${aspect} deg`, () => {
      const t = Math.tan(rad(slope));
      const g = plane(7, 6, 2, -t * Math.sin(rad(aspect)), -t * Math.cos(rad(aspect)));
      const sa = slopeAspect(g);
      for (let i = 0; i < g.heights.length; i++) {
        // Edges included: the one-sided estimate is exact on a plane too.
        // Heights are Float32 (as in DemGrid): allow its rounding, ~1e-3 deg here.
        expect(Math.abs((sa.slopeRad[i] * 180) / Math.PI - slope)).toBeLessThan(2e-3);
        expect(Math.abs(sa.aspectDeg[i] - aspect)).toBeLessThan(1e-2);
      }
      for (const [az, alt] of [[315, 45], [90, 30], [200, 60]]) {
        const shade = hillshade().azimuth(az).altitude(alt)(g);
        const want = hornAnalytic(slope, aspect, az, alt);
        for (let i = 0; i < shade.length; i++) expect(Math.abs(shade[i] - want)).toBeLessThan(2e-5);
      }
    });
  }

  it("flat ground shades to sin(altitude), the sun's height (Lambert's cosine law)", () => {
    const g = plane(4, 4, 1, 0, 0);
    const s = hillshade().altitude(30)(g);
    expect(s[5]).toBeCloseTo(0.5, 6);
  });

  it("zFactor exaggerates heights: z-factor 2 on slope atan(0.2) equals slope atan(0.4)", () => {
    const a = hillshade().zFactor(2)(plane(5, 5, 1, 0.2, 0));
    const b = hillshade().zFactor(1)(plane(5, 5, 1, 0.4, 0));
    for (let i = 0; i < a.length; i++) expect(Math.abs(a[i] - b[i])).toBeLessThan(2e-5);
  });

  it("nodata cells stay NaN and their neighbours stay finite", () => {
    const g = plane(5, 5, 1, 0.3, 0.1);
    g.heights[12] = NaN;
    const s = hillshade()(g);
    expect(Number.isNaN(s[12])).toBe(true);
    expect(Number.isFinite(s[11])).toBe(true);
    expect(Number.isFinite(s[7])).toBe(true);
  });

  it("setters read back their values and defaults are the cartographic sun (315, 45)", () => {
    const h = hillshade();
    expect(h.azimuth()).toBe(315);
    expect(h.altitude()).toBe(45);
    expect(h.zFactor()).toBe(1);
  });
});

describe.skipIf(!HAS_GDAL)("hillshade against GDAL's gdaldem (Horn's method, azimuth 315, altitude 45)", () => {
  it("matches gdaldem hillshade on a curved surface within one grey level", () => {
    // A non-planar surface so that the 1-2-1 weights matter.
    const w = 40, h = 30, cell = 5;
    const heights = new Float32Array(w * h);
    for (let r = 0; r < h; r++)
      for (let c = 0; c < w; c++) {
        const x = (c + 0.5) * cell, y = (r + 0.5) * cell;
        heights[r * w + c] = 300 + 40 * Math.sin(x / 37) * Math.cos(y / 23) + 0.002 * x * y;
      }
    const grid: HeightGrid = { width: w, height: h, heights, cellSizeM: [cell, cell] };
    const dir = mkdtempSync(join(tmpdir(), "gsdplan-hs-"));
    try {
      // ESRI ASCII grid: a plain-text raster GDAL reads natively (AAIGrid driver).
      const rows: string[] = [];
      for (let r = 0; r < h; r++) rows.push(Array.from(heights.subarray(r * w, (r + 1) * w), (v) => v.toFixed(4)).join(" "));
      writeFileSync(
        join(dir, "dem.asc"),
        `ncols ${w}\nnrows ${h}\nxllcorner 0\nyllcorner 0\ncellsize ${cell}\nNODATA_value -9999\n${rows.join("\n")}\n`,
      );
      execFileSync("gdaldem", ["hillshade", "-q", "-az", "315", "-alt", "45", "-z", "1", join(dir, "dem.asc"), join(dir, "hs.tif")]);
      execFileSync("gdal_translate", ["-q", "-of", "AAIGrid", join(dir, "hs.tif"), join(dir, "hs.asc")]);
      const lines = readFileSync(join(dir, "hs.asc"), "utf8").trim().split("\n");
      const data = lines.filter((l) => /^\s*[0-9]/.test(l)).map((l) => l.trim().split(/\s+/).map(Number));
      expect(data.length).toBe(h);
      const ours = hillshade().azimuth(315).altitude(45).zFactor(1)(grid);
      let compared = 0;
      // gdaldem leaves the one-cell border as nodata (0) and writes 1 + 254 * shade.
      for (let r = 1; r < h - 1; r++)
        for (let c = 1; c < w - 1; c++) {
          const g = data[r][c];
          const mine = 1 + 254 * ours[r * w + c];
          expect(Math.abs(mine - g)).toBeLessThanOrEqual(1);
          compared++;
        }
      expect(compared).toBe((w - 2) * (h - 2));
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
