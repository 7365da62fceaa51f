import { describe, it, expect } from "vitest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, writeFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fromFile } from "geotiff";
import { makeGrid } from "../../src/dem/sample.js";
import { corridorAlong } from "../../src/solve/corridor.js";
import { surfaceCeiling } from "../../src/solve/surfaceCeiling.js";
import { stationsAlongLeg } from "../../src/solve/stations.js";
import { solvePlan } from "../../src/solve/solveLegs.js";
import { HAS_GDAL } from "../helpers/tools.js";
import { options, strip } from "./fixtures.js";

describe("ceiling rules against their published text", () => {
  it("14 CFR 107.51(b): 400 ft above ground level = 121.92 m (international foot = 0.3048 m exactly)", () => {
    const C = 400 * 0.3048;
    expect(C).toBeCloseTo(121.92, 12);
    const grid = makeGrid({ width: 200, height: 60, x0: 0, y0: 60, cellM: 1, heights: (x) => 50 + 0.3 * x });
    const p = corridorAlong(grid, stationsAlongLeg(strip(30.5, 170.5), 1, 20), options({ ceiling: { heightM: C, reference: "ground" } }));
    // The ceiling must hold on the straight path between stations too, so each station takes
    // the lowest ground the path can be over before the next: on these 1 m cells, the cell
    // centres within one station step (1 m) + one cell diagonal (1.414 m), here the centre
    // 2 m back, 0.6 m lower on the 0.3 slope (see corridorAlong).
    // (Heights are Float32, as a DEM stores them: 4 decimals at 100 m.)
    for (let k = 0; k < p.s.length; k++) expect(p.hardHighM[k] - p.groundM[k]).toBeCloseTo(121.92 - 0.6, 4);
    // And then 400 ft above the ground straight below holds at every point between stations.
    for (let k = 0; k + 1 < p.s.length; k++)
      for (let f = 0; f <= 1; f += 0.125) {
        const x = p.x[k] + f * (p.x[k + 1] - p.x[k]);
        const zMax = Math.max(p.hardHighM[k], p.hardHighM[k + 1]);
        expect(zMax).toBeLessThanOrEqual(50 + 0.3 * x + 121.92 + 1e-9);
      }
  });

  it("Reg (EU) 2019/947 UAS.OPEN.010: 120 m from the closest point of the surface; flat ground gives ground + 120", () => {
    const grid = makeGrid({ width: 300, height: 300, x0: 0, y0: 300, cellM: 1, heights: () => 70 });
    const out = new Float64Array(1);
    surfaceCeiling(grid, [150.5], [150.5], 120, out);
    expect(out[0]).toBeCloseTo(190, 9);
  });

  it("on a 45-degree slope the surface rule allows C / cos(a) above the ground below, C (sqrt 2 - 1) more than the ground rule", () => {
    // Derivation: ground z = x tan a. A point at height z_p above (x_p, 0) is within C
    // of the surface point at horizontal offset u uphill iff z_p <= h(x_p) + u tan a
    // + sqrt(C^2 - u^2). The right side is largest at u = C sin a, where it equals
    // h(x_p) + C sin^2 a / cos a + C cos a = h(x_p) + C / cos a. For a = 45 deg,
    // C = 120: 169.706 m above the ground below, i.e. 49.706 m above the ground rule.
    // The 1 m cells miss the continuous optimum by < 0.5 |f''| (0.5 m)^2 = 0.003 m.
    const C = 120;
    const grid = makeGrid({ width: 400, height: 60, x0: 0, y0: 60, cellM: 1, heights: (x) => x });
    const st = stationsAlongLeg(strip(150.5, 250.5), 1, 20);
    const surf = corridorAlong(grid, st, options({ ceiling: { heightM: C, reference: "surface" } }));
    const gnd = corridorAlong(grid, st, options({ ceiling: { heightM: C, reference: "ground" } }));
    // Between stations the path stays legal when each station keeps within C - s of the
    // surface (s = 1 m station step; see corridorAlong): (C - 1) / cos a above the ground
    // below. The ground rule takes the lowest centre within s + one cell diagonal, 2 m back
    // on this slope of 1: C - 2 above the ground below.
    for (let k = 0; k < st.s.length; k++) {
      expect(surf.hardHighM[k] - surf.groundM[k]).toBeCloseTo((C - 1) / Math.cos(Math.PI / 4), 2);
      expect(gnd.hardHighM[k] - gnd.groundM[k]).toBeCloseTo(C - 2, 6);
      expect(surf.hardHighM[k] - gnd.hardHighM[k]).toBeCloseTo((C - 1) * Math.SQRT2 - (C - 2), 2);
    }
  });

  it("the branch-and-bound surface ceiling equals a full scan of the disc on rough terrain", () => {
    let seed = 12345;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    const grid = makeGrid({ width: 120, height: 120, x0: 0, y0: 120, cellM: 1, heights: (x, y) => 30 * Math.sin(x / 9) * Math.cos(y / 13) + 20 * rnd() });
    const xs = [60.2, 30.7, 90.1, 10.5], ys = [60.9, 80.3, 20.2, 10.5];
    const out = new Float64Array(xs.length);
    surfaceCeiling(grid, xs, ys, 40, out);
    for (let i = 0; i < xs.length; i++) {
      let best = -Infinity;
      for (let r = 0; r < 120; r++) for (let c = 0; c < 120; c++) {
        const dx = c + 0.5 - xs[i], dy = 120 - (r + 0.5) - ys[i];
        const rem = 1600 - dx * dx - dy * dy;
        if (rem >= 0) best = Math.max(best, grid.heights[r * 120 + c] + Math.sqrt(rem));
      }
      expect(out[i]).toBeCloseTo(best, 9);
    }
  });
});

describe("surface ceiling, many points", () => {
  // The definition itself (Regulation (EU) 2019/947, UAS.OPEN.010: within C of the closest
  // point of the surface), evaluated by brute force over every cell; nodata cells are no
  // surface. Points everywhere, near the edges too, over a nodata patch.
  it("equals the full scan at 300 points on rough terrain with nodata", () => {
    let seed = 777;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    const grid = makeGrid({ width: 90, height: 70, x0: 0, y0: 70, cellM: 1, heights: (x, y) => 25 * Math.sin(x / 7) * Math.cos(y / 11) + 15 * rnd() + (x > 40 && x < 48 && y > 30 && y < 36 ? NaN : 0) });
    const n = 300;
    const xs = new Float64Array(n), ys = new Float64Array(n);
    for (let i = 0; i < n; i++) (xs[i] = rnd() * 90), (ys[i] = rnd() * 70);
    const C = 25;
    const out = new Float64Array(n);
    surfaceCeiling(grid, xs, ys, C, out);
    for (let i = 0; i < n; i++) {
      let best = -Infinity;
      for (let r = 0; r < 70; r++) for (let c = 0; c < 90; c++) {
        const z = grid.heights[r * 90 + c];
        if (z !== z) continue;
        const dx = c + 0.5 - xs[i], dy = 70 - (r + 0.5) - ys[i];
        const rem = C * C - dx * dx - dy * dy;
        if (rem >= 0) best = Math.max(best, z + Math.sqrt(rem));
      }
      expect(out[i]).toBeCloseTo(best, 9);
    }
  });
});

describe.skipIf(!HAS_GDAL)("ground under waypoints vs GDAL", () => {
  it("matches gdallocationinfo on a GDAL-written GeoTIFF", async () => {
    // GDAL 3.6's gdallocationinfo has no -r bilinear, so the check is at cell
    // centres (where bilinear equals the cell value): stations are placed on them.
    const dir = mkdtempSync(join(tmpdir(), "gsdplan-solve-"));
    try {
      const w = 80, h = 40;
      const rows: string[] = [];
      for (let r = 0; r < h; r++) {
        const vals: string[] = [];
        for (let c = 0; c < w; c++) vals.push((200 + 15 * Math.sin(c / 7) + 0.37 * r + 0.01 * c * r).toFixed(3));
        rows.push(vals.join(" "));
      }
      const asc = join(dir, "dem.asc");
      writeFileSync(asc, `ncols ${w}\nnrows ${h}\nxllcorner 500000\nyllcorner 4600000\ncellsize 1\nNODATA_value -9999\n${rows.join("\n")}\n`);
      const tif = join(dir, "dem.tif");
      execFileSync("gdal_translate", ["-q", "-of", "GTiff", "-a_srs", "EPSG:32633", "-ot", "Float32", asc, tif]);
      const img = await (await fromFile(tif)).getImage();
      const [ox, oy] = img.getOrigin();
      const [rx] = img.getResolution();
      const ras = (await img.readRasters({ interleave: true })) as Float32Array;
      const grid = makeGrid({ width: img.getWidth(), height: img.getHeight(), x0: ox, y0: oy, cellM: rx, heights: Float32Array.from(ras) });
      const y = oy - 20.5;
      const opts = options({ zoneHalfAcrossM: 5, clearance: { minM: 10, safetyRadiusM: 5, obstacleMarginM: 0 } });
      const r = solvePlan(grid, [{ kind: "strip", strip: 1, from: [ox + 10.5, y], to: [ox + 69.5, y], lengthM: 59 }], opts);
      const wps = r.legs[0].waypoints;
      expect(wps.length).toBeGreaterThanOrEqual(2);
      for (const wp of wps) {
        const g = Number(execFileSync("gdallocationinfo", ["-valonly", "-geoloc", tif, String(wp.x), String(wp.y)]).toString().trim());
        expect(wp.groundAmslM).toBeCloseTo(g, 3);
        expect(wp.heightAboveGroundM).toBeCloseTo(wp.altitudeAmslM - g, 3);
      }
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
