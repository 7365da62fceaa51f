import { describe, it, expect } from "vitest";
import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { makeGrid } from "../../src/dem/sample.js";
import { latticeCountsByBand, type LatticeStrip } from "../../src/assess/latticeCoverage.js";
import { photoLattice } from "../../src/assess/exposures.js";
import { latticeRows, LATTICE_ROWS_WASM } from "../../src/assess/latticeRowsWasm.js";
import { wasmKernel } from "../../src/wasmKernel.js";

/**
 * The comparison's lattice rows in WebAssembly (src/assess/latticeRows.as.ts) against its
 * JavaScript rows (latticeCoverage.ts countRow), the reference the per-cell checks of
 * test/plan/baseline.test.ts hold to (the footprint sweep's counts, and photos counted one by
 * one): the same count in every cell, on hills with nodata, ground above the photos, holes in
 * the site and in the strips' photos, strips along, across and oblique to the grid, over
 * several bands of rows.
 */

// The kernel is compiled by `npm run build` (scripts/build-wasm.mjs) into dist/.
const HAS_WASM = existsSync(fileURLToPath(new URL(`../../dist/${LATTICE_ROWS_WASM}`, import.meta.url)));
if (!HAS_WASM) {
  if (process.env.CI === "true") throw new Error("dist/assess/latticeRows.wasm is required under CI=true (npm test builds it first)");
  process.stderr.write("NOTICE: dist/ not built; skipping the WebAssembly lattice rows (run npm run build)\n");
}

/** Counts of the whole grid, band after band. */
function whole(rowsIn: "wasm" | "js", ...args: Parameters<typeof latticeCountsByBand>): Uint16Array {
  const [grid, inSite, strips, A, t, ka, kc] = args;
  const l = latticeCountsByBand(grid, inSite, strips, A, t, ka, kc, { rowsIn });
  const out = new Uint16Array(grid.width * grid.height);
  for (let b = 0; b < l.bands; b++) {
    const [i0, i1] = l.count(b);
    out.set(l.images.subarray(0, i1 - i0), i0);
  }
  return out;
}

describe.skipIf(!HAS_WASM)("the comparison's lattice rows in WebAssembly", () => {
  it("is built and compiles on this engine, so the comparison uses it", () => {
    expect(wasmKernel(LATTICE_ROWS_WASM)).not.toBeNull();
    expect(latticeRows(new Int32Array(4), 16)).toBeDefined();
  });

  it("gives the JavaScript rows' counts in every cell", () => {
    // 611 x 700 cells of 0.5 m (three bands of rows); hills, a peak above the photos, nodata.
    const grid = makeGrid({
      width: 611, height: 700, x0: 0, y0: 350, cellM: 0.5,
      // A plateau just under the photos (290-299 m at 300 m: reaches shorter than half the
      // trigger distance, so runs of no photo between photos).
      heights: (x, y) => (Math.hypot(x - 150, y - 180) < 5 ? 420 : Math.hypot(x - 220, y - 60) < 9 ? NaN : Math.hypot(x - 80, y - 250) < 40 ? 290 + ((x * 7 + y * 3) % 10) : 200 + 25 * Math.sin(x / 23) * Math.cos(y / 31)),
    });
    const n = grid.width * grid.height;
    const inSite = new Uint8Array(n);
    for (let i = 0; i < n; i++) inSite[i] = (i % 97) % 11 === 3 ? 0 : 1;
    const t = 9.5;
    let cells = 0;
    for (const headingDeg of [90, 0, 33, 127]) {
      const h = (headingDeg * Math.PI) / 180;
      const ux = Math.sin(h), uy = Math.cos(h);
      const strips: LatticeStrip[] = [];
      for (let j = -7; j <= 7; j++) {
        const cx = 152 + j * 21 * uy, cy = 175 - j * 21 * ux;
        const from: [number, number] = [cx - 200 * ux, cy - 200 * uy];
        const to: [number, number] = [cx + 200 * ux, cy + 200 * uy];
        // Every third strip with stretches of no photos, one on a photo grid of its own.
        const lattice = photoLattice({
          kind: "strip", from, to,
          ...(j % 3 === 0 ? { noPhotoIntervals: [[40, 95], [230, 241.5]] as [number, number][] } : {}),
          ...(j === 2 ? { photoPhaseM: 3.25 } : {}),
        }, t)!;
        strips.push({ from, lattice });
      }
      const args = [grid, inSite, strips, 300, t, 0.45, 0.68] as const;
      const js = whole("js", ...args);
      const wasm = whole("wasm", ...args);
      let differ = 0, seen = 0;
      for (let i = 0; i < n; i++) {
        if (js[i] !== wasm[i]) differ++;
        if (js[i] > 0) seen++;
      }
      expect(differ, `heading ${headingDeg}`).toBe(0);
      expect(seen).toBeGreaterThan(n / 4);
      cells += seen;
    }
    expect(cells).toBeGreaterThan(n);
  });

  it("gives them where a footprint's edge falls exactly on a photo (flat ground, round numbers)", () => {
    // 100 m under the photos, half a footprint 0.5 x 100 = 50 m, photos every 10 m from 0,
    // cell centres on the half metres: a cell at 10 k - 50 m or 10 k + 50 m along sees photo k
    // exactly at its footprint's edge (the test is <=), for strips along either axis.
    const grid = makeGrid({ width: 400, height: 300, x0: -100.25, y0: 75.25, cellM: 0.5, heights: (x, y) => (x > 60 && y < 0 ? 95 : 100) });
    const n = grid.width * grid.height;
    const inSite = new Uint8Array(n).fill(1);
    for (const [from, to] of [[[-100, 0], [100, 0]], [[0, -75], [0, 75]], [[-100, 30], [100, 30]]] as [[number, number], [number, number]][]) {
      const lattice = photoLattice({ kind: "strip", from, to }, 10)!;
      const args = [grid, inSite, [{ from, lattice }], 200, 10, 0.5, 0.7] as const;
      const js = whole("js", ...args);
      const wasm = whole("wasm", ...args);
      let differ = 0;
      for (let i = 0; i < n; i++) if (js[i] !== wasm[i]) differ++;
      expect(differ).toBe(0);
      // Photo by photo, the footprint's own test (|along| <= (A - z) kAlong, |across| <= (A - z) kAcross).
      const len = Math.hypot(to[0] - from[0], to[1] - from[1]);
      const ux = (to[0] - from[0]) / len, uy = (to[1] - from[1]) / len;
      let edge = 0;
      for (let r = 0; r < grid.height; r++) {
        for (let c = 0; c < grid.width; c++) {
          const x = -100.25 + (c + 0.5) * 0.5, y = 75.25 - (r + 0.5) * 0.5;
          const d = 200 - grid.heights[r * grid.width + c];
          let count = 0;
          for (let k = 0; k <= lattice.n; k++) {
            if (!lattice.present[k]) continue;
            const px = from[0] + (lattice.s0 + k * 10) * ux, py = from[1] + (lattice.s0 + k * 10) * uy;
            const a = (x - px) * ux + (y - py) * uy, q = (x - px) * uy - (y - py) * ux;
            if (Math.abs(a) <= d * 0.5 && Math.abs(q) <= d * 0.7) count++;
            if (Math.abs(a) === d * 0.5 && Math.abs(q) <= d * 0.7) edge++;
          }
          expect(js[r * grid.width + c], `cell ${c},${r}`).toBe(count);
        }
      }
      expect(edge).toBeGreaterThan(1000);
    }
  });
});
