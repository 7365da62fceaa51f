import { describe, it, expect } from "vitest";
import { fileURLToPath } from "node:url";
import proj4 from "proj4";
import { openDem } from "../../src/dem/source.js";
import { readCells } from "../../src/dem/window.js";
import type { DemGrid } from "../../src/dem/grid.js";
import { siteFromLonLat } from "../../src/layout/site.js";
import { layoutStrips } from "../../src/layout/strips.js";
import { solvePlan } from "../../src/solve/solveLegs.js";
import { CAUSE_CEILING, STATUS_OK, type SolvedLeg, type SolverOptions } from "../../src/solve/types.js";
import { assessPlan } from "../../src/assess/assess.js";
import type { NadirBy } from "../../src/assess/coverageKernel.js";
import { paintCauseZones } from "../../src/assess/flagRaster.js";
import { FLAG_CEILING, FLAG_CLEARANCE, FLAG_COARSE, FLAG_FINE, FLAG_NODATA, FLAG_RELIEF, FLAG_UNFLYABLE } from "../../src/assess/flags.js";
import { genericCamera } from "./helpers.js";
import { zoneHalfAcrossM } from "../../src/plan/plan.js";

// The hilly fixture written by GDAL (fixtures/gdal/README.md): EPSG:32633, 1000 x 800 cells
// at 1 m, about 180 m of relief. Its CRS is metric, so it serves as the local frame here.
const FIXTURE = fileURLToPath(new URL("../../fixtures/gdal/hills_utm33_f32.tif", import.meta.url));
const UTM33 = "+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs";
const toWgs84 = (x: number, y: number): [number, number] => proj4(UTM33, "WGS84", [x, y]) as [number, number];
const fromWgs84 = (lon: number, lat: number): [number, number] => proj4("WGS84", UTM33, [lon, lat]) as [number, number];
const CAUSE_OR_NODATA = FLAG_CEILING | FLAG_CLEARANCE | FLAG_NODATA | FLAG_UNFLYABLE | FLAG_RELIEF;

let gridPromise: Promise<DemGrid> | null = null;
function fixtureGrid(): Promise<DemGrid> {
  gridPromise ??= (async () => {
    const dem = await openDem(FIXTURE);
    const grid = await readCells(dem, { col0: 0, row0: 0, col1: dem.width, row1: dem.height });
    await dem.close();
    return grid;
  })();
  return gridPromise;
}

/** Lay out, solve and assess the fixture; measure the agreement between solver and assessment. */
async function agreement(stationStep: "cell" | "trigger", nadirBy: NadirBy, zoneAlong: "step" | "trigger" = "step") {
  const grid = await fixtureGrid();
  const { x0, y0 } = grid.transform;
  // Site: the fixture less 120 m on every side, with a notch.
  const ring = [[120, 120], [880, 120], [880, 680], [500, 680], [450, 560], [400, 680], [120, 680], [120, 120]].map(([dx, dy]) => toWgs84(x0 + dx, y0 - 800 + dy));
  const site = siteFromLonLat([[ring]], { fromWgs84 }, { name: "hills" });
  const camera = genericCamera();
  // Target 2 cm/px, tolerance 15 %; band heights H = GSD / ifov (GSD = H p / f).
  const lowGsdM = 0.02 * 0.85;
  const highGsdM = 0.02 * 1.15;
  const hTarget = 0.02 / camera.ifov;
  const footAcross = hTarget * camera.ifov * camera.imageWidthPx;
  const footAlong = hTarget * camera.ifov * camera.imageHeightPx;
  // 70 % side and 80 % front overlap (common practice for mapping).
  const spacingM = footAcross * (1 - 0.7);
  const triggerM = footAlong * (1 - 0.8);
  // Plan settings widen the zone to the photos' nearest-nadir reach (src/plan/plan.ts zoneHalfAcrossM).
  const zoneAcross = zoneAlong === "trigger" ? zoneHalfAcrossM(spacingM, triggerM) : spacingM / 2;
  const layout = layoutStrips(site, { headingDeg: 90, spacingM, triggerM, footprintAcrossM: footAcross, footprintAlongM: footAlong, photoSpeedMps: 6, transitSpeedMps: 10 });
  const opts: SolverOptions = {
    ceiling: { heightM: 120, reference: "ground" },
    takeoffGroundM: 300,
    clearance: { minM: 20, safetyRadiusM: 15, obstacleMarginM: 0 },
    aircraft: { type: "multirotor", speedMps: 6, transitSpeedMps: 10, minSpeedMps: 2, maxClimbMps: 3, maxDescentMps: 3 },
    band: { hMinM: lowGsdM / camera.ifov, hMaxM: highGsdM / camera.ifov, hTargetM: hTarget },
    zoneHalfAcrossM: zoneAcross,
    stationStepM: stationStep === "cell" ? 1 : triggerM,
    ...(zoneAlong === "trigger" ? { zoneHalfAlongM: triggerM / 2 + 1 } : {}),
    onConflict: "skip",
  };
  const solved = solvePlan(grid, layout.legs, opts);
  const a = assessPlan(grid, site.local, solved.legs, camera, { lowGsdM, highGsdM }, { triggerM, zoneHalfAcrossM: zoneAcross, toWgs84, nadirBy });
  const { flags, inSite, gsdCm } = a.rasters;

  // Cells the solver marked ok: in the zone of some ok station and carrying no cause bit.
  // The ok stations' zones are painted with a marker bit through the same zone geometry.
  const okOnly: SolvedLeg[] = solved.legs.map((l) => ({
    ...l,
    profile: { ...l.profile, status: new Uint8Array(l.profile.status.length), cause: l.profile.status.map((s) => (s === STATUS_OK ? CAUSE_CEILING : 0)) },
  }));
  const okZone = new Uint16Array(flags.length);
  paintCauseZones(okZone, grid, inSite, okOnly, zoneAcross);
  let okCells = 0;
  let okInBand = 0;
  let outOfBand = 0;
  let outWithoutCause = 0;
  // How far past the band edge the worst uncaused cell lies, percent of the band's low end.
  let worstMissPct = 0;
  for (let i = 0; i < flags.length; i++) {
    if (!inSite[i]) continue;
    const f = flags[i];
    const out = (f & (FLAG_COARSE | FLAG_FINE)) !== 0;
    if (okZone[i] && (f & CAUSE_OR_NODATA) === 0) {
      okCells++;
      if (!out && gsdCm[i] === gsdCm[i]) okInBand++;
    }
    if (out) {
      outOfBand++;
      if ((f & CAUSE_OR_NODATA) === 0) {
        outWithoutCause++;
        const g = gsdCm[i];
        worstMissPct = Math.max(worstMissPct, (100 * (g < lowGsdM * 100 ? lowGsdM * 100 - g : g - highGsdM * 100)) / (lowGsdM * 100));
      }
    }
  }
  return { exposures: a.exposures.length, siteCells: a.stats.siteCells, okCells, okInBandShare: okInBand / okCells, outOfBand, outWithoutCause, worstMissPct };
}

describe("assessment of a solver plan over the hilly GDAL fixture", () => {
  it("solver zones that match the photos (station step = trigger distance, nearest nadir point): >= 99 % of ok cells in band", async () => {
    const r = await agreement("trigger", "distance");
    // A real plan: hundreds of photos, most of the site ok.
    expect(r.exposures).toBeGreaterThan(500);
    expect(r.okCells).toBeGreaterThan(0.5 * r.siteCells);
    // Issue 5: at least 99 % of the cells the solver marked ok are inside the band by the assessment.
    expect(r.okInBandShare).toBeGreaterThanOrEqual(0.99);
  }, 60_000);

  // As the plan runs it (src/plan/plan.ts): 1 m stations whose zones reach half a trigger
  // distance along (the ground each photo images most nadir) and the nearest nadir point.
  it("plan settings (1 m stations, zones reaching each photo's nearest-nadir ground): >= 99 % of ok cells in band, uncaused misses marginal and rare", async () => {
    const r = await agreement("cell", "distance", "trigger");
    // Issue 5: at least 99 % of the cells the solver marked ok are inside the band by the assessment,
    expect(r.okInBandShare).toBeGreaterThanOrEqual(0.99);
    // and every cell outside the band carries a cause bit or a nodata bit. Measured here: about
    // ten cells of ~400 000 at strip midlines miss it, all within 1 % of a band edge (photo and
    // station positions differ by up to one station step along the strip); the check allows at
    // most 0.01 % of the site, each within 1 % of the band.
    expect(r.outWithoutCause).toBeLessThanOrEqual(1e-4 * r.siteCells);
    expect(r.worstMissPct).toBeLessThan(1);
  }, 60_000);

  // With zones only half a station step long, the solver cannot see the ground a photo
  // up to half a trigger distance away images; kept as a measured contrast.
  it("zones of half a 1 m station step leave more ok cells out of band than zones of half a trigger distance", async () => {
    const short = await agreement("cell", "distance", "step");
    const long = await agreement("cell", "distance", "trigger");
    expect(long.okInBandShare).toBeGreaterThan(short.okInBandShare);
  }, 60_000);
});
