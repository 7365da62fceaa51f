import { describe, it, expect, afterAll } from "vitest";
import proj4 from "proj4";
import { HAS_GDAL } from "../helpers/tools.js";
import { openDem, demHandles, type DemSource } from "../../src/dem/source.js";
import { readWindow, nativeBounds, readCells } from "../../src/dem/window.js";
import { WGS84_PROJ4 } from "../../src/dem/bounds.js";
import { gdalinfo, gdalLocationValues, sampleCells } from "./gdal-helpers.js";

// Reference: GDAL 3.x from Debian's gdal-bin (gdalinfo -json, gdallocationinfo -valonly),
// reading the same files that GDAL itself wrote (scripts/make-gdal-fixtures.mjs).
// US survey foot = 1200/3937 m (EPSG unit 9003, the US definition of the survey foot).
const FTUS_M = 1200 / 3937;

interface Case {
  file: string;
  band?: number;
  unitM?: number;
}
const CASES: Case[] = [
  { file: "hills_utm33_f32.tif" },
  { file: "hills_ca3_ftus_f32.tif", unitM: FTUS_M },
  { file: "geo4326_i16_lzw.tif" },
  { file: "utm32_i32_scaled_raw.tif" },
  { file: "utm33_f64_point_deflate.tif" },
  { file: "utm33_i16_3band.tif" },
  { file: "utm33_i16_3band.tif", band: 2 },
  { file: "utm33_i16_3band.tif", band: 3 },
  { file: "userdef_lcc2sp.tif" },
  { file: "userdef_lcc1sp.tif" },
  { file: "userdef_sterea_i16.tif" },
  { file: "userdef_aea.tif" },
  { file: "userdef_polarstere.tif" },
  { file: "userdef_tm_ft.tif" },
];

const path = (f: string) => `fixtures/gdal/${f}`;
const opened: DemSource[] = [];
afterAll(async () => {
  for (const d of opened) await d.close();
});

function expectedHeights(c: Case, raws: number[], info: ReturnType<typeof gdalinfo>): number[] {
  const b = info.bands[(c.band ?? 1) - 1];
  const nd = b.noDataValue === undefined ? null : Number(b.noDataValue);
  const scale = b.scale ?? 1;
  const offset = b.offset ?? 0;
  return raws.map((r) => (nd !== null && r === nd ? NaN : (r * scale + offset) * (c.unitM ?? 1)));
}

function expectClose(ours: ArrayLike<number>, ref: number[]) {
  for (let i = 0; i < ref.length; i++) {
    if (Number.isNaN(ref[i])) expect(ours[i], `point ${i}`).toBeNaN();
    // Float32 storage: relative 1e-6 is a few float32 ulps.
    else expect(Math.abs(ours[i] - ref[i]), `point ${i}: ${ours[i]} vs ${ref[i]}`).toBeLessThanOrEqual(1e-6 * Math.abs(ref[i]) + 1e-6);
  }
}

describe.skipIf(!HAS_GDAL)("openDem / readWindow against GDAL on GDAL-written fixtures", () => {
  for (const c of CASES) {
    const label = `${c.file}${c.band ? ` band ${c.band}` : ""}`;

    it(`${label}: size and corner-based geotransform match gdalinfo`, async () => {
      const info = gdalinfo(path(c.file));
      const dem = await openDem(path(c.file), { band: c.band });
      opened.push(dem);
      expect([dem.width, dem.height]).toEqual(info.size);
      const [x0, dx, rx, y0, ry, dy] = info.geoTransform;
      expect(rx).toBe(0);
      expect(ry).toBe(0);
      expect(dem.transform.x0).toBeCloseTo(x0, 6);
      expect(dem.transform.y0).toBeCloseTo(y0, 6);
      expect(dem.transform.dx).toBeCloseTo(dx, 9);
      expect(dem.transform.dy).toBeCloseTo(dy, 9);
      expect(dem.nodata === null).toBe(info.bands[(c.band ?? 1) - 1].noDataValue === undefined);
    });

    it(`${label}: corners in WGS84 through our CRS match gdalinfo's wgs84Extent`, async () => {
      const info = gdalinfo(path(c.file));
      const dem = await openDem(path(c.file), { band: c.band });
      opened.push(dem);
      const b = nativeBounds(dem);
      const conv = proj4(dem.crs.proj4, WGS84_PROJ4);
      // gdalinfo lists upper-left, lower-left, lower-right, upper-right, rounded to 1e-7 degrees.
      const ours = [
        [b.west, b.north],
        [b.west, b.south],
        [b.east, b.south],
        [b.east, b.north],
      ].map((p) => conv.forward(p as [number, number]));
      const ref = info.wgs84Extent!.coordinates[0].slice(0, 4);
      for (let i = 0; i < 4; i++) {
        expect(Math.abs(ours[i][0] - ref[i][0]), `corner ${i} lon`).toBeLessThan(2e-7);
        expect(Math.abs(ours[i][1] - ref[i][1]), `corner ${i} lat`).toBeLessThan(2e-7);
      }
    });

    it(`${label}: heights at 80 cells match gdallocationinfo (pixel, -geoloc and -wgs84 lookups)`, async () => {
      const info = gdalinfo(path(c.file));
      const dem = await openDem(path(c.file), { band: c.band });
      opened.push(dem);
      const grid = await readWindow(dem, nativeBounds(dem));
      expect([grid.width, grid.height]).toEqual(info.size);
      const cells = sampleCells(dem.width, dem.height, 80);
      const ours = cells.map(([col, row]) => grid.heights[row * grid.width + col]);

      // 1. by pixel/line (cell centres)
      const raws = gdalLocationValues(path(c.file), cells.map(([col, row]) => [col + 0.5, row + 0.5]), "pixel", c.band ?? 1);
      const ref = expectedHeights(c, raws, info);
      expectClose(ours, ref);
      for (let i = 0; i < ref.length; i++) expect(Number.isNaN(ours[i])).toBe(Number.isNaN(ref[i]));

      // 2. by georeferenced cell centres from GDAL's own geotransform
      const [x0, dx, , y0, , dy] = info.geoTransform;
      const geo = gdalLocationValues(path(c.file), cells.map(([col, row]) => [x0 + (col + 0.5) * dx, y0 + (row + 0.5) * dy]), "geoloc", c.band ?? 1);
      expectClose(ours, expectedHeights(c, geo, info));

      // 3. by longitude/latitude of our cell centres through our CRS: GDAL lands on the
      //    same cells only if our CRS agrees with its reading of the GeoKeys.
      const inv = proj4(dem.crs.proj4, WGS84_PROJ4);
      const t = grid.transform;
      const ll = cells.map(([col, row]) => inv.forward([t.x0 + (col + 0.5) * t.dx, t.y0 + (row + 0.5) * t.dy]) as [number, number]);
      const viaWgs = gdalLocationValues(path(c.file), ll, "wgs84", c.band ?? 1);
      expectClose(ours, expectedHeights(c, viaWgs, info));
    });
  }

  it("a window given in WGS84 with a margin returns the covering cells, aligned with GDAL's grid", async () => {
    const f = path("hills_utm33_f32.tif");
    const dem = await openDem(f);
    opened.push(dem);
    const toLl = proj4(dem.crs.proj4, WGS84_PROJ4);
    const [w, s] = toLl.forward([500300, 5200200]);
    const [e, n] = toLl.forward([500420, 5200330]);
    const grid = await readWindow(dem, { west: w, south: s, east: e, north: n }, { crs: WGS84_PROJ4, marginM: 10 });
    // Box edges are curves in UTM; the window must at least contain the UTM box grown by 10 m.
    expect(grid.transform.x0).toBeLessThanOrEqual(500290);
    expect(grid.transform.y0).toBeGreaterThanOrEqual(5200340);
    expect(grid.transform.x0 + grid.width).toBeGreaterThanOrEqual(500430);
    expect(grid.transform.y0 - grid.height).toBeLessThanOrEqual(5200190);
    expect(grid.width).toBeLessThan(160);
    const col0 = grid.transform.x0 - 500000;
    const row0 = 5200800 - grid.transform.y0;
    expect(Number.isInteger(col0) && Number.isInteger(row0)).toBe(true);
    const cells = sampleCells(grid.width, grid.height, 30, 7);
    const ref = gdalLocationValues(f, cells.map(([c, r]) => [col0 + c + 0.5, row0 + r + 0.5]), "pixel");
    expectClose(cells.map(([c, r]) => grid.heights[r * grid.width + c]), ref);
    expect(grid.cellSizeM).toEqual([1, 1]);
  });

  it("pixel-is-point: the file's tiepoint is a cell centre, our transform is GDAL's corner-based one", async () => {
    const dem = await openDem(path("utm33_f64_point_deflate.tif"));
    opened.push(dem);
    expect(dem.pixelIsPoint).toBe(true);
    const tie = demHandles(dem).image.fileDirectory.getValue("ModelTiepoint") as number[];
    // GeoTIFF 1.0 spec 2.5.2.2: for PixelIsPoint the tiepoint refers to the centre of cell (0,0).
    expect(tie[3]).toBeCloseTo(dem.transform.x0 + dem.transform.dx / 2, 9);
    expect(tie[4]).toBeCloseTo(dem.transform.y0 + dem.transform.dy / 2, 9);
  });

  it("a geographic window has metre cell sizes at its centre latitude (compared with GeographicLib)", async () => {
    const { Geodesic } = await import("geographiclib-geodesic");
    const dem = await openDem(path("geo4326_i16_lzw.tif"));
    opened.push(dem);
    const grid = await readCells(dem, { col0: 100, row0: 100, col1: 200, row1: 200 });
    const lat = grid.transform.y0 + (grid.height * grid.transform.dy) / 2;
    const g = Geodesic.WGS84;
    // Short geodesics (1 arc-second) along the meridian and the parallel at the window centre.
    const ns = g.Inverse(lat - 0.5 / 3600, 7.45, lat + 0.5 / 3600, 7.45).s12!;
    const ew = g.Inverse(lat, 7.45 - 0.5 / 3600, lat, 7.45 + 0.5 / 3600).s12!;
    expect(grid.cellSizeM[1]).toBeCloseTo(ns, 3);
    expect(grid.cellSizeM[0]).toBeCloseTo(ew, 3);
  });

  it("decodes only the tiles a window intersects", async () => {
    const dem = await openDem(path("hills_utm33_f32.tif"));
    opened.push(dem);
    const { image } = demHandles(dem);
    const seen = new Set<string>();
    const orig = image.getTileOrStrip.bind(image);
    image.getTileOrStrip = (x, y, sample, dec, signal) => {
      seen.add(`${x},${y}`);
      return orig(x, y, sample, dec, signal);
    };
    await readCells(dem, { col0: 10, row0: 10, col1: 60, row1: 60 });
    expect([...seen]).toEqual(["0,0"]);
    seen.clear();
    // Straddles the corner of four 256x256 tiles.
    await readCells(dem, { col0: 250, row0: 250, col1: 262, row1: 262 });
    expect([...seen].sort()).toEqual(["0,0", "0,1", "1,0", "1,1"]);
    image.getTileOrStrip = orig;
  });
});
