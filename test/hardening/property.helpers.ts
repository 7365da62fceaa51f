/**
 * Random terrains and random valid plans for the hardening property tests
 * (fast-check arbitraries), and a writer that puts one case on disk: a GDAL-written
 * GeoTIFF DEM in UTM 33N, a square site and resolved plan options.
 */
import fc from "fast-check";
import { writeFileSync } from "node:fs";
import path from "node:path";
import { resolvePlanOptions, type PlanOptions } from "../../src/plan/options.js";
import { lonLatRing, siteGeoJson, UTM33, writeDemWithGdal } from "./helpers.js";

export interface Terrain {
  baseM: number;
  slope: [number, number];
  hills: { x: number; y: number; sigmaM: number; ampM: number }[];
  holes: { x: number; y: number; radiusM: number }[];
}

/** Sum of random Gaussians on a random slope, with random nodata holes (offsets in metres from the centre). */
export const terrainArb: fc.Arbitrary<Terrain> = fc.record({
  baseM: fc.integer({ min: 0, max: 2000 }),
  slope: fc.tuple(fc.double({ min: -0.3, max: 0.3, noNaN: true }), fc.double({ min: -0.3, max: 0.3, noNaN: true })),
  hills: fc.array(
    fc.record({
      x: fc.integer({ min: -250, max: 250 }),
      y: fc.integer({ min: -250, max: 250 }),
      sigmaM: fc.integer({ min: 15, max: 150 }),
      ampM: fc.integer({ min: -80, max: 150 }),
    }),
    { maxLength: 5 },
  ),
  holes: fc.array(fc.record({ x: fc.integer({ min: -200, max: 200 }), y: fc.integer({ min: -200, max: 200 }), radiusM: fc.integer({ min: 4, max: 30 }) }), { maxLength: 2 }),
});

export interface PlanDraw {
  sensorWidthMm: number;
  focalLengthMm: number;
  imageWidthPx: number;
  aspect: number;
  /** Height above ground the target GSD means (the GSD is derived from it, so the plan is plausible). */
  targetHeightM: number;
  tolerancePct: number;
  frontPct: number;
  sidePct: number;
  ceilingM: number;
  ceilingReference: "ground" | "surface" | "takeoff";
  clearanceM: number;
  safetyRadiusM: number;
  obstacleMarginM: number;
  type: "multirotor" | "fixed-wing";
  speedMps: number;
  minSpeedMps: number;
  maxClimbMps: number;
  maxDescentMps: number;
  onConflict: "skip" | "clearance";
  siteM: number;
  headingDeg: "auto" | number;
}

/** Random valid plans: camera, GSD, overlaps, ceilings, clearance, aircraft. */
export const planArb: fc.Arbitrary<PlanDraw> = fc.record({
  sensorWidthMm: fc.double({ min: 6, max: 36, noNaN: true }),
  focalLengthMm: fc.double({ min: 4, max: 35, noNaN: true }),
  imageWidthPx: fc.integer({ min: 2000, max: 8000 }),
  aspect: fc.constantFrom(2 / 3, 3 / 4, 9 / 16),
  targetHeightM: fc.integer({ min: 50, max: 140 }),
  tolerancePct: fc.integer({ min: 5, max: 25 }),
  frontPct: fc.integer({ min: 60, max: 85 }),
  sidePct: fc.integer({ min: 55, max: 80 }),
  ceilingM: fc.integer({ min: 90, max: 250 }),
  ceilingReference: fc.constantFrom("ground", "surface", "takeoff"),
  clearanceM: fc.integer({ min: 5, max: 45 }),
  safetyRadiusM: fc.integer({ min: 0, max: 30 }),
  obstacleMarginM: fc.integer({ min: 0, max: 10 }),
  type: fc.constantFrom("multirotor", "fixed-wing"),
  speedMps: fc.integer({ min: 4, max: 20 }),
  minSpeedMps: fc.integer({ min: 1, max: 3 }),
  maxClimbMps: fc.double({ min: 1, max: 6, noNaN: true }),
  maxDescentMps: fc.double({ min: 1, max: 6, noNaN: true }),
  onConflict: fc.constantFrom("skip", "clearance"),
  siteM: fc.integer({ min: 120, max: 220 }),
  headingDeg: fc.oneof(fc.constant("auto" as const), fc.integer({ min: 0, max: 179 })),
});

/** Cells of the random DEM: 100 x 100 at 5 m (500 m square) around (500000, 5200000) in UTM 33N. */
export const CELLS = 100;
export const CELL_M = 5;

/** Height of the terrain at an offset (metres) from the centre; NaN inside a hole. */
export function terrainHeight(t: Terrain, dx: number, dy: number): number {
  for (const h of t.holes) if ((dx - h.x) ** 2 + (dy - h.y) ** 2 < h.radiusM ** 2) return NaN;
  let z = t.baseM + t.slope[0] * dx + t.slope[1] * dy;
  for (const h of t.hills) z += h.ampM * Math.exp(-((dx - h.x) ** 2 + (dy - h.y) ** 2) / (2 * h.sigmaM ** 2));
  return z;
}

/**
 * Writes the case into `dir` and returns its resolved options (throws what resolvePlanOptions throws).
 * `dem` overrides the DEM's cell size, cell count and height function (default: CELLS x CELLS at CELL_M, terrainHeight).
 */
export function writeCase(
  dir: string, t: Terrain, p: PlanDraw, dem: { cellM: number; cells: number; height: (dx: number, dy: number) => number } = { cellM: CELL_M, cells: CELLS, height: (dx, dy) => terrainHeight(t, dx, dy) },
): PlanOptions {
  const { cellM, cells } = dem;
  const half = (cells * cellM) / 2;
  const heights = new Float32Array(cells * cells);
  for (let r = 0; r < cells; r++)
    for (let c = 0; c < cells; c++) heights[r * cells + c] = dem.height(-half + (c + 0.5) * cellM, half - (r + 0.5) * cellM);
  writeDemWithGdal(path.join(dir, "dem.tif"), {
    width: cells, height: cells, x0: 500000 - half, y0: 5200000 + half, dx: cellM, dy: -cellM, srs: "EPSG:32633", heights,
    creation: ["TILED=YES", "BLOCKXSIZE=64", "BLOCKYSIZE=64", "COMPRESS=DEFLATE"],
  });
  const s = p.siteM / 2;
  writeFileSync(path.join(dir, "site.geojson"), siteGeoJson(lonLatRing(UTM33, 500000 - s, 5200000 - s, 500000 + s, 5200000 + s)));
  // GSD = H * p / f (pinhole relation), p = sensor width / image width.
  const pitchMm = p.sensorWidthMm / p.imageWidthPx;
  const gsdCm = (p.targetHeightM * pitchMm) / p.focalLengthMm * 100;
  return resolvePlanOptions(
    {
      dem: "dem.tif",
      area: "site.geojson",
      camera: {
        sensorWidthMm: p.sensorWidthMm,
        focalLengthMm: p.focalLengthMm,
        imageWidthPx: p.imageWidthPx,
        imageHeightPx: Math.round(p.imageWidthPx * p.aspect),
      },
      target: { gsdCm, tolerancePct: p.tolerancePct },
      overlap: { frontPct: p.frontPct, sidePct: p.sidePct },
      ceiling: { heightM: p.ceilingM, reference: p.ceilingReference },
      clearance: { minM: p.clearanceM, safetyRadiusM: p.safetyRadiusM, obstacleMarginM: p.obstacleMarginM },
      aircraft: {
        type: p.type,
        speedMps: p.speedMps,
        minSpeedMps: Math.min(p.minSpeedMps, p.speedMps),
        maxClimbMps: p.maxClimbMps,
        maxDescentMps: p.maxDescentMps,
        enduranceMin: 30,
      },
      onConflict: p.onConflict,
      headingDeg: p.headingDeg,
    },
    {},
    dir,
  );
}
