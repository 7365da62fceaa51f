import { describe, it, expect } from "vitest";
import { booleanPointInPolygon, point, polygon } from "@turf/turf";
import { readSite } from "../../src/layout/site.js";
import { layoutStrips, type LayoutOptions } from "../../src/layout/strips.js";
import { exposureStations, stationsAlong } from "../../src/layout/stations.js";
import type { LayoutLeg } from "../../src/layout/types.js";
import { UTM33, E0, N0, polygonText, rect } from "./frame-helper.js";

describe("stationsAlong", () => {
  const leg: LayoutLeg = { kind: "strip", strip: 1, from: [100, 200], to: [100 + 300, 200 + 400], lengthM: 500 };

  it("puts the first and last station exactly on the leg's ends, equally spaced at most stepM apart", () => {
    const st = stationsAlong(leg, 7, 20);
    expect(st.s[0]).toBe(0);
    expect(st.s[st.s.length - 1]).toBe(500);
    expect([st.x[0], st.y[0]]).toEqual(leg.from);
    expect([st.x[st.x.length - 1], st.y[st.y.length - 1]]).toEqual(leg.to);
    // 500 / 7 = 71.4 -> 72 steps of 6.94 m, 73 stations.
    expect(st.s.length).toBe(73);
    expect(st.stepM).toBeCloseTo(500 / 72, 12);
    for (let i = 1; i < st.s.length; i++) expect(st.s[i] - st.s[i - 1]).toBeCloseTo(500 / 72, 9);
    // Positions lie on the leg at distance s from its start (3-4-5 triangle: unit vector (0.6, 0.8)).
    expect(st.ux).toBeCloseTo(0.6, 12);
    expect(st.uy).toBeCloseTo(0.8, 12);
    expect(st.x[10]).toBeCloseTo(100 + 0.6 * st.s[10], 9);
    expect(st.zoneHalfAcrossM).toBe(20);
    expect(st.zoneHalfAlongM).toBeCloseTo(st.stepM / 2, 12);
  });
});

describe("exposureStations", () => {
  const leg: LayoutLeg = { kind: "strip", strip: 1, from: [0, 0], to: [0, 250], lengthM: 250 };

  it("photos at both ends, gaps never larger than the trigger distance (front overlap never below plan)", () => {
    const s = exposureStations(leg, 30);
    expect(s[0]).toBe(0);
    expect(s[s.length - 1]).toBe(250);
    // ceil(250 / 30) = 9 gaps, 10 photos.
    expect(s.length).toBe(10);
    for (let i = 1; i < s.length; i++) expect(s[i] - s[i - 1]).toBeLessThanOrEqual(30 + 1e-9);
  });

  it("skips the no-photo intervals", () => {
    const s = exposureStations({ ...leg, noPhotoIntervals: [[100, 180]] }, 30);
    for (const x of s) expect(x > 100 && x < 180).toBe(false);
    expect(s).toContain(100);
    expect(s).toContain(180);
  });

  it("transit legs have no photos", () => {
    expect(exposureStations({ ...leg, kind: "transit" }, 30).length).toBe(0);
  });
});

describe("a site with a hole (an excluded courtyard)", () => {
  // 300 x 300 m with the courtyard [100, 200] x [100, 200] (clockwise hole, RFC 7946).
  const hole = [[100, 100], [100, 200], [200, 200], [200, 100], [100, 100]];
  const site = readSite(polygonText([rect(0, 0, 300, 300), hole]), UTM33);
  const holeLocal = polygon([hole.map(([x, y]) => UTM33.fromWgs84(...UTM33.toWgs84(E0 + x, N0 + y)))]);
  const opts: LayoutOptions = { headingDeg: 0, spacingM: 20, triggerM: 10, footprintAcrossM: 50, footprintAlongM: 30, photoSpeedMps: 6, transitSpeedMps: 10 };

  function exposuresXY(layout: ReturnType<typeof layoutStrips>): number[][] {
    const out: number[][] = [];
    for (const leg of layout.legs) {
      if (leg.kind !== "strip") continue;
      const ux = (leg.to[0] - leg.from[0]) / leg.lengthM;
      const uy = (leg.to[1] - leg.from[1]) / leg.lengthM;
      for (const s of exposureStations(leg, layout.triggerM)) out.push([leg.from[0] + ux * s, leg.from[1] + uy * s]);
    }
    return out;
  }

  it("strips still cross the courtyard (one leg per strip) but take no photo inside it", () => {
    const layout = layoutStrips(site, { ...opts, holeMarginM: 0 });
    const crossing = layout.legs.filter((l) => l.kind === "strip" && l.noPhotoIntervals);
    // Strip centres at x = 10, 30, ..., 290 (15 strips centred on 300 m); those at 110..190 have zones wholly over the courtyard's width.
    expect(crossing.length).toBe(5);
    expect(layout.legs.filter((l) => l.kind === "strip").length).toBe(15);
    const inside = exposuresXY(layout).filter((p) => booleanPointInPolygon(point(p), holeLocal, { ignoreBoundary: true }));
    expect(inside).toEqual([]);
  });

  it("by default photos run on half a footprint into the courtyard, like at the outer edge, and no further", () => {
    const layout = layoutStrips(site, opts);
    const withHole = exposuresXY(layout);
    for (const p of withHole) {
      if (!booleanPointInPolygon(point(p), holeLocal, { ignoreBoundary: true })) continue;
      const depth = Math.min(p[1] - (N0 + 100), N0 + 200 - p[1]);
      expect(depth).toBeLessThanOrEqual(opts.footprintAlongM / 2 + 1e-6);
    }
    // Photos were saved compared with the same site without its courtyard.
    const solid = layoutStrips(readSite(polygonText([rect(0, 0, 300, 300)]), UTM33), opts);
    expect(withHole.length).toBeLessThan(exposuresXY(solid).length);
  });
});
