import { execFileSync } from "node:child_process";
import { HAS_PROJ, requireTool } from "../helpers/tools.js";

/** PROJ's cs2cs is present (the shared probe: `cs2cs -l`, since it has no --version). */
export const HAS_CS2CS = HAS_PROJ;
export const HAS_CCT = requireTool("cct", "proj-bin", ["--version"]);

/**
 * Run PROJ's cs2cs (Debian proj-bin) on many points at once. `from` and `to`
 * are proj strings (so axis order is always lon/lat, x/y); returns the first
 * two output columns of each line.
 */
export function cs2cs(from: string, to: string, pts: [number, number][], decimals = 6): [number, number][] {
  const input = pts.map(([a, b]) => `${a} ${b}`).join("\n") + "\n";
  const args = ["-f", `%.${decimals}f`, ...from.split(/\s+/), "+to", ...to.split(/\s+/)];
  const out = execFileSync("cs2cs", args, { input, encoding: "utf8" });
  return parseColumns(out, pts.length, 2) as [number, number][];
}

/**
 * EGM96 undulation N from PROJ (Debian proj-bin + proj-data's egm96_15.gtx),
 * through cct and an explicit vgridshift pipeline so that the grid file is
 * named and no grid-lookup fallback can stand in for it. vgridshift's
 * forward step adds the grid value to z, so orthometric 0 becomes h = N.
 */
export function projEgm96UndulationsM(lonLats: [number, number][]): number[] {
  const input = lonLats.map(([lon, lat]) => `${lon} ${lat} 0 0`).join("\n") + "\n";
  const args = [
    "-d", "6",
    "+proj=pipeline",
    "+step", "+proj=unitconvert", "+xy_in=deg", "+xy_out=rad",
    "+step", "+proj=vgridshift", "+grids=egm96_15.gtx", "+multiplier=1",
    "+step", "+proj=unitconvert", "+xy_in=rad", "+xy_out=deg",
  ];
  const out = execFileSync("cct", args, { input, encoding: "utf8" });
  return parseColumns(out, lonLats.length, 3).map((r) => r[2]);
}

function parseColumns(out: string, n: number, cols: number): number[][] {
  const rows = out
    .trim()
    .split("\n")
    .map((l) => l.trim().split(/\s+/).slice(0, cols).map(Number));
  if (rows.length !== n || rows.some((r) => r.length < cols || r.some((v) => !Number.isFinite(v)))) {
    throw new Error(`unexpected PROJ output:\n${out.slice(0, 500)}`);
  }
  return rows;
}

/** Small seeded generator (mulberry32) so the "random" points are the same on every run. */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
