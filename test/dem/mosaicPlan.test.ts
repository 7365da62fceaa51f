/**
 * A plan over tiles equals the plan over the one file they were cut from (issue 13: "same
 * waypoints within 0.01 m"): the four tiles of fixtures/mosaic/tiles were cut from
 * fixtures/gdal/hills_utm33_f32.tif by GDAL's gdal_translate -srcwin, and the test site
 * crosses both seams. Given as a list, a folder and the VRT gdalbuildvrt wrote.
 */
import { describe, it, expect, beforeAll } from "vitest";
import path from "node:path";
import { loadPlanFile, resolvePlanOptions } from "../../src/plan/options.js";
import { planMission, type PlanRun } from "../../src/plan/plan.js";

const PLAN = "fixtures/mosaic/mosaic-plan.yaml";
const M = path.resolve("fixtures/mosaic");
const TILES = ["hills_a_nw.tif", "hills_b_ne.tif", "hills_c_sw.tif", "hills_d_se.tif"].map((f) => path.join(M, "tiles", f));

async function plan(dem: string | string[]): Promise<PlanRun> {
  const file = await loadPlanFile(PLAN);
  return planMission(resolvePlanOptions(file.data, { dem }, file.dir));
}

describe("a plan over four tiles equals the plan over the file they were cut from", () => {
  let one: PlanRun;
  beforeAll(async () => {
    one = await plan(path.resolve("fixtures/gdal/hills_utm33_f32.tif"));
  }, 120_000);

  const forms: [string, string | string[]][] = [
    ["a list of the tiles", TILES],
    ["the folder", path.join(M, "tiles")],
    ["the VRT", path.join(M, "hills_tiles.vrt")],
  ];
  for (const [what, dem] of forms) {
    it(`${what}: same DEM window, same waypoints within 0.01 m, same warnings`, async () => {
      const run = await plan(dem);
      // The site's window lies inside the tiles, on the same cells.
      expect([run.grid.width, run.grid.height]).toEqual([one.grid.width, one.grid.height]);
      expect(run.grid.native!.transform).toEqual(one.grid.native!.transform);
      expect(run.grid.heights).toEqual(one.grid.heights);
      // The site crosses both seams (x = 500500 and y = 5200400 in the DEM's CRS).
      const nt = run.grid.native!.transform;
      expect(nt.x0).toBeLessThan(500500);
      expect(nt.x0 + run.grid.width * nt.dx).toBeGreaterThan(500500);
      expect(nt.y0).toBeGreaterThan(5200400);
      expect(nt.y0 + run.grid.height * nt.dy).toBeLessThan(5200400);
      expect(run.rows.length).toBe(one.rows.length);
      expect(run.rows.length).toBeGreaterThan(5);
      for (let i = 0; i < run.rows.length; i++) {
        const a = run.rows[i], b = one.rows[i];
        expect([a.flight, a.strip, a.index, a.segment]).toEqual([b.flight, b.strip, b.index, b.segment]);
        expect(Math.abs(a.longitude - b.longitude) * 111_000).toBeLessThan(0.01);
        expect(Math.abs(a.latitude - b.latitude) * 111_000).toBeLessThan(0.01);
        expect(Math.abs(a.altitudeAmslM - b.altitudeAmslM)).toBeLessThan(0.01);
        expect(Math.abs(a.groundAmslM - b.groundAmslM)).toBeLessThan(0.01);
      }
      expect(run.warnings.map((w) => w.code)).toEqual(one.warnings.map((w) => w.code));
      expect(run.verification.undeclared).toEqual([]);
    }, 120_000);
  }
});
