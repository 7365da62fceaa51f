/**
 * A GDAL-written GeoTIFF whose compressed bytes inside one tile (or strip) are
 * damaged, through `gsdplan plan`, `gsdplan inspect` and the library: one line
 * naming the file and the block, exit code 2, nothing written. GDAL (libtiff)
 * reading the same file is the outside reference: it fails on the same block.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { execFileSync, spawnSync } from "node:child_process";
import { readFileSync, renameSync, writeFileSync } from "node:fs";
import { HAS_GDAL } from "../helpers/tools.js";
import { InputFileError } from "../../src/errors.js";
import path from "node:path";
import { cliAsync, ensureBuilt, expectNothingWritten, expectOneLineError, expectRefusedEverywhere, readWholeDem, smallScenario, tempDir, userErrorOf } from "./helpers.js";

beforeAll(() => ensureBuilt(), 120_000);

/**
 * Offsets and byte counts of every block, read from the first IFD of a
 * little-endian classic TIFF (TIFF 6.0 section 2 for the header and IFD
 * entries, section 15 for TileOffsets 324 / TileByteCounts 325, section 3 for
 * StripOffsets 273 / StripByteCounts 279; types SHORT 3, LONG 4).
 */
function blockTable(tiff: Buffer): { offsets: number[]; counts: number[]; tiled: boolean } {
  expect(tiff.toString("latin1", 0, 2)).toBe("II");
  expect(tiff.readUInt16LE(2)).toBe(42);
  const ifd = tiff.readUInt32LE(4);
  const n = tiff.readUInt16LE(ifd);
  const entries = new Map<number, number[]>();
  for (let i = 0; i < n; i++) {
    const at = ifd + 2 + 12 * i;
    const tag = tiff.readUInt16LE(at), type = tiff.readUInt16LE(at + 2), count = tiff.readUInt32LE(at + 4);
    if (type !== 3 && type !== 4) continue;
    const size = type === 3 ? 2 : 4;
    const base = count * size <= 4 ? at + 8 : tiff.readUInt32LE(at + 8);
    entries.set(tag, Array.from({ length: count }, (_, k) => (size === 2 ? tiff.readUInt16LE(base + k * 2) : tiff.readUInt32LE(base + k * 4))));
  }
  const tiled = entries.has(324);
  return { offsets: entries.get(tiled ? 324 : 273)!, counts: entries.get(tiled ? 325 : 279)!, tiled };
}

/** Flips 64 bytes from a quarter into block `index` (XOR 0x5a, so every byte changes). */
function damageBlock(file: string, index: number): { offset: number; count: number } {
  const bytes = readFileSync(file);
  const { offsets, counts } = blockTable(bytes);
  const offset = offsets[index], count = counts[index];
  for (let i = Math.floor(count / 4); i < Math.floor(count / 4) + 64; i++) bytes[offset + i] ^= 0x5a;
  writeFileSync(file, bytes);
  return { offset, count };
}

/** GDAL's own complaint reading every block (gdalinfo -checksum); empty when it reads them all. */
function gdalReadErrors(file: string): string {
  const r = spawnSync("gdalinfo", ["-checksum", file], { encoding: "utf8", env: { ...process.env, GDAL_PAM_ENABLED: "NO" } });
  return r.stderr;
}

/** Re-encodes the scenario's DEM with other GeoTIFF creation options (gdal_translate). */
function recode(dem: string, co: string[]): void {
  const tmp = `${dem}.recode.tif`;
  execFileSync("gdal_translate", ["-q", ...co.flatMap((c) => ["-co", c]), dem, tmp], { env: { ...process.env, GDAL_PAM_ENABLED: "NO" } });
  renameSync(tmp, dem);
}

const terrain = (x: number, y: number) => 300 + 0.05 * (x - 500000) + 20 * Math.sin(y / 50);

describe.skipIf(!HAS_GDAL)("damaged compressed data inside one DEM block", () => {
  // 200 x 200 cells in 64 x 64 tiles: 4 x 4 tiles; tile 5 (column 1, row 1) lies under the site.
  for (const [name, co] of [
    ["Deflate", ["TILED=YES", "BLOCKXSIZE=64", "BLOCKYSIZE=64", "COMPRESS=DEFLATE"]],
    ["LZW with the floating-point predictor", ["TILED=YES", "BLOCKXSIZE=64", "BLOCKYSIZE=64", "COMPRESS=LZW", "PREDICTOR=3"]],
  ] as const) {
    it(`${name}: GDAL fails on tile (1, 1); so do plan, inspect and the library, naming the tile`, async () => {
      const dir = tempDir(`corrupt-${co[3].slice(9).toLowerCase()}`);
      const s = smallScenario(dir, terrain);
      recode(s.dem, [...co]);
      const { offset, count } = damageBlock(s.dem, 5);
      // libtiff reports the block as "X offset 1, Y offset 1" (GDAL's block column and row).
      expect(gdalReadErrors(s.dem)).toMatch(/IReadBlock failed at X offset 1, Y offset 1/);
      const pattern = new RegExp(`dem\\.tif: damaged compressed data in tile 5 \\(column 1, row 1 of 4 x 4 tiles; ${count} bytes at byte offset ${offset}\\): \\S`);
      await expectRefusedEverywhere(s.planFile, s.dem, pattern);
      // Through the library the error is the file's: an InputFileError naming it.
      const e = await userErrorOf(() => readWholeDem(s.dem));
      expect(e).toBeInstanceOf(InputFileError);
      expect((e as InputFileError).file).toBe(s.dem);
    });
  }

  it("LZW in strips of 16 rows: GDAL fails on strip 6; so do we, naming it and its rows", async () => {
    const dir = tempDir("corrupt-lzw-strips");
    const s = smallScenario(dir, terrain);
    recode(s.dem, ["TILED=NO", "BLOCKYSIZE=16", "COMPRESS=LZW"]);
    expect(blockTable(readFileSync(s.dem)).tiled).toBe(false);
    const { offset, count } = damageBlock(s.dem, 6);
    // Strip 6 holds rows 96 to 111, GDAL's block row 6.
    expect(gdalReadErrors(s.dem)).toMatch(/IReadBlock failed at X offset 0, Y offset 6/);
    await expectRefusedEverywhere(s.planFile, s.dem, new RegExp(`dem\\.tif: damaged compressed data in strip 6 \\(rows 96 to 111; ${count} bytes at byte offset ${offset}\\)`));
  });

  it("Zstandard: refused in one line instead of decoding for ever", async () => {
    const dir = tempDir("corrupt-zstd");
    const s = smallScenario(dir, terrain);
    recode(s.dem, ["TILED=YES", "BLOCKXSIZE=64", "BLOCKYSIZE=64", "COMPRESS=ZSTD"]);
    const before = readFileSync(s.dem);
    const { offset, count } = damageBlock(s.dem, 5);
    // GDAL's frames carry no checksum (the damage is in the literals here), so libzstd and
    // GDAL may read the tile without complaint; the reference is that the tile's bytes changed.
    expect(readFileSync(s.dem).subarray(offset, offset + count).equals(before.subarray(offset, offset + count))).toBe(false);
    const pattern = /dem\.tif: damaged compressed data in tile 5 \(column 1, row 1 of 4 x 4 tiles/;
    // Child processes only (the CLI, and the library in a child): a regression here is a
    // decoder looping for ever, which must fail this test, not hang the whole run.
    const out = path.join(dir, "out");
    const [plan, inspect] = await Promise.all([cliAsync(["plan", s.planFile, "--out", out, "--quiet"]), cliAsync(["inspect", s.dem])]);
    expectOneLineError(plan, pattern);
    expectOneLineError(inspect, pattern);
    expectNothingWritten(out);
    const script = `import { openDem } from "./dist/dem/source.js"; import { readCells } from "./dist/dem/window.js";
      const d = await openDem(process.argv[1]);
      try { await readCells(d, { col0: 0, row0: 0, col1: d.width, row1: d.height }); console.log("read"); }
      catch (e) { console.log(e.name + ": " + e.message); } finally { await d.close(); }`;
    const lib = spawnSync(process.execPath, ["--input-type=module", "-e", script, s.dem], { encoding: "utf8", timeout: 60_000 });
    expect(lib.stdout).toMatch(/^InputFileError: .*dem\.tif: damaged compressed data in tile 5 /);
  });
});
