import { describe, it, expect } from "vitest";
import { contours } from "d3-contour";
import { isoPolygons, maskOutline } from "../../src/report/contours.js";
import { seededRandom } from "../geo/projCli.js";

/** A seeded generator (mulberry32), so a failure can be replayed. */
const rng = seededRandom;

/** Rolling ground with nodata holes: a few sines plus noise, NaN at random spots and in a block. */
function ground(w: number, h: number, seed: number, nodata: boolean): Float32Array {
  const r = rng(seed);
  const z = new Float32Array(w * h);
  const [a, b, c] = [r() * 0.5 + 0.1, r() * 0.5 + 0.1, r() * 6];
  for (let y = 0; y < h; y++)
    for (let x = 0; x < w; x++) {
      z[y * w + x] = 100 + 20 * Math.sin(a * x + c) * Math.cos(b * y) + 5 * r();
      if (nodata && (r() < 0.03 || (x > w / 3 && x < w / 2 && y > h / 4 && y < h / 2))) z[y * w + x] = NaN;
    }
  return z;
}

/** d3-contour's rings for one level, each flattened to [x, y, ...] as isoPolygons returns them. */
function d3Polygons(values: ArrayLike<number>, w: number, h: number, level: number, smooth: boolean): number[][][] {
  const mp = contours().size([w, h]).smooth(smooth).contour(Array.from(values), level);
  return mp.coordinates.map((poly) => poly.map((ring) => (ring as [number, number][]).flat()));
}

// The tracing follows d3-contour's marching squares (src/report/contours.ts): the same
// polygons, rings, points and order as the library itself gives, on ground with nodata.
describe("isoPolygons against d3-contour", () => {
  const grids = [
    { w: 37, h: 23, seed: 1, nodata: false },
    { w: 41, h: 40, seed: 2, nodata: true },
    { w: 1, h: 9, seed: 3, nodata: false },
    { w: 12, h: 1, seed: 4, nodata: true },
    { w: 64, h: 48, seed: 5, nodata: true },
  ];
  for (const g of grids) {
    it(`${g.w} x ${g.h}${g.nodata ? " with nodata" : ""}, smoothed and not`, () => {
      const z = ground(g.w, g.h, g.seed, g.nodata);
      let rings = 0;
      for (const level of [85, 95, 100, 104.5, 110, 118]) {
        for (const smooth of [true, false]) {
          const ours = isoPolygons(z, g.w, g.h, level, smooth);
          expect(ours).toEqual(d3Polygons(z, g.w, g.h, level, smooth));
          rings += ours.flat().length;
        }
      }
      expect(rings).toBeGreaterThan(0);
    });
  }

  it("a 0/1 mask with holes and islands, as maskOutline traces it", () => {
    const w = 50, h = 33;
    const r = rng(9);
    const mask = new Uint8Array(w * h);
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) mask[y * w + x] = (x - 25) ** 2 + (y - 16) ** 2 < 150 && !((x - 25) ** 2 + (y - 16) ** 2 < 20) ? 1 : r() < 0.05 ? 1 : 0;
    const want = d3Polygons(mask, w, h, 0.5, false).flat();
    expect(want.length).toBeGreaterThan(3); // islands and the ring's hole
    expect(maskOutline(mask, w, h)).toEqual(want);
    // Any other array type is read as non-zero / zero, alike.
    expect(maskOutline(Array.from(mask, (v) => v * 7), w, h)).toEqual(want);
    expect(maskOutline(new Uint8Array(w * h), w, h)).toEqual([]);
  });
});
