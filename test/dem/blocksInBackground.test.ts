import { describe, it, expect, afterAll } from "vitest";
import { execFileSync, spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { HAS_GDAL } from "../helpers/tools.js";
import { builtModule } from "../helpers/dist.js";
import type * as Source from "../../src/dem/source.js";
import type * as Window from "../../src/dem/window.js";

// Reference: GDAL (Debian's gdal-bin) writes the DEMs and reads them back raw (ENVI format).
// A large window of a local Deflate Float32 DEM with the floating-point predictor has the
// later half of its blocks decoded on a worker thread (dem/blockWorker.ts, from the build):
// every cell must still equal GDAL's sample, and a damaged block among the worker's must
// still be refused naming the block.
const built = builtModule("dem/tiles.js", ["blockWorker.js"]);
const SOURCE = "fixtures/gdal/hills_utm33_f32.tif"; // 1000 x 800 Float32
const GDAL_ENV = { ...process.env, GDAL_PAM_ENABLED: "NO" };
const dir = mkdtempSync(join(tmpdir(), "gsdplan-blocks-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const load = async () => ({
  source: (await import(new URL("../../dist/dem/source.js", import.meta.url).href)) as typeof Source,
  window: (await import(new URL("../../dist/dem/window.js", import.meta.url).href)) as typeof Window,
});

function gdalSamples(file: string): Float32Array {
  const raw = join(dir, `${file.split("/").pop()}.bin`);
  execFileSync("gdal_translate", ["-q", "-of", "ENVI", file, raw], { env: GDAL_ENV });
  const b = readFileSync(raw);
  return new Float32Array(b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength));
}

/** Offset and byte count of tile `index` in a little-endian classic TIFF whose tile tables are LONGs. */
function tileBytes(tiff: Buffer, index: number): [number, number] {
  expect(tiff.toString("latin1", 0, 2)).toBe("II");
  const ifd = tiff.readUInt32LE(4);
  const found = new Map<number, number>();
  for (let i = 0; i < tiff.readUInt16LE(ifd); i++) {
    const at = ifd + 2 + 12 * i;
    const tag = tiff.readUInt16LE(at);
    if ((tag === 324 || tag === 325) && tiff.readUInt16LE(at + 2) === 4) found.set(tag, tiff.readUInt32LE(tiff.readUInt32LE(at + 8) + 4 * index));
  }
  return [found.get(324)!, found.get(325)!];
}

describe.skipIf(!HAS_GDAL || !built.available)("a window's blocks decoded on a worker thread", () => {
  const co = ["-co", "TILED=YES", "-co", "BLOCKXSIZE=64", "-co", "BLOCKYSIZE=64", "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=3"];
  for (const [label, args] of [
    ["208 tiles", co],
    ["208 tiles, 88 of them sparse nodata", ["-srcwin", "-300", "-200", "1000", "800", "-a_nodata", "-9999", "-co", "SPARSE_OK=TRUE", ...co]],
  ] as const) {
    it(`gives GDAL's heights in every cell (${label})`, async () => {
      const file = join(dir, `${label.length}.tif`);
      execFileSync("gdal_translate", ["-q", ...args, SOURCE, file], { env: GDAL_ENV });
      const ref = gdalSamples(file);
      const { source, window } = await load();
      const dem = await source.openDem(file);
      try {
        // Two threads asked for: the worker takes half the blocks whatever the window's size.
        const grid = await window.readWindow(dem, window.nativeBounds(dem), { threads: 2 });
        expect(grid.heights.buffer).toBeInstanceOf(SharedArrayBuffer);
        let differ = 0;
        let nodata = 0;
        for (let i = 0; i < ref.length; i++) {
          if (ref[i] === -9999) {
            nodata++;
            if (!Number.isNaN(grid.heights[i])) differ++;
          } else if (grid.heights[i] !== ref[i]) differ++;
        }
        expect(differ).toBe(0);
        expect(nodata > 0).toBe(label.includes("sparse"));
      } finally {
        await dem.close();
      }
    });
  }

  it("refuses a damaged block among the worker's, naming it, as the calling thread does", async () => {
    const file = join(dir, "damaged.tif");
    execFileSync("gdal_translate", ["-q", ...co, SOURCE, file], { env: GDAL_ENV });
    // The last tile (column 15, row 12 of 16 x 13, index 207): its bytes from the TileOffsets
    // and TileByteCounts tags (324, 325; TIFF 6.0 sections 2 and 15) of the first IFD.
    const bytes = readFileSync(file);
    const [offset, size] = tileBytes(bytes, 207);
    expect(size).toBeGreaterThan(100);
    for (let i = offset + 20; i < offset + 84; i++) bytes[i] ^= 0x5a;
    writeFileSync(file, bytes);
    // GDAL (libtiff) fails on that block too.
    const r = spawnSync("gdalinfo", ["-checksum", file], { encoding: "utf8", env: GDAL_ENV });
    expect(r.stderr).toMatch(/IReadBlock failed at X offset 15, Y offset 12/);
    const { source, window } = await load();
    const dem = await source.openDem(file);
    try {
      await expect(window.readWindow(dem, window.nativeBounds(dem), { threads: 2 })).rejects.toThrow(/damaged compressed data in tile 207 \(column 15, row 12 of 16 x 13 tiles/);
    } finally {
      await dem.close();
    }
  });
});
