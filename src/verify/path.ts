/**
 * The flown path in the DEM's own index space: each row projected from WGS84
 * to the DEM's CRS (proj4), altitudes in the DEM's vertical datum, and per leg
 * the metres per column and per row, so a horizontal radius in metres becomes
 * an ellipse of cells. A leg is the straight, constant-gradient line between
 * consecutive rows of one flight, taken straight in the DEM's CRS (over a
 * 1 km leg a straight line in degrees and one in a metric frame part by a few
 * centimetres).
 */
import proj4 from "proj4";
import type { DemGrid } from "../dem/grid.js";
import { metresPerDegree } from "../dem/cellsize.js";
import { InputError } from "../errors.js";
import type { Surface } from "./surface.js";
import { fromIndex, toIndex } from "./surface.js";
import type { VerifyRow } from "./types.js";

const WGS84 = "+proj=longlat +datum=WGS84 +no_defs";

export interface FlightPath {
  rows: readonly VerifyRow[];
  n: number;
  /** Index coordinates of each row. */
  c: Float64Array;
  r: Float64Array;
  /** Altitude of each row in the DEM's vertical datum, metres. */
  z: Float64Array;
  /** Per leg i (row i -> row i + 1): metres per column and per row, horizontal length in metres. */
  sx: Float64Array;
  sy: Float64Array;
  lengthM: Float64Array;
  /** 1 when rows i and i + 1 belong to one flight (a leg); 0 at a flight change and for the last row. */
  isLeg: Uint8Array;
  /**
   * 1 for the vertical moves at the take-off point that open or close a flight: the climb
   * from and the descent to the take-off point are outside the clearance promise.
   */
  takeoffVertical: Uint8Array;
  /** WGS84 of a point given in index space. */
  toLonLat: (c: number, r: number) => [number, number];
  /** Index space of a WGS84 point (as the rows are placed; NaN where the DEM's CRS cannot hold it). */
  fromLonLat: (lon: number, lat: number) => [number, number];
}

/** Legs shorter than this (metres) are vertical moves: rows carry 1e-8 degree (about 1 mm). */
export const VERTICAL_LEG_M = 0.01;

/**
 * Projects the rows onto the DEM window. Altitudes: the DEM's datum is
 * orthometric unless it is ellipsoidal, so altitude_ellipsoid_m is used only for
 * ellipsoidal DEMs (as the exporter writes them).
 * @example const path = flightPath(rows, surface)
 */
export function flightPath(rows: readonly VerifyRow[], s: Surface): FlightPath {
  const grid = s.grid;
  const n = rows.length;
  const conv = proj4(WGS84, grid.crs.proj4);
  const c = new Float64Array(n);
  const r = new Float64Array(n);
  const z = new Float64Array(n);
  const ellipsoidal = grid.verticalDatum === "ellipsoid";
  // A geographic DEM may hold longitudes past 180 (a tile from 179.95 to 180.05 E): take each
  // longitude in the turn nearest the DEM's own.
  const midLon = grid.transform.x0 + (grid.width * grid.transform.dx) / 2;
  const fromLonLat = (lon: number, lat: number): [number, number] => {
    let [x, y] = conv.forward([lon, lat]);
    if (grid.crs.geographic) x += 360 * Math.round((midLon - x) / 360);
    return toIndex(s, x, y);
  };
  for (let i = 0; i < n; i++) {
    const row = rows[i];
    [c[i], r[i]] = fromLonLat(row.longitude, row.latitude);
    z[i] = ellipsoidal ? row.altitudeEllipsoidM : row.altitudeAmslM;
    if (!Number.isFinite(z[i])) {
      const col = ellipsoidal ? "altitude_ellipsoid_m" : "altitude_amsl_m";
      throw new InputError(`row ${i + 1} ${col}`, "", `a number (the DEM's heights are ${ellipsoidal ? "ellipsoidal" : "orthometric"}, so ${col} is the altitude checked)`, "empty");
    }
  }
  const sx = new Float64Array(Math.max(0, n - 1));
  const sy = new Float64Array(Math.max(0, n - 1));
  const lengthM = new Float64Array(Math.max(0, n - 1));
  const isLeg = new Uint8Array(n);
  const projK = grid.crs.geographic ? 1 : projectedScale(grid, rows);
  for (let i = 0; i + 1 < n; i++) {
    isLeg[i] = rows[i].flight === rows[i + 1].flight ? 1 : 0;
    [sx[i], sy[i]] = metresPerIndex(grid, 0.5 * (rows[i].latitude + rows[i + 1].latitude), projK);
    lengthM[i] = Math.hypot((c[i + 1] - c[i]) * sx[i], (r[i + 1] - r[i]) * sy[i]);
  }
  const takeoffVertical = new Uint8Array(n);
  for (let a = 0; a < n; ) {
    let b = a;
    while (b + 1 < n && rows[b + 1].flight === rows[a].flight) b++;
    // Vertical legs chained from the flight's first row, and into its last row.
    for (let i = a; i < b && lengthM[i] < VERTICAL_LEG_M; i++) takeoffVertical[i] = 1;
    for (let i = b - 1; i >= a && lengthM[i] < VERTICAL_LEG_M; i--) takeoffVertical[i] = 1;
    a = b + 1;
  }
  const inv = proj4(grid.crs.proj4, WGS84);
  const toLonLat = (ci: number, ri: number): [number, number] => {
    const [x, y] = fromIndex(s, ci, ri);
    const [lon, lat] = inv.forward([x, y]);
    return [lon, lat];
  };
  return { rows, n, c, r, z, sx, sy, lengthM, isLeg, takeoffVertical, toLonLat, fromLonLat };
}

/**
 * Metres per column and per row. Geographic grids: the ellipsoid's metres per
 * degree at the leg's latitude. Projected grids: CRS units times metres per unit,
 * over the projection's point scale factor `k` (grid metres per true metre).
 */
function metresPerIndex(grid: DemGrid, latDeg: number, k: number): [number, number] {
  const { dx, dy } = grid.transform;
  if (grid.crs.geographic) {
    const [lonM, latM] = metresPerDegree(latDeg);
    return [Math.abs(dx) * lonM, Math.abs(dy) * latM];
  }
  const u = grid.crs.linearUnitM;
  return [(Math.abs(dx) * u) / k, (Math.abs(dy) * u) / k];
}

/**
 * The projection's point scale at the rows' centre, from its Jacobian by finite
 * differences (areal scale, square-rooted: exact for conformal projections such
 * as UTM, whose scale is the same in every direction). UTM's stays within about
 * 0.1 % of 1 inside its zone (from memory); computing it costs nothing.
 */
function projectedScale(grid: DemGrid, rows: readonly VerifyRow[]): number {
  let lon = 0;
  let lat = 0;
  for (const row of rows) {
    lon += row.longitude;
    lat += row.latitude;
  }
  lon /= rows.length;
  lat /= rows.length;
  const conv = proj4(WGS84, grid.crs.proj4);
  const e = 1e-4;
  const [x0, y0] = conv.forward([lon, lat]);
  const [x1, y1] = conv.forward([lon + e, lat]);
  const [x2, y2] = conv.forward([lon, lat + e]);
  const u = grid.crs.linearUnitM;
  const det = Math.abs((x1 - x0) * (y2 - y0) - (x2 - x0) * (y1 - y0)) * u * u;
  const [lonM, latM] = metresPerDegree(lat);
  const k = Math.sqrt(det / (e * lonM * e * latM));
  return Number.isFinite(k) && k > 0 ? k : 1;
}
