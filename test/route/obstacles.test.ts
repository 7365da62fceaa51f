/**
 * Buffered keep-out zones against OGR/SpatiaLite's ST_Buffer (GEOS) in a metric
 * CRS, and against turf's buffer placed on the local frame with proj4.
 *
 * GEOS puts its buffer's vertices on the true arcs (inscribed polygons), so its
 * buffer lies inside the true buffer, which lies inside ours (circumscribed
 * arcs). With R = d / cos(π / 4Q), GEOS's buffer by R with Q segments per quarter
 * circle holds the disc of radius d around every vertex, so it holds everything
 * within d of the zone. Both facts are the geometry of inscribed and
 * circumscribed regular polygons (common practice).
 */
import { beforeAll, describe, expect, it } from "vitest";
import { buffer as turfBuffer, polygon as turfPolygon } from "@turf/turf";
import proj4 from "proj4";
import type { XY } from "../../src/layout/types.js";
import { arcDeviationM, arcHalfStepRad } from "../../src/route/offsetCycles.js";
import { bufferZone } from "../../src/route/obstacles.js";
import { indexObstacles, pointInsideAny } from "../../src/route/inside.js";
import { signedArea } from "../../src/route/rings.js";
import type { KeepOutZone } from "../../src/route/types.js";
import { HAS_SPATIALITE, multiPolygonGeometry, ogrSql, pointSegmentDistance, polygonGeometry, seeded, starRing } from "./helpers.js";

const Q = 64; // GEOS quadrant segments used for the references

const square = (x0: number, y0: number, x1: number, y1: number): XY[] => [[x0, y0], [x1, y0], [x1, y1], [x0, y1]];

/** Fixtures: convex, concave with a notch wider and narrower than twice the buffer, holes that stay and that close, stars. */
function fixtures(): KeepOutZone[] {
  const rand = seeded(42);
  const u: XY[] = [[0, 0], [100, 0], [100, 100], [70, 100], [70, 20], [30, 20], [30, 100], [0, 100]];
  const zones: KeepOutZone[] = [
    { name: "square", rings: [square(0, 0, 10, 10)], bufferM: 20 },
    { name: "U, notch 40 m, buffer 10 m (stays open)", rings: [u], bufferM: 10 },
    { name: "U, notch 40 m, buffer 25 m (fills)", rings: [u], bufferM: 25 },
    { name: "wide hole (stays, shrunk)", rings: [square(0, 0, 100, 100), square(20, 20, 80, 80).reverse()], bufferM: 10 },
    { name: "narrow hole (closes)", rings: [square(0, 0, 100, 100), square(20, 20, 80, 35)], bufferM: 10 },
    { name: "thin road", rings: [[[0, 0], [300, 40], [300, 44], [0, 4]]], bufferM: 15 },
    { name: "comb, gaps exactly twice the buffer", rings: [[[0, 0], [100, 0], [100, 50], [80, 50], [80, 10], [60, 10], [60, 50], [40, 50], [40, 10], [20, 10], [20, 50], [0, 50]]], bufferM: 10 },
    { name: "UTM-sized coordinates", rings: [starRing(rand, 500000, 5200000, 40, 50, 300)], bufferM: 30 },
  ];
  for (let i = 0; i < 12; i++) {
    const rings = [starRing(rand, 0, 0, 5 + Math.floor(rand() * 60), 50, 300)];
    if (i % 2 === 0) rings.push(starRing(rand, 0, 0, 6, 10, 40, true));
    zones.push({ name: `star ${i}`, rings, bufferM: [0.5, 3, 12, 40, 90][i % 5] });
  }
  return zones;
}

describe("arc sides are circumscribed", () => {
  it("keeps the excess r (1 / cos h - 1) at or below the deviation asked for", () => {
    // Circumscribed regular polygon: its vertices lie at r / cos(π / n) (common practice).
    for (const r of [0.5, 5, 20, 100, 1000]) {
      const dev = arcDeviationM(r);
      const h = arcHalfStepRad(r, dev);
      expect(r / Math.cos(h) - r).toBeLessThanOrEqual(dev * (1 + 1e-12));
      expect(dev).toBe(Math.min(0.5, 0.02 * r));
    }
  });

  it("puts every outline vertex between r and r + deviation from the zone", () => {
    // Outline vertices are arc vertices (r / cos h), offset-side ends or crossings (>= r):
    // the distance to the zone, a brute-force minimum over its sides.
    for (const zone of fixtures()) {
      const z = bufferZone(zone);
      for (const ring of z.polygons.flat()) {
        for (const p of ring) {
          let d = Infinity;
          for (const r of zone.rings) for (let i = 0; i < r.length; i++) d = Math.min(d, pointSegmentDistance(p, r[i], r[(i + 1) % r.length]));
          expect(d, zone.name).toBeGreaterThanOrEqual(zone.bufferM * (1 - 1e-9) - 1e-9);
          expect(d, zone.name).toBeLessThanOrEqual(zone.bufferM + z.deviationM + 1e-6);
        }
      }
    }
  });
});

describe.skipIf(!HAS_SPATIALITE)("buffers against OGR's ST_Buffer (GEOS, planar, metric CRS)", () => {
  const zones = fixtures();
  const ours = zones.map((z) => bufferZone(z));
  const features = zones.flatMap((z, id) => [
    { id, kind: "zone", r: z.bufferM, dev: ours[id].deviationM, geometry: polygonGeometry(z.rings) },
    { id, kind: "ours", r: z.bufferM, dev: ours[id].deviationM, geometry: multiPolygonGeometry(ours[id].polygons) },
  ]);
  let rows: Record<string, string>[] = [];
  beforeAll(() => {
    rows = ogrSql(
    features,
    `SELECT a.id AS id,
       ST_IsValid(b.geometry) AS valid,
       ST_Area(b.geometry) AS ours,
       ST_Area(ST_Buffer(a.geometry, a.r, ${Q})) AS geos,
       ST_Area(ST_Difference(ST_Buffer(a.geometry, a.r, ${Q}), b.geometry)) AS missed,
       ST_Area(ST_Difference(b.geometry, ST_Buffer(a.geometry, (a.r + a.dev) / cos(pi() / ${4 * Q}) + 1e-6, ${Q}))) AS beyond,
       NumInteriorRings(ST_Buffer(a.geometry, a.r, ${Q})) AS geosHoles
     FROM z a JOIN z b ON a.id = b.id AND a.kind = 'zone' AND b.kind = 'ours' ORDER BY a.id`,
    );
  });
  const num = (v: string) => (v === "" ? 0 : Number(v));

  it("every buffered outline is a valid polygon (GEOS ST_IsValid)", () => {
    expect(rows).toHaveLength(zones.length);
    for (const r of rows) expect(r.valid, zones[Number(r.id)].name).toBe("1");
  });

  it("contains GEOS's buffer (what GEOS covers and we do not: < 1e-6 of its area)", () => {
    for (const r of rows) expect(num(r.missed), zones[Number(r.id)].name).toBeLessThanOrEqual(1e-6 * num(r.geos));
  });

  it("stays inside the buffer by r + deviation (GEOS, widened to hold its arcs' chords)", () => {
    for (const r of rows) expect(num(r.beyond), zones[Number(r.id)].name).toBeLessThanOrEqual(1e-6 * num(r.geos));
  });

  it("has GEOS's area within 2 % (ours is larger: circumscribed against inscribed arcs)", () => {
    for (const r of rows) {
      const ratio = num(r.ours) / num(r.geos);
      expect(ratio, zones[Number(r.id)].name).toBeGreaterThanOrEqual(1);
      expect(ratio, zones[Number(r.id)].name).toBeLessThan(1.02);
    }
  });

  it("keeps a hole exactly when GEOS does (wider than twice the buffer), and our area sums match the shoelace", () => {
    for (const r of rows) {
      const z = ours[Number(r.id)];
      const holes = z.polygons.reduce((s, p) => s + p.length - 1, 0);
      expect(holes, zones[Number(r.id)].name).toBe(num(r.geosHoles));
      const area = z.polygons.flat().reduce((s, ring) => s + signedArea(ring), 0);
      expect(area).toBeCloseTo(num(r.ours), 3);
    }
    const named = (name: string) => ours[zones.findIndex((z) => z.name === name)];
    expect(named("wide hole (stays, shrunk)").polygons[0]).toHaveLength(2);
    expect(named("narrow hole (closes)").polygons[0]).toHaveLength(1);
    expect(named("U, notch 40 m, buffer 25 m (fills)").polygons[0]).toHaveLength(1);
  });
});

describe("buffers against turf's buffer (jsts in its own azimuthal equidistant frame), placed on ours with proj4", () => {
  // Local frame: azimuthal equidistant around 15° E 47° N on turf's sphere (radius
  // 6371008.8 m, turf's earthRadius), since turf's "meters" are metres on that sphere.
  const aeqd = proj4("EPSG:4326", "+proj=aeqd +lat_0=47 +lon_0=15 +x_0=0 +y_0=0 +R=6371008.8 +units=m +no_defs");
  const rand = seeded(7);
  const cases: KeepOutZone[] = [
    { name: "star", rings: [starRing(rand, 200, -100, 25, 60, 200)], bufferM: 25 },
    { name: "rectangle", rings: [square(-300, 100, -100, 180)], bufferM: 40 },
  ];
  for (const zone of cases) {
    it(`${zone.name}: holds every vertex of turf's buffer, areas within 3 %`, () => {
      const lonLat = zone.rings.map((r) => [...r, r[0]].map((p) => aeqd.inverse([p[0], p[1]])));
      const tb = turfBuffer(turfPolygon(lonLat), zone.bufferM, { units: "meters", steps: 16 });
      const coords = (tb!.geometry.type === "Polygon" ? [tb!.geometry.coordinates] : tb!.geometry.coordinates) as number[][][][];
      const local = coords.map((poly) => poly.map((ring) => ring.slice(0, -1).map((q) => aeqd.forward([q[0], q[1]]) as XY)));
      const ours = bufferZone(zone);
      const index = indexObstacles([ours]);
      const outline = ours.polygons.flat();
      for (const v of local.flat(2)) {
        // Turf's vertices lie on its arcs; both frames are azimuthal equidistant a
        // few hundred metres from their centres, so they agree to millimetres
        // (scale error (d / R)² / 6, from memory): inside ours or within 5 mm of our outline.
        let d = Infinity;
        for (const r of outline) for (let i = 0; i < r.length; i++) d = Math.min(d, pointSegmentDistance(v, r[i], r[(i + 1) % r.length]));
        expect(pointInsideAny(index, v) || d < 0.005, `${zone.name} vertex ${v}`).toBe(true);
      }
      const turfArea = local.reduce((s, poly) => s + poly.reduce((t, ring) => t + Math.abs(signedArea(ring)) * (t === 0 ? 1 : -1), 0), 0);
      const ourArea = outline.reduce((s, r) => s + signedArea(r), 0);
      expect(ourArea / turfArea).toBeGreaterThan(1);
      expect(ourArea / turfArea).toBeLessThan(1.03);
    });
  }
});
