import { describe, it, expect } from "vitest";
import { execFileSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { builtModule } from "../helpers/dist.js";
import { tmpdir } from "node:os";
import path from "node:path";
import { fromArrayBuffer } from "geotiff";
import { HAS_GDAL } from "../helpers/tools.js";
import type { AssessmentRasters } from "../../src/assess/types.js";
import { FLAG_CEILING, FLAG_COARSE } from "../../src/assess/flags.js";
import { FLAGS_NODATA, IMAGES_NODATA, assessmentGeoTiffs, rasterGeoTiff, type assessmentGeoTiffFileInBackground as FileInBackground } from "../../src/export/geotiffRasters.js";

// A 5 x 4 grid of 2 m cells in UTM 33N; the site is every cell but the first column.
const W = 5;
const H = 4;
const transform = { x0: 500_000, y0: 5_216_000, dx: 2, dy: -2 };
function rasters(): AssessmentRasters {
  const n = W * H;
  const inSite = new Uint8Array(n);
  const gsdCm = new Float32Array(n).fill(NaN);
  const images = new Uint16Array(n);
  const flags = new Uint16Array(n);
  for (let row = 0; row < H; row++) {
    for (let col = 1; col < W; col++) {
      const i = row * W + col;
      inSite[i] = 1;
      gsdCm[i] = 2 + 0.125 * col + 0.5 * row;
      images[i] = col + row;
      flags[i] = col === 4 ? FLAG_COARSE | FLAG_CEILING : 0;
    }
  }
  return { width: W, height: H, transform, gsdCm, images, flags, inSite };
}
const dir = mkdtempSync(path.join(tmpdir(), "gsdplan-tif-"));
const files = assessmentGeoTiffs(rasters(), { epsg: 32633, proj4: "+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs", geographic: false, name: "WGS 84 / UTM zone 33N" });
for (const [name, data] of Object.entries(files)) writeFileSync(path.join(dir, name), new Uint8Array(data));

describe("assessment GeoTIFFs read back by geotiff.js", () => {
  it("hold the values, with nodata outside the site", async () => {
    const img = await (await fromArrayBuffer(files["images.tif"])).getImage();
    expect([img.getWidth(), img.getHeight()]).toEqual([W, H]);
    const [band] = (await img.readRasters()) as unknown as Uint16Array[];
    expect(band[0]).toBe(IMAGES_NODATA);
    expect(band[1 * W + 3]).toBe(4);
    expect(img.getOrigin()).toEqual([500_000, 5_216_000, 0]);
    expect(img.getResolution()).toEqual([2, -2, 0]);
  });
});

describe.skipIf(!HAS_GDAL)("assessment GeoTIFFs read by GDAL (gdalinfo, gdallocationinfo from Debian's gdal-bin)", () => {
  // flags.tif's 65536-entry colour table makes gdalinfo -json about 6 MB, beyond execFileSync's default 1 MB buffer.
  const info = (name: string) => JSON.parse(execFileSync("gdalinfo", ["-json", path.join(dir, name)], { maxBuffer: 256 * 2 ** 20 }).toString());
  const at = (name: string, col: number, row: number) =>
    execFileSync("gdallocationinfo", ["-valonly", path.join(dir, name), String(col), String(row)]).toString().trim();

  for (const [name, type, nodata] of [
    ["gsd.tif", "Float32", "NaN"],
    ["images.tif", "UInt16", IMAGES_NODATA],
    ["flags.tif", "UInt16", FLAGS_NODATA],
  ] as const) {
    it(`${name}: same geotransform, EPSG:32633, ${type}, nodata ${nodata}`, () => {
      const j = info(name);
      // GDAL geotransform: [x0, dx, 0, y0, 0, dy].
      expect(j.geoTransform).toEqual([500_000, 2, 0, 5_216_000, 0, -2]);
      expect(j.size).toEqual([W, H]);
      expect(j.coordinateSystem.wkt).toMatch(/ID\["EPSG",32633\]\]$/);
      expect(j.bands).toHaveLength(1);
      expect(j.bands[0].type).toBe(type);
      expect(j.bands[0].noDataValue).toBe(nodata);
      expect(j.metadata[""]?.AREA_OR_POINT).toBe("Area");
      // One 512 x 512 tile and no overviews: the raster fits one tile (the COG driver's rule).
      expect(j.bands[0].block).toEqual([512, 512]);
      expect(j.bands[0].overviews ?? []).toEqual([]);
      expect(j.metadata.IMAGE_STRUCTURE.LAYOUT).toBe("COG");
    });
  }

  it("gives the cell values at pixel positions", () => {
    expect(Number(at("gsd.tif", 3, 2))).toBeCloseTo(2 + 0.375 + 1, 6);
    expect(at("gsd.tif", 0, 0)).toBe("nan");
    expect(at("images.tif", 2, 3)).toBe("5");
    expect(at("flags.tif", 4, 1)).toBe(String(FLAG_COARSE | FLAG_CEILING));
    expect(at("flags.tif", 0, 2)).toBe(String(FLAGS_NODATA));
  });

  it("places cells where the transform says: a point in cell (3, 2) by its projected coordinates", () => {
    // Cell (3, 2) centre: x0 + 3.5 dx, y0 + 2.5 dy.
    const v = execFileSync("gdallocationinfo", ["-valonly", "-geoloc", path.join(dir, "images.tif"), String(500_000 + 7), String(5_216_000 - 5)]).toString().trim();
    expect(v).toBe("5");
  });

  it("writes a CRS without EPSG code as user-defined transverse Mercator that GDAL reads back", () => {
    const def = "+proj=tmerc +lat_0=0 +lon_0=10.3333333333 +k=0.9999 +x_0=150000 +y_0=-5000000 +ellps=GRS80 +units=m +no_defs";
    const tif = rasterGeoTiff(new Uint8Array(4), { width: 2, height: 2, transform }, { epsg: null, proj4: def, geographic: false, name: "local TM" });
    const f = path.join(dir, "user.tif");
    writeFileSync(f, new Uint8Array(tif));
    const out = execFileSync("gdalinfo", ["-proj4", f]).toString();
    const p4 = /PROJ\.4 string is:\s*'([^']+)'/.exec(out)![1];
    expect(p4).toMatch(/\+proj=tmerc/);
    expect(p4).toMatch(/\+lon_0=10\.3333333333/);
    expect(p4).toMatch(/\+k=0\.9999/);
    expect(p4).toMatch(/\+x_0=150000/);
    expect(p4).toMatch(/\+y_0=-5000000/);
    expect(p4).toMatch(/\+ellps=GRS80/);
    // A UTM zone without EPSG code maps to its transverse Mercator parameters.
    const utm = rasterGeoTiff(new Uint8Array(4), { width: 2, height: 2, transform }, { epsg: null, proj4: "+proj=utm +zone=33 +south +datum=WGS84", geographic: false });
    writeFileSync(f, new Uint8Array(utm));
    const p4u = /PROJ\.4 string is:\s*'([^']+)'/.exec(execFileSync("gdalinfo", ["-proj4", f]).toString())![1];
    // GDAL recognises the parameter set as UTM zone 33 south.
    expect(p4u).toMatch(/^\+proj=utm \+zone=33 \+south \+datum=WGS84/);
  });
});

const builtFile = builtModule("export/geotiffRasters.js", ["cogFileWorker.js"]);

describe.skipIf(!builtFile.available)("an assessment GeoTIFF written to its file by a worker thread", () => {
  const crs = { epsg: 32633, proj4: "+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs", geographic: false, name: "WGS 84 / UTM zone 33N" };
  /** A 1300 x 1100 grid (overviews: over one 512-px tile), its arrays in shared memory or not. */
  function grid(shared: boolean): AssessmentRasters {
    const w = 1300, h = 1100, n = w * h;
    const buf = (bytes: number) => (shared ? new SharedArrayBuffer(bytes) : new ArrayBuffer(bytes));
    const r: AssessmentRasters = { width: w, height: h, transform, gsdCm: new Float32Array(buf(4 * n)), images: new Uint16Array(buf(2 * n)), flags: new Uint16Array(buf(2 * n)), inSite: new Uint8Array(buf(n)) };
    for (let i = 0; i < n; i++) {
      const c = i % w, row = Math.floor(i / w);
      r.inSite[i] = c > 40 && row > 30 && c + row < 2200 ? 1 : 0;
      // A few in-site cells left unseen (NaN), as the assessment leaves them.
      r.gsdCm[i] = r.inSite[i] && (c * 7 + row) % 101 !== 0 ? 2.5 + 0.2 * Math.sin(c / 37) * Math.cos(row / 53) : NaN;
    }
    return r;
  }

  it("holds the bytes gsd.tif has when made on this thread", async () => {
    const { assessmentGeoTiffFileInBackground } = (await import(builtFile.href)) as { assessmentGeoTiffFileInBackground: typeof FileInBackground };
    const r = grid(true);
    const at = path.join(dir, "worker-gsd.tif");
    expect(await assessmentGeoTiffFileInBackground(r, crs, "gsd.tif", at).result()).toBe(true);
    const here = Buffer.from(assessmentGeoTiffs(r, crs)["gsd.tif"]);
    const there = readFileSync(at);
    expect(there.length).toBe(here.length);
    expect(there.equals(here)).toBe(true);
  });

  it("does not start when the arrays are not in shared memory (they would be copied)", async () => {
    const { assessmentGeoTiffFileInBackground } = (await import(builtFile.href)) as { assessmentGeoTiffFileInBackground: typeof FileInBackground };
    const at = path.join(dir, "unshared-gsd.tif");
    expect(await assessmentGeoTiffFileInBackground(grid(false), crs, "gsd.tif", at).result()).toBeUndefined();
    expect(existsSync(at)).toBe(false);
  });
});
