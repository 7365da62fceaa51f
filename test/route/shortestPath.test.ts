/**
 * Shortest transits around keep-out zones. References: an exhaustive search
 * over the full visibility graph (every outline vertex, no pruning; plain
 * Dijkstra written here), which the shortest path among polygons is known to lie
 * on (Lozano-Pérez and Wesley, 1979; de Berg et al., Computational Geometry,
 * ch. 15); a brute-force shortest path on a 16-connected grid, an upper bound
 * since every grid path is a path (common practice); turf's booleanIntersects
 * and OGR's ST_Distance for "the path keeps the buffer from every zone".
 */
import { beforeAll, describe, expect, it } from "vitest";
import fc from "fast-check";
import { booleanIntersects, lineString, polygon as turfPolygon } from "@turf/turf";
import type { XY } from "../../src/layout/types.js";
import { bufferZones } from "../../src/route/obstacles.js";
import { segmentEntersAny } from "../../src/route/inside.js";
import { makeRouter, type Router } from "../../src/route/shortestPath.js";
import type { KeepOutZone } from "../../src/route/types.js";
import { HAS_SPATIALITE, PairHeap, denseDijkstra, ogrSql, pathLength, pointInPolygonEvenOdd, polygonGeometry, segmentPolygonDistance, starRing, seeded } from "./helpers.js";

interface Fixture {
  name: string;
  zones: KeepOutZone[];
  bounds?: XY[][][];
  a: XY;
  b: XY;
  /** Box of the grid reference [west, south, east, north] and its step, metres. */
  box: [number, number, number, number];
  step: number;
}

const rect = (x0: number, y0: number, x1: number, y1: number): XY[] => [[x0, y0], [x1, y0], [x1, y1], [x0, y1]];

const FIXTURES: Fixture[] = [
  { name: "a zone across the way", zones: [{ name: "field", rings: [rect(40, -60, 60, 80)], bufferM: 20 }], a: [0, 0], b: [100, 0], box: [-20, -120, 120, 140], step: 4 },
  {
    name: "a concave U around A, opening away from B",
    zones: [{ name: "U", rings: [[[0, 0], [100, 0], [100, 100], [70, 100], [70, 20], [30, 20], [30, 100], [0, 100]]], bufferM: 5 }],
    a: [50, 60], b: [50, -40], box: [-30, -60, 130, 130], step: 4,
  },
  {
    name: "a zone with a hole, A in the hole, B in the hole behind the island's corner",
    zones: [{ name: "ring", rings: [rect(0, 0, 200, 200), rect(40, 40, 160, 160).reverse()], bufferM: 5 }, { name: "island", rings: [rect(90, 60, 110, 140)], bufferM: 5 }],
    a: [70, 100], b: [130, 100], box: [44, 44, 156, 156], step: 2,
  },
  {
    name: "two zones that touch, buffered into one",
    zones: [{ name: "west", rings: [rect(0, -50, 50, 50)], bufferM: 10 }, { name: "east", rings: [rect(50, -30, 100, 70)], bufferM: 10 }],
    a: [-40, 0], b: [140, 10], box: [-60, -90, 160, 110], step: 4,
  },
  {
    name: "a gap narrower than twice the buffer is closed, a wider one is used",
    zones: [
      { name: "n1", rings: [rect(40, 15, 60, 200)], bufferM: 10 },
      { name: "s1", rings: [rect(40, -200, 60, -15)], bufferM: 10 }, // gap 30 m > 2 x (10 m + 0.2 m of arc excess): open
      { name: "n2", rings: [rect(120, 8, 140, 200)], bufferM: 10 },
      { name: "s2", rings: [rect(120, -200, 140, -8)], bufferM: 10 }, // gap 16 m < 20 m: closed
    ],
    a: [0, 0], b: [200, 0], box: [-20, -230, 220, 230], step: 4,
  },
  {
    name: "inside L-shaped bounds (the known ground)",
    zones: [{ name: "mast", rings: [rect(60, 60, 70, 70)], bufferM: 15 }],
    bounds: [[[[0, 0], [200, 0], [200, 100], [100, 100], [100, 200], [0, 200]]]],
    a: [180, 20], b: [20, 180], box: [0, 0, 200, 200], step: 4,
  },
];

function routerOf(f: Fixture): Router {
  return makeRouter(bufferZones(f.zones), { bounds: f.bounds });
}

/** Length of the shortest path over every outline vertex, visibility by segmentEntersAny. */
function exhaustive(router: Router, a: XY, b: XY): number {
  const pts: XY[] = [a, b, ...router.index.rings.flat()];
  const n = pts.length;
  const w = new Float64Array(n * n).fill(NaN);
  const weight = (i: number, j: number) => {
    const k = Math.min(i, j) * n + Math.max(i, j);
    if (Number.isNaN(w[k])) w[k] = segmentEntersAny(router.index, pts[i], pts[j]) ? Infinity : Math.hypot(pts[i][0] - pts[j][0], pts[i][1] - pts[j][1]);
    return w[k];
  };
  return denseDijkstra(n, 0, weight)[1];
}

/**
 * Shortest 16-connected grid path from a to b (both on the grid), using only
 * grid sides farther than bufferM + deviation from every zone (so outside our
 * buffered outlines) and inside the bounds.
 */
function gridLength(f: Fixture, a: XY, b: XY, clearM: (z: KeepOutZone) => number): number {
  const [w, s, e, n] = f.box;
  const nx = Math.round((e - w) / f.step) + 1;
  const ny = Math.round((n - s) / f.step) + 1;
  const at = (i: number): XY => [w + (i % nx) * f.step, s + Math.floor(i / nx) * f.step];
  const free = (p: XY, q: XY) =>
    f.zones.every((z) => segmentPolygonDistance(p, q, z.rings) > clearM(z)) &&
    (f.bounds ?? []).every((poly) => pointInPolygonEvenOdd(p, poly) && pointInPolygonEvenOdd(q, poly) && poly.every((ring) => ring.every((c, i) => segmentPolygonDistance(p, q, [[c, ring[(i + 1) % ring.length], c]]) > 0 || onSegment(c, ring[(i + 1) % ring.length], p, q))));
  const index = (p: XY) => Math.round((p[1] - s) / f.step) * nx + Math.round((p[0] - w) / f.step);
  const steps = [[1, 0], [0, 1], [-1, 0], [0, -1], [1, 1], [1, -1], [-1, 1], [-1, -1], [1, 2], [2, 1], [-1, 2], [-2, 1], [1, -2], [2, -1], [-1, -2], [-2, -1]];
  const dist = new Float64Array(nx * ny).fill(Infinity);
  const done = new Uint8Array(nx * ny);
  const src = index(a);
  dist[src] = 0;
  const heap = new PairHeap();
  heap.push(0, src);
  while (heap.size) {
    const [d, u] = heap.pop();
    if (done[u]) continue;
    done[u] = 1;
    if (u === index(b)) return d;
    const pu = at(u);
    for (const [di, dj] of steps) {
      const i = (u % nx) + di;
      const j = Math.floor(u / nx) + dj;
      if (i < 0 || j < 0 || i >= nx || j >= ny) continue;
      const v = j * nx + i;
      if (done[v]) continue;
      const pv = at(v);
      const dv = d + Math.hypot(di, dj) * f.step;
      if (dv < dist[v] && free(pu, pv)) {
        dist[v] = dv;
        heap.push(dv, v);
      }
    }
  }
  return Infinity;
}

/** Both ends of p-q on segment a-b (a grid side running along the bounds is inside them). */
function onSegment(a: XY, b: XY, p: XY, q: XY): boolean {
  const on = (r: XY) => Math.abs((b[0] - a[0]) * (r[1] - a[1]) - (b[1] - a[1]) * (r[0] - a[0])) < 1e-9;
  return on(p) && on(q);
}

describe("shortest transits on fixtures", () => {
  const results = FIXTURES.map((f) => {
    const router = routerOf(f);
    return { f, router, path: router.route(f.a, f.b) };
  });

  for (const { f, router, path } of results) {
    describe(f.name, () => {
      it("finds a path from A to B that enters no buffered zone (our predicate) and no zone (turf)", () => {
        expect(path).not.toBeNull();
        const p = path!;
        expect(p[0]).toEqual(f.a);
        expect(p[p.length - 1]).toEqual(f.b);
        for (let i = 1; i < p.length; i++) expect(segmentEntersAny(router.index, p[i - 1], p[i])).toBe(false);
        const line = lineString(p);
        for (const z of f.zones) expect(booleanIntersects(line, turfPolygon(z.rings.map((r) => [...r, r[0]]))), z.name).toBe(false);
      });

      it("is as short as the exhaustive search over the full visibility graph (1e-6 m)", () => {
        expect(pathLength(path!)).toBeCloseTo(exhaustive(router, f.a, f.b), 6);
      });

      it("is no longer than the 16-connected grid path that keeps clear of our outlines", () => {
        const devs = new Map(f.zones.map((z) => [z, bufferZones([z])[0].deviationM]));
        const grid = gridLength(f, f.a, f.b, (z) => z.bufferM + devs.get(z)! + 1e-9);
        expect(grid).toBeLessThan(Infinity);
        expect(pathLength(path!)).toBeLessThanOrEqual(grid + 1e-6);
        // and not absurdly shorter: a 16-connected grid is within a few % of the true length (common practice)
        expect(pathLength(path!)).toBeGreaterThan(0.9 * grid);
      });
    });
  }

  it("takes the wider gap and not the one narrower than twice the buffer", () => {
    const path = results[4].path!;
    // Where the path crosses x = 50: inside the open gap (|y| < 15 - 10 m of buffer).
    const i = path.findIndex((p) => p[0] > 50);
    const [p, q] = [path[i - 1], path[i]];
    const y50 = p[1] + ((50 - p[0]) * (q[1] - p[1])) / (q[0] - p[0]);
    expect(Math.abs(y50)).toBeLessThan(5);
    // Around the closed gap at x = 120..140: past the end of a zone 200 m out, plus its buffer.
    expect(Math.max(...path.map((p) => Math.abs(p[1])))).toBeGreaterThanOrEqual(210);
  });

  it("returns null when B is enclosed, inside a zone, or outside the bounds, and [A, B] when B is in sight", () => {
    const holed = routerOf(FIXTURES[2]);
    expect(holed.route([70, 100], [300, 100])).toBeNull(); // out of the hole: enclosed
    expect(holed.route([70, 100], [20, 100])).toBeNull(); // B in the zone
    expect(holed.route([70, 100], [70, 150])).toEqual([[70, 100], [70, 150]]);
    const bounded = routerOf(FIXTURES[5]);
    expect(bounded.route([180, 20], [150, 150])).toBeNull(); // B on unknown ground
  });

  it("bends around the tip of a zero-width needle (a zone without buffer that doubles back on itself)", () => {
    const needle = makeRouter(bufferZones([{ name: "needle", rings: [[[0, 0], [100, 0], [100, 10], [50, 10], [50, 60], [50, 10], [0, 10]]], bufferM: 0 }]));
    expect(needle.route([40, 30], [60, 30])).toEqual([[40, 30], [50, 60], [60, 30]]);
  });

  describe.skipIf(!HAS_SPATIALITE)("OGR: every path keeps at least the buffer from every zone (ST_Distance) and stays in the bounds (ST_Covers)", () => {
    let rows: Record<string, string>[] = [];
    beforeAll(() => {
      const features = results.flatMap(({ f, path }, fi) => [
        { fi, kind: "path", r: 0, geometry: { type: "LineString", coordinates: path } },
        ...f.zones.map((z) => ({ fi, kind: "zone", r: z.bufferM, geometry: polygonGeometry(z.rings) })),
        ...(f.bounds ?? []).map((poly) => ({ fi, kind: "bounds", r: 0, geometry: polygonGeometry(poly) })),
      ]);
      rows = ogrSql(features, `SELECT p.fi AS fi, z.kind AS kind, z.r AS r, ST_Distance(p.geometry, z.geometry) AS d, ST_Covers(z.geometry, p.geometry) AS covered
        FROM z p JOIN z z ON p.fi = z.fi AND p.kind = 'path' AND z.kind <> 'path'`);
    });
    it("holds for every fixture", () => {
      expect(rows.length).toBeGreaterThan(FIXTURES.length);
      for (const r of rows) {
        if (r.kind === "zone") expect(Number(r.d), FIXTURES[Number(r.fi)].name).toBeGreaterThanOrEqual(Number(r.r) - 1e-6);
        else expect(r.covered, FIXTURES[Number(r.fi)].name).toBe("1");
      }
    });
  });
});

describe("property: random convex and concave zones, random A and B (fast-check)", () => {
  const shape = fc.record({
    seed: fc.integer({ min: 1, max: 1 << 30 }),
    zones: fc.integer({ min: 1, max: 4 }),
    convex: fc.boolean(),
    bufferM: fc.double({ min: 1, max: 15, noNaN: true }),
  });
  it("routes no longer than the grid brute force and never into a zone", () => {
    fc.assert(
      fc.property(shape, ({ seed, zones: count, convex, bufferM }) => {
        const rand = seeded(seed);
        const zones: KeepOutZone[] = [];
        for (let i = 0; i < count; i++) {
          const cx = 30 + 140 * rand();
          const cy = 30 + 140 * rand();
          const n = convex ? 3 + Math.floor(rand() * 8) : 5 + Math.floor(rand() * 15);
          const rMin = convex ? 25 : 8;
          zones.push({ name: `z${i}`, rings: [starRing(rand, cx, cy, n, rMin, 25 + 20 * rand())], bufferM: convex ? bufferM : bufferM / 2 });
        }
        const f: Fixture = { name: "random", zones, a: [0, 0], b: [0, 0], box: [-20, -20, 220, 220], step: 5 };
        const router = routerOf(f);
        const devs = bufferZones(zones).map((z) => z.deviationM);
        const clear = (z: KeepOutZone) => z.bufferM + devs[zones.indexOf(z)] + 1e-9;
        const lattice = (): XY => [-20 + 5 * Math.floor(rand() * 49), -20 + 5 * Math.floor(rand() * 49)];
        const outside = (p: XY) => zones.every((z) => segmentPolygonDistance(p, p, z.rings) > clear(z));
        let a = lattice();
        let b = lattice();
        for (let k = 0; k < 50 && !outside(a); k++) a = lattice();
        for (let k = 0; k < 50 && !outside(b); k++) b = lattice();
        fc.pre(outside(a) && outside(b));
        const grid = gridLength(f, a, b, clear);
        const path = router.route(a, b);
        if (grid < Infinity) expect(path).not.toBeNull();
        if (!path) return;
        for (let i = 1; i < path.length; i++) expect(segmentEntersAny(router.index, path[i - 1], path[i])).toBe(false);
        const line = lineString(path.length > 1 ? path : [a, b]);
        for (const z of zones) expect(booleanIntersects(line, turfPolygon(z.rings.map((r) => [...r, r[0]])))).toBe(false);
        // The brief's bound is grid + resolution; ours holds without the slack.
        expect(pathLength(path)).toBeLessThanOrEqual(grid + 1e-6);
      }),
      { numRuns: 60, seed: 20240611 },
    );
  });
});
