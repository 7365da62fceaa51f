import { describe, it, expect } from "vitest";
import { parseSiteText } from "../../src/layout/site-parse.js";
import { bufferLinesLocal, checkLineKeys, lineSiteFromLonLat } from "../../src/layout/lineSite.js";
import { assertLineInRange, lineOffsetsM, lineStripLegs, offsetPieces } from "../../src/layout/lineStrips.js";
import type { XY } from "../../src/layout/types.js";
import { UTM33, E0, N0, lonLatRing } from "./frame-helper.js";

/** Shoelace area of polygons of closed rings (outer minus holes): plane geometry. */
function area(polys: number[][][][]): number {
  let a = 0;
  for (const rings of polys) rings.forEach((r, i) => {
    let s = 0;
    for (let k = 0; k + 1 < r.length; k++) s += r[k][0] * r[k + 1][1] - r[k + 1][0] * r[k][1];
    a += (i === 0 ? 1 : -1) * Math.abs(s / 2);
  });
  return a;
}

describe("site-parse: lines (RFC 7946 LineString / MultiLineString; KML 2.2 LineString)", () => {
  it("reads a GeoJSON LineString and a MultiLineString as lines, and no polygon", () => {
    const one = parseSiteText(JSON.stringify({ type: "Feature", properties: { name: "road" }, geometry: { type: "LineString", coordinates: [[15, 47], [15.01, 47]] } }));
    expect(one.polygons).toEqual([]);
    expect(one.lines).toEqual([[[15, 47], [15.01, 47]]]);
    expect(one.name).toBe("road");
    const multi = parseSiteText(JSON.stringify({ type: "MultiLineString", coordinates: [[[15, 47], [15.01, 47]], [[15, 47.01], [15.01, 47.02]]] }));
    expect(multi.lines.length).toBe(2);
  });

  it("reads a KML LineString's coordinates, altitudes dropped", () => {
    const kml = `<kml xmlns="http://www.opengis.net/kml/2.2"><Placemark><name>pipe</name><LineString><coordinates>15,47,100 15.01,47.005,120</coordinates></LineString></Placemark></kml>`;
    const p = parseSiteText(kml);
    expect(p.lines).toEqual([[[15, 47], [15.01, 47.005]]]);
    expect(p.name).toBe("pipe");
  });

  it("a file with a polygon and a line stays a polygon site, as before", () => {
    const p = parseSiteText(JSON.stringify({ type: "GeometryCollection", geometries: [
      { type: "Polygon", coordinates: [[[15, 47], [15.01, 47], [15.01, 47.01], [15, 47]]] },
      { type: "LineString", coordinates: [[15, 47], [15.01, 47]] },
    ] }));
    expect(p.polygons.length).toBe(1);
    expect(p.lines).toEqual([]);
  });

  it("lineWidthM is required with a line and refused with a polygon", () => {
    expect(() => checkLineKeys({ polygons: [], lines: [[]] }, undefined, undefined)).toThrow(/^lineWidthM: the area is a line/);
    expect(() => checkLineKeys({ polygons: [[]], lines: [] }, 50, undefined)).toThrow(/^lineWidthM: the area is a polygon/);
    expect(() => checkLineKeys({ polygons: [[]], lines: [] }, undefined, 2)).toThrow(/^lineStrips: the area is a polygon/);
    expect(() => checkLineKeys({ polygons: [], lines: [[]] }, 50, 2)).not.toThrow();
  });
});

describe("lineSite: the line buffered by half the width, flat ends, round joins", () => {
  it("a straight line: a rectangle of length x width (plane geometry)", () => {
    expect(area(bufferLinesLocal([[[0, 0], [100, 0]]], 10))).toBeCloseTo(2000, 6);
  });

  it("a right-angle bend: 2r(L1 + L2) - r^2 (inside overlap) + pi r^2 / 4 (outside quarter disc)", () => {
    // Plane geometry, r = 10, L1 = L2 = 100: 4000 - 100 + 78.54 = 3978.54 m2. Our disc is a
    // 64-gon circumscribing the circle: its quarter is larger by pi r^2/4 x (64 tan(pi/64)/pi - 1) = 0.06 m2.
    const a = area(bufferLinesLocal([[[0, 0], [100, 0], [100, 100]]], 10));
    expect(a).toBeGreaterThan(3978.54);
    expect(a).toBeLessThan(3978.54 + 0.1);
  });

  it("becomes an ordinary Site in the local frame and in WGS84, with the line kept", () => {
    const line = lonLatRing([[0, 0], [300, 0], [300, 200]]);
    const site = lineSiteFromLonLat([line], UTM33, { widthM: 40, name: "road" });
    // 2 x 20 x 500 - 20^2 + pi 20^2 / 4 = 19 914.16 m2 (as above)
    expect(site.areaM2).toBeGreaterThan(19_914.1);
    expect(site.areaM2).toBeLessThan(19_914.6);
    expect(site.wgs84.type).toBe("Polygon");
    expect(site.line.widthM).toBe(40);
    expect(site.line.local[0][1][0] - E0).toBeCloseTo(300, 3);
    expect(site.line.local[0][1][1] - N0).toBeCloseTo(0, 3);
  });

  it("refuses a line of one distinct position", () => {
    expect(() => lineSiteFromLonLat([[[15, 47], [15, 47]]], UTM33, { widthM: 40, name: "x" })).toThrow(/the line has no length/);
  });
});

describe("lineStrips: offset lines along the line", () => {
  it("n = ceil(width / spacing) strips, spacing apart, centred (common practice for parallel strips)", () => {
    expect(lineOffsetsM(100, 42)).toEqual([-42, 0, 42]);
    expect(lineOffsetsM(84, 42)).toEqual([-21, 21]);
    expect(lineOffsetsM(100, 42, 1)).toEqual([0]);
  });

  it("an L bend: the inside offset stops at the mitre, the outside at the perpendicular; run-outs of half the footprint", () => {
    // Plane geometry: line (0,0)-(100,0)-(100,100), a left turn; offset +10 is inside.
    const inside = offsetPieces([[0, 0], [100, 0], [100, 100]], 10);
    expect(inside.folds).toEqual([]);
    expect(inside.pieces.map((p) => [p.t0, p.t1])).toEqual([[0, 90], [10, 100]]);
    const outside = offsetPieces([[0, 0], [100, 0], [100, 100]], -10);
    expect(outside.pieces.map((p) => [p.t0, p.t1])).toEqual([[0, 100], [0, 100]]);
    const { legs } = lineStripLegs([[[0, 0], [100, 0], [100, 100]]], { widthM: 20, spacingM: 20, footprintAlongM: 30, takeoff: [0, 0] });
    const strips = legs.filter((l) => l.kind === "strip");
    expect(strips.length).toBe(2);
    // One strip at offset 0: from (-15, 0) to (115, 0), then (100, -15) to (100, 115).
    expect(strips[0].from[0]).toBeCloseTo(-15, 9);
    expect(strips[0].to[0]).toBeCloseTo(115, 9);
    expect(strips[1].from[1]).toBeCloseTo(-15, 9);
    expect(strips[1].to[1]).toBeCloseTo(115, 9);
    expect(new Set(legs.map((l) => l.strip))).toEqual(new Set([1]));
  });

  it("a bend tighter than the offset: the folded offset segment is dropped and the bend reported", () => {
    // An inverted V with a 30 m top, 49.6 deg right turns: on the inside (offset -42) each end of
    // the top's offset is cut back by 42 tan(24.8 deg) = 19.4 m, 38.8 > 30 m: it folds.
    const line: XY[] = [[0, 0], [230, 270], [260, 270], [490, 0]];
    const r = offsetPieces(line, -42);
    expect(r.folds.length).toBe(1);
    expect([1, 2]).toContain(r.folds[0]);
    expect(r.pieces.map((p) => p.seg)).toEqual([0, 2]);
    for (const p of r.pieces) expect(p.t1).toBeGreaterThan(p.t0);
    expect(offsetPieces(line, 42).folds).toEqual([]);
  });

  it("strips go back and forth, the first from the end nearest the take-off", () => {
    const line: XY[] = [[0, 0], [500, 0]];
    const { legs } = lineStripLegs([line], { widthM: 100, spacingM: 42, footprintAlongM: 60, takeoff: [520, -60] });
    const strips = legs.filter((l) => l.kind === "strip");
    expect(strips.map((l) => l.strip)).toEqual([1, 2, 3]);
    // Nearest end to (520, -60): the east end of the strip at y = -42.
    expect(strips[0].from).toEqual([530, -42]);
    expect(Math.sign(strips[0].to[0] - strips[0].from[0])).toBe(-1);
    expect(Math.sign(strips[1].to[0] - strips[1].from[0])).toBe(1);
    expect(strips[2].from[1]).toBeCloseTo(42, 9);
  });

  it("a line site reaching beyond the range from its take-off point is refused (one block only)", () => {
    // Plane geometry: the far end of the strip at y = 42 runs on 30 m past (500, 0): hypot(530, 42) = 531.7 m.
    const { legs, takeoff } = lineStripLegs([[[0, 0], [500, 0]]], { widthM: 100, spacingM: 42, footprintAlongM: 60, takeoff: [0, 0] });
    const layout = { legs, takeoff, headingDeg: 90, spacingM: 42, triggerM: 15, footprintAcrossM: 120, footprintAlongM: 60, headingCandidates: [], headingReason: "" };
    expect(() => assertLineInRange(layout, 500)).toThrow(/^aircraft\.maxRangeM: the line site reaches 532 m/);
    expect(() => assertLineInRange(layout, 532)).not.toThrow();
    expect(() => assertLineInRange(layout, 0)).not.toThrow();
  });

  it("a MultiLineString: two apart lines give a two-polygon site, each line its own strips, numbers counting on", () => {
    // Two parallel 300 m lines 500 m apart, 40 m wide: 2 x 300 x 40 = 24 000 m2 (plane geometry).
    const lines = [lonLatRing([[0, 0], [300, 0]]), lonLatRing([[0, 500], [300, 500]])];
    const site = lineSiteFromLonLat(lines, UTM33, { widthM: 40, name: "two" });
    expect(site.wgs84.type).toBe("MultiPolygon");
    expect(site.areaM2).toBeCloseTo(24_000, 0);
    const { legs, stripCount } = lineStripLegs(site.line.local, { widthM: 40, spacingM: 42, footprintAlongM: 60 });
    expect(stripCount).toBe(2);
    expect(legs.filter((l) => l.kind === "strip").map((l) => l.strip)).toEqual([1, 2]);
  });
});
