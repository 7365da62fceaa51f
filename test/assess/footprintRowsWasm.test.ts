import { describe, it, expect } from "vitest";
import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { makeGrid } from "../../src/dem/sample.js";
import { computeCoverage } from "../../src/assess/coverage.js";
import { footprintRows, FOOTPRINT_ROWS_WASM } from "../../src/assess/footprintRowsWasm.js";
import { wasmKernel } from "../../src/wasmKernel.js";
import type { Exposure } from "../../src/assess/types.js";
import { genericCamera } from "./helpers.js";

/**
 * The coverage sweep's footprint rows in WebAssembly (src/assess/footprintRows.as.ts) against
 * its JavaScript rows (coverageKernel.ts sweepRow), the reference whose results the
 * independent per-cell checks of test/assess/coverage.test.ts hold to: the same image counts,
 * GSD and nadir strips bit for bit, on terrain with nodata, ground above the camera, holes in
 * the site, rows of odd and even lengths and footprints along and across the grid's axes.
 */

// The kernel is compiled by `npm run build` (scripts/build-wasm.mjs) into dist/.
const HAS_WASM = existsSync(fileURLToPath(new URL(`../../dist/${FOOTPRINT_ROWS_WASM}`, import.meta.url)));
if (!HAS_WASM) {
  if (process.env.CI === "true") throw new Error("dist/assess/footprintRows.wasm is required under CI=true (npm test builds it first)");
  process.stderr.write("NOTICE: dist/ not built; skipping the WebAssembly footprint rows (run npm run build)\n");
}

const bytes = (a: ArrayBufferView) => Buffer.from(a.buffer, a.byteOffset, a.byteLength);

describe.skipIf(!HAS_WASM)("footprint rows in WebAssembly", () => {
  it("is built and compiles on this engine (SIMD), so the sweep uses it", () => {
    expect(wasmKernel(FOOTPRINT_ROWS_WASM)).not.toBeNull();
    expect(footprintRows()).toBeDefined();
  });

  it("gives the JavaScript rows' results bit for bit", () => {
    // Odd width and height; hills, a spike above the lowest photos, nodata patches.
    const grid = makeGrid({
      width: 613, height: 401, x0: 0, y0: 200.5, cellM: 0.5,
      heights: (x, y) => (Math.hypot(x - 150, y - 100) < 6 ? 330 : Math.hypot(x - 220, y - 60) < 9 ? NaN : 200 + 25 * Math.sin(x / 23) * Math.cos(y / 31) + ((Math.floor(x * 7 + y * 13) % 5) - 2) * 0.01),
    });
    const n = grid.width * grid.height;
    const inSite = new Uint8Array(n);
    for (let i = 0; i < n; i++) inSite[i] = (i % 97) % 11 === 3 ? 0 : 1;
    const camera = genericCamera();
    let seenNoData = 0;
    let seenAboveCamera = 0;
    for (const headingDeg of [90, 0, 30, 117]) {
      const h = (headingDeg * Math.PI) / 180;
      const ux = Math.sin(h), uy = Math.cos(h);
      const ex: Exposure[] = [];
      for (let j = -6; j <= 6; j++) for (let k = -9; k <= 9; k++) {
        ex.push({ x: 153 + k * 17 * ux + j * 23 * uy, y: 100 + k * 17 * uy - j * 23 * ux, altitudeAmslM: 300 + ((k + j + 20) % 4) * 1.37, ux, uy, strip: j + 7 });
      }
      for (const nadirBy of ["image", "distance"] as const) {
        const effects = { lowGsdCm: 2.3, highGsdCm: 2.9, minImages: 5 };
        const js = computeCoverage(grid, inSite, ex, camera, { threads: 1, nadirBy, effects, rowsIn: "js" });
        const wasm = computeCoverage(grid, inSite, ex, camera, { threads: 1, nadirBy, effects, rowsIn: "wasm" });
        for (const k of ["images", "gsdCm", "nadirStrip", "flags"] as const) {
          expect(bytes(wasm[k]!).equals(bytes(js[k]!)), `${k} at ${headingDeg} deg by ${nadirBy}`).toBe(true);
        }
        expect(Array.from(wasm.seenByBand!.counts)).toEqual(Array.from(js.seenByBand!.counts));
        let seen = 0;
        for (let i = 0; i < n; i++) if (js.images[i] > 0) seen++;
        expect(seen, `${headingDeg} deg`).toBeGreaterThan(0.5 * n);
        expect(new Set(js.nadirStrip).size).toBeGreaterThan(8);
        // The cases the rows must get right were met: nodata and ground above a camera.
        for (let i = 0; i < n; i++) if (inSite[i] && js.images[i] === 0 && Number.isNaN(grid.heights[i])) seenNoData++;
        for (let i = 0; i < n; i++) if (inSite[i] && grid.heights[i] === 330 && js.images[i] === 0) seenAboveCamera++;
      }
    }
    expect(seenNoData).toBeGreaterThan(100);
    expect(seenAboveCamera).toBeGreaterThan(100);
  });

  it("keeps image counts at 65535 (Uint16) in both lanes and in an odd last cell, and ties to the earlier photo, as the JavaScript rows do", () => {
    const k = footprintRows()!;
    // Each pair of cells (from cell 0: 0-1, 2-3, ...; from cell 1: 1-2, ... and 7 alone) with a full count in one lane or both.
    const start = [65534, 65535, 65535, 65534, 0, 65535, 7, 65535];
    for (const i0 of [0, 1]) {
      const a = k.band(start.length);
      a.ground.fill(0);
      a.inSite.fill(1);
      a.images.set(start);
      a.best.fill(Infinity);
      a.gsdCm.fill(NaN);
      a.nadirStrip.fill(0);
      k.camera(1, 1, 1, 1, false, 0.5);
      // A photo 100 m up over every cell (offsets 0): each cell is seen and this photo is its best.
      k.row(i0, start.length - 1, 100, 0, 0, 0, 0, 9);
      const want = start.map((c, i) => (i < i0 ? c : Math.min(65535, c + 1)));
      expect(Array.from(a.images), `from cell ${i0}`).toEqual(want);
      expect(Array.from(a.nadirStrip)).toEqual(start.map((_, i) => (i < i0 ? 0 : 9)));
      expect(Array.from(a.gsdCm)).toEqual(start.map((_, i) => (i < i0 ? NaN : 50)));
      expect(Array.from(a.best)).toEqual(start.map((_, i) => (i < i0 ? Infinity : 0)));
      // The same footprint from a later photo of another strip ties: the earlier photo stays.
      k.row(i0, start.length - 1, 100, 0, 0, 0, 0, 4);
      expect(Array.from(a.nadirStrip)).toEqual(start.map((_, i) => (i < i0 ? 0 : 9)));
      expect(Array.from(a.images)).toEqual(start.map((c, i) => (i < i0 ? c : Math.min(65535, c + 2))));
    }
  });
});
