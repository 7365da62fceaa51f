/**
 * The file edge of `gsdplan verify`: reads the waypoint list, the plan file's
 * limits and the DEM window under the rows (in the DEM's own CRS, never
 * resampled), padded with "no data" where the rows come near or past the
 * DEM's edge so every check sees unknown ground there rather than a crash.
 */
import { readFile, stat } from "node:fs/promises";
import path from "node:path";
import proj4 from "proj4";
import { metresPerDegree } from "../dem/cellsize.js";
import type { DemGrid } from "../dem/grid.js";
import { openDem, type DemSource } from "../dem/source.js";
import { readCells } from "../dem/window.js";
import { InputFileError } from "../errors.js";
import { loadPlanFile, resolvePlanOptions, type PlanOptions } from "../plan/options.js";
import { parseWaypointsCsv } from "./csv.js";
import { readKeepOutFiles } from "../route/zoneFile.js";
import { keepOutZonesFor, limitsFromPlanOptions } from "./limits.js";
import type { VerifyDem, VerifyLimits, VerifyRow } from "./types.js";
import { terrainOnGrid } from "../plan/terrainGrid.js";

const WGS84 = "+proj=longlat +datum=WGS84 +no_defs";

const VERTICAL_UNIT_NAMES: Record<NonNullable<PlanOptions["demVerticalUnit"]>, string> = {
  metre: "metre",
  foot: "foot",
  "us-survey-foot": "US survey foot",
};

export interface VerifyInputs {
  csvPath: string;
  rows: VerifyRow[];
  options: PlanOptions;
  limits: VerifyLimits;
  /** The DEM window; with the plan's `dtm`, the terrain model on its cells (`dem.terrain`). */
  dem: VerifyDem;
  /** Notes about the DEM (undeclared datum or unit) for the report. */
  demWarnings: string[];
}

/**
 * Metres of DEM needed around the rows: the safety radius, the reach of the
 * surface ceiling's search (ceiling + 50 m, see ceiling.ts) and 20 m to spare.
 * @example verifyMarginM(limits) // 35 for a 15 m radius and a ground ceiling
 */
export function verifyMarginM(l: VerifyLimits): number {
  return Math.max(l.safetyRadiusM, l.ceilingReference === "surface" ? l.ceilingM + 50 : 0) + 20;
}

/**
 * Reads `<target>/waypoints.csv` (or the CSV `target` names), the plan file, its
 * keep-out zone files and the DEM window under the rows plus verifyMarginM (and, when the
 * plan gives a terrain model `dtm`, that model on the same cells: the ceiling is checked on it).
 * @example const { rows, limits, dem } = await loadVerifyInputs("out", "site/plan.yaml")
 */
export async function loadVerifyInputs(target: string, planFile: string): Promise<VerifyInputs> {
  const st = await stat(target).catch(() => null);
  if (!st) throw new InputFileError(target, "not found (give an output folder of `gsdplan plan` or a waypoints.csv)");
  const csvPath = st.isDirectory() ? path.join(target, "waypoints.csv") : target;
  let text: string;
  try {
    text = await readFile(csvPath, "utf8");
  } catch {
    throw new InputFileError(csvPath, "cannot read the waypoint list (missing or unreadable)");
  }
  const rows = parseWaypointsCsv(text, csvPath);
  const file = await loadPlanFile(planFile);
  const options = resolvePlanOptions(file.data, {}, file.dir);
  const limits = limitsFromPlanOptions(options);
  if (options.keepOut.length) limits.keepOutZones = keepOutZonesFor(await readKeepOutFiles(options.keepOut), options.keepOutBufferM);
  const vertical = {
    ...(options.demVerticalDatum ? { verticalDatum: options.demVerticalDatum } : {}),
    ...(options.demVerticalUnit ? { verticalUnit: VERTICAL_UNIT_NAMES[options.demVerticalUnit] } : {}),
  };
  const source = await openDem(options.dem, { band: options.band, ...vertical });
  let dem: VerifyDem;
  const demWarnings = [...source.warnings];
  try {
    dem = await readPaddedWindow(source, rows, verifyMarginM(limits));
  } finally {
    await source.close();
  }
  if (options.dtm !== undefined) {
    const t = await terrainOnGrid(options.dtm, vertical, dem);
    demWarnings.push(...t.warnings);
    dem = { ...dem, terrain: t.grid };
  }
  return { csvPath, rows, options, limits, dem, demWarnings };
}

/**
 * The cells under the rows' box grown by `marginM`, in the DEM's CRS; cells past
 * the raster's edge are no data. Reads only the part inside the raster.
 * @example const grid = await readPaddedWindow(await openDem("dem.tif"), rows, 35)
 */
export async function readPaddedWindow(source: DemSource, rows: readonly VerifyRow[], marginM: number): Promise<DemGrid> {
  const conv = proj4(WGS84, source.crs.proj4);
  let west = Infinity;
  let east = -Infinity;
  let south = Infinity;
  let north = -Infinity;
  let maxAbsLat = 0;
  const midLon = source.transform.x0 + (source.width * source.transform.dx) / 2;
  for (const r of rows) {
    let [x, y] = conv.forward([r.longitude, r.latitude]);
    // Longitudes in the turn nearest the DEM's own (a geographic tile past 180 E).
    if (source.crs.geographic) x += 360 * Math.round((midLon - x) / 360);
    if (!Number.isFinite(x) || !Number.isFinite(y)) throw new InputFileError(source.path, `the waypoint at ${r.longitude}, ${r.latitude} cannot be placed in the DEM's CRS (${source.crs.name})`);
    west = Math.min(west, x);
    east = Math.max(east, x);
    south = Math.min(south, y);
    north = Math.max(north, y);
    maxAbsLat = Math.max(maxAbsLat, Math.abs(r.latitude));
  }
  let mx: number;
  let my: number;
  if (source.crs.geographic) {
    const [lonM, latM] = metresPerDegree(Math.min(maxAbsLat, 89));
    mx = marginM / lonM;
    my = marginM / latM;
  } else {
    mx = my = marginM / source.crs.linearUnitM;
  }
  const { x0, y0, dx, dy } = source.transform;
  // One cell more on every side than the margin: bilinear needs the next centre.
  const col0 = Math.floor((west - mx - x0) / dx) - 1;
  const col1 = Math.ceil((east + mx - x0) / dx) + 1;
  const row0 = Math.floor((north + my - y0) / dy) - 1;
  const row1 = Math.ceil((south - my - y0) / dy) + 1;
  const width = col1 - col0;
  const height = row1 - row0;
  if (width * height > 400_000_000) throw new InputFileError(source.path, `the waypoints span ${width} x ${height} DEM cells; verify reads at most 4e8 cells (split the list by flight)`);
  const heights = new Float32Array(width * height).fill(NaN);
  const c0 = Math.max(0, col0);
  const c1 = Math.min(source.width, col1);
  const r0 = Math.max(0, row0);
  const r1 = Math.min(source.height, row1);
  let inner: DemGrid | null = null;
  if (c1 > c0 && r1 > r0) {
    inner = await readCells(source, { col0: c0, row0: r0, col1: c1, row1: r1 });
    for (let r = r0; r < r1; r++) {
      const from = (r - r0) * inner.width;
      const to = (r - row0) * width + (c0 - col0);
      heights.set(inner.heights.subarray(from, from + inner.width), to);
    }
  }
  const transform = { x0: x0 + col0 * dx, y0: y0 + row0 * dy, dx, dy };
  return {
    width,
    height,
    heights,
    transform,
    crs: source.crs,
    cellSizeM: inner?.cellSizeM ?? [Math.abs(dx) * (source.crs.geographic ? NaN : source.crs.linearUnitM), Math.abs(dy) * (source.crs.geographic ? NaN : source.crs.linearUnitM)],
    verticalDatum: source.verticalDatum,
    verticalUnit: source.verticalUnit,
  };
}
