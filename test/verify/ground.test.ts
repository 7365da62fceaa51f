import { describe, expect, it } from "vitest";
import { groundAtLonLat } from "../../src/verify/surface.js";
import { HAS_GDAL, HAS_PROJ } from "../helpers/tools.js";
import { wholeSurface } from "./fixtures.js";
import { cs2csToLonLat, gdalBilinearGrid } from "./gdal.js";

const TRUTH = "fixtures/truth";

// The check's ground is GDAL's: bilinear interpolation between cell centres in the DEM's own
// CRS. Reference: GDAL (Debian gdal-bin), gdalwarp -r bilinear onto a finer grid whose cell
// centres are the query points (see gdal.ts for why not gdallocationinfo -r on GDAL 3.6).
describe.skipIf(!HAS_GDAL)("ground of the check = GDAL's bilinear ground", () => {
  it("on a geographic 3-arc-second DEM of steep ridges, interpolated in degrees", async () => {
    const file = `${TRUTH}/ridges_geo3s.tif`;
    const s = await wholeSurface(file);
    // 37 x 23 points over 0.02 x 0.015 degrees: steps of 0.65 and 0.78 source cells (smaller
    // than a source cell, or the warp kernel would widen), so every fraction of a cell is met;
    // flanks of 45 degrees and sharp crests.
    const pts = gdalBilinearGrid(file, [9.285, 46.49, 9.305, 46.505], 37, 23);
    expect(pts.length).toBe(37 * 23);
    const ours = groundAtLonLat(s, pts.map((p) => p.x), pts.map((p) => p.y));
    // Float32 heights and double arithmetic on both sides: 1 mm is generous.
    for (let i = 0; i < pts.length; i++) expect(Math.abs(ours[i] - pts[i].z)).toBeLessThan(1e-3);
    // The points are not all on one plane: relief of hundreds of metres is crossed.
    const zs = pts.map((p) => p.z);
    expect(Math.max(...zs) - Math.min(...zs)).toBeGreaterThan(300);
  });

  it.skipIf(!HAS_PROJ)("on the 1 m UTM gorge with one-cell walls, from WGS84 points (PROJ's cs2cs) back to UTM", async () => {
    const file = `${TRUTH}/gorge_utm.tif`;
    const s = await wholeSurface(file);
    // Across the gorge's west wall, the mast (columns 200-201, row 90) and the pit: cells of
    // 0.37 m and 0.41 m, offset from the source grid.
    const boxes: [number, number, number, number][] = [
      [420100.13, 5150140.29, 420130.22, 5150160.79], // gorge wall and floor
      [420195.07, 5150205.11, 420207.03, 5150214.57], // mast
      [420091.91, 5150090.05, 420104.12, 5150102.33], // pit
    ];
    let n = 0;
    let relief = 0;
    for (const box of boxes) {
      const nx = Math.round((box[2] - box[0]) / 0.37);
      const ny = Math.round((box[3] - box[1]) / 0.41);
      const pts = gdalBilinearGrid(file, box, nx, ny);
      const ll = cs2csToLonLat("EPSG:32632", pts);
      const ours = groundAtLonLat(s, ll.map((p) => p[0]), ll.map((p) => p[1]));
      // cs2cs prints 1e-12 degree (0.1 um); proj4 and PROJ agree on UTM to well under 1 mm
      // horizontally, which on a 30 m-per-metre wall is under 3 cm in height.
      for (let i = 0; i < pts.length; i++) {
        const slope = 80; // metres per metre at worst (the mast's sides)
        expect(Math.abs(ours[i] - pts[i].z)).toBeLessThan(1e-3 + slope * 1e-5);
      }
      const zs = pts.map((p) => p.z);
      relief = Math.max(relief, Math.max(...zs) - Math.min(...zs));
      n += pts.length;
    }
    expect(n).toBeGreaterThan(3000);
    expect(relief).toBeGreaterThan(70); // the mast was crossed
  });
});
