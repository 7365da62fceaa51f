import { describe, it, expect } from "vitest";
import geodesic from "geographiclib-geodesic";
import { booleanPointInPolygon, point } from "@turf/turf";
import { readSite, siteFromBbox } from "../../src/layout/site.js";
import { layoutStrips, type LayoutOptions } from "../../src/layout/strips.js";
import type { Layout, LayoutLeg, Site } from "../../src/layout/types.js";
import { InputError } from "../../src/errors.js";
import { UTM33, E0, N0, polygonText, rect } from "./frame-helper.js";

const WGS84 = geodesic.Geodesic.WGS84;

const BASE: Omit<LayoutOptions, "headingDeg" | "spacingM"> = {
  triggerM: 20,
  footprintAcrossM: 100,
  footprintAlongM: 50,
  photoSpeedMps: 8,
  transitSpeedMps: 12,
};

const strips = (layout: Layout): LayoutLeg[] => layout.legs.filter((l) => l.kind === "strip");
const stripCount = (layout: Layout): number => new Set(strips(layout).map((l) => l.strip)).size;

function distToSegment(p: number[], a: number[], b: number[]): number {
  const dx = b[0] - a[0];
  const dy = b[1] - a[1];
  const len2 = dx * dx + dy * dy;
  const t = len2 > 0 ? Math.max(0, Math.min(1, ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / len2)) : 0;
  return Math.hypot(p[0] - a[0] - t * dx, p[1] - a[1] - t * dy);
}

/**
 * Side coverage as used here: every point of the site lies within half a
 * strip spacing of some strip leg, i.e. inside the zone that strip images
 * best (domain brief: each strip's own zone is half the spacing to each
 * side). Checked on a dense point lattice with turf's booleanPointInPolygon.
 * Returns the largest distance found, and how many site points were tested.
 */
function worstSideDistance(site: Site, legs: LayoutLeg[], stepM = 5): { worstM: number; points: number } {
  const coords = site.local.type === "Polygon" ? [site.local.coordinates] : site.local.coordinates;
  let xMin = Infinity, xMax = -Infinity, yMin = Infinity, yMax = -Infinity;
  for (const poly of coords) for (const [x, y] of poly[0]) {
    xMin = Math.min(xMin, x); xMax = Math.max(xMax, x); yMin = Math.min(yMin, y); yMax = Math.max(yMax, y);
  }
  let worstM = 0;
  let points = 0;
  for (let x = xMin + stepM / 2; x < xMax; x += stepM) {
    for (let y = yMin + stepM / 2; y < yMax; y += stepM) {
      if (!booleanPointInPolygon(point([x, y]), site.local)) continue;
      points++;
      let d = Infinity;
      for (const l of legs) d = Math.min(d, distToSegment([x, y], l.from, l.to));
      worstM = Math.max(worstM, d);
    }
  }
  return { worstM, points };
}

describe("strip spacing, count and side coverage", () => {
  // Count derivation: n strips, each imaging a zone one spacing wide, cover a
  // site of width W across the heading when n * spacing >= W, so the fewest
  // strips is n = ceil(W / spacing). For a w x h rectangle at heading θ,
  // W = w |cos θ| + h |sin θ| (projection of the rectangle onto the across axis).
  const rectSite = readSite(polygonText([rect(0, 0, 400, 300)]), UTM33);

  for (const headingDeg of [0, 30, 90]) {
    it(`rectangle 400 x 300 m at heading ${headingDeg}: ceil(W / spacing) strips, all within half a spacing`, () => {
      const spacingM = 45;
      const layout = layoutStrips(rectSite, { ...BASE, headingDeg, spacingM });
      const th = (headingDeg * Math.PI) / 180;
      const W = 400 * Math.abs(Math.cos(th)) + 300 * Math.abs(Math.sin(th));
      expect(stripCount(layout)).toBe(Math.ceil(W / spacingM));
      const { worstM, points } = worstSideDistance(rectSite, strips(layout));
      expect(points).toBeGreaterThan(4000);
      expect(worstM).toBeLessThanOrEqual(spacingM / 2 + 1e-6);
      // Neighbouring strip lines are one spacing apart (perpendicular distance from a strip's start to the next strip's line).
      const s = strips(layout);
      for (let i = 0; i + 1 < s.length; i++) {
        const [a, b] = [s[i], s[i + 1]];
        const ux = (b.to[0] - b.from[0]) / b.lengthM;
        const uy = (b.to[1] - b.from[1]) / b.lengthM;
        const across = Math.abs((a.from[0] - b.from[0]) * uy - (a.from[1] - b.from[1]) * ux);
        expect(across).toBeCloseTo(spacingM, 6);
      }
    });
  }

  it("the coverage check has teeth: dropping one inner strip breaks it", () => {
    const layout = layoutStrips(rectSite, { ...BASE, headingDeg: 0, spacingM: 45 });
    const s = strips(layout).filter((l) => l.strip !== 4);
    expect(worstSideDistance(rectSite, s).worstM).toBeGreaterThan(45 / 2 + 10);
  });

  // L-shape: [0,300] x [0,100] plus [0,100] x [0,300].
  const L = [[0, 0], [300, 0], [300, 100], [100, 100], [100, 300], [0, 300], [0, 0]];
  const lSite = readSite(polygonText([L]), UTM33);
  for (const [headingDeg, W] of [[0, 300], [45, 600 / Math.SQRT2], [100, 100 * Math.sin((10 * Math.PI) / 180) + 300 * Math.cos((10 * Math.PI) / 180)]] as const) {
    it(`L-shaped site at heading ${headingDeg}: ceil(W / spacing) strips, every point within half a spacing`, () => {
      // W at 45 degrees: the corners (300, 0) and (0, 300) are the extremes across, 300 * sqrt(2) apart.
      // W at 100 degrees (across axis (-sin 10, -cos 10)): the corners (0, 0) and (100, 300), 100 sin 10 + 300 cos 10 apart across.
      const spacingM = 40;
      const layout = layoutStrips(lSite, { ...BASE, headingDeg, spacingM });
      expect(stripCount(layout)).toBe(Math.ceil(W / spacingM));
      const { worstM, points } = worstSideDistance(lSite, strips(layout));
      expect(points).toBeGreaterThan(1500);
      expect(worstM).toBeLessThanOrEqual(spacingM / 2 + 1e-6);
    });
  }
});

describe("strip lengths against GeographicLib geodesic distances", () => {
  // Site given in lon/lat on UTM 33's central meridian (15 E), where the
  // UTM scale factor is 0.9996 (Snyder, USGS PP 1395, ch. 8): frame lengths
  // are 0.04 % short of ground lengths, hence the 0.1 % tolerance.
  const bbox = [15.0, 47.0, 15.005, 47.003];
  const site = siteFromBbox(bbox, UTM33);
  const layout = layoutStrips(site, { ...BASE, headingDeg: 0, spacingM: 40 });
  const toLonLat = (p: number[]) => UTM33.toWgs84(p[0], p[1]);

  it("each strip leg's length equals the geodesic distance between its ends (proj4 inverse to WGS84) within 0.1 %", () => {
    for (const leg of strips(layout)) {
      const [lon1, lat1] = toLonLat(leg.from);
      const [lon2, lat2] = toLonLat(leg.to);
      const s12 = WGS84.Inverse(lat1, lon1, lat2, lon2).s12 ?? NaN;
      expect(Math.abs(leg.lengthM - s12) / s12).toBeLessThan(1e-3);
    }
  });

  it("a strip runs the site's north-south geodesic extent plus half a footprint at each end (within 0.1 %)", () => {
    const siteLengthM = WGS84.Inverse(47.0, 15.0, 47.003, 15.0).s12 ?? NaN;
    for (const leg of strips(layout)) {
      const expected = siteLengthM + BASE.footprintAlongM;
      expect(Math.abs(leg.lengthM - expected) / expected).toBeLessThan(1e-3);
    }
  });

  it("the outermost strips are (n - 1) spacings apart on the ground within 0.1 %", () => {
    const s = strips(layout);
    const south = (l: LayoutLeg) => (l.from[1] < l.to[1] ? l.from : l.to);
    const a = toLonLat(south(s[0]));
    const b = toLonLat(south(s[s.length - 1]));
    const s12 = WGS84.Inverse(a[1], a[0], b[1], b[0]).s12 ?? NaN;
    const expected = (stripCount(layout) - 1) * 40;
    expect(Math.abs(s12 - expected) / expected).toBeLessThan(1e-3);
  });
});

describe("flight order", () => {
  const site = readSite(polygonText([rect(0, 0, 400, 300)]), UTM33);

  it("starts with the strip nearest the take-off point, flies back and forth, returns to take-off", () => {
    const takeoff: [number, number] = [E0 + 420, N0 + 310];
    const layout = layoutStrips(site, { ...BASE, headingDeg: 0, spacingM: 45, takeoff });
    expect(layout.legs[0].kind).toBe("transit");
    expect(layout.legs[0].from).toEqual(takeoff);
    const s = strips(layout);
    // The first strip is the easternmost, entered at its northern end (nearest the north-east take-off).
    const xs = s.map((l) => l.from[0]);
    expect(xs[0]).toBeCloseTo(Math.max(...xs), 6);
    expect(s[0].from[1]).toBeGreaterThan(s[0].to[1]);
    for (let i = 0; i + 1 < s.length; i++) {
      const d1 = s[i].to[1] - s[i].from[1];
      const d2 = s[i + 1].to[1] - s[i + 1].from[1];
      expect(Math.sign(d1)).toBe(-Math.sign(d2));
    }
    const last = layout.legs[layout.legs.length - 1];
    expect(last.kind).toBe("transit");
    expect(last.to).toEqual(takeoff);
    // Legs join end to end.
    for (let i = 0; i + 1 < layout.legs.length; i++) expect(layout.legs[i].to).toEqual(layout.legs[i + 1].from);
  });

  it("default take-off is a corner of the site", () => {
    const layout = layoutStrips(site, { ...BASE, headingDeg: 0, spacingM: 45 });
    const corners = [[0, 0], [400, 0], [400, 300], [0, 300]].map(([x, y]) => [E0 + x, N0 + y]);
    expect(corners.some((c) => Math.hypot(c[0] - layout.takeoff[0], c[1] - layout.takeoff[1]) < 0.01)).toBe(true);
  });
});

describe("concave sites", () => {
  // U open to the north: [0,300] x [0,300] without the notch [100,200] x [100,300].
  const U = [[0, 0], [300, 0], [300, 300], [200, 300], [200, 100], [100, 100], [100, 300], [0, 300], [0, 0]];
  const site = readSite(polygonText([U]), UTM33);
  const layout = layoutStrips(site, { ...BASE, headingDeg: 90, spacingM: 40 });

  it("a strip crossing the gap becomes two strip legs with a transit between", () => {
    const byStrip = new Map<number, LayoutLeg[]>();
    for (const l of layout.legs) if (l.kind === "strip") byStrip.set(l.strip, [...(byStrip.get(l.strip) ?? []), l]);
    let split = 0;
    for (const [n, pieces] of byStrip) {
      const yRel = pieces[0].from[1] - N0;
      // A strip whose zone (half a spacing each side) lies wholly in the arms' height range crosses the gap.
      if (yRel - 20 > 100) {
        expect(pieces.length).toBe(2);
        split++;
        const i = layout.legs.indexOf(pieces[0]);
        const connector = layout.legs[i + 1];
        expect(connector.kind).toBe("transit");
        expect(connector.strip).toBe(n);
        expect(layout.legs[i + 2]).toBe(pieces[1]);
        // The gap is 100 m; each piece runs on half a footprint (25 m) into it.
        expect(connector.lengthM).toBeCloseTo(100 - BASE.footprintAlongM, 6);
      } else if (yRel + 20 < 100) {
        expect(pieces.length).toBe(1);
      }
    }
    expect(split).toBeGreaterThanOrEqual(4);
  });

  it("still covers every point within half a spacing", () => {
    expect(worstSideDistance(site, strips(layout)).worstM).toBeLessThanOrEqual(20 + 1e-6);
  });
});

describe("layout options are validated", () => {
  const site = readSite(polygonText([rect(0, 0, 100, 100)]), UTM33);
  it("spacing must be positive", () => {
    expect(() => layoutStrips(site, { ...BASE, headingDeg: 0, spacingM: 0 })).toThrow(InputError);
    expect(() => layoutStrips(site, { ...BASE, headingDeg: Number.NaN, spacingM: 10 })).toThrow(InputError);
  });
});
