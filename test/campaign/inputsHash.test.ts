/**
 * The inputs hash: SHA-256 (FIPS 180-4) as coreutils' sha256sum computes it, JSON with
 * sorted keys, and a GDAL VRT's source files as gdalinfo lists them.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { execFileSync } from "node:child_process";
import { copyFileSync, mkdtempSync, readFileSync, rmSync, utimesSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { HAS_GDAL, requireTool } from "../helpers/tools.js";
import { ROOT } from "../e2e/cli.js";
import { resolvePlanOptions } from "../../src/plan/options.js";
import { readCampaignFile } from "../../src/campaign/campaignFile.js";
import { canonicalJson, fileFingerprint, inputFingerprints, inputsHash, SAMPLE_BYTES, vrtSourceFiles } from "../../src/campaign/inputsHash.js";

const HAS_SHA256SUM = requireTool("sha256sum", "coreutils");
const sha256sum = (args: string[], input?: Buffer) =>
  execFileSync("sha256sum", args, input ? { input } : {}).toString().split(/\s/)[0];

describe("canonical JSON", () => {
  it("sorts keys at every depth and keeps list order", () => {
    expect(canonicalJson({ b: 1, a: { d: 2, c: [3, 1] }, u: undefined })).toBe('{"a":{"c":[3,1],"d":2},"b":1}');
    expect(canonicalJson({ a: 1, b: 2 })).toBe(canonicalJson({ b: 2, a: 1 }));
  });
});

describe.skipIf(!HAS_SHA256SUM)("file fingerprints", () => {
  let dir = "";
  beforeAll(() => {
    dir = mkdtempSync(path.join(tmpdir(), "gsdplan-hash-"));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it("hashes a small file whole, as sha256sum does", async () => {
    const dem = path.join(ROOT, "fixtures/truth/gorge_utm.tif");
    const f = await fileFingerprint("dem", dem);
    expect(f).toMatchObject({ role: "dem", path: dem, sha256: sha256sum([dem]) });
  });

  it("fingerprints a large file by size, mtime and its first and last 64 KiB (sha256sum of head -c / tail -c)", async () => {
    const dem = path.join(ROOT, "fixtures/gdal/hills_utm33_f32.tif");
    const bytes = readFileSync(dem);
    expect(bytes.length).toBeGreaterThan(2 * SAMPLE_BYTES);
    // A limit below the file's size stands in for a file of gigabytes.
    const f = await fileFingerprint("dem", dem, 1024);
    expect(f).toMatchObject({
      size: bytes.length,
      headSha256: sha256sum(["-"], bytes.subarray(0, SAMPLE_BYTES)),
      tailSha256: sha256sum(["-"], bytes.subarray(bytes.length - SAMPLE_BYTES)),
    });
    // The same bytes with another modification time count as changed.
    const copy = path.join(dir, "big.tif");
    copyFileSync(dem, copy);
    utimesSync(copy, new Date(2001, 0, 1), new Date(2001, 0, 1));
    const g = await fileFingerprint("dem", copy, 1024);
    expect((g as { mtimeMs: number }).mtimeMs).not.toBe((f as { mtimeMs: number }).mtimeMs);
  });

  it("changes when one byte of an input changes, and not when nothing does; a missing file is recorded, not thrown", async () => {
    const c = await readCampaignFile(path.join(ROOT, "fixtures/campaign/three-sites.yaml"));
    const area = path.join(dir, "site.geojson");
    copyFileSync(path.join(ROOT, "fixtures/truth/gorge_utm-site.geojson"), area);
    const options = { ...resolvePlanOptions(c.sites[0].planObject, {}, c.dir), area };
    const h1 = await inputsHash(options, "0.1.0");
    expect(h1).toMatch(/^sha256:[0-9a-f]{64}$/);
    expect(await inputsHash(options, "0.1.0")).toBe(h1);
    const text = readFileSync(area, "utf8");
    // The last digit of the outline moved by one.
    const moved = text.replace(/\d(?=\D*$)/, (d) => String((Number(d) + 1) % 10));
    expect(moved).not.toBe(text);
    writeFileSync(area, moved);
    const h2 = await inputsHash(options, "0.1.0");
    expect(h2).not.toBe(h1);
    // Another gsdplan version may plan differently: its outputs are not current.
    expect(await inputsHash(options, "0.2.0")).not.toBe(h2);
    // Options: one key changed.
    expect(await inputsHash({ ...options, minImages: 4 }, "0.1.0")).not.toBe(h2);
    const missing = await inputFingerprints({ ...options, area: path.join(dir, "nope.geojson") });
    expect(missing[1]).toEqual({ role: "area", path: path.join(dir, "nope.geojson"), missing: true });
  });

  it("takes a folder of tiles as the .tif/.tiff files in it, by name, and an http(s) DEM by its URL", async () => {
    const c = await readCampaignFile(path.join(ROOT, "fixtures/campaign/three-sites.yaml"));
    const options = resolvePlanOptions(c.sites[0].planObject, {}, c.dir);
    const tiles = path.join(dir, "tiles");
    execFileSync("mkdir", ["-p", tiles]);
    copyFileSync(path.join(ROOT, "fixtures/truth/gorge_utm.tif"), path.join(tiles, "b.tif"));
    copyFileSync(path.join(ROOT, "fixtures/truth/hole_utm.tif"), path.join(tiles, "a.TIFF"));
    writeFileSync(path.join(tiles, "notes.txt"), "not a tile");
    const fps = await inputFingerprints({ ...options, dem: [tiles, "https://example.org/dem.tif"] });
    expect(fps.map((f) => ("path" in f ? path.basename(f.path) : f.url))).toEqual(["a.TIFF", "b.tif", "https://example.org/dem.tif", "gorge_utm-site.geojson"]);
    expect((fps[0] as { sha256: string }).sha256).toBe(sha256sum([path.join(tiles, "a.TIFF")]));
  });
});

describe.skipIf(!HAS_GDAL)("a GDAL VRT's source files", () => {
  let dir = "";
  beforeAll(() => {
    dir = mkdtempSync(path.join(tmpdir(), "gsdplan-vrt-"));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it("are the files gdalinfo lists for it (gdalbuildvrt writes them relative to the VRT)", () => {
    const sub = path.join(dir, "tiles");
    execFileSync("mkdir", ["-p", sub]);
    for (const n of ["hole_utm.tif", "gorge_utm.tif"]) copyFileSync(path.join(ROOT, "fixtures/truth", n), path.join(sub, n));
    const vrt = path.join(dir, "mosaic.vrt");
    // Two tiles in different CRSs cannot share a VRT; one tile twice under two names can.
    copyFileSync(path.join(sub, "gorge_utm.tif"), path.join(sub, "gorge_copy.tif"));
    execFileSync("gdalbuildvrt", ["-q", vrt, path.join(sub, "gorge_utm.tif"), path.join(sub, "gorge_copy.tif")]);
    const info = JSON.parse(execFileSync("gdalinfo", ["-json", vrt], { encoding: "utf8" })) as { files: string[] };
    const listed = info.files.filter((f) => f !== vrt).map((f) => path.resolve(f)).sort();
    expect(listed).toHaveLength(2);
    expect(vrtSourceFiles(readFileSync(vrt, "utf8"), dir).sort()).toEqual(listed);
  });
});
