import type { DemGrid } from "../dem/grid.js";
import { extremaInOrientedRect, sampleBilinear } from "../dem/sample.js";
import type { Stations } from "../layout/types.js";
import { maxGroundInRadius } from "./clearance.js";
import { surfaceCeiling } from "./surfaceCeiling.js";
import { zoneExtremaAlongLine } from "./zoneExtrema.js";
import {
  CAUSE_CEILING,
  CAUSE_CLEARANCE,
  CAUSE_NODATA,
  CAUSE_RELIEF,
  STATUS_DETAIL_LIMITED,
  STATUS_OK,
  STATUS_UNFLYABLE,
  type SolverOptions,
  type StationProfile,
} from "./types.js";

/**
 * The corridor at every station of a leg, metres AMSL (the path, `altitudeM`,
 * is left NaN for the path stage):
 * - hard lower: highest ground within the safety radius + obstacle margin + minimum clearance;
 * - hard upper: the legal ceiling in its reference (`ground`: ground below + C;
 *   `surface`: within C of the closest terrain point; `takeoff`: take-off ground + C);
 * - soft band from the strip's own zone (oriented rectangle, half the strip
 *   spacing across, half the station step along): bandHigh = lowest zone
 *   ground + H_max, bandLow = highest zone ground + H_min. `band: false`
 *   (transit legs) leaves the band NaN.
 * Status: unflyable (hard bounds conflict; nodata -> CAUSE_NODATA), detail-limited
 * (band and hard corridor do not meet: CAUSE_CEILING / CAUSE_CLEARANCE; the
 * zone's relief wider than the band: CAUSE_RELIEF), else ok. Pass a grid whose
 * nodata is already filled to honour `assumeGroundM` (see solvePlan).
 * @example corridorAlong(grid, stationsAlongLeg(leg, 1, 30), opts).hardLowM
 */
export function corridorAlong(grid: DemGrid, st: Stations, opts: SolverOptions, flags: { band?: boolean } = {}): StationProfile {
  const n = st.s.length;
  const groundM = sampleBilinear(grid, st.x, st.y, new Float64Array(n));
  const hardLowM = new Float64Array(n);
  const hardHighM = new Float64Array(n);
  const bandLowM = new Float64Array(n).fill(NaN);
  const bandHighM = new Float64Array(n).fill(NaN);
  const status = new Uint8Array(n);
  const cause = new Uint8Array(n);
  const { minM, safetyRadiusM, obstacleMarginM } = opts.clearance;
  maxGroundInRadius(grid, st.x, st.y, safetyRadiusM, hardLowM);
  for (let i = 0; i < n; i++) hardLowM[i] += obstacleMarginM + minM;

  const C = opts.ceiling.heightM;
  switch (opts.ceiling.reference) {
    case "ground":
      for (let i = 0; i < n; i++) hardHighM[i] = groundM[i] + C;
      break;
    case "takeoff":
      hardHighM.fill(opts.takeoffGroundM + C);
      break;
    case "surface":
      surfaceCeiling(grid, st.x, st.y, C, hardHighM);
      break;
  }

  const withBand = flags.band ?? true;
  if (withBand) {
    const zMax = new Float64Array(n);
    const zMin = new Float64Array(n);
    // Same cells either way. Long zones (half a photo spacing along) overlap
    // from station to station, so the leg's band is visited once; a zone a
    // few cells long is cheaper scanned per station (0.5 m cells, oblique
    // legs: at 0.25 m half-along the scans are 10x faster, at 11.9 m the
    // per-leg pass is 1.5x faster; they cross near 15 cells).
    const cellM = Math.min(grid.cellSizeM[0], grid.cellSizeM[1]);
    if (st.zoneHalfAlongM >= 16 * cellM) zoneExtremaAlongLine(grid, st.x, st.y, st.ux, st.uy, st.zoneHalfAlongM, st.zoneHalfAcrossM, zMax, zMin);
    else extremaInOrientedRect(grid, st.x, st.y, st.ux, st.uy, st.zoneHalfAlongM, st.zoneHalfAcrossM, zMax, zMin);
    for (let i = 0; i < n; i++) {
      bandHighM[i] = zMin[i] + opts.band.hMaxM;
      bandLowM[i] = zMax[i] + opts.band.hMinM;
    }
  }

  for (let i = 0; i < n; i++) {
    const lo = hardLowM[i], hi = hardHighM[i];
    if (groundM[i] !== groundM[i] || lo !== lo || hi !== hi || (withBand && bandLowM[i] !== bandLowM[i])) {
      status[i] = STATUS_UNFLYABLE;
      cause[i] = CAUSE_NODATA;
      continue;
    }
    if (lo > hi) {
      status[i] = STATUS_UNFLYABLE;
      cause[i] = CAUSE_CEILING | CAUSE_CLEARANCE;
      continue;
    }
    if (!withBand) continue;
    let c = 0;
    if (bandLowM[i] > bandHighM[i]) c |= CAUSE_RELIEF;
    if (bandLowM[i] > hi) c |= CAUSE_CEILING;
    if (bandHighM[i] < lo) c |= CAUSE_CLEARANCE;
    status[i] = c ? STATUS_DETAIL_LIMITED : STATUS_OK;
    cause[i] = c;
  }
  return {
    s: st.s,
    x: st.x,
    y: st.y,
    groundM,
    hardLowM,
    hardHighM,
    bandLowM,
    bandHighM,
    altitudeM: new Float64Array(n).fill(NaN),
    status,
    cause,
  };
}
