import { describe, it, expect } from "vitest";
import { area as turfArea, booleanValid, booleanClockwise, kinks, polygon } from "@turf/turf";
import proj4 from "proj4";
import type { Position } from "geojson";
import { flagPolygons, noneFlagged } from "../../src/assess/flagPolygons.js";
import { FLAG_COARSE, FLAG_FEW_IMAGES, FLAG_FINE, FLAG_KEEP_OUT, FLAG_KINDS } from "../../src/assess/flags.js";

// UTM zone 33N (EPSG:32633) by proj4, the reference library for the WGS84 step.
const utm33 = "+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs";
const toWgs84 = (x: number, y: number): [number, number] => proj4(utm33, "WGS84", [x, y]) as [number, number];

function planarRingArea(ring: Position[]): number {
  let a = 0;
  for (let i = 0; i + 1 < ring.length; i++) a += ring[i][0] * ring[i + 1][1] - ring[i + 1][0] * ring[i][1];
  return a / 2;
}

/** Cell edges between a flagged and an unflagged (or outside) cell: the outline length in cells. */
function perimeterEdges(mask: (i: number) => boolean, w: number, h: number): number {
  let e = 0;
  for (let r = 0; r < h; r++)
    for (let c = 0; c < w; c++) {
      if (!mask(r * w + c)) continue;
      if (c === 0 || !mask(r * w + c - 1)) e++;
      if (c === w - 1 || !mask(r * w + c + 1)) e++;
      if (r === 0 || !mask((r - 1) * w + c)) e++;
      if (r === h - 1 || !mask((r + 1) * w + c)) e++;
    }
  return e;
}

describe("flag polygons by d3-contour", () => {
  const w = 120;
  const h = 90;
  const cellM = 2;
  const transform = { x0: 480000, y0: 5200000, dx: cellM, dy: -cellM };
  const flags = new Uint16Array(w * h);
  for (let r = 0; r < h; r++)
    for (let c = 0; c < w; c++) {
      const i = r * w + c;
      // Coarse: a disc, and a block touching the grid's top-left corner.
      if ((c - 40) ** 2 + (r - 45) ** 2 < 20 ** 2 || (c < 10 && r < 6)) flags[i] |= FLAG_COARSE;
      // Fine: a square ring (polygon with a hole) running off the right edge.
      if (c >= 90 && r >= 20 && r < 70 && !(c >= 100 && c < 110 && r >= 35 && r < 55)) flags[i] |= FLAG_FINE;
      // Few images: a checkerboard patch (cells touching only at corners) on the bottom edge.
      if (r >= 80 && c >= 60 && c < 70 && (r + c) % 2 === 0) flags[i] |= FLAG_FEW_IMAGES;
    }
  const layers = flagPolygons(flags, w, h, transform, toWgs84, cellM * cellM);

  it("one layer per flag kind that occurs", () => {
    expect(Object.keys(layers).sort()).toEqual(["coarse", "fewImages", "fine"]);
  });

  for (const kind of FLAG_KINDS.filter((k) => [FLAG_COARSE, FLAG_FINE, FLAG_FEW_IMAGES].includes(k.bit))) {
    it(`${kind.key}: valid GeoJSON, RFC 7946 winding, area = cell area within the outline`, () => {
      const f = layers[kind.key];
      expect(f.properties.bit).toBe(kind.bit);
      let cells = 0;
      for (let i = 0; i < flags.length; i++) if (flags[i] & kind.bit) cells++;
      expect(f.properties.areaM2).toBe(cells * cellM * cellM);
      // turf's booleanValid (OGC simple-feature rules) on the WGS84 geometry.
      expect(booleanValid(f.geometry)).toBe(true);
      // booleanValid does not look for a ring crossing itself; turf's kinks does.
      for (const poly of f.geometry.coordinates) expect(kinks(polygon(poly)).features).toHaveLength(0);
      // RFC 7946 section 3.1.6: exterior rings counterclockwise, holes clockwise.
      for (const poly of f.geometry.coordinates) {
        expect(booleanClockwise(poly[0])).toBe(false);
        for (const hole of poly.slice(1)) expect(booleanClockwise(hole)).toBe(true);
      }
      // Marching squares cuts each outline corner by a triangle of 1/8 cell: the polygons
      // differ from the cells by less than half a cell along the outline.
      const edges = perimeterEdges((i) => (flags[i] & kind.bit) !== 0, w, h);
      const tolM2 = 0.5 * edges * cellM * cellM;
      const cellAreaM2 = cells * cellM * cellM;
      // turf.area: spherical area of the WGS84 polygons; UTM scale (about 0.9996 to 1.0004 here)
      // changes areas by under 0.1 %, well inside the outline tolerance.
      expect(Math.abs(turfArea(f) - cellAreaM2)).toBeLessThan(tolM2 + 0.001 * cellAreaM2);
    });
  }

  it("planar area in the frame is within the outline tolerance, holes counted", () => {
    const local = flagPolygons(flags, w, h, transform, (x, y) => [x, y], cellM * cellM);
    const f = local.fine;
    expect(f.geometry.coordinates).toHaveLength(1);
    expect(f.geometry.coordinates[0]).toHaveLength(2); // outer ring and the hole
    let a = 0;
    for (const poly of f.geometry.coordinates) for (const ring of poly) a += planarRingArea(ring);
    // Ring: 30 x 50 cells minus a 10 x 20 hole = 1300 cells of 4 m2. The hole's 4 corners are
    // concave for the shape (cut adds 1/8 cell each), the outer 4 convex (cut removes 1/8 each).
    expect(a).toBeCloseTo(1300 * 4, 6);
  });

  it("draws the keep-out bit (256, beyond the byte) like the others", () => {
    // A 10 x 6 cell block with too few images under a cut stretch: bits 4 and 256.
    const f = new Uint16Array(w * h);
    for (let r = 20; r < 26; r++) for (let c = 30; c < 40; c++) f[r * w + c] = FLAG_FEW_IMAGES | FLAG_KEEP_OUT;
    const layers = flagPolygons(f, w, h, transform, toWgs84, cellM * cellM);
    expect(layers.keepOut?.properties.areaM2).toBe(60 * cellM * cellM);
    expect(layers.keepOut?.properties.bit).toBe(256);
    // The traced ring (corners cut by half a cell diagonally) encloses nearly the 240 m2 block (turf's geodesic area).
    expect(turfArea(layers.keepOut!)).toBeGreaterThan(230);
    expect(turfArea(layers.keepOut!)).toBeLessThan(241);
  });
});

describe("nothing flagged", () => {
  // Checked against a plain scan of the samples (the definition): any non-zero sample is a flag.
  const scan = (f: Uint16Array) => f.every((v) => v === 0);

  it("noneFlagged agrees with a scan: one flag bit anywhere, low byte or high, across its 64 KiB slices", () => {
    const n = 100_003; // 200 006 bytes: three full slices and a partial one
    const f = new Uint16Array(n);
    expect(noneFlagged(f)).toBe(true);
    for (const i of [0, 1, 32_767, 32_768, 65_535, 99_999, n - 1]) {
      for (const bit of [1, 128, 256, 32_768]) {
        f[i] = bit;
        expect(noneFlagged(f)).toBe(scan(f));
        expect(noneFlagged(f)).toBe(false);
        f[i] = 0;
      }
    }
    expect(noneFlagged(f)).toBe(true);
  });

  it("reads only the view it is given (a subarray of a larger raster)", () => {
    const whole = new Uint16Array(1000);
    whole[10] = FLAG_FINE;
    whole[990] = FLAG_COARSE;
    expect(noneFlagged(whole.subarray(11, 990))).toBe(true);
    expect(noneFlagged(whole.subarray(10, 990))).toBe(false);
    expect(noneFlagged(whole.subarray(11, 991))).toBe(false);
  });

  it("no flagged cell: no layer at all, as for a grid without any kind", () => {
    expect(flagPolygons(new Uint16Array(120 * 90), 120, 90, { x0: 0, y0: 0, dx: 1, dy: -1 }, toWgs84, 1)).toEqual({});
  });
});
