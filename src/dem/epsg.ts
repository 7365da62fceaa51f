import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import { dirname, join } from "node:path";

/** One EPSG entry as epsg-index stores it (node_modules/epsg-index/s/<code>.json). */
export interface EpsgEntry {
  code: string;
  kind: string;
  name: string;
  proj4: string;
  unit: string | null;
}

let indexDir: string | null = null;

function epsgIndexDir(): string {
  if (indexDir === null) {
    const require = createRequire(import.meta.url);
    indexDir = join(dirname(require.resolve("epsg-index/package.json")), "s");
  }
  return indexDir;
}

/**
 * Looks one EPSG code up in epsg-index's per-code files (one small file read,
 * never the whole table). Returns null for codes the EPSG dataset does not have.
 * @example epsgEntry(32633)?.proj4 // "+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs +type=crs"
 */
export function epsgEntry(code: number): EpsgEntry | null {
  if (!Number.isInteger(code) || code <= 0 || code >= 1_000_000) return null;
  try {
    const text = readFileSync(join(epsgIndexDir(), `${code}.json`), "utf8");
    const e = JSON.parse(text) as EpsgEntry;
    return e;
  } catch {
    return null;
  }
}
