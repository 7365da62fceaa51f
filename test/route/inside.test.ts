/**
 * Point and segment tests against turf (booleanPointInPolygon, booleanIntersects,
 * lineIntersect: planar on these coordinates) on random concave zones with
 * holes, and the touching cases against OGR/SpatiaLite's DE-9IM relation
 * (ST_Relate with 'T********': the interiors meet).
 */
import { beforeAll, describe, expect, it } from "vitest";
import { booleanIntersects, booleanPointInPolygon, lineIntersect, lineString, point, polygon as turfPolygon } from "@turf/turf";
import type { XY } from "../../src/layout/types.js";
import { bufferZone } from "../../src/route/obstacles.js";
import { indexObstacles, insideIntervals, pointInsideAny, segmentEntersAny, segmentTouchesAny } from "../../src/route/inside.js";
import type { BufferedZone } from "../../src/route/types.js";
import { HAS_SPATIALITE, ogrSql, polygonGeometry, seeded, starRing } from "./helpers.js";

const asZone = (name: string, rings: XY[][]): BufferedZone => bufferZone({ name, rings, bufferM: 0 });
const closed = (rings: XY[][]) => turfPolygon(rings.map((r) => [...r, r[0]]));

/** Concave stars, half with a star hole, overlapping each other. */
function randomZones(seed: number): XY[][][] {
  const rand = seeded(seed);
  const out: XY[][][] = [];
  for (let i = 0; i < 6; i++) {
    const cx = 600 * rand();
    const cy = 600 * rand();
    const rings = [starRing(rand, cx, cy, 5 + Math.floor(rand() * 25), 40, 160)];
    if (rand() < 0.5) rings.push(starRing(rand, cx, cy, 3 + Math.floor(rand() * 8), 5, 35, true));
    out.push(rings);
  }
  return out;
}

describe("predicates against turf on random concave zones with holes (overlapping: inside any)", () => {
  for (const seed of [1, 2, 3]) {
    const polys = randomZones(seed);
    const index = indexObstacles(polys.map((p, i) => asZone(`z${i}`, p)));
    const turfPolys = polys.map(closed);
    const rand = seeded(100 + seed);
    const at = (): XY => [-100 + 800 * rand(), -100 + 800 * rand()];

    it(`seed ${seed}: a point is inside exactly when turf puts it inside some zone (boundary excluded)`, () => {
      let inside = 0;
      for (let k = 0; k < 3000; k++) {
        const p = at();
        const expected = turfPolys.some((tp) => booleanPointInPolygon(point(p), tp, { ignoreBoundary: true }));
        expect(pointInsideAny(index, p), `${p}`).toBe(expected);
        if (expected) inside++;
      }
      expect(inside).toBeGreaterThan(100); // the sample does hit the zones
    });

    it(`seed ${seed}: a segment meets a zone exactly when turf's booleanIntersects says so`, () => {
      let hits = 0;
      for (let k = 0; k < 1500; k++) {
        const a = at();
        const len = 5 + 300 * rand();
        const ang = 2 * Math.PI * rand();
        const b: XY = [a[0] + len * Math.cos(ang), a[1] + len * Math.sin(ang)];
        const line = lineString([a, b]);
        const expected = turfPolys.some((tp) => booleanIntersects(line, tp));
        expect(segmentTouchesAny(index, a, b), `${a} -> ${b}`).toBe(expected);
        // Random segments touch no outline without crossing it, so entering equals meeting.
        expect(segmentEntersAny(index, a, b), `${a} -> ${b}`).toBe(expected);
        if (expected) hits++;
      }
      expect(hits).toBeGreaterThan(300);
    });

    it(`seed ${seed}: the parts inside match turf's crossings (lineIntersect) and point tests between them`, () => {
      for (let k = 0; k < 400; k++) {
        const a = at();
        const b = at();
        const line = lineString([a, b]);
        const dx = b[0] - a[0];
        const dy = b[1] - a[1];
        const ts = turfPolys.flatMap((tp) => lineIntersect(line, tp).features.map((f) => {
          const [x, y] = f.geometry.coordinates;
          return Math.abs(dx) > Math.abs(dy) ? (x - a[0]) / dx : (y - a[1]) / dy;
        }));
        const cuts = [0, ...ts.sort((p, q) => p - q), 1];
        const expected: [number, number][] = [];
        for (let i = 0; i + 1 < cuts.length; i++) {
          if (cuts[i + 1] - cuts[i] < 1e-12) continue;
          const tm = (cuts[i] + cuts[i + 1]) / 2;
          const m = point([a[0] + tm * dx, a[1] + tm * dy]);
          if (!turfPolys.some((tp) => booleanPointInPolygon(m, tp, { ignoreBoundary: true }))) continue;
          const last = expected[expected.length - 1];
          if (last && Math.abs(last[1] - cuts[i]) < 1e-12) last[1] = cuts[i + 1];
          else expected.push([cuts[i], cuts[i + 1]]);
        }
        const got = insideIntervals(index, a, b);
        expect(got.length, `${a} -> ${b}`).toBe(expected.length);
        got.forEach((iv, i) => {
          expect(iv[0]).toBeCloseTo(expected[i][0], 9);
          expect(iv[1]).toBeCloseTo(expected[i][1], 9);
        });
      }
    });
  }
});

describe("touching, grazing and overlapping zones", () => {
  // Zone A: square 0..100; B shares A's east side (x = 100) from the other side;
  // C overlaps A's north-east corner; the bounds are the square -50..250.
  const A: XY[] = [[0, 0], [100, 0], [100, 100], [0, 100]];
  const B: XY[] = [[100, 0], [200, 0], [200, 60], [100, 60]];
  const C: XY[] = [[80, 80], [150, 80], [150, 150], [80, 150]];
  const zones = [asZone("A", [A]), asZone("B", [B]), asZone("C", [C])];
  const index = indexObstacles(zones);
  const cases: { name: string; a: XY; b: XY; enters: boolean; touches: boolean }[] = [
    { name: "along A's south side", a: [-20, 0], b: [50, 0], enters: false, touches: true },
    { name: "through A's south-west corner only", a: [-20, 20], b: [20, -20], enters: false, touches: true },
    { name: "ending on A's west side", a: [-50, 50], b: [0, 50], enters: false, touches: true },
    { name: "passing 0.7 mm outside A's corner", a: [-20, 19.999], b: [19.999, -20], enters: false, touches: false },
    { name: "cutting 0.7 mm across A's corner", a: [-20, 20.001], b: [20.001, -20], enters: true, touches: true },
    { name: "through A, both ends outside", a: [-10, 50], b: [50, 110], enters: true, touches: true },
    { name: "along the side A and B share (inside their union)", a: [100, 10], b: [100, 50], enters: true, touches: true },
    { name: "along A's north side where C covers it", a: [85, 100], b: [95, 100], enters: true, touches: true },
    { name: "along A's north side west of C", a: [10, 100], b: [70, 100], enters: false, touches: true },
    { name: "through the corner where A, B and C's sides do not cover", a: [160, 70], b: [220, 70], enters: false, touches: false },
  ];
  for (const c of cases) {
    it(`${c.name}: enters ${c.enters}, touches ${c.touches}`, () => {
      expect(segmentEntersAny(index, c.a, c.b)).toBe(c.enters);
      expect(segmentTouchesAny(index, c.a, c.b)).toBe(c.touches);
    });
  }

  describe.skipIf(!HAS_SPATIALITE)("the same cases in OGR: ST_Relate(segment, union of zones, 'T********') and ST_Intersects", () => {
    let rows: Record<string, string>[] = [];
    beforeAll(() => {
      const features = [
        ...[A, B, C].map((r, i) => ({ id: i, kind: "zone", geometry: polygonGeometry([r]) })),
        ...cases.map((c, i) => ({ id: i, kind: "seg", geometry: { type: "LineString", coordinates: [c.a, c.b] } })),
      ];
      rows = ogrSql(features, `SELECT s.id AS id, ST_Relate(s.geometry, u.g, 'T********') AS enters, ST_Intersects(s.geometry, u.g) AS touches
        FROM z s, (SELECT ST_Union(geometry) AS g FROM z WHERE kind = 'zone') u WHERE s.kind = 'seg' ORDER BY s.id`);
    });
    it("agrees on every case", () => {
      expect(rows).toHaveLength(cases.length);
      for (const r of rows) {
        const c = cases[Number(r.id)];
        expect(r.enters === "1", `${c.name}: enters`).toBe(c.enters);
        expect(r.touches === "1", `${c.name}: touches`).toBe(c.touches);
      }
    });
  });

  it("points on a side, at a corner, on the shared side and in the overlap", () => {
    expect(pointInsideAny(index, [50, 0])).toBe(false); // on A's outline: not inside
    expect(pointInsideAny(index, [0, 0])).toBe(false); // A's corner
    expect(pointInsideAny(index, [100, 30])).toBe(true); // A and B on both sides
    expect(pointInsideAny(index, [100, 80])).toBe(false); // A's corner under C's corner: C's outline, free to the east
    expect(pointInsideAny(index, [100, 90])).toBe(true); // in C
    expect(pointInsideAny(index, [90, 90])).toBe(true); // in A and C
  });

  it("bounds: outside them counts as inside an obstacle, and a segment may not leave them", () => {
    // The known ground may not be left: nothing is flown over unknown ground (domain rule).
    const bounded = indexObstacles(zones, { bounds: [[[[-50, -50], [250, -50], [250, 250], [-50, 250]]]] });
    expect(pointInsideAny(bounded, [-60, 0])).toBe(true);
    expect(pointInsideAny(bounded, [-40, 0])).toBe(false);
    expect(pointInsideAny(bounded, [-50, 0])).toBe(false); // on the bounds: allowed
    expect(segmentEntersAny(bounded, [-40, -40], [-40, 240])).toBe(false);
    expect(segmentEntersAny(bounded, [-40, -40], [-60, 240])).toBe(true);
    expect(segmentEntersAny(bounded, [-50, -50], [-50, 250])).toBe(false); // along the bounds
    expect(insideIntervals(bounded, [-100, -10], [0, -10])).toEqual([[0, 0.5]]);
  });
});
