import { describe, it, expect, afterAll } from "vitest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { HAS_GDAL } from "../helpers/tools.js";
import { openDem, type DemSource } from "../../src/dem/source.js";
import { readWindow, nativeBounds } from "../../src/dem/window.js";

// Reference: GDAL (Debian's gdal-bin) writes each DEM from a GDAL-written fixture with the
// TIFF predictors (TIFF 6.0 section 14: horizontal differencing; Adobe's floating-point
// predictor 3: byte planes, most significant first, differenced) and reads it back as raw
// samples (ENVI format: a headerless little-endian dump). Every cell of our whole-file
// window must equal GDAL's sample, bit for bit.
const SOURCE = "fixtures/gdal/hills_utm33_f32.tif"; // 1000 x 800 Float32
const GDAL_ENV = { ...process.env, GDAL_PAM_ENABLED: "NO" };

interface Case {
  label: string;
  args: string[];
  band?: number;
  type: "Float32" | "Float64" | "Int16";
  /** The file's nodata value: such cells are NaN (no ground) in our window. */
  nodata?: number;
}

const CASES: Case[] = [
  { label: "Float32, predictor 3, Deflate, 64 x 64 tiles", type: "Float32", args: ["-co", "TILED=YES", "-co", "BLOCKXSIZE=64", "-co", "BLOCKYSIZE=64", "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=3"] },
  { label: "Float32, predictor 3, LZW, strips of 7 rows (the last one short)", type: "Float32", args: ["-co", "BLOCKYSIZE=7", "-co", "COMPRESS=LZW", "-co", "PREDICTOR=3"] },
  { label: "Float32, predictor 3, Deflate, 3 bands pixel-interleaved, band 2", type: "Float32", band: 2, args: ["-b", "1", "-b", "1", "-b", "1", "-scale_2", "0", "1000", "0", "1000", "-exponent_2", "0.5", "-co", "INTERLEAVE=PIXEL", "-co", "TILED=YES", "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=3"] },
  // Shifted off the source so whole 64 x 64 tiles are nodata, which GDAL leaves out of the
  // file (sparse: no bytes at all); geotiff fills such a tile with the nodata value itself.
  { label: "Float32, predictor 3, Deflate, sparse nodata tiles", type: "Float32", nodata: -9999, args: ["-srcwin", "-300", "-200", "1000", "800", "-a_nodata", "-9999", "-co", "SPARSE_OK=TRUE", "-co", "TILED=YES", "-co", "BLOCKXSIZE=64", "-co", "BLOCKYSIZE=64", "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=3"] },
  { label: "Float64, predictor 3, Deflate", type: "Float64", args: ["-ot", "Float64", "-co", "TILED=YES", "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=3"] },
  { label: "Int16, predictor 2, Deflate", type: "Int16", args: ["-ot", "Int16", "-co", "TILED=YES", "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=2"] },
];

const dir = mkdtempSync(join(tmpdir(), "gsdplan-predictors-"));
const opened: DemSource[] = [];
afterAll(async () => {
  for (const d of opened) await d.close();
  rmSync(dir, { recursive: true, force: true });
});

/** GDAL's raw samples of `band` of `file`, as float64 numbers. */
function gdalSamples(file: string, band: number, type: Case["type"]): Float64Array {
  const raw = join(dir, `raw_${band}_${type}.bin`);
  execFileSync("gdal_translate", ["-q", "-of", "ENVI", "-b", String(band), file, raw], { env: GDAL_ENV });
  const b = readFileSync(raw);
  const buf = b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength);
  const a = type === "Float32" ? new Float32Array(buf) : type === "Float64" ? new Float64Array(buf) : new Int16Array(buf);
  return Float64Array.from(a);
}

describe.skipIf(!HAS_GDAL)("predictors undone as GDAL undoes them, every cell", () => {
  CASES.forEach((c, k) => {
    it(c.label, async () => {
      const file = join(dir, `case${k}.tif`);
      execFileSync("gdal_translate", ["-q", ...c.args, SOURCE, file], { env: GDAL_ENV });
      const band = c.band ?? 1;
      const ref = gdalSamples(file, band, c.type);
      const dem = await openDem(file, { band });
      opened.push(dem);
      const grid = await readWindow(dem, nativeBounds(dem));
      expect([grid.width, grid.height]).toEqual([1000, 800]);
      expect(ref.length).toBe(grid.width * grid.height);
      let differ = 0;
      let nodata = 0;
      const distinct = new Set<number>();
      for (let i = 0; i < ref.length; i++) {
        if (ref[i] === c.nodata) {
          nodata++;
          if (!Number.isNaN(grid.heights[i])) differ++;
          continue;
        }
        // Heights are held as Float32: GDAL's sample rounded the same way.
        if (grid.heights[i] !== Math.fround(ref[i])) differ++;
        if (distinct.size < 1000) distinct.add(ref[i]);
      }
      expect(differ).toBe(0);
      if (c.nodata !== undefined) expect(nodata).toBeGreaterThan(300 * 800);
      // Real terrain, not a constant that any byte order would decode alike.
      expect(distinct.size).toBeGreaterThan(100);
    });
  });
});
