import { describe, it, expect } from "vitest";
import { makeGrid } from "../../src/dem/sample.js";
import { computeCoverage, footprintPixels } from "../../src/assess/coverage.js";
import { exposuresFromLegs } from "../../src/assess/exposures.js";
import { rasteriseSite } from "../../src/assess/siteMask.js";
import type { Exposure } from "../../src/assess/types.js";
import type { SolvedLeg } from "../../src/solve/types.js";
import { genericCamera, handLeg, latticeCount } from "./helpers.js";

const camera = genericCamera();
const { alongPx, acrossPx } = footprintPixels(camera);
const H0 = 250; // flat ground, metres AMSL
const AGL = 100;

/**
 * Serpentine strips on a lattice in a rotated frame around origin o: strip j
 * runs along u at across offset c0 + j * spacing, photos at along offset
 * a0 + k * trigger (k = 0..n), the same lattice whichever way the strip is flown.
 */
function latticePlan(o: [number, number], headingDeg: number, a0: number, c0: number, triggerM: number, spacingM: number, n: number, m: number, altitudeAmslM: number): SolvedLeg[] {
  const h = (headingDeg * Math.PI) / 180;
  const u: [number, number] = [Math.sin(h), Math.cos(h)];
  const v: [number, number] = [u[1], -u[0]];
  const legs: SolvedLeg[] = [];
  for (let j = 0; j <= m; j++) {
    const c = c0 + j * spacingM;
    const p = (a: number): [number, number] => [o[0] + a * u[0] + c * v[0], o[1] + a * u[1] + c * v[1]];
    const ends = [p(a0), p(a0 + n * triggerM)];
    if (j % 2 === 1) ends.reverse();
    const len = n * triggerM;
    legs.push(handLeg({ from: ends[0], to: ends[1], strip: j + 1, waypoints: [{ s: 0, altitudeAmslM }, { s: len, altitudeAmslM }], stationStepM: 5 }));
  }
  return legs;
}

const square = { type: "Polygon" as const, coordinates: [[[0.2, 0.2], [399.8, 0.2], [399.8, 399.8], [0.2, 399.8], [0.2, 0.2]]] };

describe("flat ground, nadir GSD and image count from the overlaps", () => {
  const grid = makeGrid({ width: 400, height: 400, x0: 0, y0: 400, cellM: 1, heights: () => H0 });
  const inSite = rasteriseSite(square, grid.width, grid.height, grid.transform);
  // Overlaps 70 % front, 60 % side; trigger = footprint along * (1 - front), spacing =
  // footprint across * (1 - side) (common practice; the relation in the domain notes).
  const front = 0.7;
  const side = 0.6;
  const footAlongM = AGL * camera.ifov * alongPx;
  const footAcrossM = AGL * camera.ifov * acrossPx;
  const triggerM = footAlongM * (1 - front);
  const spacingM = footAcrossM * (1 - side);

  for (const headingDeg of [90, 30]) {
    it(`heading ${headingDeg} deg: GSD = H p / f everywhere, count = lattice points in the footprint`, () => {
      const o: [number, number] = [200, 200];
      const n = Math.ceil(600 / triggerM);
      const m = Math.ceil(600 / spacingM);
      // Offsets of 0.3 m keep footprint edges off the cell-centre lattice.
      const a0 = -300.3;
      const c0 = -300.3;
      const legs = latticePlan(o, headingDeg, a0, c0, triggerM, spacingM, n, m, H0 + AGL);
      const exposures = exposuresFromLegs(legs, triggerM);
      expect(exposures.length).toBe((n + 1) * (m + 1));
      const cov = computeCoverage(grid, inSite, exposures, camera);

      // Pinhole camera, similar triangles (any photogrammetry textbook): GSD = H * p / f.
      const gsdExpected = AGL * camera.ifov * 100;
      const h = (headingDeg * Math.PI) / 180;
      const u = [Math.sin(h), Math.cos(h)];
      const halfAlong = (AGL * camera.ifov * alongPx) / 2;
      const halfAcross = (AGL * camera.ifov * acrossPx) / 2;
      const alongCounts = new Set<number>();
      const acrossCounts = new Set<number>();
      let worstRel = 0;
      let mismatches = 0;
      let cells = 0;
      for (let r = 0; r < grid.height; r++) {
        for (let c = 0; c < grid.width; c++) {
          const i = r * grid.width + c;
          if (!inSite[i]) continue;
          cells++;
          worstRel = Math.max(worstRel, Math.abs(cov.gsdCm[i] - gsdExpected) / gsdExpected);
          const px = c + 0.5 - o[0];
          const py = 400 - (r + 0.5) - o[1];
          const a = px * u[0] + py * u[1];
          const q = px * u[1] - py * u[0];
          const na = latticeCount(a, a0, triggerM, n, halfAlong);
          const nc = latticeCount(q, c0, spacingM, m, halfAcross);
          alongCounts.add(na);
          acrossCounts.add(nc);
          if (cov.images[i] !== na * nc) mismatches++;
        }
      }
      expect(cells).toBe(400 * 400);
      expect(worstRel).toBeLessThan(1e-6);
      expect(mismatches).toBe(0);
      // Along the track a point lies in floor or ceil of 1 / (1 - front) = 3.33 photos, across in
      // floor or ceil of 1 / (1 - side) = 2.5 strips, depending on where it falls between photos.
      expect([...alongCounts].sort()).toEqual([Math.floor(1 / (1 - front)), Math.ceil(1 / (1 - front))]);
      expect([...acrossCounts].sort()).toEqual([Math.floor(1 / (1 - side)), Math.ceil(1 / (1 - side))]);
    });
  }

  it("cells outside the site get nothing", () => {
    const small = { type: "Polygon" as const, coordinates: [[[100.2, 100.2], [200.2, 100.2], [200.2, 200.2], [100.2, 200.2], [100.2, 100.2]]] };
    const mask = rasteriseSite(small, grid.width, grid.height, grid.transform);
    const legs = latticePlan([200, 200], 90, -300.3, -300.3, triggerM, spacingM, Math.ceil(600 / triggerM), Math.ceil(600 / spacingM), H0 + AGL);
    const cov = computeCoverage(grid, mask, exposuresFromLegs(legs, triggerM), camera);
    let outside = 0;
    let touched = 0;
    for (let i = 0; i < mask.length; i++) {
      if (mask[i]) continue;
      outside++;
      if (cov.images[i] !== 0 || !Number.isNaN(cov.gsdCm[i])) touched++;
    }
    expect(outside).toBe(400 * 400 - 100 * 100);
    expect(touched).toBe(0);
  });
});

describe("a single ridge under a constant-altitude flight", () => {
  // Triangular ridge running north-south at x = 200, 60 m high, 80 m half-width.
  const ridgeX = 200;
  const ridgeHalfWidthM = 80;
  const ridgeHeightM = 60;
  const ground = (x: number): number => H0 + ridgeHeightM * Math.max(0, 1 - Math.abs(x - ridgeX) / ridgeHalfWidthM);
  const grid = makeGrid({ width: 400, height: 300, x0: 0, y0: 300, cellM: 1, heights: (x) => ground(x) });
  const site = { type: "Polygon" as const, coordinates: [[[0.2, 0.2], [399.8, 0.2], [399.8, 299.8], [0.2, 299.8], [0.2, 0.2]]] };
  const inSite = rasteriseSite(site, grid.width, grid.height, grid.transform);
  const zFlight = H0 + AGL; // constant altitude: the ridge crest is only 40 m below
  const triggerM = 30;
  const spacingM = 60;
  const a0 = -200.3; // along offset from o = (200, 150), heading east
  const c0 = -200.3;
  const n = 14;
  const m = 7;

  it("GSD follows (z - ground) p / f and the count shrinks with the footprint on the crest", () => {
    const legs = latticePlan([200, 150], 90, a0, c0, triggerM, spacingM, n, m, zFlight);
    const cov = computeCoverage(grid, inSite, exposuresFromLegs(legs, triggerM), camera);
    let worstRel = 0;
    let mismatches = 0;
    for (let r = 0; r < grid.height; r++) {
      for (let c = 0; c < grid.width; c++) {
        const i = r * grid.width + c;
        const x = c + 0.5;
        const y = 300 - (r + 0.5);
        // The DEM stores float32 heights: use the same ground the camera sees.
        const g = Math.fround(ground(x));
        const d = zFlight - g;
        const gsd = d * camera.ifov * 100; // similar triangles: GSD = (z - ground) p / f
        worstRel = Math.max(worstRel, Math.abs(cov.gsdCm[i] - gsd) / gsd);
        // Footprint projected to this cell's ground: half-widths (z - ground) ifov px / 2.
        const na = latticeCount(x - 200, a0, triggerM, n, (d * camera.ifov * alongPx) / 2);
        // Heading east: across-track unit (0, -1), so across offset = -(y - 150).
        const nc = latticeCount(-(y - 150), c0, spacingM, m, (d * camera.ifov * acrossPx) / 2);
        if (cov.images[i] !== na * nc) mismatches++;
      }
    }
    expect(worstRel).toBeLessThan(1e-6);
    expect(mismatches).toBe(0);
    // The drop itself: footprints on the crest are 40 % the size of those over the valley
    // (40 m vs 100 m below the camera), so the crest sees fewer photos.
    const crest = 150 * grid.width + 200;
    const valley = 150 * grid.width + 20;
    expect(cov.images[crest]).toBeLessThan(cov.images[valley]);
    expect(cov.gsdCm[crest]).toBeLessThan(cov.gsdCm[valley]);
  });
});

describe("most nadir photo", () => {
  it("takes the GSD from the photo whose nadir point is nearest relative to its footprint", () => {
    const grid = makeGrid({ width: 200, height: 250, x0: 0, y0: 250, cellM: 1, heights: () => H0 });
    const all = new Uint8Array(grid.width * grid.height).fill(1);
    // A: 100 m above ground at y = 100; B: 80 m above ground at y = 160, both heading east.
    const ex: Exposure[] = [
      { x: 100, y: 100, altitudeAmslM: H0 + 100, ux: 1, uy: 0, strip: 1 },
      { x: 100, y: 160, altitudeAmslM: H0 + 80, ux: 1, uy: 0, strip: 2 },
    ];
    const cov = computeCoverage(grid, all, ex, camera);
    // Straight across the track the offsets relative to the half-widths 75 m (A) and 60 m (B)
    // are equal where (y - 100) / 75 = (160 - y) / 60, at y = 133.33 m.
    const col = 100;
    for (const y of [101.5, 120.5, 132.5, 134.5, 150.5, 159.5]) {
      const r = Math.round(250 - y - 0.5);
      const i = r * grid.width + col;
      const fromA = y < 133.33;
      expect(cov.nadirStrip[i]).toBe(fromA ? 1 : 2);
      const want = (fromA ? 100 : 80) * camera.ifov * 100;
      expect(Math.abs(cov.gsdCm[i] - want) / want).toBeLessThan(1e-6);
      expect(cov.images[i]).toBe(2);
    }
    // By plain ground distance the split is the midline y = 130 m instead.
    const byDistance = computeCoverage(grid, all, ex, camera, { nadirBy: "distance" });
    for (const y of [128.5, 129.5, 130.5, 131.5]) {
      const i = Math.round(250 - y - 0.5) * grid.width + col;
      expect(byDistance.nadirStrip[i]).toBe(y < 130 ? 1 : 2);
    }
  });
});

describe("nadir strip raster width", () => {
  // One byte a cell while every strip number is below 256, two beyond; the same strips
  // either way. A strip number is only a label: the same photos numbered 300 up give the
  // same GSD and counts, and each cell's strip moves by the same 299.
  const grid = makeGrid({ width: 300, height: 260, x0: 0, y0: 130, cellM: 0.5, heights: (x, y) => H0 + 8 * Math.sin(x / 17) * Math.cos(y / 23) });
  const inSite = new Uint8Array(grid.width * grid.height).fill(1);
  const photos = (first: number): Exposure[] => {
    const ex: Exposure[] = [];
    for (let j = 0; j < 4; j++) for (let k = 0; k < 7; k++) ex.push({ x: 20 + j * 35, y: -5 + k * 22, altitudeAmslM: H0 + AGL - 10 * (j % 2), ux: 0, uy: 1, strip: first + j });
    return ex;
  };
  it("is a Uint8Array up to strip 255 and a Uint16Array beyond, with the same strips", () => {
    for (const rowsIn of ["js", "wasm"] as const) {
      const low = computeCoverage(grid, inSite, photos(1), camera, { threads: 1, nadirBy: "distance", rowsIn });
      const edge = computeCoverage(grid, inSite, photos(252), camera, { threads: 1, nadirBy: "distance", rowsIn });
      const high = computeCoverage(grid, inSite, photos(300), camera, { threads: 1, nadirBy: "distance", rowsIn });
      expect(low.nadirStrip).toBeInstanceOf(Uint8Array);
      expect(edge.nadirStrip).toBeInstanceOf(Uint8Array);
      expect(high.nadirStrip).toBeInstanceOf(Uint16Array);
      expect(Buffer.from(high.gsdCm.buffer).equals(Buffer.from(low.gsdCm.buffer))).toBe(true);
      expect(Buffer.from(high.images.buffer).equals(Buffer.from(low.images.buffer))).toBe(true);
      let seen = 0;
      const strips = new Set<number>();
      for (let i = 0; i < inSite.length; i++) {
        const s = low.nadirStrip[i];
        expect(edge.nadirStrip[i]).toBe(s === 0 ? 0 : s + 251);
        expect(high.nadirStrip[i]).toBe(s === 0 ? 0 : s + 299);
        if (s) {
          seen++;
          strips.add(s);
        }
      }
      expect(seen).toBeGreaterThan(10_000);
      expect([...strips].sort()).toEqual([1, 2, 3, 4]);
    }
  });
});
