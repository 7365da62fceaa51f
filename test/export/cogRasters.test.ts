/**
 * gsd.tif, images.tif and flags.tif as cloud-optimized GeoTIFFs, checked against outside
 * references: GDAL 3.6 from Debian (gdalinfo, gdal_translate, gdallocationinfo, and GDAL's
 * own validate_cloud_optimized_geotiff.py from python3-gdal when it is installed), the
 * geotiff package as a second reader, and GDAL's COG driver for the overview sizes.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { execFileSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fromArrayBuffer } from "geotiff";
import { HAS_GDAL } from "../helpers/tools.js";
import type { AssessmentRasters } from "../../src/assess/types.js";
import { ASSESSMENT_FLAG_KINDS, FLAG_CEILING, FLAG_CLEARANCE, FLAG_COARSE, FLAG_FEW_IMAGES, FLAG_FINE, FLAG_KEEP_OUT, FLAG_UNFLYABLE } from "../../src/assess/flags.js";
import { COG_TILE_SIZE, FLAGS_NODATA, IMAGES_NODATA, assessmentGeoTiffChunks, assessmentGeoTiffs, rasterGeoTiff, type AssessmentTiffs, type RasterCrs } from "../../src/export/geotiffRasters.js";
import { FLAG_PRIORITY, NO_FLAG_RGB, flagColour } from "../../src/export/flagPalette.js";
import { overviewSizes } from "../../src/export/overviews.js";

const dir = mkdtempSync(path.join(tmpdir(), "gsdplan-cog-"));
const BIG = { maxBuffer: 256 * 2 ** 20 };
const ENV = { ...process.env, GDAL_PAM_ENABLED: "NO" };

// 1100 x 700 cells of 2 m in UTM 33N: wider than one 512 tile, so two overviews (550 x 350, 275 x 175).
const W = 1100;
const H = 700;
const UTM33N: RasterCrs = { epsg: 32633, proj4: "+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs", geographic: false, name: "WGS 84 / UTM zone 33N" };

/** An elliptic site with a smooth GSD, an unseen patch, varied counts and flag patches, lone flags and a clash block. */
function rasters(width: number, height: number, transform: AssessmentRasters["transform"]): AssessmentRasters {
  const n = width * height;
  const inSite = new Uint8Array(n);
  const gsdCm = new Float32Array(n).fill(NaN);
  const images = new Uint16Array(n);
  const flags = new Uint16Array(n);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      const u = (x - width / 2) / (0.46 * width);
      const v = (y - height / 2) / (0.43 * height);
      if (u * u + v * v > 1) continue;
      inSite[i] = 1;
      gsdCm[i] = 2 + 0.001 * x + 0.0007 * y + 0.1 * Math.sin(x / 37) * Math.cos(y / 23);
      images[i] = ((x * 7 + y * 3) % 23) + 1;
      if (x > 300 && x < 420 && y > 200 && y < 260) flags[i] = FLAG_COARSE | FLAG_CEILING;
      if (x > 600 && x < 700 && y > 400 && y < 480) flags[i] = FLAG_FEW_IMAGES;
      if (x > 650 && x < 680 && y > 420 && y < 450) flags[i] = FLAG_FEW_IMAGES | FLAG_KEEP_OUT;
    }
  }
  const at = (x: number, y: number) => y * width + x;
  // Unseen ground inside the site: NaN GSD stays nodata.
  for (let y = 330; y < 336; y++) for (let x = 500; x < 509; x++) gsdCm[at(x, y)] = NaN;
  // A count above the nodata value saturates below it.
  images[at(width >> 1, height >> 1)] = 65535;
  // Lone flags on odd cells, and one 2 x 2 block whose OR would be 255 (the nodata value).
  flags[at(201, 301)] = FLAG_UNFLYABLE;
  flags[at(203, 303)] = FLAG_KEEP_OUT;
  flags[at(600, 300)] = 255 & ~FLAG_FINE;
  flags[at(601, 300)] = FLAG_FINE;
  flags[at(500, 200)] = FLAG_FINE | FLAG_CLEARANCE;
  return { width, height, transform, gsdCm, images, flags, inSite };
}

const r = rasters(W, H, { x0: 500_000, y0: 5_216_000, dx: 2, dy: -2 });
const files = assessmentGeoTiffs(r, UTM33N);
const NAMES = Object.keys(files) as (keyof AssessmentTiffs)[];
for (const name of NAMES) writeFileSync(path.join(dir, name), new Uint8Array(files[name]));

/** What the writer promises at full resolution: site cells' values, nodata elsewhere. */
function expectedFull(rr: AssessmentRasters) {
  const n = rr.width * rr.height;
  const gsd = new Float32Array(n);
  const images = new Uint16Array(n);
  const flags = new Uint16Array(n);
  for (let i = 0; i < n; i++) {
    const s = rr.inSite[i] === 1;
    gsd[i] = s ? rr.gsdCm[i] : NaN;
    images[i] = s ? Math.min(rr.images[i], IMAGES_NODATA - 1) : IMAGES_NODATA;
    flags[i] = s ? rr.flags[i] : FLAGS_NODATA;
  }
  return { gsd, images, flags };
}

// ---------- Reading through GDAL ----------

/** Every cell as GDAL decodes it (`gdal_translate -of ENVI`, raw samples); `ovr` picks an overview (0 = the first). */
function gdalCells(file: string, type: "Float32" | "UInt16", ovr?: number): { width: number; height: number; values: Float32Array | Uint16Array } {
  const out = path.join(dir, `read-${path.basename(file)}-${ovr ?? "full"}.bin`);
  execFileSync("gdal_translate", ["-q", "-of", "ENVI", ...(ovr === undefined ? [] : ["-ovr", String(ovr)]), file, out], { env: ENV });
  const hdr = readFileSync(out.replace(/\.bin$/, ".hdr"), "utf8");
  const num = (key: string) => Number(new RegExp(`${key}\\s*=\\s*(\\d+)`).exec(hdr)![1]);
  // ENVI header (ENVI file formats): byte order 0 = little-endian, the order of this host's typed arrays.
  expect(num("byte order")).toBe(0);
  const b = readFileSync(out);
  const ab = b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength);
  return { width: num("samples"), height: num("lines"), values: type === "Float32" ? new Float32Array(ab) : new Uint16Array(ab) };
}

function gdalinfo(file: string) {
  return JSON.parse(execFileSync("gdalinfo", ["-json", file], { ...BIG, encoding: "utf8", env: ENV }));
}

/** Float32 arrays equal bit for bit, NaN matching NaN. */
function sameFloats(a: Float32Array, b: Float32Array): number {
  let mismatches = 0;
  for (let i = 0; i < a.length; i++) {
    const x = a[i];
    const y = b[i];
    if (Number.isNaN(x) !== Number.isNaN(y) || (!Number.isNaN(x) && x !== y)) mismatches++;
  }
  return mismatches;
}

// ---------- The COG layout rules, read from the bytes ----------

interface Ifd {
  offset: number;
  tags: Map<number, number[]>;
}

/**
 * The IFD chain of a little-endian classic TIFF (TIFF 6.0 section 2), with numeric tag
 * values (ASCII as character codes), parsed here without the code under test.
 */
function readIfds(buf: Buffer): Ifd[] {
  expect(buf.toString("latin1", 0, 2)).toBe("II");
  expect(buf.readUInt16LE(2)).toBe(42);
  const size: Record<number, number> = { 1: 1, 2: 1, 3: 2, 4: 4, 12: 8 };
  const out: Ifd[] = [];
  let off = buf.readUInt32LE(4);
  while (off !== 0) {
    const n = buf.readUInt16LE(off);
    const tags = new Map<number, number[]>();
    for (let i = 0; i < n; i++) {
      const e = off + 2 + 12 * i;
      const tag = buf.readUInt16LE(e);
      const type = buf.readUInt16LE(e + 2);
      const count = buf.readUInt32LE(e + 4);
      const bytes = size[type] * count;
      const at = bytes <= 4 ? e + 8 : buf.readUInt32LE(e + 8);
      const vals: number[] = [];
      for (let k = 0; k < count; k++) {
        const p = at + k * size[type];
        vals.push(type === 3 ? buf.readUInt16LE(p) : type === 4 ? buf.readUInt32LE(p) : type === 12 ? buf.readDoubleLE(p) : buf[p]);
      }
      tags.set(tag, vals);
    }
    out.push({ offset: off, tags });
    off = buf.readUInt32LE(off + 2 + 12 * n);
  }
  return out;
}

/**
 * The checks of GDAL's validate_cloud_optimized_geotiff.py (GDAL 3.6, python3-gdal), done on
 * the bytes here too, so they run where python3-gdal is not installed: the main IFD right
 * after the header and GDAL's structural metadata ("ghost header"); IFDs by increasing
 * offset and overviews by decreasing size, all tiled; the smallest overview's first tile
 * after the last IFD, each larger image's tiles after the smaller one's; with
 * BLOCK_ORDER=ROW_MAJOR, tiles in row-major order; with BLOCK_LEADER=SIZE_AS_UINT4, the
 * 4 bytes before each tile give its size; with BLOCK_TRAILER=LAST_4_BYTES_REPEATED, its
 * last 4 bytes follow it again. Returns the list of broken rules.
 */
function cogLayoutErrors(buf: Buffer): string[] {
  const errors: string[] = [];
  const ifds = readIfds(buf);
  const pattern = "GDAL_STRUCTURAL_METADATA_SIZE=";
  let expectedIfd = 8;
  let md = "";
  if (buf.toString("latin1", 8, 8 + pattern.length) === pattern) {
    const size = Number(buf.toString("latin1", 8 + pattern.length, 8 + pattern.length + 6));
    const line = `${pattern}000000 bytes\n`.length;
    md = buf.toString("latin1", 8 + line, 8 + line + size);
    expectedIfd = 8 + line + size;
    expectedIfd += expectedIfd % 2;
  }
  if (ifds[0].offset !== expectedIfd) errors.push(`main IFD at ${ifds[0].offset}, expected ${expectedIfd}`);
  const dims = ifds.map((d) => [d.tags.get(256)![0], d.tags.get(257)![0]]);
  for (let k = 1; k < ifds.length; k++) {
    if (ifds[k].offset < ifds[k - 1].offset) errors.push(`IFD ${k} before IFD ${k - 1}`);
    if (dims[k][0] > dims[k - 1][0] || dims[k][1] > dims[k - 1][1]) errors.push(`image ${k} larger than image ${k - 1}`);
    if (ifds[k].tags.get(254)?.[0] !== 1) errors.push(`image ${k} not marked reduced-resolution (NewSubfileType)`);
  }
  for (const [k, d] of ifds.entries()) if (!d.tags.has(322) || !d.tags.has(324)) errors.push(`image ${k} not tiled`);
  const firstTile = ifds.map((d) => d.tags.get(324)!.find((o) => o > 0) ?? 0);
  const last = ifds.length - 1;
  if (firstTile[last] < ifds[last].offset) errors.push("smallest overview's data before its IFD");
  for (let k = last - 1; k >= 0; k--) if (firstTile[k] < firstTile[k + 1]) errors.push(`image ${k}'s data before image ${k + 1}'s`);
  for (const [k, d] of ifds.entries()) {
    const offsets = d.tags.get(324)!;
    const counts = d.tags.get(325)!;
    let prev = 0;
    offsets.forEach((o, i) => {
      if (md.includes("BLOCK_ORDER=ROW_MAJOR") && o < prev) errors.push(`image ${k} tile ${i} out of row-major order`);
      if (md.includes("BLOCK_LEADER=SIZE_AS_UINT4") && buf.readUInt32LE(o - 4) !== counts[i]) errors.push(`image ${k} tile ${i}: leader`);
      if (md.includes("BLOCK_TRAILER=LAST_4_BYTES_REPEATED") && !buf.subarray(o + counts[i] - 4, o + counts[i]).equals(buf.subarray(o + counts[i], o + counts[i] + 4))) {
        errors.push(`image ${k} tile ${i}: trailer`);
      }
      prev = o;
    });
  }
  return errors;
}

/** GDAL's validator script and a Python that has the GDAL bindings, when python3-gdal is installed. */
function gdalValidator(): { python: string; script: string } | undefined {
  const script = [
    "/usr/lib/python3/dist-packages/osgeo_utils/samples/validate_cloud_optimized_geotiff.py",
    "/usr/share/doc/python3-gdal/examples/validate_cloud_optimized_geotiff.py",
  ].find((p) => existsSync(p));
  if (!script) return undefined;
  for (const python of ["/usr/bin/python3", "python3"]) {
    try {
      execFileSync(python, ["-c", "import osgeo.gdal"], { stdio: "ignore" });
      return { python, script };
    } catch {
      // try the next one
    }
  }
  return undefined;
}

// ---------- Tests ----------

describe("the COG layout, by the rules of GDAL's validate_cloud_optimized_geotiff.py (checked on the bytes)", () => {
  it.each(NAMES)("%s: IFDs first, overviews smallest first, tiles row-major with leader and trailer", (name) => {
    const buf = readFileSync(path.join(dir, name));
    expect(cogLayoutErrors(buf)).toEqual([]);
    expect(readIfds(buf).map((d) => [d.tags.get(256)![0], d.tags.get(257)![0]])).toEqual([[W, H], [550, 350], [275, 175]]);
  });

  it("the rules can fail: a file with its overview tiles after the full-resolution ones is refused", () => {
    const buf = Buffer.from(readFileSync(path.join(dir, "images.tif")));
    const ifds = readIfds(buf);
    // Point the first overview's first tile past the full-resolution tiles (rewrite its TileOffsets value in place).
    const off = ifds[1].offset;
    const n = buf.readUInt16LE(off);
    for (let i = 0; i < n; i++) {
      const e = off + 2 + 12 * i;
      if (buf.readUInt16LE(e) === 324) buf.writeUInt32LE(buf.length - 8, buf.readUInt32LE(e + 4) * 4 > 4 ? buf.readUInt32LE(e + 8) : e + 8);
    }
    expect(cogLayoutErrors(buf).join("; ")).toMatch(/image 0's data before image 1's/);
  });
});

describe.skipIf(!HAS_GDAL)("COGs read by GDAL (Debian gdal-bin 3.6)", () => {
  const validator = HAS_GDAL ? gdalValidator() : undefined;
  beforeAll(() => {
    if (HAS_GDAL && !validator) process.stderr.write("NOTICE: GDAL's validate_cloud_optimized_geotiff.py (Debian python3-gdal) not found; the same rules are checked on the bytes above\n");
  });

  it.skipIf(!validator).each(NAMES)("%s: GDAL's validate_cloud_optimized_geotiff.py --full-check=yes finds no error and no warning", (name) => {
    const out = execFileSync(validator!.python, [validator!.script, "--full-check=yes", path.join(dir, name)], { encoding: "utf8", env: ENV });
    expect(out).toMatch(/is a valid cloud optimized GeoTIFF/);
    expect(out).not.toMatch(/warning/i);
  });

  it.each([
    ["gsd.tif", "Float32", "NaN"],
    ["images.tif", "UInt16", IMAGES_NODATA],
    ["flags.tif", "UInt16", FLAGS_NODATA],
  ] as const)("%s: gdalinfo lists the overviews, 512 x 512 tiles, LAYOUT=COG, %s, nodata %s", (name, type, nodata) => {
    const j = gdalinfo(path.join(dir, name));
    const b = j.bands[0];
    expect(j.size).toEqual([W, H]);
    expect(j.geoTransform).toEqual([500_000, 2, 0, 5_216_000, 0, -2]);
    expect(j.coordinateSystem.wkt).toMatch(/ID\["EPSG",32633\]\]$/);
    expect(b.type).toBe(type);
    expect(b.noDataValue).toBe(nodata);
    expect(b.block).toEqual([COG_TILE_SIZE, COG_TILE_SIZE]);
    expect(b.overviews.map((o: { size: number[] }) => o.size)).toEqual([[550, 350], [275, 175]]);
    // GDAL reports LAYOUT=COG from the structural metadata its COG driver writes (gdal.org, COG driver).
    expect(j.metadata.IMAGE_STRUCTURE.LAYOUT).toBe("COG");
    expect(j.metadata.IMAGE_STRUCTURE.COMPRESSION ?? "NONE").toBe(name === "gsd.tif" ? "NONE" : "DEFLATE");
    expect(j.metadata[""].AREA_OR_POINT).toBe("Area");
  });

  it("band descriptions and units: gsd.tif in cm, flags.tif names its bits (FLAG_n items)", () => {
    const gsd = gdalinfo(path.join(dir, "gsd.tif")).bands[0];
    expect(gsd.description).toMatch(/GSD/);
    expect(gsd.unit).toBe("cm");
    expect(gdalinfo(path.join(dir, "images.tif")).bands[0].description).toMatch(/number of images/);
    const flags = gdalinfo(path.join(dir, "flags.tif")).bands[0];
    expect(flags.description).toMatch(/flag bits/);
    for (const k of ASSESSMENT_FLAG_KINDS) expect(flags.metadata[""][`FLAG_${k.bit}`]).toBe(k.label);
  });

  it.each(NAMES)("%s: the GDAL_METADATA XML is the one GDAL writes itself for the same band (gdal_translate copy)", (name) => {
    const copy = path.join(dir, `copy-${name}`);
    execFileSync("gdal_translate", ["-q", path.join(dir, name), copy], { env: ENV });
    const xml = (file: string) => String.fromCharCode(...(readIfds(readFileSync(file))[0].tags.get(42112) ?? []));
    expect(xml(path.join(dir, name))).toMatch(/^<GDALMetadata>/);
    expect(xml(path.join(dir, name))).toBe(xml(copy));
  });

  it("GDAL reads every cell unchanged at full resolution (gdal_translate -of ENVI), Float32 bit for bit", () => {
    const want = expectedFull(r);
    const gsd = gdalCells(path.join(dir, "gsd.tif"), "Float32");
    expect([gsd.width, gsd.height]).toEqual([W, H]);
    expect(sameFloats(gsd.values as Float32Array, want.gsd)).toBe(0);
    expect(Array.from(gdalCells(path.join(dir, "images.tif"), "UInt16").values)).toEqual(Array.from(want.images));
    expect(Array.from(gdalCells(path.join(dir, "flags.tif"), "UInt16").values)).toEqual(Array.from(want.flags));
    // Spot checks through another GDAL tool: the saturated count and a flag combination.
    const at = (name: string, x: number, y: number) => execFileSync("gdallocationinfo", ["-valonly", path.join(dir, name), String(x), String(y)], { encoding: "utf8", env: ENV }).trim();
    expect(at("images.tif", W >> 1, H >> 1)).toBe(String(IMAGES_NODATA - 1));
    expect(at("flags.tif", 660, 430)).toBe(String(FLAG_FEW_IMAGES | FLAG_KEEP_OUT));
    expect(at("gsd.tif", 503, 332)).toBe("nan");
  });

  it("overview 1 of images.tif: nearest neighbour, the top-left cell of each 2 x 2 block or the first other one with a value", () => {
    const want = expectedFull(r).images;
    const got = gdalCells(path.join(dir, "images.tif"), "UInt16", 0);
    expect([got.width, got.height]).toEqual([550, 350]);
    let diff = 0;
    for (let y = 0; y < 350; y++) {
      for (let x = 0; x < 550; x++) {
        const block = [[2 * x, 2 * y], [2 * x + 1, 2 * y], [2 * x, 2 * y + 1], [2 * x + 1, 2 * y + 1]].map(([cx, cy]) => want[cy * W + cx]);
        const v = block.find((b) => b !== IMAGES_NODATA) ?? IMAGES_NODATA;
        if (got.values[y * 550 + x] !== v) diff++;
      }
    }
    expect(diff).toBe(0);
  });

  it("overview 1 of flags.tif: bitwise OR of the block's cells with a value, so lone flags stay visible; an OR equal to nodata drops the 'finer' bit", () => {
    const want = expectedFull(r).flags;
    const got = gdalCells(path.join(dir, "flags.tif"), "UInt16", 0);
    let diff = 0;
    for (let y = 0; y < 350; y++) {
      for (let x = 0; x < 550; x++) {
        const block = [want[2 * y * W + 2 * x], want[2 * y * W + 2 * x + 1], want[(2 * y + 1) * W + 2 * x], want[(2 * y + 1) * W + 2 * x + 1]].filter((b) => b !== FLAGS_NODATA);
        let v = block.length === 0 ? FLAGS_NODATA : block.reduce((a, b) => a | b, 0);
        if (block.length > 0 && v === FLAGS_NODATA) v &= ~FLAG_FINE;
        if (got.values[y * 550 + x] !== v) diff++;
      }
    }
    expect(diff).toBe(0);
    // The lone flags on odd cells survive the halving; the clash block keeps all but the 'finer' bit.
    expect(got.values[150 * 550 + 100]).toBe(FLAG_UNFLYABLE);
    expect(got.values[151 * 550 + 101]).toBe(FLAG_KEEP_OUT);
    expect(got.values[150 * 550 + 300]).toBe(255 & ~FLAG_FINE);
  });

  it("overviews 1 and 2 of gsd.tif: the mean of the full-resolution cells with a value in each 2 x 2 and 4 x 4 block", () => {
    const want = expectedFull(r).gsd;
    for (const [ovr, f, w2, h2] of [[0, 2, 550, 350], [1, 4, 275, 175]] as const) {
      const got = gdalCells(path.join(dir, "gsd.tif"), "Float32", ovr);
      expect([got.width, got.height]).toEqual([w2, h2]);
      let worst = 0;
      let nanMismatch = 0;
      for (let y = 0; y < h2; y++) {
        for (let x = 0; x < w2; x++) {
          let s = 0;
          let c = 0;
          for (let dy = 0; dy < f; dy++) {
            for (let dx = 0; dx < f; dx++) {
              const cx = f * x + dx;
              const cy = f * y + dy;
              if (cx >= W || cy >= H) continue;
              const v = want[cy * W + cx];
              if (!Number.isNaN(v)) {
                s += v;
                c++;
              }
            }
          }
          const g = got.values[y * w2 + x];
          if (c === 0 || Number.isNaN(g)) {
            if ((c === 0) !== Number.isNaN(g)) nanMismatch++;
            continue;
          }
          worst = Math.max(worst, Math.abs(g - s / c));
        }
      }
      expect(nanMismatch).toBe(0);
      // Float32 rounding of a mean near 3 cm: half an ulp is 1.2e-7.
      expect(worst).toBeLessThan(3e-7);
    }
  });

  it("flags.tif is a palette image GDAL reads with 65536 colours: each value the colour of its most severe flag", () => {
    const b = gdalinfo(path.join(dir, "flags.tif")).bands[0];
    expect(b.colorInterpretation).toBe("Palette");
    expect(b.colorTable.palette).toBe("RGB");
    expect(b.colorTable.count).toBe(65536);
    const e: number[][] = b.colorTable.entries;
    // Colours of the report's flag map (src/report/render.ts FLAG_STYLE), by the priority rule of flagPalette.ts.
    expect(e[0]).toEqual([...NO_FLAG_RGB, 255]);
    expect(e[FLAG_COARSE]).toEqual([0xb4, 0x04, 0x26, 255]);
    expect(e[FLAG_COARSE | FLAG_CEILING]).toEqual([0xb4, 0x04, 0x26, 255]);
    expect(e[FLAG_COARSE | FLAG_UNFLYABLE]).toEqual([0xd6, 0x27, 0x28, 255]);
    expect(e[FLAG_FINE]).toEqual([0x3b, 0x4c, 0xc0, 255]);
    expect(e[FLAG_FINE | FLAG_CLEARANCE]).toEqual([0x8c, 0x51, 0x0a, 255]);
    expect(e[FLAG_FEW_IMAGES | FLAG_KEEP_OUT]).toEqual([0x7b, 0x32, 0x94, 255]);
    expect(e[FLAG_KEEP_OUT]).toEqual([0x01, 0x66, 0x5e, 255]);
    // GDAL gives the nodata entry alpha 0, so a GIS draws nodata transparent.
    expect(e[FLAGS_NODATA][3]).toBe(0);
    // Every value a cell can hold (nine bits) reads back as the rule's colour.
    for (let v = 0; v < 512; v++) if (v !== FLAGS_NODATA) expect(e[v]).toEqual([...flagColour(v), 255]);
  });

  it("the geotiff package reads the full-resolution image and finds the overviews as further images", async () => {
    const want = expectedFull(r);
    for (const [name, w] of [["gsd.tif", want.gsd], ["images.tif", want.images], ["flags.tif", want.flags]] as const) {
      const tiff = await fromArrayBuffer(files[name]);
      expect(await tiff.getImageCount()).toBe(3);
      const img = await tiff.getImage(0);
      const [band] = (await img.readRasters()) as unknown as (Float32Array | Uint16Array)[];
      if (band instanceof Float32Array) expect(sameFloats(band, w as Float32Array)).toBe(0);
      else expect(Array.from(band)).toEqual(Array.from(w));
      expect((await tiff.getImage(2)).getWidth()).toBe(275);
    }
  });

  it("a geographic CRS: the DEM's own degrees, EPSG:4326, read back by GDAL with overviews and every value", () => {
    const arcsec = 1 / 3600;
    const geo = rasters(600, 520, { x0: 15.25, y0: 47.1, dx: arcsec, dy: -arcsec });
    const tiffs = assessmentGeoTiffs(geo, { epsg: 4326, proj4: "+proj=longlat +datum=WGS84 +no_defs", geographic: true, name: "WGS 84" });
    const want = expectedFull(geo);
    for (const name of NAMES) {
      const f = path.join(dir, `geo-${name}`);
      writeFileSync(f, new Uint8Array(tiffs[name]));
      const j = gdalinfo(f);
      expect(j.coordinateSystem.wkt).toMatch(/^GEOGCRS\["WGS 84"/);
      expect(j.coordinateSystem.wkt).toMatch(/ID\["EPSG",4326\]\]$/);
      const [x0, dx, rx, y0, ry, dy] = j.geoTransform;
      expect([x0, rx, y0, ry]).toEqual([15.25, 0, 47.1, 0]);
      expect(dx).toBeCloseTo(arcsec, 15);
      expect(dy).toBeCloseTo(-arcsec, 15);
      expect(j.bands[0].overviews.map((o: { size: number[] }) => o.size)).toEqual([[300, 260]]);
      expect(cogLayoutErrors(readFileSync(f))).toEqual([]);
    }
    expect(sameFloats(gdalCells(path.join(dir, "geo-gsd.tif"), "Float32").values as Float32Array, want.gsd)).toBe(0);
    expect(Array.from(gdalCells(path.join(dir, "geo-flags.tif"), "UInt16").values)).toEqual(Array.from(want.flags));
    // A point by its longitude and latitude: cell (123, 77)'s centre.
    const lon = 15.25 + 123.5 * arcsec;
    const lat = 47.1 - 77.5 * arcsec;
    const v = execFileSync("gdallocationinfo", ["-valonly", "-wgs84", path.join(dir, "geo-images.tif"), String(lon), String(lat)], { encoding: "utf8", env: ENV }).trim();
    expect(v).toBe(String(want.images[77 * 600 + 123]));
  });

  it("Deflate with the floating-point predictor (3) and the horizontal one (2): GDAL reads every Float32, UInt16 and Byte value", () => {
    // 700 x 300: two tiles across, the second mostly padding; values that stress each byte plane.
    const w = 700;
    const h = 300;
    const grid = { width: w, height: h, transform: { x0: 500_000, y0: 5_216_000, dx: 2, dy: -2 } };
    const f32 = new Float32Array(w * h);
    const u16 = new Uint16Array(w * h);
    const u8 = new Uint8Array(w * h);
    let s = 12345;
    for (let i = 0; i < f32.length; i++) {
      s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
      f32[i] = i % 97 === 0 ? NaN : i % 89 === 0 ? -0 : (s / 2 ** 32 - 0.5) * 10 ** ((i % 13) - 6);
      u16[i] = s >>> 16;
      u8[i] = s >>> 24;
    }
    const cases = [
      ["f32.tif", rasterGeoTiff(f32, grid, UTM33N, "nan"), "3"],
      ["u16.tif", rasterGeoTiff(u16, grid, UTM33N), "2"],
      ["u8.tif", rasterGeoTiff(u8, grid, UTM33N), "2"],
    ] as const;
    for (const [name, data, predictor] of cases) {
      writeFileSync(path.join(dir, name), new Uint8Array(data));
      const j = gdalinfo(path.join(dir, name));
      expect(j.metadata.IMAGE_STRUCTURE).toMatchObject({ COMPRESSION: "DEFLATE", PREDICTOR: predictor, LAYOUT: "COG" });
    }
    const got = gdalCells(path.join(dir, "f32.tif"), "Float32").values as Float32Array;
    // Bit for bit, -0 included.
    let diff = 0;
    for (let i = 0; i < f32.length; i++) if (!Object.is(got[i], f32[i]) && !(Number.isNaN(got[i]) && Number.isNaN(f32[i]))) diff++;
    expect(diff).toBe(0);
    expect(Array.from(gdalCells(path.join(dir, "u16.tif"), "UInt16").values)).toEqual(Array.from(u16));
    const raw = path.join(dir, "u8.bin");
    execFileSync("gdal_translate", ["-q", "-of", "ENVI", path.join(dir, "u8.tif"), raw], { env: ENV });
    expect([...readFileSync(raw)]).toEqual([...u8]);
  });

  it("odd sizes, three overviews (2105 x 1029): each level GDAL reads of images.tif and flags.tif is its 2 x 2 rule applied to the level before; gsd.tif's level k is the mean of each 2^k x 2^k block", () => {
    // Odd width and height at full resolution and in the overviews, and a last band of tiles
    // 5 rows high: the edges where a block misses its right or bottom cells.
    const w0 = 2105;
    const h0 = 1029;
    const odd = rasters(w0, h0, { x0: 500_000, y0: 5_216_000, dx: 2, dy: -2 });
    // Values along the right and bottom edges too (the ellipse stops short of them), a few unseen.
    for (let y = 0; y < h0; y++) {
      for (let x = 0; x < w0; x++) {
        if (x < w0 - 40 && y < h0 - 40) continue;
        const i = y * w0 + x;
        // Some outside the site, so an edge block's first cell is sometimes nodata.
        odd.inSite[i] = (3 * x + y) % 5 === 0 ? 0 : 1;
        odd.gsdCm[i] = (x + y) % 7 === 0 ? NaN : 2.5 + 0.0003 * x + 0.1 * Math.sin(y / 5);
        odd.images[i] = (x * 5 + y) % 11;
        odd.flags[i] = (x + 2 * y) % 13 === 0 ? FLAG_CEILING : (x * y) % 17 === 0 ? FLAG_FINE : 0;
      }
    }
    const tiffs = assessmentGeoTiffs(odd, UTM33N);
    for (const name of NAMES) {
      writeFileSync(path.join(dir, `odd-${name}`), new Uint8Array(tiffs[name]));
      expect(cogLayoutErrors(readFileSync(path.join(dir, `odd-${name}`)))).toEqual([]);
      // Streamed in chunks (how plans write them): the same bytes; gsd.tif (uncompressed) as its
      // header and IFDs, then one chunk per tile row of each image in file order, smallest
      // overview first: 129, 258 and 515 rows (1, 1 and 2 rows of 512-pixel tiles), then the
      // full resolution's 1029 (3). A chunk is valid until the next is asked for (the tile rows
      // share one buffer): copied as they come.
      const chunks: Uint8Array[] = [];
      for (const c of assessmentGeoTiffChunks(odd, UTM33N, name)) chunks.push(c.slice());
      expect(Buffer.concat(chunks).equals(Buffer.from(tiffs[name])), name).toBe(true);
      if (name === "gsd.tif") {
        expect(chunks.length).toBe(1 + 1 + 1 + 2 + 3);
        // No chunk wider than one full-resolution tile row (5 tiles of 512 x 512 x 4 bytes, each with its 4-byte leader and trailer).
        expect(Math.max(...chunks.slice(1).map((c) => c.length))).toBe(5 * (512 * 512 * 4 + 8));
      }
    }
    const sizes = overviewSizes(w0, h0, 512);
    expect(sizes).toEqual([[1053, 515], [527, 258], [264, 129]]);
    const want = expectedFull(odd);
    let images: { width: number; height: number; values: ArrayLike<number> } = { width: w0, height: h0, values: want.images };
    let flags: { width: number; height: number; values: ArrayLike<number> } = { width: w0, height: h0, values: want.flags };
    for (const [k, [w, h]] of sizes.entries()) {
      const gotImages = gdalCells(path.join(dir, "odd-images.tif"), "UInt16", k);
      const gotFlags = gdalCells(path.join(dir, "odd-flags.tif"), "UInt16", k);
      expect([gotImages.width, gotImages.height, gotFlags.width, gotFlags.height]).toEqual([w, h, w, h]);
      let diff = 0;
      for (let y = 0; y < h; y++) {
        for (let x = 0; x < w; x++) {
          // The block's cells inside the level before, top-left, top-right, bottom-left, bottom-right.
          const cells = [[2 * x, 2 * y], [2 * x + 1, 2 * y], [2 * x, 2 * y + 1], [2 * x + 1, 2 * y + 1]].filter(([cx, cy]) => cx < images.width && cy < images.height);
          const iv = cells.map(([cx, cy]) => images.values[cy * images.width + cx]).find((v) => v !== IMAGES_NODATA) ?? IMAGES_NODATA;
          const fv = cells.map(([cx, cy]) => flags.values[cy * flags.width + cx]).filter((v) => v !== FLAGS_NODATA);
          let or = fv.length === 0 ? FLAGS_NODATA : fv.reduce((a, b) => a | b, 0);
          if (fv.length > 0 && or === FLAGS_NODATA) or &= ~FLAG_FINE;
          if (gotImages.values[y * w + x] !== iv) diff++;
          if (gotFlags.values[y * w + x] !== or) diff++;
        }
      }
      expect(diff).toBe(0);
      images = gotImages;
      flags = gotFlags;

      const f = 2 ** (k + 1);
      const gsd = gdalCells(path.join(dir, "odd-gsd.tif"), "Float32", k);
      expect([gsd.width, gsd.height]).toEqual([w, h]);
      let nanMismatch = 0;
      let beyondRounding = 0;
      for (let y = 0; y < h; y++) {
        for (let x = 0; x < w; x++) {
          let s = 0;
          let c = 0;
          for (let cy = f * y; cy < Math.min(f * (y + 1), h0); cy++) {
            for (let cx = f * x; cx < Math.min(f * (x + 1), w0); cx++) {
              const v = want.gsd[cy * w0 + cx];
              if (!Number.isNaN(v)) {
                s += v;
                c++;
              }
            }
          }
          const g = gsd.values[y * w + x];
          if (c === 0 || Number.isNaN(g)) {
            if ((c === 0) !== Number.isNaN(g)) nanMismatch++;
            continue;
          }
          // IEEE 754 binary32: rounding to nearest is within half an ulp, at most 2^-24 of the value.
          if (Math.abs(g - s / c) > (s / c) * 2 ** -24 * 1.001) beyondRounding++;
        }
      }
      expect(nanMismatch).toBe(0);
      expect(beyondRounding).toBe(0);
    }
  });

  it("overview sizes are gdaladdo's for factors 2, 4, 8... and stop once one fits a 512 tile, as GDAL's COG driver stops", () => {
    for (const [w, h] of [[1100, 701], [513, 40], [2049, 1000], [40, 1025]]) {
      const f = path.join(dir, `gdaladdo-${w}x${h}.tif`);
      execFileSync("gdal_translate", ["-q", "-outsize", String(w), String(h), path.join(dir, "images.tif"), f], { env: ENV });
      const ours = overviewSizes(w, h, 512);
      execFileSync("gdaladdo", ["-q", f, ...ours.map((_, k) => String(2 ** (k + 1)))], { env: ENV });
      expect(ours).toEqual(gdalinfo(f).bands[0].overviews.map((o: { size: number[] }) => o.size));
      expect(Math.max(...ours[ours.length - 1])).toBeLessThanOrEqual(512);
      expect(Math.max(...(ours[ours.length - 2] ?? [w, h]))).toBeGreaterThan(512);
    }
    // GDAL's COG driver makes as many levels where rounding does not matter.
    const f = path.join(dir, "gdal-cog.tif");
    execFileSync("gdal_translate", ["-q", "-of", "COG", "-co", "BLOCKSIZE=512", path.join(dir, "images.tif"), f], { env: ENV });
    expect(gdalinfo(f).bands[0].overviews.map((o: { size: number[] }) => o.size)).toEqual(overviewSizes(W, H, 512));
  });
});

describe("the colour rule of flags.tif", () => {
  it("FLAG_PRIORITY names every flag kind exactly once", () => {
    expect([...FLAG_PRIORITY].sort()).toEqual(ASSESSMENT_FLAG_KINDS.map((k) => k.key).sort());
  });
  it("the most severe flag wins: unflyable over coarse, coarse over ceiling, anything over 'finer'", () => {
    expect(flagColour(FLAG_UNFLYABLE | FLAG_COARSE)).toEqual(flagColour(FLAG_UNFLYABLE));
    expect(flagColour(FLAG_COARSE | FLAG_CEILING)).toEqual(flagColour(FLAG_COARSE));
    expect(flagColour(FLAG_FINE | FLAG_CLEARANCE)).toEqual(flagColour(FLAG_CLEARANCE));
    expect(flagColour(0)).toEqual(NO_FLAG_RGB);
  });
});
