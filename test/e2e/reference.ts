/**
 * Outside references for the end-to-end checks: GDAL (Debian gdal-bin) for
 * DEM heights and raster georeferencing, PROJ (Debian proj-bin + proj-data)
 * for coordinates and the EGM96 undulation.
 */
import { execFileSync } from "node:child_process";

const ENV = { ...process.env, GDAL_PAM_ENABLED: "NO" };

/** `gdalinfo -json file` (GDAL_PAM_ENABLED=NO so no .aux.xml is written beside an input). */
export function gdalinfoJson(file: string): {
  size: [number, number];
  geoTransform: [number, number, number, number, number, number];
  coordinateSystem: { wkt: string };
  bands: { type: string; noDataValue?: number | string }[];
} {
  // flags.tif's 65,536-entry colour table makes gdalinfo -json about 6 MB.
  return JSON.parse(execFileSync("gdalinfo", ["-json", file], { encoding: "utf8", env: ENV, maxBuffer: 64 * 2 ** 20 }));
}

/**
 * Cell values by integer column/row through `gdallocationinfo -valonly` (all
 * points in one run, on stdin). NaN where GDAL prints nothing.
 */
export function gdalCellValues(file: string, cells: [number, number][]): number[] {
  if (!cells.length) return [];
  const input = cells.map(([c, r]) => `${c} ${r}`).join("\n") + "\n";
  const out = execFileSync("gdallocationinfo", ["-valonly", file], { input, encoding: "utf8", env: ENV });
  const lines = out.split("\n").slice(0, cells.length);
  return lines.map((l) => (l.trim() === "" ? NaN : Number(l)));
}

/**
 * WGS84 longitude/latitude to a projected CRS by PROJ's cs2cs. EPSG:4326 takes
 * latitude first (its authority axis order), so the input is written lat lon.
 */
export function cs2csFromWgs84(epsg: number, lonLats: [number, number][]): [number, number][] {
  const input = lonLats.map(([lon, lat]) => `${lat.toFixed(9)} ${lon.toFixed(9)}`).join("\n") + "\n";
  const out = execFileSync("cs2cs", ["-f", "%.6f", "EPSG:4326", `EPSG:${epsg}`], { input, encoding: "utf8" });
  const rows = out.trim().split("\n").map((l) => l.trim().split(/\s+/).slice(0, 2).map(Number) as [number, number]);
  if (rows.length !== lonLats.length || rows.some((r) => !r.every(Number.isFinite))) throw new Error(`unexpected cs2cs output: ${out.slice(0, 300)}`);
  return rows;
}

/**
 * EGM96 geoid undulation N (metres) from PROJ with proj-data's egm96_15.gtx,
 * through cct and an explicit vgridshift step, so the named grid is used and
 * nothing silently stands in for it. vgridshift's forward step adds the grid
 * value to z: orthometric 0 in, ellipsoidal height N out (sign checked in
 * the tests against the known positive N over central Europe).
 */
export function projEgm96UndulationsM(lonLats: [number, number][]): number[] {
  const input = lonLats.map(([lon, lat]) => `${lon.toFixed(9)} ${lat.toFixed(9)} 0 0`).join("\n") + "\n";
  const out = execFileSync(
    "cct",
    ["-d", "4", "+proj=pipeline", "+step", "+proj=unitconvert", "+xy_in=deg", "+xy_out=rad", "+step", "+proj=vgridshift", "+grids=egm96_15.gtx", "+multiplier=1", "+step", "+proj=unitconvert", "+xy_in=rad", "+xy_out=deg"],
    { input, encoding: "utf8" },
  );
  const rows = out.trim().split("\n").map((l) => Number(l.trim().split(/\s+/)[2]));
  if (rows.length !== lonLats.length || rows.some((v) => !Number.isFinite(v))) throw new Error(`unexpected cct output: ${out.slice(0, 300)}`);
  return rows;
}

/**
 * Bilinear height at projected points, from the four cell centres around each
 * point as GDAL reads them. GDAL 3.6's gdallocationinfo has no interpolation
 * option (it returns the containing cell), so the four values come from
 * gdallocationinfo and the weights are the textbook bilinear ones on a
 * north-up grid with cell centres at origin + (i + 0.5) * size.
 * `unitToM` converts stored heights to metres (US survey foot: 1200/3937).
 */
export function gdalBilinearM(file: string, xy: [number, number][], unitToM = 1): number[] {
  const info = gdalinfoJson(file);
  const [x0, dx, , y0, , dy] = info.geoTransform;
  const cells: [number, number][] = [];
  const weights: [number, number][] = [];
  for (const [x, y] of xy) {
    const px = (x - x0) / dx - 0.5;
    const py = (y - y0) / dy - 0.5;
    const c = Math.floor(px);
    const r = Math.floor(py);
    weights.push([px - c, py - r]);
    cells.push([c, r], [c + 1, r], [c, r + 1], [c + 1, r + 1]);
  }
  const v = gdalCellValues(file, cells);
  return weights.map(([fx, fy], i) => {
    const [a, b, c, d] = v.slice(4 * i, 4 * i + 4);
    const top = a * (1 - fx) + b * fx;
    const bottom = c * (1 - fx) + d * fx;
    return (top * (1 - fy) + bottom * fy) * unitToM;
  });
}

/** US survey foot in metres: 1200/3937 exactly (NIST; as in EPSG unit 9003). */
export const US_SURVEY_FOOT_M = 1200 / 3937;
