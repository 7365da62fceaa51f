/**
 * Property (issue 12): for random convex and concave keep-out zones (a few, random sizes, some on
 * the site, some overlapping each other) and a random take-off point outside them, every leg the
 * planner flies keeps out of every zone and its buffer, and every routed transit is within 1.05x
 * of the shortest way around the buffered zones.
 *
 * Plans through the library (resolvePlanOptions + planMission) on the small hills site over the
 * GDAL-written DEM fixtures/gdal/hills_utm33_f32.tif (UTM 33N, 1 m cells; the site
 * 500600..500800 E, 5200300..5200500 N). Zones are drawn in UTM 33N metres, written as RFC 7946
 * GeoJSON through proj4's EPSG:32633 definition, and read back onto the plan's local frame with
 * run.frame.fromWgs84, where the legs' waypoints are.
 *
 * References: turf's booleanPointInPolygon (a planar ray-casting test on the coordinates given,
 * so it works on local-frame metres as they are); the planar point-segment distance written
 * here, because turf's distances (pointToLineDistance, pointToPolygonDistance) take coordinates
 * as degrees on a sphere and cannot measure local metres; turf's buffer for the reference
 * obstacles, and an exhaustive search of the full visibility graph over their vertices
 * (Lozano-Pérez and Wesley, CACM 1979) for the shortest way round.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import fc from "fast-check";
import proj4 from "proj4";
import { booleanPointInPolygon, buffer as turfBuffer, point, polygon as turfPolygon } from "@turf/turf";
import type { Feature, MultiPolygon, Polygon } from "geojson";
import { ROOT } from "../e2e/cli.js";
import { bendM, polylineM, strictlyInside, visibilityShortestM } from "../e2e/keepOutReference.js";
import { loadPlanFile, resolvePlanOptions } from "../../src/plan/options.js";
import { planMission, type PlanRun } from "../../src/plan/plan.js";
import { InputError } from "../../src/errors.js";
import type { XY } from "../../src/layout/types.js";

const PLAN = path.join(ROOT, "fixtures", "e2e", "hills-utm33-small-plan.yaml");
/** EPSG:32633 as PROJ defines it (WGS 84 / UTM zone 33N). */
const UTM33 = "+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs";
/** Local-frame coordinates are shifted by this point before the geometry (small numbers). */
const O: XY = [500000, 5200000];

interface ZoneSpec {
  concave: boolean;
  cx: number;
  cy: number;
  r: number;
  n: number;
  /** Convex: the ellipse's minor/major ratio. Concave: each inner vertex's share of r. */
  shape: number[];
  rot: number;
  /** The feature's own buffer; null: the plan's keepOutBufferM. */
  bufferM: number | null;
}

/** A zone's ring in UTM 33N, counter-clockwise: an ellipse's polygon (convex) or a star (concave, simple). */
function ringOf(z: ZoneSpec): XY[] {
  const ring: XY[] = [];
  const m = z.concave ? 2 * z.n : z.n;
  for (let i = 0; i < m; i++) {
    const a = (2 * Math.PI * i) / m;
    let x: number, y: number;
    if (z.concave) {
      const r = i % 2 === 0 ? z.r : z.r * z.shape[(i >> 1) % z.shape.length];
      [x, y] = [r * Math.cos(a), r * Math.sin(a)];
    } else {
      [x, y] = [z.r * Math.cos(a), z.r * z.shape[0] * Math.sin(a)];
    }
    const c = Math.cos(z.rot), s = Math.sin(z.rot);
    ring.push([z.cx + c * x - s * y, z.cy + s * x + c * y]);
  }
  return ring;
}

const zoneArb: fc.Arbitrary<ZoneSpec> = fc.record({
  concave: fc.boolean(),
  // Centres on the site or up to 30 m beyond it; radii 8-45 m: zones on the site, across its
  // edge, beside it, and overlapping each other. All stay well inside the DEM window the plan
  // reads (about 130 m round the site; its edge is unknown ground, an obstacle too).
  cx: fc.integer({ min: 500570, max: 500830 }),
  cy: fc.integer({ min: 5200270, max: 5200530 }),
  r: fc.integer({ min: 8, max: 45 }),
  n: fc.integer({ min: 4, max: 8 }),
  shape: fc.array(fc.double({ min: 0.3, max: 0.75, noNaN: true }), { minLength: 8, maxLength: 8 }),
  rot: fc.double({ min: 0, max: 2 * Math.PI, noNaN: true }),
  bufferM: fc.option(fc.integer({ min: 0, max: 15 }), { nil: null }),
});

const caseArb = fc.record({
  zones: fc.array(zoneArb, { minLength: 1, maxLength: 3 }),
  defaultBufferM: fc.integer({ min: 0, max: 12 }),
  takeoff: fc.tuple(fc.integer({ min: 500500, max: 500900 }), fc.integer({ min: 5200200, max: 5200600 })),
});

/** Planar distance from p to segment a-b: the textbook projection onto the segment, clamped. */
function pointSegment(p: XY, a: XY, b: XY): number {
  const dx = b[0] - a[0], dy = b[1] - a[1];
  const dd = dx * dx + dy * dy;
  const t = dd === 0 ? 0 : Math.max(0, Math.min(1, ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / dd));
  return Math.hypot(a[0] + t * dx - p[0], a[1] + t * dy - p[1]);
}

/** Segments a-b and c-d cross or touch (orientation signs). */
function segmentsMeet(a: XY, b: XY, c: XY, d: XY): boolean {
  const o = (p: XY, q: XY, r: XY) => Math.sign((q[0] - p[0]) * (r[1] - p[1]) - (q[1] - p[1]) * (r[0] - p[0]));
  return o(a, b, c) * o(a, b, d) < 0 && o(c, d, a) * o(c, d, b) < 0;
}

/** Planar distance between segment a-b and a ring's sides (0 when they cross). */
function segmentRing(a: XY, b: XY, ring: readonly XY[]): number {
  let d = Infinity;
  for (let i = 0; i < ring.length; i++) {
    const c = ring[i], e = ring[(i + 1) % ring.length];
    if (segmentsMeet(a, b, c, e)) return 0;
    d = Math.min(d, pointSegment(a, c, e), pointSegment(b, c, e), pointSegment(c, a, b), pointSegment(e, a, b));
  }
  return d;
}

const closed = (r: readonly XY[]) => [...r, r[0]].map((p) => [p[0], p[1]]);

describe("keep-out property: random zones, every leg keeps out", () => {
  let dir: string;
  let base: { data: Record<string, unknown>; dir: string };
  const tally = { planned: 0, refused: [] as string[], lengthChecked: 0, cutRuns: 0, zonesOnSite: 0 };

  beforeAll(async () => {
    dir = mkdtempSync(path.join(tmpdir(), "gsdplan-keepout-prop-"));
    const file = await loadPlanFile(PLAN);
    base = { data: file.data as Record<string, unknown>, dir: file.dir };
  });

  it("holds for 10 random zone sets and take-off points (seeded)", async () => {
    let k = 0;
    await fc.assert(
      fc.asyncProperty(caseArb, async (c) => {
        const zoneUtm = c.zones.map(ringOf);
        const bufferOf = (i: number) => c.zones[i].bufferM ?? c.defaultBufferM;
        // A take-off point outside every zone's buffer with a metre to spare (the planner's
        // outline is circumscribed, up to 0.5 m wider); inside one the planner refuses it
        // (checked end to end in test/e2e/planKeepOut.test.ts).
        const t: XY = [c.takeoff[0], c.takeoff[1]];
        const clearOf = (p: XY, ring: XY[], b: number) =>
          !booleanPointInPolygon(point(p), turfPolygon([closed(ring)])) && ring.every((q, i) => pointSegment(p, q, ring[(i + 1) % ring.length]) > b + 1);
        fc.pre(zoneUtm.every((ring, i) => clearOf(t, ring, bufferOf(i))));

        const file = path.join(dir, `zones-${k++}.geojson`);
        const toLonLat = (p: XY) => proj4(UTM33, "WGS84", p) as [number, number];
        writeFileSync(
          file,
          JSON.stringify({
            type: "FeatureCollection",
            features: zoneUtm.map((ring, i) => ({
              type: "Feature",
              properties: { name: `random ${i + 1}`, ...(c.zones[i].bufferM === null ? {} : { bufferM: c.zones[i].bufferM }) },
              geometry: { type: "Polygon", coordinates: [closed(ring).map((p) => toLonLat(p as XY))] },
            })),
          }),
        );
        const options = resolvePlanOptions({ ...base.data, keepOut: [file], keepOutBufferM: c.defaultBufferM, takeoff: toLonLat(t) }, {}, base.dir);
        let run: PlanRun;
        try {
          run = await planMission(options);
        } catch (e) {
          // Zones may cover the site or wall the take-off point in: the plan is then refused
          // with one of these lines, which is right.
          if (e instanceof InputError && /wholly inside keep-out zones|keep-out zones enclose every strip|no way from the take-off point/.test(e.message)) {
            tally.refused.push(e.message);
            return;
          }
          throw e;
        }
        tally.planned++;
        if ((run.layout.keepOutCuts ?? []).length) tally.cutRuns++;
        tally.zonesOnSite += run.keepOut.zones.filter((z) => z.siteRemovedM2 > 0).length;

        // The zones as the planner's frame places them: the file's WGS84 corners through run.frame.fromWgs84.
        const local = zoneUtm.map((ring) => ring.map((p) => {
          const [x, y] = run.frame.fromWgs84(...toLonLat(p));
          return [x - O[0], y - O[1]] as XY;
        }));
        const zonePolys = local.map((ring) => turfPolygon([closed(ring)]));
        const legs = run.flights.flights.flatMap((f) => f.legs);
        expect(legs.length).toBeGreaterThan(2);
        for (const leg of legs) {
          const way: XY[] = leg.waypoints.map((w) => [w.x - O[0], w.y - O[1]]);
          for (let i = 1; i < way.length; i++) {
            const [a, b] = [way[i - 1], way[i]];
            const steps = Math.max(1, Math.ceil(Math.hypot(b[0] - a[0], b[1] - a[1]) / 0.5));
            local.forEach((ring, z) => {
              // Inside the zone: turf, at both ends and every 0.5 m between.
              for (let s = 0; s <= steps; s++) {
                const p: XY = [a[0] + ((b[0] - a[0]) * s) / steps, a[1] + ((b[1] - a[1]) * s) / steps];
                expect(booleanPointInPolygon(point(p), zonePolys[z]), `${leg.kind} ${leg.strip} in zone ${z + 1}`).toBe(false);
              }
              // Nearer than the buffer: the exact planar distance of the straight segment. 1 cm
              // for the cut points' arithmetic.
              expect(segmentRing(a, b, ring), `${leg.kind} ${leg.strip} near zone ${z + 1}`).toBeGreaterThanOrEqual(bufferOf(z) - 0.01);
            });
          }
        }

        // Routed transits against the exhaustive visibility search around turf's buffers
        // (8 sides a quadrant with corners on the circle, so inside the true buffer; 10 cm less
        // than the buffer for turf's spherical radius, 0.3 % short here). Only when every two
        // buffered zones either overlap or stay apart by 2 m: a narrower gap may be open to the
        // reference and closed to the planner's outline (up to 0.5 m wider), both right.
        const obstacles: XY[][][] = local.map((ring, z) => {
          const b = bufferOf(z);
          if (b === 0) return [[ring]];
          const g = turfBuffer(turfPolygon([closed(zoneUtm[z]).map((p) => toLonLat(p as XY))]), b - 0.1, { units: "meters" }) as Feature<Polygon | MultiPolygon>;
          const polys = g.geometry.type === "Polygon" ? [g.geometry.coordinates] : g.geometry.coordinates;
          return polys.map((rings) => rings.map((r) => r.slice(0, -1).map(([lon, lat]) => {
            const [x, y] = run.frame.fromWgs84(lon, lat);
            return [x - O[0], y - O[1]] as XY;
          })));
        }).flat();
        let ambiguous = false;
        for (let i = 0; i < local.length; i++)
          for (let j = i + 1; j < local.length; j++) {
            let d = Infinity;
            for (let p = 0; p < local[i].length; p++) d = Math.min(d, segmentRing(local[i][p], local[i][(p + 1) % local[i].length], local[j]));
            const inside = booleanPointInPolygon(point(local[i][0]), zonePolys[j]) || booleanPointInPolygon(point(local[j][0]), zonePolys[i]);
            const gap = (inside ? -1 : d) - bufferOf(i) - bufferOf(j);
            if (Math.abs(gap) < 2) ambiguous = true;
          }
        if (ambiguous) return;
        for (const leg of legs) {
          if (leg.kind !== "transit") continue;
          const way: XY[] = leg.waypoints.map((w) => [w.x - O[0], w.y - O[1]]);
          if (way.length < 3 || bendM(way) < 0.5) continue;
          const ref = visibilityShortestM(obstacles, way[0], way[way.length - 1]);
          expect(strictlyInside(way[0], obstacles) || strictlyInside(way[way.length - 1], obstacles)).toBe(false);
          expect(Number.isFinite(ref)).toBe(true);
          // ref <= ours: ours goes round a wider outline, which holds the reference obstacles.
          expect(polylineM(way)).toBeGreaterThanOrEqual(ref - 0.01);
          expect(polylineM(way)).toBeLessThanOrEqual(1.05 * ref + 1e-6);
          tally.lengthChecked++;
        }
      }),
      { numRuns: 10, seed: 1206, endOnFailure: true },
    );
    process.stdout.write(
      `keep-out property: ${tally.planned} plans checked (${tally.cutRuns} with strips cut, ${tally.zonesOnSite} zones on the site), ${tally.refused.length} refused, ${tally.lengthChecked} routed transits measured\n`,
    );
    // Not vacuous: most random cases plan, zones cut strips, and routed transits are measured.
    expect(tally.planned).toBeGreaterThanOrEqual(5);
    expect(tally.cutRuns).toBeGreaterThanOrEqual(3);
    expect(tally.lengthChecked).toBeGreaterThan(0);
  }, 180_000);
});
