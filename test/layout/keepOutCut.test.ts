/**
 * Strips cut at keep-out zones. Reference: turf (`lineIntersect`, `booleanPointInPolygon`,
 * `buffer`'s outline as a planar polygon) on the local frame's metres, independent of
 * src/route's predicates.
 */
import { describe, it, expect } from "vitest";
import { booleanPointInPolygon, lineIntersect, lineString, point, polygon } from "@turf/turf";
import { readSite } from "../../src/layout/site.js";
import { layoutStrips } from "../../src/layout/strips.js";
import type { LayoutLeg, XY } from "../../src/layout/types.js";
import { keepOutSet, keepOutStretches } from "../../src/route/keepOut.js";
import { UTM33, E0, N0, polygonText, rect } from "./frame-helper.js";

const site = readSite(polygonText([rect(0, 0, 400, 300)]), UTM33);
const at = (dx: number, dy: number): XY => [E0 + dx, N0 + dy];
// A square yard in the middle (no buffer) and a yard with a 12 m buffer near a corner.
const yard = { name: "yard", source: "zones.geojson", bufferM: 0, polygons: [[[at(150, 100), at(250, 100), at(250, 180), at(150, 180)]]] };
const shed = { name: "shed", source: "zones.geojson", bufferM: 12, polygons: [[[at(320, 220), at(350, 220), at(350, 250), at(320, 250)]]] };
const set = keepOutSet([yard, shed]);
const opts = {
  headingDeg: 90, spacingM: 40, triggerM: 20, footprintAcrossM: 100, footprintAlongM: 50, photoSpeedMps: 8, transitSpeedMps: 12,
  keepOut: (a: XY, b: XY) => keepOutStretches(set, a, b),
};
const layout = layoutStrips(site, opts);
const plain = layoutStrips(site, { ...opts, keepOut: undefined });
const strips = (legs: LayoutLeg[]) => legs.filter((l) => l.kind === "strip");
const closedRing = (r: XY[]) => [...r, r[0]];
const yardPoly = polygon([closedRing(yard.polygons[0][0])]);
const shedPoly = polygon([closedRing(shed.polygons[0][0])]);

/** Planar distance from p to a polygon's outline (the local frame is metric: no geodesy needed). */
function distToOutline(p: XY, poly: typeof yardPoly): number {
  let best = Infinity;
  for (const ring of poly.geometry.coordinates) {
    for (let i = 0; i + 1 < ring.length; i++) {
      const [ax, ay] = ring[i], [bx, by] = ring[i + 1];
      const ex = bx - ax, ey = by - ay;
      const t = Math.max(0, Math.min(1, ((p[0] - ax) * ex + (p[1] - ay) * ey) / (ex * ex + ey * ey)));
      best = Math.min(best, Math.hypot(p[0] - ax - t * ex, p[1] - ay - t * ey));
    }
  }
  return best;
}

describe("strips cut at keep-out zones (turf on the local frame as reference)", () => {
  it("no strip leg comes nearer the yard than 0 m or the shed than its 12 m buffer (turf inside test, planar distances, every 0.5 m)", () => {
    // Inside by turf's booleanPointInPolygon, else the planar distance to the outline: a strip
    // end lies on the (buffered) outline, so it may sit within rounding of it (1e-6 m).
    const clearance = (p: XY, poly: typeof yardPoly) =>
      booleanPointInPolygon(point(p), poly, { ignoreBoundary: true }) ? -distToOutline(p, poly) : distToOutline(p, poly);
    let worstYard = Infinity, worstShed = Infinity, samples = 0;
    for (const l of strips(layout.legs)) {
      for (let d = 0; d <= l.lengthM; d += 0.5) {
        const t = d / l.lengthM;
        const p: XY = [l.from[0] + t * (l.to[0] - l.from[0]), l.from[1] + t * (l.to[1] - l.from[1])];
        samples++;
        worstYard = Math.min(worstYard, clearance(p, yardPoly));
        worstShed = Math.min(worstShed, clearance(p, shedPoly));
      }
    }
    expect(samples).toBeGreaterThan(2000);
    expect(worstYard).toBeGreaterThan(-1e-6);
    expect(worstShed).toBeGreaterThan(12 - 1e-6);
    // ...and the cut is tight: the strips reach the yard's outline, and within the arc's 0.24 m
    // excess (2 % of 12 m) of the shed's buffer.
    expect(worstYard).toBeLessThan(1e-6);
    expect(worstShed).toBeLessThan(12 + 0.25);
  });

  it("each strip line crossing the yard is cut exactly at turf's intersections with its outline (1e-6 m)", () => {
    let crossings = 0;
    for (const l of strips(plain.legs)) {
      const hits = lineIntersect(lineString([l.from, l.to]), yardPoly).features.map((f) => f.geometry.coordinates as XY);
      if (hits.length !== 2) continue;
      crossings++;
      // The cut strip has a piece ending at one hit and a piece starting at the other.
      const pieces = strips(layout.legs).filter((p) => p.strip === l.strip || Math.abs((p.from[1] - l.from[1])) < 1e-6);
      const ends = pieces.flatMap((p) => [p.from, p.to]);
      for (const h of hits) expect(Math.min(...ends.map((e) => Math.hypot(e[0] - h[0], e[1] - h[1])))).toBeLessThan(1e-6);
    }
    expect(crossings).toBe(2); // strips at y = 30, 70, 110, 150, ...: 110 and 150 cross the yard (100..180)
  });

  it("records the cut stretches, and their lengths add up to what the strips lost", () => {
    const len = (legs: LayoutLeg[]) => strips(legs).reduce((s, l) => s + l.lengthM, 0);
    const cut = (layout.keepOutCuts ?? []).reduce((s, c) => s + Math.hypot(c.to[0] - c.from[0], c.to[1] - c.from[1]), 0);
    expect(layout.keepOutCuts?.length).toBeGreaterThanOrEqual(3);
    expect(len(plain.legs) - len(layout.legs)).toBeCloseTo(cut, 6);
    // Two strips over the 100 m wide yard lose 100 m each, the shed's buffer (30 + 2 * 12 m wide) cuts one more.
    expect(cut).toBeGreaterThan(2 * 100 + 30);
  });

  it("a strip piece carries its strip's number, and the pieces are joined by transits", () => {
    const byStrip = new Map<number, number>();
    for (const l of strips(layout.legs)) byStrip.set(l.strip, (byStrip.get(l.strip) ?? 0) + 1);
    expect([...byStrip.values()].filter((n) => n === 2).length).toBeGreaterThanOrEqual(2);
    for (let i = 1; i < layout.legs.length; i++) expect(layout.legs[i].from).toEqual(layout.legs[i - 1].to);
  });

  it("a site wholly inside a zone leaves no strip", () => {
    const all = keepOutSet([{ name: "all", source: "z", bufferM: 0, polygons: [[[at(-100, -100), at(500, -100), at(500, 400), at(-100, 400)]]] }]);
    const l = layoutStrips(site, { ...opts, keepOut: (a: XY, b: XY) => keepOutStretches(all, a, b) });
    expect(strips(l.legs)).toHaveLength(0);
  });
});
