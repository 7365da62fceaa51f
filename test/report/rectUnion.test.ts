import { describe, it, expect } from "vitest";
import { union } from "@turf/union";
import { booleanPointInPolygon, featureCollection, point, polygon } from "@turf/turf";
import type { Feature, MultiPolygon, Polygon } from "geojson";
import { rectUnion, type Rect, type Ring } from "../../src/report/rectUnion.js";
import { insideEvenOdd } from "../helpers/evenOdd.js";
import { seededRandom as rng } from "../geo/projCli.js";

// The reference is turf's union (@turf/union, a general planar polygon clipper from the npm
// registry): the same region, the same number of pieces and holes.

function shoelace(ring: Ring | number[][]): number {
  let a = 0;
  for (let i = 0; i + 1 < ring.length; i++) a += ring[i][0] * ring[i + 1][1] - ring[i + 1][0] * ring[i][1];
  return a / 2;
}

function turfUnion(rects: readonly Rect[]): number[][][][] {
  const polys = rects.map((r) => polygon([[[r.u0, r.v0], [r.u1, r.v0], [r.u1, r.v1], [r.u0, r.v1], [r.u0, r.v0]]]));
  const u = polys.length === 1 ? polys[0] : (union(featureCollection(polys)) as Feature<Polygon | MultiPolygon>);
  return u.geometry.type === "Polygon" ? [u.geometry.coordinates] : u.geometry.coordinates;
}

/** The four sides, one unit wide, of an n x n square frame (its hole (n - 2) x (n - 2)). */
function frame(n: number): Rect[] {
  return [
    { u0: 0, u1: n, v0: 0, v1: 1 },
    { u0: 0, u1: n, v0: n - 1, v1: n },
    { u0: 0, u1: 1, v0: 0, v1: n },
    { u0: n - 1, u1: n, v0: 0, v1: n },
  ];
}

describe("union of axis-aligned rectangles", () => {
  it("two overlapping rectangles: the L-shaped outline, counter-clockwise, by hand", () => {
    const polys = rectUnion([{ u0: 0, u1: 2, v0: 0, v1: 1 }, { u0: 1, u1: 3, v0: 0.5, v1: 2 }]);
    expect(polys).toHaveLength(1);
    expect(polys[0]).toHaveLength(1);
    const ring = polys[0][0];
    expect(ring[0]).toEqual(ring[ring.length - 1]);
    expect(new Set(ring.slice(0, -1).map((p) => p.join(",")))).toEqual(new Set(["0,0", "2,0", "2,0.5", "3,0.5", "3,2", "1,2", "1,1", "0,1"]));
    // 2 x 1 + 2 x 1.5 less their 1 x 0.5 overlap = 4.5, counter-clockwise (positive).
    expect(shoelace(ring)).toBe(4.5);
  });

  it("rectangles touching along an edge are one rectangle; touching at a corner, two", () => {
    const side = rectUnion([{ u0: 0, u1: 1, v0: 0, v1: 1 }, { u0: 1, u1: 2, v0: 0, v1: 1 }]);
    expect(side).toHaveLength(1);
    expect(side[0][0]).toHaveLength(5);
    expect(shoelace(side[0][0])).toBe(2);
    const corner = rectUnion([{ u0: 0, u1: 1, v0: 0, v1: 1 }, { u0: 1, u1: 2, v0: 1, v1: 2 }]);
    expect(corner).toHaveLength(2);
    for (const p of corner) {
      expect(p).toHaveLength(1);
      expect(p[0]).toHaveLength(5);
      expect(shoelace(p[0])).toBe(1);
    }
  });

  it("a frame of four rectangles: one outer ring and its hole (clockwise)", () => {
    const polys = rectUnion(frame(5));
    expect(polys).toHaveLength(1);
    expect(polys[0]).toHaveLength(2);
    expect(shoelace(polys[0][0])).toBe(25);
    expect(shoelace(polys[0][1])).toBe(-9);
  });

  it("an island inside a frame's hole stays its own polygon", () => {
    const polys = rectUnion([...frame(9), { u0: 4, u1: 5, v0: 4, v1: 5 }]);
    expect(polys.map((p) => p.length).sort()).toEqual([1, 2]);
    const framed = polys.find((p) => p.length === 2)!;
    expect(shoelace(framed[0])).toBe(81);
    expect(shoelace(framed[1])).toBe(-49);
  });

  for (const seed of [1, 2, 3, 4, 5, 6, 7, 8]) {
    it(`random rectangles (seed ${seed}): the region, pieces and holes of turf's union`, () => {
      const r = rng(seed);
      // Coordinates on a coarse grid half the time, so shared and touching edges are common.
      const c = (span: number) => (r() < 0.5 ? Math.round(r() * span) : r() * span);
      const rects: Rect[] = [];
      for (let i = 0; i < 6 + Math.floor(r() * 30); i++) {
        const u0 = c(20), v0 = c(20);
        rects.push({ u0, u1: u0 + 0.5 + c(6), v0, v1: v0 + 0.5 + c(6) });
      }
      const ours = rectUnion(rects);
      const ref = turfUnion(rects);
      const area = (polys: (Ring | number[][])[][]) => polys.reduce((s, p) => s + p.reduce((t, ring) => t + Math.abs(shoelace(ring)) * (t === 0 ? 1 : -1), 0), 0);
      expect(area(ours)).toBeCloseTo(area(ref), 9);
      // Rings: counter-clockwise outers, clockwise holes.
      for (const p of ours) {
        expect(shoelace(p[0])).toBeGreaterThan(0);
        for (const h of p.slice(1)) expect(shoelace(h)).toBeLessThan(0);
      }
      expect(ours.reduce((n, p) => n + p.length - 1, 0)).toBe(ref.reduce((n, p) => n + p.length - 1, 0));
      expect(ours.length).toBe(ref.length);
      // And point by point (turf's point-in-polygon on its own union), off every edge.
      const refFeature = { type: "Feature", properties: {}, geometry: { type: "MultiPolygon", coordinates: ref } } as Feature<MultiPolygon>;
      for (let k = 0; k < 400; k++) {
        const u = r() * 28 + 0.0001234, v = r() * 28 + 0.0005678;
        expect(insideEvenOdd(ours, u, v)).toBe(booleanPointInPolygon(point([u, v]), refFeature));
      }
    });
  }
});
