import { beforeAll, describe, expect, it } from "vitest";
import { checkGroundCeilingLeg } from "../../src/verify/ceiling.js";
import { checkClearanceLeg, emptyFinding, type LegSpec } from "../../src/verify/clearance.js";
import { makeSurface, type Surface } from "../../src/verify/surface.js";
import { distanceOut, surfaceDistance } from "../../src/verify/surfaceDistance.js";
import { HAS_GDAL } from "../helpers/tools.js";
import { bilinear, discByCentresAndRim, type Raster } from "./brute.js";
import { wholeSurface } from "./fixtures.js";
import { gdalHeights } from "./gdal.js";

// The checks along a whole leg against brute force along it, on the gorge fixture (1 m cells,
// index point (c, r) = cell centre; 30 m one-cell walls, a pit of 25 m at columns 95-100, rows
// 200-205). Heights for the references come from GDAL (gdal_translate -of XYZ).

describe.skipIf(!HAS_GDAL)("checks along a leg = brute force along it (gorge fixture)", () => {
  let ref: Raster;
  let s: Surface;
  beforeAll(async () => {
    ref = gdalHeights("fixtures/truth/gorge_utm.tif");
    s = await wholeSurface("fixtures/truth/gorge_utm.tif");
  });

  const leg = (ca: number, ra: number, cb: number, rb: number, za: number, zb: number): LegSpec => ({
    ca, ra, cb, rb, za, zb, sx: 1, sy: 1, lengthM: Math.hypot(cb - ca, rb - ra),
  });

  it("clearance: worst deficit and breached length on a low leg across the gorge", () => {
    // 89 m across the gorge, 930 -> 936 m: about 30 m above the plateau (903-905 m), so the
    // 30.5 m floor is broken in places and kept in others.
    const l = leg(110, 130, 190, 170, 930, 936);
    const f = emptyFinding();
    checkClearanceLeg(s, l, 30.5, 15, f);
    // Brute force: every 5 cm along the leg, the disc's maximum (its centres and 4000 rim
    // points; discMax.test.ts shows against full sampling that nothing else can be higher).
    const deficit = (t: number, rim: number) =>
      discByCentresAndRim(ref, l.ca + (l.cb - l.ca) * t, l.ra + (l.rb - l.ra) * t, 15, rim) + 30.5 - (l.za + (l.zb - l.za) * t);
    const n = Math.round(l.lengthM / 0.05);
    let bestT = 0;
    let best = -Infinity;
    let breached = 0;
    for (let k = 0; k <= n; k++) {
      const d = deficit(k / n, 4000);
      if (d > best) [best, bestT] = [d, k / n];
      if (d > 0.01) breached++;
    }
    // ... then every 1 mm within 10 cm of the best, with 200 000 rim points.
    for (let m = -100; m <= 100; m++) best = Math.max(best, deficit(bestT + m / 1000 / l.lengthM, 200_000));
    expect(best).toBeGreaterThan(1); // a real breach
    expect(Math.abs(f.worst - best)).toBeLessThan(0.02);
    // Length to the check's 0.25 m step and the brute force's 5 cm.
    expect(Math.abs(f.lengthM - breached * 0.05)).toBeLessThan(0.6);
  });

  it("clearance: a leg whose ends are clear but whose middle passes the mast is caught", () => {
    // 3 m beside the mast (columns 200-201, row 90; top 983.27 m), at 960 m: ends 70 m away clear.
    const l = leg(204, 20, 204, 160, 960, 960);
    const f = emptyFinding();
    checkClearanceLeg(s, l, 30.5, 15, f);
    expect(f.worst).toBeCloseTo(983.27 + 30.5 - 960, 1);
    // The mast is within 15 m of the leg over 2 * sqrt(15^2 - 3^2) = 29.4 m (to each of its
    // cells; its quads reach one cell further), less where its sides fall below the floor.
    expect(f.lengthM).toBeGreaterThan(20);
    expect(f.lengthM).toBeLessThan(33);
  });

  it("ceiling above the ground below: exact excess and length over the pit and the gorge", () => {
    // Level at 1022 m: 120 m above the plateau's 902 m, so the pit (25 m deeper) and the gorge
    // (30 m) break it.
    const l = leg(80, 210, 180, 120, 1022, 1022);
    const f = emptyFinding();
    checkGroundCeilingLeg(s, l, 120, f);
    let best = -Infinity;
    let above = 0;
    const n = Math.round(l.lengthM / 0.001);
    for (let k = 0; k <= n; k++) {
      const t = k / n;
      const e = l.za - 120 - bilinear(ref, l.ca + (l.cb - l.ca) * t, l.ra + (l.rb - l.ra) * t);
      best = Math.max(best, e);
      if (e > 0.01) above++;
    }
    expect(best).toBeGreaterThan(20);
    expect(Math.abs(f.worst - best)).toBeLessThan(1e-3);
    expect(Math.abs(f.lengthM - above * 0.001)).toBeLessThan(0.01);
  });

  it("distance to the closest terrain point = brute force, above the gorge beside its wall", () => {
    // 40 m above the gorge floor, 4 m from its east wall at row 150 (floor ~870 m, plateau ~903 m
    // at column 162): the closest terrain is up the wall, not straight below.
    const pc = 157.5;
    const pr = 150;
    const zM = 910;
    surfaceDistance(s, pc, pr, zM, 1, 1, 170, 0.001);
    const [lo, up] = distanceOut;
    const dist = (c: number, r: number) => Math.hypot(c - pc, r - pr, bilinear(ref, c, r) - zM);
    let best = Infinity;
    let bc = 0;
    let br = 0;
    for (let r = pr - 45; r <= pr + 45; r += 0.1)
      for (let c = pc - 45; c <= pc + 45; c += 0.1) {
        const d = dist(c, r);
        if (d < best) [best, bc, br] = [d, c, r];
      }
    for (let r = br - 0.1; r <= br + 0.1; r += 0.001) for (let c = bc - 0.1; c <= bc + 0.1; c += 0.001) best = Math.min(best, dist(c, r));
    expect(best).toBeLessThan(zM - 870 - 5); // closer than straight down
    expect(up).toBeGreaterThanOrEqual(lo);
    expect(up - lo).toBeLessThanOrEqual(0.001 + 1e-9);
    expect(Math.abs(up - best)).toBeLessThan(0.002);
  });
});

describe("ceiling above the ground below inside one quad", () => {
  it("a leg across a saddle quad peaks between the grid lines (bilinear along a line is a parabola)", async () => {
    const { makeGrid } = await import("../../src/dem/sample.js");
    // One quad with corners 0, 10, 10, 0 (a saddle): along the diagonal from (1, 0) to (0, 1)
    // the ground is 10 - 20 t + 20 t^2 (substitute u = 1 - t, v = t into the bilinear form),
    // lowest (5 m) at t = 0.5; a level leg at 125 m is 0 m over a 120 m ceiling at the ends
    // and 5 m over in the middle.
    const grid = makeGrid({ width: 2, height: 2, x0: 500000, y0: 4600002, cellM: 1, heights: Float32Array.of(0, 10, 10, 0) });
    const s = makeSurface(grid, null);
    const f = emptyFinding();
    checkGroundCeilingLeg(s, { ca: 1, ra: 0, cb: 0, rb: 1, za: 130, zb: 130, sx: 1, sy: 1, lengthM: Math.SQRT2 }, 120, f);
    expect(f.worst).toBeCloseTo(130 - 5 - 120, 9);
    expect(f.worstT).toBeCloseTo(0.5, 9);
    // Over the ceiling (by more than the 1 cm tolerance) where 10 - 20 t + 20 t^2 < 9.99.
    const t1 = (1 - Math.sqrt(1 - 4 * ((10 - 9.99) / 20))) / 2;
    expect(f.lengthM).toBeCloseTo((1 - 2 * t1) * Math.SQRT2, 9);
  });
});
