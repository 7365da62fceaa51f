import { describe, it, expect } from "vitest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fromArrayBuffer } from "geotiff";
import { HAS_GDAL } from "../helpers/tools.js";
import type { AssessmentRasters } from "../../src/assess/types.js";
import { FLAGS_NODATA, IMAGES_NODATA, assessmentGeoTiff, assessmentGeoTiffChunks, siteRowSpans, siteWindow } from "../../src/export/geotiffRasters.js";
import { FLAG_FINE } from "../../src/assess/flags.js";

const CRS = { epsg: 32633, proj4: "+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs", geographic: false, name: "WGS 84 / UTM zone 33N" };

// 1300 x 1100 cells of 0.5 m (three tile columns, overviews), the site a disc well inside.
const W = 1300;
const H = 1100;
const transform = { x0: 500_000, y0: 5_216_000, dx: 0.5, dy: -0.5 };
function discRasters(): AssessmentRasters {
  const n = W * H;
  const inSite = new Uint8Array(n);
  const gsdCm = new Float32Array(n).fill(NaN);
  const images = new Uint16Array(n);
  const flags = new Uint16Array(n);
  for (let r = 0; r < H; r++) {
    for (let c = 0; c < W; c++) {
      if (Math.hypot(c - 700, r - 520) > 400) continue;
      const i = r * W + c;
      inSite[i] = 1;
      gsdCm[i] = 2 + ((c * 7 + r * 3) % 50) / 100;
      images[i] = 3 + ((c + r) % 9);
      flags[i] = (c + 2 * r) % 31 === 0 ? 1 : 0;
    }
  }
  return { width: W, height: H, transform, gsdCm, images, flags, inSite };
}

async function read(tif: ArrayBuffer): Promise<{ w: number; h: number; origin: number[]; data: ArrayLike<number> }> {
  const img = await (await fromArrayBuffer(tif)).getImage();
  const [data] = (await img.readRasters()) as unknown as ArrayLike<number>[];
  return { w: img.getWidth(), h: img.getHeight(), origin: img.getOrigin(), data };
}

describe("the site's window of the rasters (siteWindow)", () => {
  it("is the whole cells under a box, clipped to the rasters", () => {
    const g = { width: 100, height: 80, transform: { x0: 0, y0: 80, dx: 1, dy: -1 } };
    // x 10.2 .. 20.5 -> columns 10 .. 20; y 5 .. 30 -> rows 50 (y 29..30) .. 75 (y 4..5, holding y = 5).
    expect(siteWindow(g, [10.2, 5, 20.5, 30])).toEqual({ c0: 10, r0: 50, width: 11, height: 26 });
    expect(siteWindow(g, [-5, -5, 3.5, 2])).toEqual({ c0: 0, r0: 78, width: 4, height: 2 });
    expect(siteWindow(g, [200, 0, 210, 5])).toBeUndefined();
  });
});

describe("assessment GeoTIFFs of a window", () => {
  const r = discRasters();
  const win = siteWindow(r, [transform.x0 + 299.6 * 0.5, transform.y0 - 920.4 * 0.5, transform.x0 + 1100.2 * 0.5, transform.y0 - 119.7 * 0.5])!;

  it("hold the whole file's cells of the window, georeferenced whole cells in", async () => {
    expect(win).toEqual({ c0: 299, r0: 119, width: 802, height: 802 });
    for (const [name, nodata] of [["gsd.tif", NaN], ["images.tif", IMAGES_NODATA], ["flags.tif", FLAGS_NODATA]] as const) {
      const whole = await read(assessmentGeoTiff(r, CRS, name));
      const part = await read(assessmentGeoTiff(r, CRS, name, win));
      expect([part.w, part.h]).toEqual([win.width, win.height]);
      expect(part.origin).toEqual([transform.x0 + win.c0 * 0.5, transform.y0 - win.r0 * 0.5, 0]);
      let differ = 0;
      let outsideData = 0;
      for (let row = 0; row < H; row++) {
        for (let col = 0; col < W; col++) {
          const v = whole.data[row * W + col];
          const inWin = col >= win.c0 && col < win.c0 + win.width && row >= win.r0 && row < win.r0 + win.height;
          if (!inWin) {
            if (!Object.is(v, nodata)) outsideData++;
            continue;
          }
          if (!Object.is(part.data[(row - win.r0) * win.width + (col - win.c0)], v)) differ++;
        }
      }
      expect(differ, name).toBe(0);
      // Nothing but nodata is left out: the window holds every site cell.
      expect(outsideData, name).toBe(0);
    }
  });

  it("are the same bytes whole or streamed, and refuse a window beyond the rasters", () => {
    const one = new Uint8Array(assessmentGeoTiff(r, CRS, "gsd.tif", win));
    // Each chunk copied as it comes (the writer reuses its buffer for the next).
    const chunks: Buffer[] = [];
    for (const c of assessmentGeoTiffChunks(r, CRS, "gsd.tif", win)) chunks.push(Buffer.from(c));
    expect(Buffer.concat(chunks).equals(Buffer.from(one))).toBe(true);
    expect(() => assessmentGeoTiff(r, CRS, "images.tif", { c0: 1000, r0: 0, width: 301, height: 10 })).toThrow(/not within the 1300 x 1100 rasters/);
  });

  it.skipIf(!HAS_GDAL)("read by GDAL: the window's size and origin, its overviews the means of its own cells (gdalinfo, gdal_translate from Debian's gdal-bin)", () => {
    const dir = mkdtempSync(path.join(tmpdir(), "gsdplan-win-"));
    const file = path.join(dir, "gsd.tif");
    writeFileSync(file, new Uint8Array(assessmentGeoTiff(r, CRS, "gsd.tif", win)));
    const info = JSON.parse(execFileSync("gdalinfo", ["-json", file], { maxBuffer: 64 * 2 ** 20 }).toString());
    expect(info.size).toEqual([802, 802]);
    expect(info.geoTransform).toEqual([transform.x0 + 299 * 0.5, 0.5, 0, transform.y0 - 119 * 0.5, 0, -0.5]);
    expect(info.bands[0].overviews.map((o: { size: number[] }) => o.size)).toEqual([[401, 401]]);
    // GDAL's own 2 x 2 average of the window's cells (nodata left out) equals the stored first overview to float32 rounding.
    const ovr = path.join(dir, "ovr.tif");
    execFileSync("gdal_translate", ["-q", "-ovr", "0", file, ovr]);
    const avg = path.join(dir, "avg.tif");
    execFileSync("gdal_translate", ["-q", "-ovr", "NONE", "-r", "average", "-outsize", "401", "401", file, avg]);
    const stat = (f: string) => JSON.parse(execFileSync("gdalinfo", ["-json", "-stats", f], { maxBuffer: 64 * 2 ** 20 }).toString()).bands[0];
    const a = stat(ovr), b = stat(avg);
    expect(a.mean).toBeCloseTo(b.mean, 4);
    expect(a.minimum).toBeCloseTo(b.minimum, 4);
    expect(a.maximum).toBeCloseTo(b.maximum, 4);
  });
});

describe("the rows' site spans (siteRowSpans) and the files made with them", () => {
  it("are each row's first site cell to just past its last, empty rows at the window's width", () => {
    // 6 x 3 window at column 1, row 1 of 8 x 5 rasters: row 0 site cells at 2 and 4 (a gap),
    // row 1 none, row 2 the whole row.
    const inSite = new Uint8Array(8 * 5);
    for (const c of [3, 5]) inSite[1 * 8 + c] = 1;
    inSite[1 * 8 + 0] = 1; // left of the window: not counted
    for (let c = 0; c < 8; c++) inSite[3 * 8 + c] = 1;
    expect(Array.from(siteRowSpans(inSite, 8, { c0: 1, r0: 1, width: 6, height: 3 }))).toEqual([2, 5, 6, 6, 0, 6]);
  });

  it("hold each site cell's value and nodata elsewhere, rows without site cells and gaps within a row's span included", async () => {
    // A ring: rows above and below it have no site cell, rows through its middle two runs.
    const w = 700, h = 600;
    const n = w * h;
    const inSite = new Uint8Array(n), gsdCm = new Float32Array(n), images = new Uint16Array(n), flags = new Uint16Array(n);
    for (let i = 0; i < n; i++) {
      const c = i % w, rr = Math.floor(i / w);
      const d = Math.hypot(c - 350, rr - 300);
      inSite[i] = d <= 250 && d >= 120 ? 1 : 0;
      // Values outside the site too: the files must not show them.
      gsdCm[i] = 2 + (i % 97) / 100;
      // Some counts saturated (65535, the file's nodata): written just below it.
      images[i] = i % 211 === 0 ? 65535 : i % 13;
      flags[i] = i % 17 === 0 ? FLAGS_NODATA : i % 5 === 0 ? FLAG_FINE : 0;
    }
    const ring: AssessmentRasters = { width: w, height: h, transform, gsdCm, images, flags, inSite };
    const win = { c0: 50, r0: 20, width: 620, height: 570 };
    for (const name of ["gsd.tif", "images.tif", "flags.tif"] as const) {
      const { data } = await read(assessmentGeoTiff(ring, CRS, name, win));
      let wrong = 0;
      for (let y = 0; y < win.height; y++) {
        for (let x = 0; x < win.width; x++) {
          const i = (win.r0 + y) * w + win.c0 + x;
          const want = name === "gsd.tif" ? (inSite[i] ? gsdCm[i] : NaN)
            : name === "images.tif" ? (inSite[i] ? Math.min(images[i], IMAGES_NODATA - 1) : IMAGES_NODATA)
            // flags.tif: a cell whose bits read as nodata drops its fine bit (geotiffRasters.ts).
            : (inSite[i] ? (flags[i] === FLAGS_NODATA ? FLAGS_NODATA & ~FLAG_FINE : flags[i]) : FLAGS_NODATA);
          if (!Object.is(data[y * win.width + x], want)) wrong++;
        }
      }
      expect(wrong, name).toBe(0);
    }
  });
});
