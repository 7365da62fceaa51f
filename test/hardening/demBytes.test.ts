/**
 * Hostile DEM bytes through `gsdplan plan`, `gsdplan inspect` and the library (openDem +
 * readWindow, planMission): random bytes named .tif, and a header claiming 10^6 x 10^6
 * cells. One clear error line, exit code 2, nothing written (issue 8, "Hardening").
 */
import { describe, it, expect, beforeAll } from "vitest";
import { spawnSync } from "node:child_process";
import { readFileSync, writeFileSync, existsSync } from "node:fs";
import { randomBytes } from "node:crypto";
import path from "node:path";
import { HAS_GDAL } from "../helpers/tools.js";
import { CLI, ensureBuilt, expectRefusedEverywhere, smallScenario, tempDir } from "./helpers.js";

beforeAll(() => ensureBuilt(), 120_000);

describe.skipIf(!HAS_GDAL)("hostile DEM bytes", () => {
  it("random bytes named .tif: not a TIFF", async () => {
    const dir = tempDir("random");
    const s = smallScenario(dir, () => 300);
    // 4 KiB of random bytes; force a non-TIFF first byte so the test cannot pass by luck
    // of drawing "II*\0" (TIFF 6.0 section 2: the header starts II or MM, then 42).
    const bytes = randomBytes(4096);
    bytes[0] = 0x00;
    writeFileSync(s.dem, bytes);
    await expectRefusedEverywhere(s.planFile, s.dem, /dem\.tif: not a TIFF file/);
  });

  it("random bytes after a valid TIFF header: damaged, refused in one line", async () => {
    const dir = tempDir("randhdr");
    const s = smallScenario(dir, () => 300);
    const bytes = randomBytes(4096);
    // TIFF 6.0 section 2: "II", 42 as a little-endian short, then the first IFD offset.
    bytes.set([0x49, 0x49, 42, 0, 8, 0, 0, 0], 0);
    writeFileSync(s.dem, bytes);
    await expectRefusedEverywhere(s.planFile, s.dem, /dem\.tif: /);
  });

});

/**
 * A minimal little-endian baseline TIFF (TIFF 6.0, sections 2 and 8) with GeoTIFF
 * keys (GeoTIFF 1.1, OGC 19-008r4) whose header claims width x height Float32 cells
 * in one uncompressed strip. Only the header exists: no cell data follows.
 */
function craftedTiffHeader(width: number, height: number): Uint8Array {
  const entries: [tag: number, type: number, count: number, value: number | number[]][] = [
    [256, 4, 1, width], // ImageWidth, LONG
    [257, 4, 1, height], // ImageLength, LONG
    [258, 3, 1, 32], // BitsPerSample, SHORT
    [259, 3, 1, 1], // Compression: none
    [262, 3, 1, 1], // PhotometricInterpretation: BlackIsZero
    [273, 4, 1, 4096], // StripOffsets
    [277, 3, 1, 1], // SamplesPerPixel
    [278, 4, 1, height], // RowsPerStrip
    [279, 4, 1, 0xffffffff], // StripByteCounts (the real count would not fit a LONG)
    [339, 3, 1, 3], // SampleFormat: IEEE float
    [33550, 12, 3, [1, 1, 0]], // ModelPixelScaleTag, DOUBLE
    [33922, 12, 6, [0, 0, 0, 500000, 5200000, 0]], // ModelTiepointTag, DOUBLE
    // GeoKeyDirectoryTag: version 1.1.0, 3 keys: projected model, pixel-is-area, EPSG:32633.
    [34735, 3, 16, [1, 1, 0, 3, 1024, 0, 1, 1, 1025, 0, 1, 1, 3072, 0, 1, 32633]],
  ];
  const size = { 3: 2, 4: 4, 12: 8 } as Record<number, number>;
  const ifdSize = 2 + entries.length * 12 + 4;
  const buf = new ArrayBuffer(8 + ifdSize + 256);
  const dv = new DataView(buf);
  dv.setUint8(0, 0x49), dv.setUint8(1, 0x49), dv.setUint16(2, 42, true), dv.setUint32(4, 8, true);
  dv.setUint16(8, entries.length, true);
  let extra = 8 + ifdSize;
  entries.forEach(([tag, type, count, value], i) => {
    const at = 10 + i * 12;
    dv.setUint16(at, tag, true), dv.setUint16(at + 2, type, true), dv.setUint32(at + 4, count, true);
    const vals = Array.isArray(value) ? value : [value];
    const bytes = size[type] * count;
    let p = bytes <= 4 ? at + 8 : extra;
    if (bytes > 4) {
      dv.setUint32(at + 8, extra, true);
      extra += bytes;
    }
    for (const v of vals) {
      if (type === 3) dv.setUint16(p, v, true);
      else if (type === 4) dv.setUint32(p, v, true);
      else dv.setFloat64(p, v, true);
      p += size[type];
    }
  });
  dv.setUint32(10 + entries.length * 12, 0, true); // no next IFD
  return new Uint8Array(buf);
}

describe.skipIf(!HAS_GDAL)("a header claiming 10^6 x 10^6 cells", () => {
  it("GDAL reads the crafted header as 1000000 x 1000000 Float32 (the craft is a real TIFF)", () => {
    const dir = tempDir("huge-gdal");
    const f = path.join(dir, "huge.tif");
    writeFileSync(f, craftedTiffHeader(1_000_000, 1_000_000));
    const r = spawnSync("gdalinfo", ["-json", f], { encoding: "utf8", env: { ...process.env, GDAL_PAM_ENABLED: "NO" } });
    expect(r.status, r.stderr).toBe(0);
    const info = JSON.parse(r.stdout);
    expect(info.size).toEqual([1_000_000, 1_000_000]);
    expect(info.bands[0].type).toBe("Float32");
  });

  it("is refused by plan, inspect and the library before any allocation (peak RSS stays small)", async () => {
    const dir = tempDir("huge");
    const s = smallScenario(dir, () => 300);
    const healthy = path.join(dir, "healthy.tif");
    writeFileSync(healthy, readFileSync(s.dem));
    writeFileSync(s.dem, craftedTiffHeader(1_000_000, 1_000_000));
    await expectRefusedEverywhere(s.planFile, s.dem, /dem\.tif: header claims 1000000 x 1000000 cells/);

    // Peak resident memory of `inspect` on the crafted header vs on the small healthy
    // DEM: a 10^12-cell raster is 4 TB of Float32, so even one decoded row (4 MB) or an
    // index of the strips would show; refusing from the header keeps both alike.
    const peakKb = (file: string) => {
      const r = spawnSync("/usr/bin/time", ["-f", "MAXRSS %M", process.execPath, CLI, "inspect", file], { encoding: "utf8" });
      const m = /MAXRSS (\d+)/.exec(r.stderr);
      return { kb: m ? Number(m[1]) : NaN, code: r.status };
    };
    if (!existsSync("/usr/bin/time")) return; // Debian's `time` package; the refusal itself was checked above
    const huge = peakKb(s.dem);
    const ok = peakKb(healthy);
    expect(huge.code).toBe(2);
    expect(ok.code).toBe(0);
    expect(huge.kb).toBeLessThan(ok.kb + 16 * 1024);
    expect(huge.kb).toBeLessThan(200 * 1024);
  });
});

