/**
 * Bad DEM files (issue 2, "Bad input") through `gsdplan plan` and `gsdplan inspect`.
 * The files are GDAL-made or hand-cut fixtures listed in fixtures/gdal/README.md.
 */
import { describe } from "vitest";
import { BASE_PLAN, badInputCases, type BadCase } from "./badInputs.js";

const DEMS: { name: string; file: string; says: RegExp }[] = [
  { name: "not a TIFF", file: "bad_notatiff.tif", says: /bad_notatiff\.tif.*TIFF/i },
  { name: "truncated TIFF", file: "bad_truncated.tif", says: /bad_truncated\.tif.*trunc/i },
  { name: "TIFF without georeferencing", file: "bad_nogeoref.tif", says: /bad_nogeoref\.tif.*georef/i },
  { name: "rotated transform", file: "bad_rotated.tif", says: /bad_rotated\.tif.*(rotat|north-up)/i },
  { name: "unknown EPSG code", file: "bad_unknown_epsg.tif", says: /bad_unknown_epsg\.tif.*EPSG/i },
  { name: "absurd dimensions in the header", file: "bad_absurd_dims.tif", says: /bad_absurd_dims\.tif/ },
];

const cases: BadCase[] = DEMS.flatMap(({ name, file, says }) => [
  { name: `plan: DEM ${name}`, args: ["plan", BASE_PLAN, "--dem", `fixtures/gdal/${file}`, "--out", "OUT"], says },
  { name: `inspect: DEM ${name}`, args: ["inspect", `fixtures/gdal/${file}`], says },
]);

describe("bad DEM files: one line, exit 2", () => {
  badInputCases(cases);
});
