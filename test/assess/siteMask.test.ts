import { describe, it, expect } from "vitest";
import { booleanPointInPolygon, point } from "@turf/turf";
import type { MultiPolygon, Polygon } from "geojson";
import { rasteriseSite } from "../../src/assess/siteMask.js";

// Reference: turf's booleanPointInPolygon (a well-kept library) for every cell centre.
function reference(geom: Polygon | MultiPolygon, width: number, height: number, x0: number, y0: number, cell: number): Uint8Array {
  const out = new Uint8Array(width * height);
  for (let r = 0; r < height; r++) {
    for (let c = 0; c < width; c++) {
      const p = point([x0 + (c + 0.5) * cell, y0 - (r + 0.5) * cell]);
      out[r * width + c] = booleanPointInPolygon(p, geom, { ignoreBoundary: true }) ? 1 : 0;
    }
  }
  return out;
}

function differences(a: Uint8Array, b: Uint8Array): number {
  let d = 0;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) d++;
  return d;
}

describe("site mask by scanline even-odd fill", () => {
  const transform = { x0: 1000, y0: 2000, dx: 2, dy: -2 };
  it("concave polygon with a hole matches turf point-in-polygon cell by cell", () => {
    const poly: Polygon = {
      type: "Polygon",
      coordinates: [
        [[1003.1, 1803.7], [1190.3, 1811.9], [1150.7, 1900.2], [1197.1, 1993.3], [1090.9, 1930.6], [1011.3, 1990.1], [1003.1, 1803.7]],
        [[1040.3, 1840.9], [1100.1, 1850.3], [1080.7, 1900.9], [1040.3, 1840.9]],
      ],
    };
    const mask = rasteriseSite(poly, 100, 100, transform);
    const ref = reference(poly, 100, 100, 1000, 2000, 2);
    expect(differences(mask, ref)).toBe(0);
    // Made in shared memory (for worker threads): the same cells.
    const shared = rasteriseSite(poly, 100, 100, transform, true);
    expect(shared.buffer).toBeInstanceOf(SharedArrayBuffer);
    expect(mask.buffer).not.toBeInstanceOf(SharedArrayBuffer);
    expect(differences(shared, ref)).toBe(0);
    // The hole is really empty and the shape is neither empty nor full.
    const sum = mask.reduce((a, b) => a + b, 0);
    expect(sum).toBeGreaterThan(1000);
    expect(sum).toBeLessThan(10000);
  });

  it("multipolygon partly outside the grid matches turf", () => {
    const mp: MultiPolygon = {
      type: "MultiPolygon",
      coordinates: [
        [[[950.3, 1950.1], [1060.7, 1950.9], [1060.1, 2050.3], [950.3, 1950.1]]],
        [[[1120.5, 1820.5], [1260.5, 1840.5], [1130.5, 1700.5], [1120.5, 1820.5]]],
      ],
    };
    const mask = rasteriseSite(mp, 100, 100, transform);
    expect(differences(mask, reference(mp, 100, 100, 1000, 2000, 2))).toBe(0);
  });
});
