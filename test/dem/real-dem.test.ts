import { describe, it, expect } from "vitest";
import { existsSync } from "node:fs";
import { HAS_GDAL } from "../helpers/tools.js";
import { openDem } from "../../src/dem/source.js";
import { readWindow, nativeBounds } from "../../src/dem/window.js";
import { demStatistics } from "../../src/dem/statistics.js";
import { gdalinfo, gdalComputedStats, gdalLocationValues, sampleCells } from "./gdal-helpers.js";

// Real open DEMs shipped by Debian packages, checked against GDAL (gdal-bin):
// - r-cran-terra: ex/elev.tif, elevation of Luxembourg at 30 arc-seconds (geographic, Int16, LZW, nodata);
// - r-cran-stars: tif/olinda_dem_utm25s.tif, a DEM of Olinda, Brazil, in a user-defined UTM 25S
//   (ProjectionGeoKey 16125 on GRS80 with TOWGS84), Float32.
const REAL = [
  { pkg: "r-cran-terra", file: "/usr/lib/R/site-library/terra/ex/elev.tif" },
  { pkg: "r-cran-stars", file: "/usr/lib/R/site-library/stars/tif/olinda_dem_utm25s.tif" },
];

function present(pkg: string, file: string): boolean {
  if (existsSync(file)) return true;
  if (process.env.CI === "true") throw new Error(`${file} (Debian package ${pkg}) is required under CI=true but was not found`);
  process.stderr.write(`NOTICE: ${file} not found (install Debian's ${pkg}); skipping its real-DEM test\n`);
  return false;
}

for (const { pkg, file } of REAL) {
  describe.skipIf(!HAS_GDAL || !present(pkg, file))(`real DEM ${file} (${pkg})`, () => {
    it("statistics match gdalinfo -stats and cell values match gdallocationinfo", async () => {
      const info = gdalinfo(file);
      const nodata = info.bands[0].noDataValue;
      // elev.tif carries stale statistics in its metadata (mean -9999): let GDAL recompute them.
      const stats = gdalComputedStats(file);
      const dem = await openDem(file);
      try {
        expect([dem.width, dem.height]).toEqual(info.size);
        const [x0, dx, , y0, , dy] = info.geoTransform;
        expect(dem.transform.x0).toBeCloseTo(x0, 6);
        expect(dem.transform.y0).toBeCloseTo(y0, 6);
        expect(dem.transform.dx).toBeCloseTo(dx, 9);
        expect(dem.transform.dy).toBeCloseTo(dy, 9);
        const s = await demStatistics(dem);
        expect(s.exact).toBe(true);
        expect(s.minM).toBeCloseTo(stats.minimum, 4);
        expect(s.maxM).toBeCloseTo(stats.maximum, 4);
        expect(s.meanM).toBeCloseTo(stats.mean, 3);
        // GDAL rounds the valid percentage to 0.01 %.
        expect(Math.abs(s.nodataFraction - (1 - stats.validPercent / 100))).toBeLessThan(1e-4);

        const grid = await readWindow(dem, nativeBounds(dem));
        const cells = sampleCells(dem.width, dem.height, 60, 2024);
        const raws = gdalLocationValues(file, cells.map(([c, r]) => [c + 0.5, r + 0.5]), "pixel");
        for (let i = 0; i < cells.length; i++) {
          const [c, r] = cells[i];
          const ours = grid.heights[r * grid.width + c];
          if (nodata !== undefined && raws[i] === Number(nodata)) expect(ours).toBeNaN();
          else expect(ours).toBeCloseTo(raws[i], 4);
        }
        // Corners through our CRS against gdalinfo's WGS84 extent (rounded to 1e-7 degrees).
        const proj4 = (await import("proj4")).default;
        const conv = proj4(dem.crs.proj4, "+proj=longlat +datum=WGS84 +no_defs");
        const ul = conv.forward([dem.transform.x0, dem.transform.y0]);
        const ref = info.wgs84Extent!.coordinates[0][0];
        expect(Math.abs(ul[0] - ref[0])).toBeLessThan(2e-7);
        expect(Math.abs(ul[1] - ref[1])).toBeLessThan(2e-7);
      } finally {
        await dem.close();
      }
    });
  });
}
