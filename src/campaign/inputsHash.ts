/**
 * The inputs hash that tells a re-run whether a site's outputs are current: SHA-256
 * (FIPS 180-4) over the resolved plan options as JSON with sorted keys, the gsdplan
 * version, and a fingerprint of every input file (DEM, site outline, keep-out zones).
 */
import { createHash } from "node:crypto";
import { createReadStream } from "node:fs";
import { open, readFile, readdir, stat } from "node:fs/promises";
import path from "node:path";
import type { PlanOptions } from "../plan/options.js";

/**
 * Files up to this size are hashed whole. Larger ones (national DEM tiles run to
 * gigabytes) are fingerprinted by size, modification time and the SHA-256 of their
 * first and last SAMPLE_BYTES: reading gigabytes on every re-run would cost more than
 * the skip saves, and a rewritten GeoTIFF changes its header (first block) or its last
 * tiles and offsets, or at least its mtime.
 */
export const FULL_HASH_MAX_BYTES = 128 * 1024 * 1024;
export const SAMPLE_BYTES = 64 * 1024;

/** Bump when the hashed material changes shape, so older hashes stop matching. */
const HASH_FORMAT = 1;

/** How one input was fingerprinted. */
export type InputFingerprint =
  | { role: string; path: string; sha256: string; size: number }
  | { role: string; path: string; size: number; mtimeMs: number; headSha256: string; tailSha256: string }
  | { role: string; path: string; missing: true }
  // An http(s) DEM is not fetched for the hash: its URL stands for it (use --force after it changes).
  | { role: string; url: string };

/**
 * JSON with every object's keys sorted, so equal options give equal text whatever
 * order they were built in.
 * @example canonicalJson({ b: 1, a: { d: 2, c: [3, 1] } }) // '{"a":{"c":[3,1],"d":2},"b":1}'
 */
export function canonicalJson(value: unknown): string {
  return JSON.stringify(sortKeys(value));
}

function sortKeys(v: unknown): unknown {
  if (Array.isArray(v)) return v.map(sortKeys);
  if (typeof v === "object" && v !== null) {
    const out: Record<string, unknown> = {};
    for (const k of Object.keys(v).sort()) {
      const x = (v as Record<string, unknown>)[k];
      if (x !== undefined) out[k] = sortKeys(x);
    }
    return out;
  }
  return v;
}

/** Fingerprints already taken in this run, by role and path: sites often share one DEM. */
export type FingerprintCache = Map<string, Promise<InputFingerprint>>;

/**
 * The inputs hash of a site: `sha256:<hex>`.
 * @example await inputsHash(options, "0.1.0", new Map()) // "sha256:3f0c..."
 */
export async function inputsHash(options: PlanOptions, toolVersion: string, cache: FingerprintCache = new Map()): Promise<string> {
  const inputs = await inputFingerprints(options, cache);
  const material = canonicalJson({ format: HASH_FORMAT, toolVersion, options, inputs });
  return `sha256:${createHash("sha256").update(material).digest("hex")}`;
}

/**
 * Fingerprints of every file a plan reads, in a fixed order: DEM sources (a folder
 * by the files in it, a GDAL VRT with the files it names), the site outline, the
 * keep-out zone files. A missing file is recorded as missing: planning will say why.
 * @example (await inputFingerprints(options)).map((f) => f.role) // ["dem", "area"]
 */
export async function inputFingerprints(options: PlanOptions, cache: FingerprintCache = new Map()): Promise<InputFingerprint[]> {
  const once = (role: string, file: string) => {
    const key = `${role}\u0000${file}`;
    let p = cache.get(key);
    if (!p) cache.set(key, (p = fileFingerprint(role, file)));
    return p;
  };
  const out: InputFingerprint[] = [];
  for (const d of Array.isArray(options.dem) ? options.dem : [options.dem]) out.push(...(await demFingerprints(d, once)));
  out.push(await once("area", options.area));
  for (const k of options.keepOut) out.push(await once("keepOut", k));
  return out;
}

async function demFingerprints(source: string, fingerprint: (role: string, file: string) => Promise<InputFingerprint>): Promise<InputFingerprint[]> {
  if (/^https?:\/\//i.test(source)) return [{ role: "dem", url: source }];
  const st = await stat(source).catch(() => null);
  if (st?.isDirectory()) {
    // The files the DEM reader takes from a folder: every .tif/.tiff directly in it.
    const names = (await readdir(source, { withFileTypes: true })).filter((e) => e.isFile() && /\.tiff?$/i.test(e.name)).map((e) => e.name).sort();
    const out: InputFingerprint[] = [];
    for (const n of names) out.push(await fingerprint("dem", path.join(source, n)));
    return out;
  }
  const main = await fingerprint("dem", source);
  if (!st || path.extname(source).toLowerCase() !== ".vrt") return [main];
  const out = [main];
  for (const ref of vrtSourceFiles(await readFile(source, "utf8"), path.dirname(source))) {
    out.push(ref.startsWith("/vsi") ? { role: "dem", url: ref } : await fingerprint("dem", ref));
  }
  return out;
}

/**
 * The files a GDAL VRT names in its SourceFilename elements, absolute (relativeToVRT="1"
 * paths against the VRT's folder, as GDAL's VRT format documentation says); /vsi paths kept.
 * @example vrtSourceFiles('<SourceFilename relativeToVRT="1">a.tif</SourceFilename>', "/d") // ["/d/a.tif"]
 */
export function vrtSourceFiles(xml: string, vrtDir: string): string[] {
  const out = new Set<string>();
  for (const m of xml.matchAll(/<SourceFilename([^>]*)>([^<]*)<\/SourceFilename>/g)) {
    const name = decodeXml(m[2].trim());
    if (!name) continue;
    const relative = /relativeToVRT\s*=\s*["']1["']/.test(m[1]);
    out.add(name.startsWith("/vsi") ? name : relative ? path.resolve(vrtDir, name) : path.resolve(name));
  }
  return [...out];
}

function decodeXml(s: string): string {
  return s.replace(/&(lt|gt|quot|apos|amp);/g, (_, e: string) => ({ lt: "<", gt: ">", quot: '"', apos: "'", amp: "&" })[e]!);
}

/**
 * One file's fingerprint: its whole SHA-256 up to FULL_HASH_MAX_BYTES, else size,
 * mtime and the SHA-256 of its first and last SAMPLE_BYTES.
 * @example await fileFingerprint("area", "/data/site.geojson") // { role: "area", path: ..., sha256: ..., size: 512 }
 */
export async function fileFingerprint(role: string, file: string, maxFullBytes = FULL_HASH_MAX_BYTES): Promise<InputFingerprint> {
  const st = await stat(file).catch(() => null);
  if (!st || !st.isFile()) return { role, path: file, missing: true };
  if (st.size <= maxFullBytes) return { role, path: file, sha256: await sha256OfFile(file), size: st.size };
  const fh = await open(file, "r");
  try {
    const n = Math.min(SAMPLE_BYTES, st.size);
    const head = Buffer.alloc(n);
    const tail = Buffer.alloc(n);
    await fh.read(head, 0, n, 0);
    await fh.read(tail, 0, n, st.size - n);
    const h = (b: Buffer) => createHash("sha256").update(b).digest("hex");
    return { role, path: file, size: st.size, mtimeMs: st.mtimeMs, headSha256: h(head), tailSha256: h(tail) };
  } finally {
    await fh.close();
  }
}

async function sha256OfFile(file: string): Promise<string> {
  const hash = createHash("sha256");
  for await (const chunk of createReadStream(file)) hash.update(chunk as Buffer);
  return hash.digest("hex");
}
