import { describe, it, expect, afterAll } from "vitest";
import { execFileSync, spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { HAS_GDAL } from "../helpers/tools.js";
import { builtModule } from "../helpers/dist.js";
import type * as Source from "../../src/dem/source.js";
import type * as Window from "../../src/dem/window.js";
import { openSync, closeSync } from "node:fs";
import { TAKEN_HERE, takeBlocks } from "../../src/dem/blockTake.js";
import type { BlockJob, BlockRef } from "../../src/dem/blocksInBackground.js";

// Reference: GDAL (Debian's gdal-bin) writes the DEMs and reads them back raw (ENVI format).
// A large window of a local Deflate Float32 DEM with the floating-point predictor has its
// blocks taken one by one by a worker thread (dem/blockWorker.ts, from the build) and the
// calling thread (dem/blockTake.ts): every cell must still equal GDAL's sample, and a damaged
// block must still be refused naming the block, whichever thread took it.
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
        // Two threads asked for: the worker takes blocks whatever the window's size.
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

  it("refuses a damaged block, naming it, whichever thread takes it", async () => {
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

describe.skipIf(!HAS_GDAL)("blocks taken from a shared counter (takeBlocks)", () => {
  const co = ["-co", "TILED=YES", "-co", "BLOCKXSIZE=64", "-co", "BLOCKYSIZE=64", "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=3"];
  const file = join(dir, "take.tif");
  const damaged = join(dir, "take-damaged.tif");
  const setUp = () => {
    execFileSync("gdal_translate", ["-q", ...co, SOURCE, file], { env: GDAL_ENV });
    const bytes = readFileSync(file);
    const [offset] = tileBytes(bytes, 100);
    for (let i = offset + 20; i < offset + 84; i++) bytes[i] ^= 0x5a;
    writeFileSync(damaged, bytes);
  };
  /** Every tile of the 1000 x 800 raster (16 x 13 tiles of 64) as a block of a job over the whole raster. */
  const jobOf = (path: string, start: number): BlockJob => {
    const bytes = readFileSync(path);
    const blocks: BlockRef[] = [];
    for (let ty = 0; ty < 13; ty++) for (let tx = 0; tx < 16; tx++) {
      const [offset, length] = tileBytes(bytes, ty * 16 + tx);
      blocks.push({ offset, length, tx, ty, need: 64 * 64 * 4 });
    }
    const next = new Int32Array(new SharedArrayBuffer(4));
    next[0] = start;
    return {
      path, blocks, tw: 64, th: 64, win: { col0: 0, col1: 1000, row0: 0, row1: 800 }, sourceHeight: 800, wc0: 0, wr0: 0, outW: 1000,
      heights: new Float32Array(new SharedArrayBuffer(4 * 1000 * 800)).fill(-1), nd: NaN,
      next, taken: new Uint8Array(new SharedArrayBuffer(blocks.length)),
    };
  };
  const take = (job: BlockJob, failed?: (k: number) => void) => {
    const fd = openSync(job.path, "r");
    try {
      takeBlocks(job, fd, TAKEN_HERE, failed);
    } finally {
      closeSync(fd);
    }
  };

  it("places the blocks from the counter on, each marked as taken, GDAL's samples in their cells", () => {
    setUp();
    const ref = gdalSamples(file);
    // The counter at 112: another thread took the first 112 tiles (tile rows 0 to 6, 448 rows of cells).
    const job = jobOf(file, 112);
    take(job);
    expect(Array.from(job.taken.subarray(0, 112)).every((t) => t === 0)).toBe(true);
    expect(Array.from(job.taken.subarray(112)).every((t) => t === TAKEN_HERE)).toBe(true);
    expect(job.next[0]).toBeGreaterThanOrEqual(208);
    let differ = 0;
    for (let i = 0; i < ref.length; i++) {
      const row = Math.floor(i / 1000);
      const want = row < 7 * 64 ? -1 : ref[i];
      if (job.heights[i] !== want) differ++;
    }
    expect(differ).toBe(0);
  });

  it("hands a damaged block to `failed` and goes on, or throws without it", () => {
    const ref = gdalSamples(file);
    const failed: number[] = [];
    const job = jobOf(damaged, 0);
    take(job, (k) => failed.push(k));
    expect(failed).toEqual([100]);
    // Every other tile is placed: a cell of tile 101 (column 5, row 6) and of the last.
    for (const i of [6 * 64 * 1000 + 5 * 64, 799 * 1000 + 999]) expect(job.heights[i]).toBe(ref[i]);
    expect(() => take(jobOf(damaged, 0))).toThrow();
  });
});
