import type { DemGrid } from "../dem/grid.js";
import { extremaInOrientedRect, extremaInRadius, sampleBilinear } from "../dem/sample.js";
import { discExtremaExact, rimExtend } from "../dem/discExact.js";
import type { Stations } from "../layout/types.js";
import { clearanceFloorM, maxGroundInRadius, poolFor } from "./clearance.js";
import { nodataFilled } from "../dem/dataMask.js";
import { surfaceCeiling } from "./surfaceCeiling.js";
import { zoneExtremaAlongLine } from "./zoneExtrema.js";
import { zoneExtremaOnAxis } from "./zoneExtremaAxis.js";
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

/** Largest cell diagonal (metres) for which the hard bounds widen their discs by one diagonal instead of taking the rim exactly. */
export const DILATE_MAX_DIAG_M = 2;

/**
 * The corridor at every station of a leg, metres AMSL (the path, `altitudeM`,
 * is left NaN for the path stage):
 * - hard lower: highest ground within the safety radius + obstacle margin + minimum clearance
 *   (+ the DEM's stated accuracy);
 * - hard upper: the legal ceiling in its reference (`ground`: ground below + C;
 *   `surface`: within C of the closest terrain point; `takeoff`: take-off ground + C),
 *   measured on `opts.terrain` when a terrain model is given beside a surface model;
 * Both hard bounds hold on the whole straight path between stations, not only at
 * them: every point between two stations lies within one station step s of both,
 * and the path's height there lies between theirs. So the floor takes the highest
 * ground within the safety radius + s, the ground ceiling the lowest ground within
 * s, and the surface ceiling C - s (any height below a legal one over the same
 * point is legal too: the ball around it, moved down, still meets the terrain).
 * The extrema bound the DEM's bilinear surface, not only its cell centres: exactly on
 * coarse DEMs (centres inside the disc and the disc's rim, see dem/discExact.ts), by
 * one cell diagonal more of disc on fine ones.
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
  const { safetyRadiusM } = opts.clearance;
  const floorM = clearanceFloorM(opts.clearance);
  // Reach between stations: the largest gap between neighbours (the last one may be shorter).
  let reachM = 0;
  for (let i = 1; i < n; i++) reachM = Math.max(reachM, st.s[i] - st.s[i - 1]);
  const discM = safetyRadiusM + reachM;
  // Fine DEMs: every point within r lies in a patch whose four corner centres lie within
  // r + one cell diagonal, and a bilinear patch stays within its corners' range, so the
  // centres within that wider disc bound the surface (high by at most the relief across
  // one cell diagonal: centimetres to a metre at <= 2 m cells) at the cost of a slightly
  // larger scan. Coarse DEMs: the rim crosses few patches, so take it exactly instead.
  const diagM = Math.hypot(grid.cellSizeM[0], grid.cellSizeM[1]);
  const rimExact = diagM > DILATE_MAX_DIAG_M;
  if (rimExact) {
    maxGroundInRadius(grid, st.x, st.y, discM, hardLowM);
    for (let i = 0; i < n; i++) hardLowM[i] = rimExtend(grid, st.x[i], st.y[i], discM, hardLowM[i], true);
  } else maxGroundInRadius(grid, st.x, st.y, discM + diagM, hardLowM);
  for (let i = 0; i < n; i++) hardLowM[i] += floorM;
  let knownLowM: Float64Array | undefined;
  for (let i = 0; i < n; i++) {
    if (hardLowM[i] === hardLowM[i]) continue;
    knownLowM ??= hardLowM.slice();
    knownLowM[i] = maxKnownInRadius(grid, st.x[i], st.y[i], discM + diagM) + floorM;
  }

  // The legal ceilings refer to the terrain: with a terrain model beside a surface model
  // they are measured from it (same cells, so the same exactness argument holds).
  const terrain = terrainOf(opts);
  if (terrain && !sameCells(terrain, grid)) throw new Error("corridorAlong: the terrain model must be on the surface grid's cells");
  const terrainM = terrain ? sampleBilinear(terrain, st.x, st.y, new Float64Array(n)) : undefined;
  const ceilingGrid = terrain ?? grid;
  const ceilingGroundM = terrainM ?? groundM;
  const C = opts.ceiling.heightM;
  switch (opts.ceiling.reference) {
    case "ground": {
      const lowest = new Float64Array(n);
      const highest = new Float64Array(n);
      if (rimExact) discExtremaExact(ceilingGrid, st.x, st.y, reachM, highest, lowest);
      else extremaInRadius(ceilingGrid, st.x, st.y, reachM + diagM, highest, lowest);
      for (let i = 0; i < n; i++) hardHighM[i] = Math.min(ceilingGroundM[i], lowest[i]) + C;
      break;
    }
    case "takeoff":
      hardHighM.fill(opts.takeoffGroundM + C);
      break;
    case "surface":
      surfaceCeiling(ceilingGrid, st.x, st.y, Math.max(0, C - reachM), hardHighM);
      break;
  }

  const withBand = flags.band ?? true;
  if (withBand) {
    const zMax = new Float64Array(n);
    const zMin = new Float64Array(n);
    // Same cells either way. Long zones (half a photo spacing along) overlap
    // from station to station, so the leg's band is visited once; on an oblique
    // leg a zone a few cells long is cheaper scanned per station (0.5 m cells:
    // at 0.25 m half-along the scans are 10x faster, at 11.9 m the per-leg pass
    // is 1.5x faster; they cross near 15 cells). On a leg along a grid axis the
    // column pass wins at any length (the demo's strips, 1 m cells, a cell
    // along: 0.2 -> 0.03 s for the site's zones).
    const cellM = Math.min(grid.cellSizeM[0], grid.cellSizeM[1]);
    if (st.zoneHalfAlongM >= 16 * cellM) zoneExtremaAlongLine(grid, st.x, st.y, st.ux, st.uy, st.zoneHalfAlongM, st.zoneHalfAcrossM, zMax, zMin);
    else if (!zoneExtremaOnAxis(grid, st.x, st.y, st.ux, st.uy, st.zoneHalfAlongM, st.zoneHalfAcrossM, zMax, zMin)) {
      extremaInOrientedRect(grid, st.x, st.y, st.ux, st.uy, st.zoneHalfAlongM, st.zoneHalfAcrossM, zMax, zMin);
    }
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
    ...(terrainM ? { terrainM } : {}),
    hardLowM,
    ...(knownLowM ? { knownLowM } : {}),
    hardHighM,
    bandLowM,
    bandHighM,
    altitudeM: new Float64Array(n).fill(NaN),
    status,
    cause,
  };
}

function sameCells(a: DemGrid, b: DemGrid): boolean {
  const p = a.transform, q = b.transform;
  return a.width === b.width && a.height === b.height && p.x0 === q.x0 && p.y0 === q.y0 && p.dx === q.dx && p.dy === q.dy;
}

/**
 * The terrain model of the options, its nodata filled with `assumeGroundM` when set
 * (as solvePlan fills the surface grid: nodataFilled, made once per grid and height);
 * undefined without one.
 */
function terrainOf(opts: SolverOptions): DemGrid | undefined {
  const t = opts.terrain;
  if (!t || opts.assumeGroundM === undefined) return t;
  return nodataFilled(t, opts.assumeGroundM);
}

/**
 * Highest cell centre with data within `radiusM` of a point (nodata skipped), or NaN when none has data.
 * On fine DEMs (the disc spans many cells) the same branch and bound as maxGroundInRadius: cells
 * max-pooled over their data into k x k blocks; a block wholly inside the disc counts by its pooled
 * maximum, a block the circle crosses is scanned cell by cell only when its maximum can beat the
 * best so far (highest first), with the same per-cell test as the plain scan.
 * @example maxKnownInRadius(grid, 120, 340, 16.2) // NaN where no centre within 16.2 m has data
 */
export function maxKnownInRadius(grid: DemGrid, px: number, py: number, radiusM: number): number {
  const { width: w, height: h, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  const c0 = Math.max(0, Math.floor((px - radiusM - x0) / dx - 0.5)), c1 = Math.min(w - 1, Math.ceil((px + radiusM - x0) / dx - 0.5));
  const r0 = Math.max(0, Math.floor((py + radiusM - y0) / dy - 0.5)), r1 = Math.min(h - 1, Math.ceil((py - radiusM - y0) / dy - 0.5));
  const r2 = radiusM * radiusM;
  const cellM = Math.max(grid.cellSizeM[0], grid.cellSizeM[1]);
  let k = radiusM / cellM > 16 ? Math.ceil(radiusM / cellM / 8) : 1;
  if (k === 1 || c0 > c1 || r0 > r1) return maxKnownIn(grid, px, py, r2, c0, c1, r0, r1, NaN);
  const pool = poolFor(grid, k);
  k = pool.k;
  const pooled = pooledKnownMax(grid, pool.pooled, k);
  const pw = pool.pooled.width;
  const rIn = Math.max(0, radiusM - 1e-6), rOut = radiusM + 1e-6;
  const rIn2 = rIn * rIn, rOut2 = rOut * rOut;
  let best = -Infinity;
  let nEdge = 0;
  const edge = edgeScratch(((Math.floor(r1 / k) - Math.floor(r0 / k) + 1) * (Math.floor(c1 / k) - Math.floor(c0 / k) + 1)));
  for (let br = Math.floor(r0 / k); br <= Math.floor(r1 / k); br++) {
    const ra = Math.max(r0, br * k), rb = Math.min(r1, br * k + k - 1);
    const fullRows = ra === br * k && rb === Math.min(h - 1, br * k + k - 1);
    const ya = y0 + (ra + 0.5) * dy - py, yb = y0 + (rb + 0.5) * dy - py;
    const nearY = (ya <= 0) !== (yb <= 0) || ya === 0 || yb === 0 ? 0 : Math.min(Math.abs(ya), Math.abs(yb));
    const farY = Math.max(Math.abs(ya), Math.abs(yb));
    for (let bc = Math.floor(c0 / k); bc <= Math.floor(c1 / k); bc++) {
      const m = pooled.at(br * pw + bc);
      if (m === -Infinity || m <= best) continue;
      const ca = Math.max(c0, bc * k), cb = Math.min(c1, bc * k + k - 1);
      const xa = x0 + (ca + 0.5) * dx - px, xb = x0 + (cb + 0.5) * dx - px;
      const nearX = (xa <= 0) !== (xb <= 0) || xa === 0 || xb === 0 ? 0 : Math.min(Math.abs(xa), Math.abs(xb));
      if (nearX * nearX + nearY * nearY > rOut2) continue;
      const farX = Math.max(Math.abs(xa), Math.abs(xb));
      if (fullRows && ca === bc * k && cb === Math.min(w - 1, bc * k + k - 1) && farX * farX + farY * farY <= rIn2) best = m;
      else edge[nEdge++] = br * pw + bc;
    }
  }
  // Boundary blocks, highest maximum first: the scan stops at the first that cannot beat the best.
  const order = edge.subarray(0, nEdge).sort((a, b) => pooled.at(b) - pooled.at(a));
  for (let e = 0; e < nEdge; e++) {
    const b = order[e];
    if (pooled.at(b) <= best) break;
    const br = Math.floor(b / pw), bc = b - br * pw;
    best = maxKnownIn(grid, px, py, r2, Math.max(c0, bc * k), Math.min(c1, bc * k + k - 1), Math.max(r0, br * k), Math.min(r1, br * k + k - 1), best);
  }
  return best === -Infinity ? NaN : best;
}

/** The plain scan: highest cell with data in columns c0..c1, rows r0..r1 whose centre lies within sqrt(r2) of the point, starting from `best` (NaN: none yet). */
function maxKnownIn(grid: DemGrid, px: number, py: number, r2: number, c0: number, c1: number, r0: number, r1: number, best: number): number {
  const { width: w, heights } = grid;
  const { x0, y0, dx, dy } = grid.transform;
  for (let r = r0; r <= r1; r++) {
    const ddy = y0 + (r + 0.5) * dy - py;
    for (let c = c0; c <= c1; c++) {
      const ddx = x0 + (c + 0.5) * dx - px;
      if (ddx * ddx + ddy * ddy > r2) continue;
      const z = heights[r * w + c];
      if (z === z && !(z <= best)) best = z;
    }
  }
  return best;
}

let edgeBuf = new Int32Array(256);
function edgeScratch(n: number): Int32Array {
  if (edgeBuf.length < n) edgeBuf = new Int32Array(Math.max(n, 2 * edgeBuf.length));
  return edgeBuf;
}

const knownPools = new WeakMap<DemGrid, Float32Array>();

/**
 * Max over the cells with data of each k x k block of `pooled` (pooledMax of the grid),
 * -Infinity for a block without any: the pooled maximum itself where the block has no
 * nodata, else scanned the first time it is asked for (NaN in the cache: not yet).
 */
function pooledKnownMax(grid: DemGrid, pooled: DemGrid, k: number): { at(b: number): number } {
  let known = knownPools.get(pooled);
  if (!known) knownPools.set(pooled, (known = new Float32Array(pooled.heights.length).fill(NaN)));
  const cache = known;
  const pmax = pooled.heights, pw = pooled.width;
  const { width: W, height: H, heights: src } = grid;
  return {
    at(b: number): number {
      const m = pmax[b];
      if (m === m) return m;
      const hit = cache[b];
      if (hit === hit) return hit;
      const br = Math.floor(b / pw), bc = b - br * pw;
      let cur = -Infinity;
      for (let r = br * k; r < Math.min(H, br * k + k); r++) {
        for (let c = bc * k; c < Math.min(W, bc * k + k); c++) {
          const z = src[r * W + c];
          if (z > cur) cur = z;
        }
      }
      cache[b] = cur;
      return cur;
    },
  };
}
