import { describe, it, expect, beforeAll } from "vitest";
import { spawnSync, execFileSync } from "node:child_process";
import { existsSync } from "node:fs";
import { HAS_GDAL } from "../helpers/tools.js";
import { gdalinfo, gdalComputedStats } from "./gdal-helpers.js";

// The built CLI, as a user runs it. Bad input must give one line naming the file and the
// problem, exit code 2 and no stack trace (issue 2, "Bad input").
const CLI = "dist/bundle/main.js";
beforeAll(() => {
  if (!existsSync(CLI)) execFileSync("npm", ["run", "build"], { stdio: "ignore" });
}, 120_000);

function run(args: string[]) {
  const r = spawnSync(process.execPath, [CLI, ...args], { encoding: "utf8" });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

describe("gsdplan inspect: bad input", () => {
  const cases: [string, string[], RegExp][] = [
    ["not a TIFF", ["fixtures/gdal/bad_notatiff.tif"], /bad_notatiff\.tif: not a TIFF file/],
    ["truncated TIFF", ["fixtures/gdal/bad_truncated.tif"], /bad_truncated\.tif: truncated TIFF/],
    ["no georeferencing", ["fixtures/gdal/bad_nogeoref.tif"], /bad_nogeoref\.tif: no georeferencing/],
    ["rotated transform", ["fixtures/gdal/bad_rotated.tif"], /bad_rotated\.tif: rotated transforms are not supported: north-up only/],
    ["absurd dimensions", ["fixtures/gdal/bad_absurd_dims.tif"], /bad_absurd_dims\.tif: header claims 3000000 x 3000000 cells/],
    ["unknown EPSG code", ["fixtures/gdal/bad_unknown_epsg.tif"], /bad_unknown_epsg\.tif: unknown EPSG code 32699/],
    ["band beyond the file's bands", ["--band", "4", "fixtures/gdal/utm33_i16_3band.tif"], /band.*got 4.*1 to 3/],
    ["band not a number", ["--band", "two", "fixtures/gdal/utm33_i16_3band.tif"], /--band.*"two"/],
    ["missing file", ["fixtures/gdal/no_such_file.tif"], /no_such_file\.tif: cannot open the file/],
    ["unknown vertical unit", ["--vertical-unit", "furlong", "fixtures/gdal/hills_utm33_f32.tif"], /verticalUnit.*"furlong"/],
  ];
  for (const [what, args, msg] of cases) {
    it(`${what}: one line, exit 2, no stack trace`, () => {
      const r = run(["inspect", ...args]);
      expect(r.code).toBe(2);
      expect(r.out).toBe("");
      const lines = r.err.trimEnd().split("\n");
      expect(lines).toHaveLength(1);
      expect(lines[0]).toMatch(/^gsdplan: /);
      expect(lines[0]).toMatch(msg);
      expect(r.err).not.toMatch(/\n\s+at /);
    });
  }
  it("--debug adds the stack trace", () => {
    const r = run(["--debug", "inspect", "fixtures/gdal/bad_rotated.tif"]);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/\n\s+at /);
  });
});

describe.skipIf(!HAS_GDAL)("gsdplan inspect --json against gdalinfo", () => {
  const files = ["hills_utm33_f32.tif", "hills_ca3_ftus_f32.tif", "geo4326_i16_lzw.tif", "utm32_i32_scaled_raw.tif", "utm33_f64_point_deflate.tif", "userdef_sterea_i16.tif"];
  for (const f of files) {
    it(`${f}: size, bounds and exact statistics match gdalinfo -stats`, () => {
      const r = run(["inspect", "--json", `fixtures/gdal/${f}`]);
      expect(r.code, r.err).toBe(0);
      const j = JSON.parse(r.out);
      const info = gdalinfo(`fixtures/gdal/${f}`);
      const st = gdalComputedStats(`fixtures/gdal/${f}`);
      expect([j.width, j.height]).toEqual(info.size);
      const [x0, dx, , y0, , dy] = info.geoTransform;
      expect(j.boundsNative[0]).toBeCloseTo(x0, 6);
      expect(j.boundsNative[3]).toBeCloseTo(y0, 6);
      expect(j.boundsNative[2]).toBeCloseTo(x0 + dx * info.size[0], 6);
      expect(j.boundsNative[1]).toBeCloseTo(y0 + dy * info.size[1], 6);
      const b = info.bands[0];
      // GDAL's statistics are of the unscaled values, in the file's vertical unit.
      const unitM = f.includes("ftus") ? 1200 / 3937 : 1;
      const scale = b.scale ?? 1, offset = b.offset ?? 0;
      expect(j.statisticsExact).toBe(true);
      expect(j.elevationM.min).toBeCloseTo((st.minimum * scale + offset) * unitM, 2);
      expect(j.elevationM.max).toBeCloseTo((st.maximum * scale + offset) * unitM, 2);
      expect(j.elevationM.mean).toBeCloseTo((st.mean * scale + offset) * unitM, 2);
      expect(Math.abs(j.nodataFraction - (1 - st.validPercent / 100))).toBeLessThan(1e-4);
      expect(typeof j.verticalUnit).toBe("string");
      expect(j.boundsWgs84).toHaveLength(4);
      expect(j.cellSizeM).toHaveLength(2);
    });
  }
  it("reports the compound CRS's vertical unit and datum", () => {
    const j = JSON.parse(run(["inspect", "--json", "fixtures/gdal/hills_ca3_ftus_f32.tif"]).out);
    // EPSG:2227 + EPSG:6360 (NAVD88 height (ftUS)), as written by GDAL.
    expect(j.epsg).toBe(2227);
    expect(j.verticalUnit).toBe("US survey foot");
    expect(j.verticalDatum).toBe("other");
    expect(j.verticalCrs).toBe("NAVD88 height (ftUS)");
  });
});
