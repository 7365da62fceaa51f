import { describe, it, expect } from "vitest";
import { downsampleGrid, downsampleGridAndRasters, downsampleRasters } from "../../src/report/downsample.js";
import type { ReportRasters } from "../../src/report/model.js";
import { seededRandom } from "../geo/projCli.js";

/** A seeded generator (mulberry32), so a failure can be replayed. */
const rng = seededRandom;

const transform = { x0: 500000, y0: 4600000, dx: 2, dy: -2 };

/** Each block's cells, by the definition of a k x k block (edge blocks cut at the frame). */
function blockCells(W: number, H: number, k: number, bc: number, br: number): number[] {
  const cells: number[] = [];
  for (let r = br * k; r < Math.min(H, br * k + k); r++) for (let c = bc * k; c < Math.min(W, bc * k + k); c++) cells.push(r * W + c);
  return cells;
}

// The reductions as downsample.ts states them: mean of the finite values (summed in row
// order, so the Float32 mean is the same to the bit), least image count over in-site cells,
// OR of the flags, "any" of inSite.
// Each case reduced in JavaScript and in WebAssembly (reduceRows.as.ts, where built).
describe("block reduction by its definition", () => {
  for (const [W, H, k] of [[17, 11, 3], [16, 16, 4], [5, 9, 7], [30, 2, 2]]) for (const reduceIn of ["js", "wasm"] as const) {
    it(`${W} x ${H} by ${k} (reduced in ${reduceIn})`, () => {
      const r = rng(W * 100 + H + k);
      const n = W * H;
      const gsd = new Float32Array(n), heights = new Float32Array(n);
      const images = new Uint16Array(n), flags = new Uint16Array(n), inSite = new Uint8Array(n);
      for (let i = 0; i < n; i++) {
        gsd[i] = r() < 0.1 ? NaN : 1 + r() * 3;
        heights[i] = r() < 0.1 ? NaN : 200 + r() * 100;
        images[i] = Math.floor(r() * 20);
        flags[i] = r() < 0.2 ? 1 << Math.floor(r() * 9) : 0;
        inSite[i] = r() < 0.6 ? 1 : 0;
      }
      // One block wholly nodata and outside the site.
      for (const i of blockCells(W, H, k, 0, 0)) (gsd[i] = NaN), (heights[i] = NaN), (inSite[i] = 0);
      const rasters: ReportRasters = { width: W, height: H, transform, gsdCm: gsd, images, flags, inSite };
      const small = downsampleRasters(rasters, k, reduceIn);
      const grid = downsampleGrid({ width: W, height: H, transform, cellSizeM: [2, 2], heights }, k, reduceIn);
      const w = Math.ceil(W / k), h = Math.ceil(H / k);
      expect([small.width, small.height, grid.width, grid.height]).toEqual([w, h, w, h]);
      expect(small.transform).toEqual({ ...transform, dx: 2 * k, dy: -2 * k });
      expect(grid.cellSizeM).toEqual([2 * k, 2 * k]);
      for (let br = 0; br < h; br++)
        for (let bc = 0; bc < w; bc++) {
          const cells = blockCells(W, H, k, bc, br);
          const o = br * w + bc;
          const mean = (a: Float32Array) => {
            const f = cells.map((i) => a[i]).filter((v) => !Number.isNaN(v));
            return f.length ? Math.fround(f.reduce((s, v) => s + v, 0) / f.length) : NaN;
          };
          expect(small.gsdCm[o]).toBe(mean(gsd));
          expect(grid.heights[o]).toBe(mean(heights));
          const inside = cells.filter((i) => inSite[i]);
          expect(small.inSite[o]).toBe(inside.length ? 1 : 0);
          expect(small.images[o]).toBe(inside.length ? Math.min(...inside.map((i) => images[i])) : 0);
          expect(small.flags[o]).toBe(cells.reduce((f, i) => f | flags[i], 0));
        }
      expect(Number.isNaN(small.gsdCm[0]) && Number.isNaN(grid.heights[0]) && small.inSite[0] === 0).toBe(true);
      // The one-pass reduction of both gives the same records, key order included (report-data.json writes them).
      const both = downsampleGridAndRasters({ width: W, height: H, transform, cellSizeM: [2, 2], heights }, rasters, k, reduceIn);
      expect(Object.keys(both.dem)).toEqual(Object.keys(grid));
      expect(Object.keys(both.rasters)).toEqual(Object.keys(small));
      expect(both.dem).toEqual(grid);
      expect(both.rasters).toEqual(small);
    });
  }
});

describe("block reduction in WebAssembly against its JavaScript twin", () => {
  it("gives the same maps bit for bit on a large raster with 8-bit flags", () => {
    const r = rng(91);
    const W = 613, H = 401, k = 5, n = W * H;
    const gsd = new Float32Array(n), heights = new Float32Array(n);
    const images = new Uint16Array(n), flags8 = new Uint8Array(n), inSite = new Uint8Array(n);
    for (let i = 0; i < n; i++) {
      gsd[i] = r() < 0.05 ? NaN : r() < 0.001 ? Infinity : 2 + r() + 1e-7 * i;
      heights[i] = r() < 0.05 ? NaN : 300 + 50 * Math.sin(i / 997) + r();
      images[i] = r() < 0.01 ? 65535 : Math.floor(r() * 30);
      flags8[i] = r() < 0.3 ? 1 << Math.floor(r() * 8) : 0;
      inSite[i] = (i % W) > 40 && r() < 0.97 ? 1 : 0;
    }
    const rasters = { width: W, height: H, transform, gsdCm: gsd, images, flags: flags8 as unknown as Uint16Array, inSite };
    const grid = { width: W, height: H, transform, cellSizeM: [2, 2] as [number, number], heights };
    const bytes = (a: ArrayBufferView) => Buffer.from(a.buffer, a.byteOffset, a.byteLength);
    const js = downsampleGridAndRasters(grid, rasters, k, "js"), wasm = downsampleGridAndRasters(grid, rasters, k, "wasm");
    for (const key of ["gsdCm", "images", "flags", "inSite"] as const) expect(bytes(wasm.rasters[key]).equals(bytes(js.rasters[key])), key).toBe(true);
    expect(bytes(wasm.dem.heights).equals(bytes(js.dem.heights))).toBe(true);
    expect(bytes(downsampleRasters(rasters, k, "wasm").gsdCm).equals(bytes(js.rasters.gsdCm))).toBe(true);
    expect(bytes(downsampleGrid(grid, k, "wasm").heights).equals(bytes(js.dem.heights))).toBe(true);
    expect(js.rasters.flags.some((f) => f > 0) && js.rasters.images.some((c) => c > 0) && js.rasters.inSite.some((a) => a === 0)).toBe(true);
  });
});
