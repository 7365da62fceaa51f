/**
 * GDAL's own bilinear ground at many points, the reference for the checks' ground.
 *
 * GDAL 3.6 (Debian 12's gdal-bin) has no `gdallocationinfo -r` (from memory it came in
 * GDAL 3.10), so the points are the cell centres of a finer grid that `gdalwarp -r
 * bilinear` fills from the DEM in the DEM's own CRS: when the target cells are smaller
 * than the source's, GDAL's warp kernel is plain bilinear interpolation between source
 * cell centres (the same value `gdallocationinfo -r bilinear` gives). The target is read
 * back with `gdal_translate -of XYZ` (cell centre x, y, value per line).
 */
import { execFileSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";

const ENV = { ...process.env, GDAL_PAM_ENABLED: "NO" };

/**
 * Bilinear values at the centres of a `nx` x `ny` grid over [west, south, east, north] in
 * the DEM's CRS. No -t_srs: the target keeps the source's CRS, vertical part included
 * (naming only the horizontal CRS makes gdalwarp shift EGM96 heights to the ellipsoid).
 */
export function gdalBilinearGrid(dem: string, box: [number, number, number, number], nx: number, ny: number): { x: number; y: number; z: number }[] {
  const dir = mkdtempSync(join(tmpdir(), "gsdplan-verify-gdal-"));
  try {
    const warped = join(dir, "w.tif");
    execFileSync("gdalwarp", ["-q", "-r", "bilinear", "-et", "0", "-ot", "Float64", "-te", ...box.map((v) => v.toPrecision(17)), "-ts", String(nx), String(ny), "-dstnodata", "-99999", dem, warped], { env: ENV });
    const xyz = join(dir, "w.xyz");
    execFileSync("gdal_translate", ["-q", "-of", "XYZ", warped, xyz], { env: ENV });
    return readFileSync(xyz, "utf8")
      .trim()
      .split("\n")
      .map((l) => l.trim().split(/\s+/).map(Number))
      .filter((v) => v[2] !== -99999)
      .map(([x, y, z]) => ({ x, y, z }));
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** UTM (or any projected CRS) points to WGS84 longitude/latitude through PROJ's cs2cs. */
export function cs2csToLonLat(srs: string, pts: { x: number; y: number }[]): [number, number][] {
  const out = execFileSync("cs2cs", ["-f", "%.12f", srs, "EPSG:4326"], { input: pts.map((p) => `${p.x} ${p.y}`).join("\n") + "\n", encoding: "utf8", env: ENV });
  // EPSG:4326 in PROJ's authority axis order: latitude first.
  return out.trim().split("\n").map((l) => {
    const [lat, lon] = l.trim().split(/\s+/).map(Number);
    return [lon, lat] as [number, number];
  });
}

/** Heights of a whole (small) raster via `gdal_translate -of XYZ`, row-major from the north-west. */
export function gdalHeights(dem: string): { width: number; height: number; z: Float64Array } {
  const info = JSON.parse(execFileSync("gdalinfo", ["-json", dem], { encoding: "utf8", env: ENV }));
  const [width, height] = info.size as [number, number];
  const dir = mkdtempSync(join(tmpdir(), "gsdplan-verify-xyz-"));
  try {
    const xyz = join(dir, "a.xyz");
    execFileSync("gdal_translate", ["-q", "-of", "XYZ", dem, xyz], { env: ENV });
    const lines = readFileSync(xyz, "utf8").trim().split("\n");
    const z = new Float64Array(width * height);
    lines.forEach((l, i) => (z[i] = Number(l.trim().split(/\s+/)[2])));
    return { width, height, z };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
