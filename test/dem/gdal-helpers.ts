import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";

/** The parts of `gdalinfo -json` (GDAL, Debian gdal-bin) the DEM tests compare against. */
export interface GdalInfo {
  size: [number, number];
  geoTransform: [number, number, number, number, number, number];
  wgs84Extent?: { coordinates: number[][][] };
  bands: { band: number; type: string; noDataValue?: number | string; scale?: number; offset?: number; block: [number, number]; minimum?: number; maximum?: number; mean?: number; computedMin?: number; computedMax?: number }[];
  metadata?: Record<string, Record<string, string>>;
}

/** Runs `gdalinfo -json [extra] file`. */
export function gdalinfo(file: string, extra: string[] = []): GdalInfo {
  return JSON.parse(execFileSync("gdalinfo", ["-json", ...extra, file], { encoding: "utf8", env: { ...process.env, GDAL_PAM_ENABLED: "NO" } })) as GdalInfo;
}

/**
 * Raw values from `gdallocationinfo -valonly` for many points at once (read from stdin).
 * mode "pixel": points are column/row (fractional allowed); "geoloc": CRS coordinates;
 * "wgs84": longitude/latitude. NaN where GDAL prints nothing (outside the raster).
 */
export function gdalLocationValues(file: string, points: [number, number][], mode: "pixel" | "geoloc" | "wgs84", band = 1): number[] {
  const args = ["-valonly", "-b", String(band)];
  if (mode === "geoloc") args.push("-geoloc");
  if (mode === "wgs84") args.push("-wgs84");
  args.push(file);
  const input = points.map(([a, b]) => `${a.toPrecision(17)} ${b.toPrecision(17)}`).join("\n") + "\n";
  const out = execFileSync("gdallocationinfo", args, { input, encoding: "utf8", env: { ...process.env, GDAL_PAM_ENABLED: "NO" } });
  const lines = out.split("\n").slice(0, points.length);
  return lines.map((l) => (l.trim() === "" ? NaN : Number(l)));
}

/** Deterministic pseudo-random cells (a linear congruential generator) spread over a raster. */
export function sampleCells(width: number, height: number, n: number, seed = 12345): [number, number][] {
  let s = seed >>> 0;
  const next = () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
  const out: [number, number][] = [[0, 0], [width - 1, height - 1], [width - 1, 0], [0, height - 1]];
  while (out.length < n) out.push([Math.floor(next() * width), Math.floor(next() * height)]);
  return out;
}

/**
 * Band statistics freshly computed by GDAL (`gdal_translate -stats` into a VRT, then
 * `gdalinfo -json`), ignoring any statistics stored in the file's own metadata.
 */
export function gdalComputedStats(file: string, band = 1): { minimum: number; maximum: number; mean: number; validPercent: number } {
  const dir = mkdtempSync(join(tmpdir(), "gsdplan-stats-"));
  try {
    const vrt = join(dir, "s.vrt");
    execFileSync("gdal_translate", ["-q", "-stats", "-b", String(band), "-of", "VRT", file, vrt], { env: { ...process.env, GDAL_PAM_ENABLED: "NO" } });
    const b = gdalinfo(vrt).bands[0] as unknown as { minimum: number; maximum: number; mean: number; metadata: Record<string, Record<string, string>> };
    return { minimum: b.minimum, maximum: b.maximum, mean: b.mean, validPercent: Number(b.metadata[""].STATISTICS_VALID_PERCENT) };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
