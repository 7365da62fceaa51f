/**
 * A GDAL-written GeoTIFF cut at every 10 % of its length, through `gsdplan plan`,
 * `gsdplan inspect` and the library: one clear error line, exit code 2, nothing
 * written (issue 8, "Hardening").
 */
import { describe, it, expect, beforeAll } from "vitest";
import { readFileSync, writeFileSync } from "node:fs";
import { HAS_GDAL } from "../helpers/tools.js";
import { ensureBuilt, expectRefusedEverywhere, smallScenario, tempDir } from "./helpers.js";

beforeAll(() => ensureBuilt(), 120_000);

describe.skipIf(!HAS_GDAL)("truncated GeoTIFFs", () => {
  // A GDAL GeoTIFF cut at 10 %, 20 %, ... 90 % of its length.
  for (let pct = 10; pct <= 90; pct += 10) {
    it(`a GeoTIFF cut at ${pct} % of its length: truncated or damaged`, async () => {
      const dir = tempDir(`cut${pct}`);
      const s = smallScenario(dir, (x, y) => 300 + 0.05 * (x - 500000) + 20 * Math.sin(y / 50));
      const full = readFileSync(s.dem);
      writeFileSync(s.dem, full.subarray(0, Math.floor((full.length * pct) / 100)));
      await expectRefusedEverywhere(s.planFile, s.dem, /dem\.tif: (truncated|damaged|not a TIFF)/);
    });
  }
});

