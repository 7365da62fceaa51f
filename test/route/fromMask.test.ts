/**
 * Unknown ground from a nodata mask. The bilinear ground between cell centres
 * (GDAL's convention, `gdallocationinfo -r bilinear`) is known only inside quads
 * whose four centres have data; the check here recomputes that from the mask
 * for every point and asks turf's booleanPointInPolygon where the point lies.
 */
import { beforeAll, describe, expect, it } from "vitest";
import fc from "fast-check";
import { booleanPointInPolygon, point, polygon as turfPolygon } from "@turf/turf";
import type { GeoTransform } from "../../src/dem/grid.js";
import type { XY } from "../../src/layout/types.js";
import { unknownGround, type UnknownGround } from "../../src/route/fromMask.js";
import { makeRouter } from "../../src/route/shortestPath.js";
import { HAS_SPATIALITE, multiPolygonGeometry, ogrSql, seeded } from "./helpers.js";

interface Mask {
  mask: Uint8Array;
  width: number;
  height: number;
  t: GeoTransform;
}

/** Is the bilinear ground at p known? (Closed: a point on a known quad's side is known.) */
function knownAt(m: Mask, p: XY): boolean {
  const u = (p[0] - m.t.x0) / m.t.dx - 0.5;
  const v = (p[1] - m.t.y0) / m.t.dy - 0.5;
  if (u < 0 || v < 0 || u > m.width - 1 || v > m.height - 1) return false;
  const has = (c: number, r: number) => m.mask[r * m.width + c] === 1;
  const quads = [Math.floor(u), Math.ceil(u) - 1].flatMap((c) => [Math.floor(v), Math.ceil(v) - 1].map((r) => [c, r]));
  return quads.some(([c, r]) => c >= 0 && r >= 0 && c < m.width - 1 && r < m.height - 1 && has(c, r) && has(c + 1, r) && has(c, r + 1) && has(c + 1, r + 1));
}

const inAny = (polys: XY[][][], p: XY, ignoreBoundary: boolean) =>
  polys.some((poly) => booleanPointInPolygon(point(p), turfPolygon(poly.map((r) => [...r, r[0]])), { ignoreBoundary }));

/** Nodata discs, a nodata band along the west edge, a ring of nodata with a known island in it. */
function blobs(width: number, height: number, seed: number): Mask {
  const rand = seeded(seed);
  const mask = new Uint8Array(width * height).fill(1);
  const discs = Array.from({ length: 4 }, () => [width * rand(), height * rand(), 3 + 10 * rand()]);
  for (let r = 0; r < height; r++) {
    for (let c = 0; c < width; c++) {
      const off = discs.some(([x, y, d]) => (c - x) ** 2 + (r - y) ** 2 < d * d) || c < 4 + 3 * Math.sin(r / 5);
      const ring = Math.hypot(c - 0.7 * width, r - 0.5 * height);
      if ((off || ring < 11) && !(ring < 6)) mask[r * width + c] = 0;
    }
  }
  return { mask, width, height, t: { x0: 500000, y0: 5200000, dx: 10, dy: -10 } };
}

function vertexCount(polys: XY[][][]): number {
  return polys.flat().reduce((s, r) => s + r.length, 0);
}

/** Every unknown quad's centre and corners, and random points, against the polygons. */
function checkContainment(m: Mask, g: UnknownGround, samples: number, seed: number): void {
  const { x0, y0, dx, dy } = m.t;
  const centre = (c: number, r: number): XY => [x0 + (c + 0.5) * dx, y0 + (r + 0.5) * dy];
  for (let r = 0; r + 1 < m.height; r++) {
    for (let c = 0; c + 1 < m.width; c++) {
      const corners = [centre(c, r), centre(c + 1, r), centre(c, r + 1), centre(c + 1, r + 1)];
      const mid: XY = [(corners[0][0] + corners[3][0]) / 2, (corners[0][1] + corners[3][1]) / 2];
      if (knownAt(m, mid)) continue;
      // An unknown quad: its centre is in the unknown polygons, and so is each corner (on their outline at worst).
      expect(inAny(g.unknown, mid, false), `quad ${c},${r} centre`).toBe(true);
      expect(inAny(g.known, mid, true), `quad ${c},${r} centre in known`).toBe(false);
      for (const p of corners) expect(inAny(g.unknown, p, false), `quad ${c},${r} corner ${p}`).toBe(true);
    }
  }
  const rand = seeded(seed);
  const [w, s, e, n] = [g.frame[0][0], g.frame[0][1], g.frame[2][0], g.frame[2][1]];
  let unknownSamples = 0;
  for (let k = 0; k < samples; k++) {
    const p: XY = [w + (e - w) * rand(), s + (n - s) * rand()];
    if (!knownAt(m, p)) {
      unknownSamples++;
      expect(inAny(g.unknown, p, false), `unknown ground at ${p}`).toBe(true);
      expect(inAny(g.known, p, true), `unknown ground at ${p} inside known`).toBe(false);
    } else if (inAny(g.known, p, true)) {
      expect(inAny(g.unknown, p, true)).toBe(false);
    }
  }
  expect(unknownSamples).toBeGreaterThan(samples / 20);
}

describe("unknown ground from a nodata mask: blobs, an edge band, a pocket with a known island", () => {
  const m = blobs(90, 70, 5);
  const variants = [
    { name: "blocks of 1, simplified by one cell", options: {} },
    { name: "blocks of 1, not simplified", options: { simplifyM: 0 } },
    { name: "blocks of 3", options: { blockCells: 3 } },
  ];
  for (const v of variants) {
    const g = unknownGround(m.mask, m.width, m.height, m.t, v.options);
    it(`${v.name}: contains every unknown quad's centre and corners and 20000 random unknown points`, () => {
      checkContainment(m, g, 20000, 9);
    });
    it(`${v.name}: few vertices (reported)`, () => {
      const known = vertexCount(g.known);
      const unknown = vertexCount(g.unknown);
      process.stdout.write(`fromMask ${v.name}: ${m.width} x ${m.height} cells, known ${g.known.length} polygons / ${known} vertices, unknown ${g.unknown.length} polygons / ${unknown} vertices\n`);
      expect(g.known.length).toBeGreaterThan(0);
      expect(known).toBeLessThan(v.options.simplifyM === 0 ? 1200 : 400);
    });
  }

  it("finds the known island inside the nodata ring as a hole of an unknown polygon", () => {
    const g = unknownGround(m.mask, m.width, m.height, m.t);
    const island: XY = [m.t.x0 + (0.7 * m.width + 0.5) * m.t.dx, m.t.y0 + (0.5 * m.height + 0.5) * m.t.dy];
    expect(knownAt(m, island)).toBe(true);
    expect(inAny(g.known, island, true)).toBe(true);
    expect(inAny(g.unknown, island, false)).toBe(false);
  });

  it("with the known polygons as bounds, a route never flies over unknown ground", () => {
    const g = unknownGround(m.mask, m.width, m.height, m.t);
    const router = makeRouter([], { bounds: g.known });
    const rand = seeded(3);
    const { x0, y0, dx, dy } = m.t;
    let routed = 0;
    for (let k = 0; k < 40; k++) {
      const a: XY = [x0 + dx * m.width * rand(), y0 + dy * m.height * rand()];
      const b: XY = [x0 + dx * m.width * rand(), y0 + dy * m.height * rand()];
      const path = router.route(a, b);
      if (!path) continue;
      routed++;
      for (let i = 1; i < path.length; i++) {
        for (let s = 0; s <= 50; s++) {
          const p: XY = [path[i - 1][0] + ((path[i][0] - path[i - 1][0]) * s) / 50, path[i - 1][1] + ((path[i][1] - path[i - 1][1]) * s) / 50];
          expect(knownAt(m, p), `route ${k} at ${p}`).toBe(true);
        }
      }
    }
    expect(routed).toBeGreaterThan(10);
  });

  describe.skipIf(!HAS_SPATIALITE)("OGR: the polygons are valid and the known ones lie inside the frame, apart from the unknown ones", () => {
    let rows: Record<string, string>[] = [];
    beforeAll(() => {
      const g = unknownGround(m.mask, m.width, m.height, m.t);
      rows = ogrSql(
        [
          { kind: "known", geometry: multiPolygonGeometry(g.known) },
          { kind: "unknown", geometry: multiPolygonGeometry(g.unknown) },
          { kind: "frame", geometry: multiPolygonGeometry([[g.frame]]) },
        ],
        `SELECT k.kind AS kind, ST_IsValid(k.geometry) AS valid, ST_Area(ST_Intersection(k.geometry, u.geometry)) AS overlap, ST_Area(k.geometry) AS area, ST_Area(f.geometry) AS frame
         FROM z k, z u, z f WHERE k.kind = 'known' AND u.kind = 'unknown' AND f.kind = 'frame'
         UNION ALL SELECT kind, ST_IsValid(geometry), 0, ST_Area(geometry), 0 FROM z WHERE kind = 'unknown'`,
      );
    });
    it("is so", () => {
      const known = rows.find((r) => r.kind === "known")!;
      const unknown = rows.find((r) => r.kind === "unknown")!;
      expect(known.valid).toBe("1");
      expect(unknown.valid).toBe("1");
      expect(Number(known.overlap || 0)).toBeLessThan(1e-6);
      // Known and unknown tile the frame.
      expect(Number(known.area) + Number(unknown.area)).toBeCloseTo(Number(known.frame), 3);
    });
  });
});

describe("property: random masks (fast-check), every unknown point is covered", () => {
  it("holds for sparse and dense nodata, blocks of 1 to 3", () => {
    fc.assert(
      fc.property(
        fc.record({ width: fc.integer({ min: 2, max: 14 }), height: fc.integer({ min: 2, max: 12 }), density: fc.double({ min: 0, max: 0.5, noNaN: true }), seed: fc.integer(), k: fc.integer({ min: 1, max: 3 }) }),
        ({ width, height, density, seed, k }) => {
          const rand = seeded(seed);
          const mask = Uint8Array.from({ length: width * height }, () => (rand() < density ? 0 : 1));
          const m: Mask = { mask, width, height, t: { x0: -50, y0: 80, dx: 10, dy: -10 } };
          checkContainment(m, unknownGround(mask, width, height, m.t, { blockCells: k }), 400, seed + 1);
        },
      ),
      { numRuns: 80, seed: 7 },
    );
  });
});
