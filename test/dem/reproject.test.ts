import { describe, it, expect } from "vitest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { HAS_GDAL } from "../helpers/tools.js";
import { openDem } from "../../src/dem/source.js";
import { readWindow, nativeBounds } from "../../src/dem/window.js";
import { toMetricGrid } from "../../src/dem/reproject.js";
import { gdalLocationValues, sampleCells } from "./gdal-helpers.js";

const UTM32 = "+proj=utm +zone=32 +datum=WGS84 +units=m +no_defs";

describe.skipIf(!HAS_GDAL)("toMetricGrid against gdalwarp", () => {
  it("a geographic Int16 DEM resampled bilinearly onto UTM 32N matches gdalwarp -r bilinear", async () => {
    const file = "fixtures/gdal/geo4326_i16_lzw.tif";
    const dem = await openDem(file);
    const geo = await readWindow(dem, nativeBounds(dem));
    await dem.close();
    const utm = toMetricGrid(geo, UTM32, { epsg: 32632 });
    expect(utm.crs.geographic).toBe(false);
    expect(utm.cellSizeM[0]).toBeCloseTo(Math.min(...geo.cellSizeM), 9);
    const cell = utm.transform.dx;
    const dir = mkdtempSync(join(tmpdir(), "gsdplan-warp-"));
    try {
      const out = join(dir, "warp.tif");
      const t = utm.transform;
      // Reference: GDAL's warper on the same target grid, exact transformation (-et 0). The
      // source CRS is given as horizontal only: with the file's EPSG:4326+5773 GDAL would also
      // shift heights from EGM96 to the ellipsoid, which toMetricGrid does not do.
      execFileSync("gdalwarp", ["-q", "-s_srs", "EPSG:4326", "-t_srs", "EPSG:32632", "-te", String(t.x0), String(t.y0 - utm.height * cell), String(t.x0 + utm.width * cell), String(t.y0),
        "-ts", String(utm.width), String(utm.height), "-r", "bilinear", "-et", "0", "-ot", "Float32", "-dstnodata", "-99999", file, out]);
      const cells = sampleCells(utm.width, utm.height, 300, 99);
      const ref = gdalLocationValues(out, cells.map(([c, r]) => [c + 0.5, r + 0.5]), "pixel");
      let compared = 0;
      for (let i = 0; i < cells.length; i++) {
        const [c, r] = cells[i];
        const ours = utm.heights[r * utm.width + c];
        if (ref[i] === -99999) {
          // Outside the source, GDAL has no value: so must we.
          if (c > 2 && r > 2 && c < utm.width - 3 && r < utm.height - 3) expect(ours).toBeNaN();
          continue;
        }
        if (Number.isNaN(ours)) continue; // next to nodata: GDAL renormalises over valid cells, we refuse
        expect(Math.abs(ours - ref[i]), `cell ${c},${r}`).toBeLessThan(0.05);
        compared++;
      }
      expect(compared).toBeGreaterThan(150);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it("a grid already in the target metric CRS is returned as is", async () => {
    const dem = await openDem("fixtures/gdal/hills_utm33_f32.tif");
    const g = await readWindow(dem, { west: 500100, south: 5200100, east: 500200, north: 5200200 });
    await dem.close();
    expect(toMetricGrid(g, g.crs.proj4)).toBe(g);
    expect(toMetricGrid(g, "+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs +type=crs", { epsg: 32633 })).toBe(g);
  });

  it("a grid in US survey feet is resampled to metres with its cell size in metres", async () => {
    const dem = await openDem("fixtures/gdal/hills_ca3_ftus_f32.tif");
    const g = await readWindow(dem, nativeBounds(dem));
    await dem.close();
    const m = toMetricGrid(g, "+proj=utm +zone=10 +datum=NAD83 +units=m +no_defs");
    // 3 US survey feet = 3 * 1200/3937 m (EPSG unit 9003).
    expect(m.transform.dx).toBeCloseTo((3 * 1200) / 3937, 9);
    expect(() => toMetricGrid(g, "+proj=longlat +datum=WGS84")).toThrow(/projected CRS in metres/);
  });
});
