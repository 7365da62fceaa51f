/**
 * DEM mosaics: tiles (a list, a folder, a GDAL VRT) read as one raster. The fixtures are
 * GDAL's (scripts/make-mosaic-fixtures.mjs: gdal_translate -srcwin cuts four tiles from
 * fixtures/gdal/hills_utm33_f32.tif, gdalbuildvrt mosaics them, gdalwarp puts one tile in
 * another CRS), and GDAL reading the VRT is the reference for every height.
 */
import { describe, it, expect, afterEach } from "vitest";
import { execFileSync } from "node:child_process";
import { copyFileSync, mkdtempSync, readFileSync, rmSync, writeFileSync, openSync, writeSync, closeSync, mkdirSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fromFile } from "geotiff";
import { HAS_GDAL } from "../helpers/tools.js";
import { gdalinfo, gdalLocationValues, sampleCells, gdalComputedStats } from "./gdal-helpers.js";
import { gdalBilinearM } from "../e2e/reference.js";
import { openDem, type DemSource } from "../../src/dem/source.js";
import { readCells, readWindow, nativeBounds } from "../../src/dem/window.js";
import { sampleBilinear } from "../../src/dem/sample.js";
import { demStatistics } from "../../src/dem/statistics.js";
import { inspectDem } from "../../src/dem/inspect.js";
import { mosaicOf } from "../../src/dem/mosaic.js";
import { InputFileError } from "../../src/errors.js";
import type { DemGrid } from "../../src/dem/grid.js";

const M = path.resolve("fixtures/mosaic");
const TILES = ["hills_a_nw.tif", "hills_b_ne.tif", "hills_c_sw.tif", "hills_d_se.tif"].map((f) => path.join(M, "tiles", f));
const VRT = path.join(M, "hills_tiles.vrt");
const PATCH = path.join(M, "hills_patch.tif");
const VRT_PATCH = path.join(M, "hills_tiles_patch.vrt");
const UTM32 = path.join(M, "hills_d_se_utm32_2m.tif");
const SOURCE = path.resolve("fixtures/gdal/hills_utm33_f32.tif");

const opened: DemSource[] = [];
afterEach(async () => {
  for (const d of opened.splice(0)) await d.close();
});
async function open(spec: string | string[]): Promise<DemSource> {
  const d = await openDem(spec);
  opened.push(d);
  return d;
}
async function whole(d: DemSource): Promise<DemGrid> {
  return readCells(d, { col0: 0, row0: 0, col1: d.width, row1: d.height });
}

/** Cells to compare: spread at random, plus every cell within two of the seams (columns 250, rows 200). */
function cellsAcrossSeams(width: number, height: number): [number, number][] {
  const out = sampleCells(width, height, 300, 7);
  for (let r = 0; r < height; r += 7) for (let c = 247; c < 253; c++) out.push([c, r]);
  for (let c = 0; c < width; c += 7) for (let r = 197; r < 203; r++) out.push([c, r]);
  return out;
}

describe.skipIf(!HAS_GDAL)("tiles as one raster: VRT, list and folder against GDAL on the VRT", () => {
  const forms: [string, string | string[]][] = [
    ["the VRT (gdalbuildvrt)", VRT],
    ["a list of the four tiles", TILES],
    ["the folder of tiles", path.join(M, "tiles")],
    ["a list in another order (no overlap: same raster)", [TILES[3], TILES[1], TILES[0], TILES[2]]],
  ];
  for (const [what, spec] of forms) {
    it(`${what}: grid equals gdalinfo's on the VRT, cell heights equal gdallocationinfo across the seams`, async () => {
      const d = await open(spec);
      const info = gdalinfo(VRT);
      expect([d.width, d.height]).toEqual(info.size);
      const [x0, dx, , y0, , dy] = info.geoTransform;
      expect(d.transform).toEqual({ x0, y0, dx, dy });
      expect(d.crs.epsg).toBe(32633);
      expect(d.verticalDatum).toBe("egm96");
      expect(d.warnings).toEqual([]);
      const g = await whole(d);
      const cells = cellsAcrossSeams(d.width, d.height);
      // GDAL: gdallocationinfo -valonly at each cell centre of the VRT.
      const ref = gdalLocationValues(VRT, cells.map(([c, r]) => [c + 0.5, r + 0.5]), "pixel");
      cells.forEach(([c, r], i) => expect(g.heights[r * g.width + c]).toBe(Math.fround(ref[i])));
      expect(g.heights.every((v) => !Number.isNaN(v))).toBe(true);
    });
  }

  it("the tiles hold exactly the cells of the file they were cut from (gdal_translate -srcwin 250 200)", async () => {
    const d = await open(TILES);
    const one = await open(SOURCE);
    const g = await whole(d);
    const s = await readCells(one, { col0: 250, row0: 200, col1: 750, row1: 600 });
    expect(g.heights).toEqual(s.heights);
  });

  it("bilinear heights between cell centres, across the seams, equal GDAL's cell values weighted bilinearly", async () => {
    const d = await open(path.join(M, "tiles"));
    const b = nativeBounds(d);
    const g = await readWindow(d, b);
    const pts: [number, number][] = [];
    let s = 99;
    const rnd = () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32);
    // Points near the seams (x = 500500, y = 5200400) and anywhere inside the centres' hull.
    for (let i = 0; i < 200; i++) pts.push([500500 + (rnd() - 0.5) * 6, b.south + 1 + rnd() * (b.north - b.south - 2)]);
    for (let i = 0; i < 200; i++) pts.push([b.west + 1 + rnd() * (b.east - b.west - 2), 5200400 + (rnd() - 0.5) * 6]);
    for (let i = 0; i < 100; i++) pts.push([b.west + 1 + rnd() * (b.east - b.west - 2), b.south + 1 + rnd() * (b.north - b.south - 2)]);
    const ours = sampleBilinear(g, pts.map((p) => p[0]), pts.map((p) => p[1]));
    // Reference: test/e2e/reference.ts gdalBilinearM (four gdallocationinfo cells, textbook weights).
    const ref = gdalBilinearM(VRT, pts);
    pts.forEach((_, i) => expect(Math.abs(ours[i] - ref[i])).toBeLessThan(1e-4));
  });

  it("where tiles overlap the later one wins, as in the VRT gdalbuildvrt writes (sources in order)", async () => {
    const info = gdalinfo(VRT_PATCH);
    const cells: [number, number][] = [];
    // The patch covers VRT cells 220..279 x 170..229; compare it and a ring around it.
    for (let r = 160; r < 240; r += 3) for (let c = 210; c < 290; c += 3) cells.push([c, r]);
    const ref = gdalLocationValues(VRT_PATCH, cells.map(([c, r]) => [c + 0.5, r + 0.5]), "pixel");
    const under = gdalLocationValues(VRT, cells.map(([c, r]) => [c + 0.5, r + 0.5]), "pixel");
    // The patch's heights differ from the tiles' (it was cut from elsewhere), or this proves nothing.
    expect(ref.filter((v, i) => v !== under[i]).length).toBeGreaterThan(300);
    for (const spec of [VRT_PATCH, [...TILES, PATCH]]) {
      const d = await open(spec);
      expect([d.width, d.height]).toEqual(info.size);
      const g = await whole(d);
      cells.forEach(([c, r], i) => expect(g.heights[r * g.width + c]).toBe(Math.fround(ref[i])));
    }
    // The patch first: the tiles, later, cover it everywhere.
    const d = await open([PATCH, ...TILES]);
    const g = await whole(d);
    cells.forEach(([c, r], i) => expect(g.heights[r * g.width + c]).toBe(Math.fround(under[i])));
  });

  it("a tile in another CRS and cell size is resampled bilinearly onto the finest grid, as gdalwarp -r bilinear does, and says so", async () => {
    const d = await open([TILES[0], TILES[1], TILES[2], UTM32]);
    expect(d.crs.epsg).toBe(32633);
    expect(d.transform.dx).toBe(1);
    expect(d.warnings).toHaveLength(1);
    expect(d.warnings[0]).toMatch(/heights of 1 of 4 DEM sources were resampled bilinearly onto the grid of .*hills_a_nw\.tif \(hills_d_se_utm32_2m\.tif: another CRS \(EPSG:32632\)\)/);
    // Reference: GDAL's warper onto the mosaic's grid over tile d's square, bilinear, exact transformation.
    const tmp = mkdtempSync(path.join(tmpdir(), "gsdplan-mosaic-"));
    try {
      const warped = path.join(tmp, "w.tif");
      // The target keeps EGM96 heights (a 2D target would have GDAL add the geoid undulation, ~47 m here).
      execFileSync("gdalwarp", ["-q", "-t_srs", "EPSG:32633+5773", "-te", "500500", "5200200", "500750", "5200400", "-tr", "1", "1", "-r", "bilinear", "-et", "0", UTM32, warped]);
      const cells: [number, number][] = [];
      for (let r = 0; r < 200; r += 3) for (let c = 0; c < 250; c += 3) cells.push([c, r]);
      const ref = gdalLocationValues(warped, cells.map(([c, r]) => [c + 0.5, r + 0.5]), "pixel");
      const oc = Math.round((500500 - d.transform.x0) / d.transform.dx), or = Math.round((d.transform.y0 - 5200400) / -d.transform.dy);
      const g = await readCells(d, { col0: oc, row0: or, col1: oc + 250, row1: or + 200 });
      let compared = 0;
      cells.forEach(([c, r], i) => {
        const ours = g.heights[r * g.width + c];
        // GDAL renormalises its weights over valid neighbours at the nodata rim; we call
        // those cells unknown. Compare where both have a height.
        if (!Number.isFinite(ours) || ref[i] === -9999 || !Number.isFinite(ref[i])) return;
        compared++;
        expect(Math.abs(ours - ref[i])).toBeLessThan(2e-3);
      });
      expect(compared).toBeGreaterThan(0.9 * cells.length);
    } finally {
      rmSync(tmp, { recursive: true, force: true });
    }
  });

  it("tiles on different vertical datums are refused in one line", async () => {
    // utm33_f64_point_deflate.tif declares no vertical datum; the tiles declare EGM96.
    const err = await openDem([TILES[0], path.resolve("fixtures/gdal/utm33_f64_point_deflate.tif")]).catch((e) => e);
    expect(err).toBeInstanceOf(InputFileError);
    expect(err.message).toMatch(/the DEM sources declare different vertical datums: egm96 \(.*hills_a_nw\.tif\), unknown \(.*utm33_f64_point_deflate\.tif\)/);
  });
});

describe("only what a window needs is opened and decoded", () => {
  it("a VRT opens a source only when a window meets it: a missing tile outside the window is never noticed", async () => {
    const tmp = mkdtempSync(path.join(tmpdir(), "gsdplan-vrt-"));
    try {
      const vrt = path.join(tmp, "m.vrt");
      // The VRT written by gdalbuildvrt, tile d_se renamed to a file that does not exist.
      const text = readFileSync(VRT, "utf8").replace(/<SourceFilename relativeToVRT="1">tiles\/(hills_[a-d]_[a-z]+\.tif)<\/SourceFilename>/g, (_, f) => `<SourceFilename relativeToVRT="0">${path.join(M, "tiles", f === "hills_d_se.tif" ? "missing_d_se.tif" : f)}</SourceFilename>`);
      writeFileSync(vrt, text);
      const d = await open(vrt);
      // Tile a_nw only (VRT cells 0..249 x 0..199).
      const g = await readCells(d, { col0: 10, row0: 10, col1: 240, row1: 190 });
      expect(g.heights.every((v) => !Number.isNaN(v))).toBe(true);
      await expect(readCells(d, { col0: 240, row0: 190, col1: 260, row1: 210 })).rejects.toThrow(/missing_d_se\.tif: cannot open the file/);
    } finally {
      rmSync(tmp, { recursive: true, force: true });
    }
  });

  it("a folder reads only headers when opened; blocks of tiles outside a window are never decoded", async () => {
    const tmp = mkdtempSync(path.join(tmpdir(), "gsdplan-folder-"));
    try {
      const dir = path.join(tmp, "tiles");
      mkdirSync(dir);
      for (const t of TILES) copyFileSync(t, path.join(dir, path.basename(t)));
      // Damage every block of d_se (zeros over its compressed data; its header stays whole).
      const damaged = path.join(dir, "hills_d_se.tif");
      const tiff = await fromFile(damaged);
      const img = await tiff.getImage(0);
      const offsets = (await img.fileDirectory.loadValue("TileOffsets")) as ArrayLike<number>;
      const counts = (await img.fileDirectory.loadValue("TileByteCounts")) as ArrayLike<number>;
      await tiff.close();
      const fd = openSync(damaged, "r+");
      for (let i = 0; i < offsets.length; i++) writeSync(fd, Buffer.alloc(Math.min(16, Number(counts[i]))), 0, Math.min(16, Number(counts[i])), Number(offsets[i]));
      closeSync(fd);
      const d = await open(dir);
      expect(mosaicOf(d)!.members).toHaveLength(4);
      const g = await readCells(d, { col0: 0, row0: 0, col1: 500, row1: 200 });
      expect(g.heights.every((v) => !Number.isNaN(v))).toBe(true);
      await expect(readCells(d, { col0: 300, row0: 250, col1: 310, row1: 260 })).rejects.toThrow(/hills_d_se\.tif: damaged compressed data in tile/);
    } finally {
      rmSync(tmp, { recursive: true, force: true });
    }
  });
});

describe("VRT kinds other than a mosaic are refused in one line naming what was found", () => {
  const cases: [string, string][] = [
    ["bad_warped.vrt", 'a warped VRT (VRTDataset subClass="VRTWarpedDataset")'],
    ["bad_scaled.vrt", "a ComplexSource that computes values (<ScaleOffset>-1500</ScaleOffset>)"],
    ["bad_derived.vrt", 'a derived band (VRTRasterBand subClass="VRTDerivedRasterBand", pixel function "sum")'],
    ["bad_raw.vrt", 'a raw band (VRTRasterBand subClass="VRTRawRasterBand")'],
  ];
  for (const [file, found] of cases) {
    it(file, async () => {
      // bad_warped.vrt: gdalwarp -of VRT; bad_scaled.vrt: gdal_translate -of VRT -scale; the other
      // two written from GDAL's VRT format description (from memory).
      const f = path.join(M, file);
      const err = await openDem(f).catch((e) => e);
      expect(err).toBeInstanceOf(InputFileError);
      expect(err.message).toBe(`${f}: ${found}; only mosaics (VRTRasterBand with SimpleSource/ComplexSource, as gdalbuildvrt writes them) are read`);
    });
  }
  it("an XML file that is not a VRT, and an empty folder", async () => {
    const tmp = mkdtempSync(path.join(tmpdir(), "gsdplan-xml-"));
    try {
      const f = path.join(tmp, "x.vrt");
      writeFileSync(f, "<kml/>");
      await expect(openDem(f)).rejects.toThrow(`${f}: not a GDAL VRT (root element <kml>, <VRTDataset> expected)`);
      await expect(openDem(tmp + "/")).rejects.toThrow(/the folder holds no \.tif or \.tiff file/);
    } finally {
      rmSync(tmp, { recursive: true, force: true });
    }
  });
});

describe.skipIf(!HAS_GDAL)("inspect of a mosaic, and exact statistics against GDAL's", () => {
  it("the VRT: size, extent and exact statistics equal gdalinfo on the VRT; each source described", async () => {
    const r = await inspectDem(VRT);
    const info = gdalinfo(VRT);
    const st = gdalComputedStats(VRT);
    expect(r.kind).toBe("VRT mosaic");
    expect([r.width, r.height]).toEqual(info.size);
    expect(r.boundsNative).toEqual([500250, 5200200, 500750, 5200600]);
    expect(r.statisticsExact).toBe(true);
    expect(r.elevationM.min).toBeCloseTo(st.minimum, 3);
    expect(r.elevationM.max).toBeCloseTo(st.maximum, 3);
    expect(r.elevationM.mean).toBeCloseTo(st.mean, 3);
    expect(r.sources!.map((s) => [path.basename(s.file), s.width, s.height, s.placement, s.overviews])).toEqual([
      ["hills_a_nw.tif", 250, 200, "copied", 0],
      ["hills_b_ne.tif", 250, 200, "copied", 0],
      ["hills_c_sw.tif", 250, 200, "copied", 0],
      // gdal_translate -of COG made overviews for this tile only: as many as gdalinfo lists.
      ["hills_d_se.tif", 250, 200, "copied", (gdalinfo(TILES[3]).bands[0] as unknown as { overviews: unknown[] }).overviews.length],
    ]);
    expect(r.sources![3].overviews).toBeGreaterThan(0);
  });

  it("a list with a tile in another CRS: sources and the resampling warning", async () => {
    const r = await inspectDem([...TILES.slice(0, 3), UTM32]);
    expect(r.kind).toBe("mosaic");
    expect(r.sources!.map((s) => [s.epsg, s.placement])).toEqual([[32633, "copied"], [32633, "copied"], [32633, "copied"], [32632, "resampled"]]);
    expect(r.warnings.some((w) => /resampled bilinearly/.test(w))).toBe(true);
  });

  it("statistics are estimated (and say so) when a whole read would not fit the time budget", async () => {
    const d = await open(SOURCE);
    let t = 0;
    // A clock that runs 10 s per call: the first chunk (256 of 800 rows) already says the whole read is too slow.
    const slow = await demStatistics(d, { now: () => (t += 10_000), maxSamples: 100_000, chunkCells: 200_000 });
    expect(slow.exact).toBe(false);
    expect(slow.sampledCells).toBeLessThan(d.width * d.height);
    const big = await demStatistics(d, { maxExactCells: 1000, maxSamples: 100_000 });
    expect(big.exact).toBe(false);
    const exact = await demStatistics(d);
    expect(exact.exact).toBe(true);
    // An estimate from whole blocks lies inside the exact range.
    expect(slow.minM).toBeGreaterThanOrEqual(exact.minM);
    expect(slow.maxM).toBeLessThanOrEqual(exact.maxM);
  });
});
