import { beforeAll, describe, expect, it } from "vitest";
import { discMaxIndex } from "../../src/verify/discMax.js";
import type { Surface } from "../../src/verify/surface.js";
import { HAS_GDAL } from "../helpers/tools.js";
import { bruteDisc, type Raster } from "./brute.js";
import { wholeSurface } from "./fixtures.js";
import { gdalHeights } from "./gdal.js";

// The highest ground within a radius, exactly, against a brute-force reference written here
// on its own: the heights as GDAL reads them (gdal_translate -of XYZ), bilinear interpolation
// between cell centres (its textbook definition), the disc sampled on a fine grid aligned to
// the cell centres (so every centre is a sample) and its rim at tiny angle steps.
// Fixture: fixtures/truth/gorge_utm.tif (1 m cells; 30 m one-cell walls, an 80 m mast of
// two cells at columns 200-201 of row 90, a 25 m pit).

describe.skipIf(!HAS_GDAL)("exact disc maximum on the gorge fixture = brute force", () => {
  let ref: Raster;
  let s: Surface;
  beforeAll(async () => {
    ref = gdalHeights("fixtures/truth/gorge_utm.tif");
    s = await wholeSurface("fixtures/truth/gorge_utm.tif");
  });

  it("beside the 80 m mast, where only the rim reaches it (centres alone miss about 48 m)", () => {
    // 15.4 m south of the mast's west centre (200, 90): no mast centre is within 15 m, but the
    // rim crosses the quads between rows 90 and 91 at 0.6 of the way up the mast's side.
    const c = 200;
    const r = 105.4;
    const exact = discMaxIndex(s, c, r, 15, 15);
    // Rim steps of 2.1e-6 rad (0.03 mm on 15 m): on an 80 m-per-metre side, under 3 mm.
    const brute = bruteDisc(ref, c, r, 15, 20, 3_000_000);
    expect(exact).toBeGreaterThanOrEqual(brute.max - 1e-6);
    expect(exact - brute.max).toBeLessThan(0.005);
    expect(exact - brute.centresOnly).toBeGreaterThan(40);
  });

  it("in the gorge with a 10 m radius: floor centres inside, the rim up a one-cell wall (centres alone miss 31 m)", () => {
    // Index point (148, 151.5) is on the gorge floor near its west wall; the plateau centres
    // beyond the wall lie just outside 10 m, so the one-cell wall is met by the rim only,
    // about 31 m above the floor centres inside the disc.
    const c = 148;
    const r = 151.5;
    const exact = discMaxIndex(s, c, r, 10, 10);
    const brute = bruteDisc(ref, c, r, 10, 20, 3_000_000);
    expect(exact).toBeGreaterThanOrEqual(brute.max - 1e-6);
    expect(exact - brute.max).toBeLessThan(0.005);
    expect(exact - brute.centresOnly).toBeGreaterThan(30);
  });

  it("at 24 points around the mast, across the gorge and over the pit (15 m radius)", () => {
    let worst = 0;
    let rimWins = 0;
    for (let k = 0; k < 24; k++) {
      let c: number;
      let r: number;
      if (k < 12) {
        // Ring around the mast (centres (200, 90) and (201, 90)) at 15.2-15.75 m from its
        // middle: the mast is reached by the rim only, or by a centre at one end.
        const a = (k * 30 * Math.PI) / 180;
        c = 200.5 + (15.2 + 0.05 * k) * Math.cos(a);
        r = 90 + (15.2 + 0.05 * k) * Math.sin(a);
      } else {
        // Deterministic spread across the gorge and over the pit.
        c = [150.7, 97.9][k % 2] + ((k * 7.31) % 19) - 9;
        r = [150.4, 202.6][k % 2] + ((k * 5.17) % 21) - 10;
      }
      const exact = discMaxIndex(s, c, r, 15, 15);
      const brute = bruteDisc(ref, c, r, 15, 10, 400_000);
      expect(exact).toBeGreaterThanOrEqual(brute.max - 1e-6);
      // Rim steps of 1.6e-5 rad (0.24 mm) on sides up to 80 m per metre: under 2 cm.
      worst = Math.max(worst, exact - brute.max);
      if (exact > brute.centresOnly + 0.5) rimWins++;
    }
    expect(worst).toBeLessThan(0.02);
    expect(rimWins).toBeGreaterThanOrEqual(8); // most of the ring needs the rim
  });
});
