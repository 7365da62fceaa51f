/**
 * Blocks in the report: report-data.json round trip and its checks, the take-off points,
 * range circles and block outlines on the main map, their legend, and the flights table.
 * The maps are read back with @xmldom/xmldom as XML (an SVG document must be well-formed
 * XML, SVG 1.1 section 1.2): a circle by its cx, cy and r attributes (SVG 1.1, 9.2), path
 * data by the SVG 1.1 path grammar (section 8.3: M moveto, L lineto, Z closepath; our writer
 * emits "x,y" pairs). Expected map positions come from the fixture's DEM window: the main
 * map is 1000 units across it, north up.
 */
import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { DOMParser, type Element } from "@xmldom/xmldom";
import { booleanPointInPolygon, convex, featureCollection, point, polygon as turfPolygon } from "@turf/turf";
import { parseReportInput, serializeReportInput } from "../../src/report/serialize.js";
import { renderReport } from "../../src/report/render.js";
import { InputFileError } from "../../src/errors.js";
import { convexHull } from "../../src/report/hull.js";
import { BAND_HALF_WIDTH, blockExtents, stripBand } from "../../src/report/blocks.js";
import { union } from "@turf/union";
import type { Feature, MultiPolygon, Polygon } from "geojson";
import type { ReportLeg } from "../../src/report/model.js";
import { fmtMinSec } from "../../src/report/format.js";
import type { ReportInput } from "../../src/report/model.js";
import type { XY } from "../../src/layout/types.js";
import { makeReportInput } from "./fixture.js";
import { insideEvenOdd } from "../helpers/evenOdd.js";
import { MAIN_K, RANGE_M, X0, Y0, makeBlocksInput } from "./blocksFixture.js";

/** The <svg> element with this id, parsed as XML. */
function svgById(html: string, id: string): Element {
  const m = new RegExp(`<svg class="map" id="${id}"[\\s\\S]*?</svg>`).exec(html);
  expect(m, id).not.toBeNull();
  return new DOMParser().parseFromString(m![0], "image/svg+xml").documentElement as unknown as Element;
}

/** The blocks legend <svg>, parsed as XML ("" when the page has none). */
function blocksLegendSvg(html: string): Element | null {
  const m = /<svg class="legend blocks-legend"[\s\S]*?<\/svg>/.exec(html);
  return m ? (new DOMParser().parseFromString(m[0], "image/svg+xml").documentElement as unknown as Element) : null;
}

function byClass(root: Element, tag: string, cls: string): Element[] {
  return Array.from(root.getElementsByTagName(tag)).filter((e) => (e.getAttribute("class") ?? "").split(/\s+/).includes(cls)) as Element[];
}

/** Subpaths of M/L/Z path data as vertex lists. */
function subpaths(d: string): XY[][] {
  return d
    .split("M")
    .filter((s) => s.length)
    .map((s) =>
      s
        .replace(/Z$/, "")
        .split("L")
        .map((p) => p.split(",").map(Number) as XY),
    );
}

/** Shoelace area of a ring, signed (positive counter-clockwise in a y-up frame). */
function signedArea(ring: XY[]): number {
  let a = 0;
  for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) a += (ring[j][0] - ring[0][0]) * (ring[i][1] - ring[0][1]) - (ring[i][0] - ring[0][0]) * (ring[j][1] - ring[0][1]);
  return a / 2;
}

/** Main-map position of a local-frame point: 1000 units across the DEM window, y down. */
const toMap = (x: number, y: number): XY => [(x - X0) * MAIN_K, (Y0 - y) * MAIN_K];

/** The page's flights table rows: each cell's text, and every number span's key, value and text. */
function flightRowsOf(html: string) {
  const table = /<table class="flights" id="flights-table">([\s\S]*?)<\/table>/.exec(html);
  if (!table) return null;
  return [...table[1].matchAll(/<tr data-flight="(\d+)" data-block="(\d+)"( class="over-range")?>([\s\S]*?)<\/tr>/g)].map((m) => {
    const cells = [...m[4].matchAll(/<td[^>]*>([\s\S]*?)<\/td>/g)].map((c) => c[1].replace(/<[^>]+>/g, ""));
    const nums = new Map([...m[4].matchAll(/data-key="flights\.\d+\.(\w+)" data-value="([^"]*)">([^<]*)</g)].map((n) => [n[1], { value: n[2], text: n[3] }]));
    return { flight: Number(m[1]), block: Number(m[2]), over: !!m[3], cells, nums };
  });
}

describe("report-data.json with blocks and flights", () => {
  it("round-trips the blocks, the range, the flights and each leg's flight and block", () => {
    const { input } = makeBlocksInput();
    const back = parseReportInput(serializeReportInput(input));
    expect(back.blocks).toEqual(input.blocks);
    expect(back.maxRangeM).toBe(RANGE_M);
    expect(back.flights).toEqual(input.flights);
    expect(back.legs.map((l) => [l.flight, l.block])).toEqual(input.legs.map((l) => [l.flight, l.block]));
    // The page is the same whether rendered directly or from the file.
    expect(renderReport(back)).toBe(renderReport(input));
  });

  it("reads report-data written before blocks (no blocks, maxRangeM, flights, or leg flight/block keys)", () => {
    const old = makeReportInput();
    const text = serializeReportInput(old);
    expect(text).not.toMatch(/"blocks"|"maxRangeM"|"flights":\[|"block":/);
    const back = parseReportInput(text);
    expect(back.blocks).toBeUndefined();
    expect(back.flights).toBeUndefined();
    const html = renderReport(back);
    const svg = svgById(html, "map-main");
    expect(byClass(svg, "g", "takeoff").length).toBe(1);
    expect(byClass(svg, "circle", "range").length).toBe(0);
    expect(byClass(svg, "path", "block-extent").length).toBe(0);
    expect(html).not.toContain("flights-table");
    expect(blocksLegendSvg(html)).toBeNull();
  });

  /** A report-data file with one change made to its input, as text. */
  function edited(change: (inp: Record<string, any>) => void): string {
    const doc = JSON.parse(serializeReportInput(makeBlocksInput().input));
    change(doc.input);
    return JSON.stringify(doc);
  }
  const bad: [string, (inp: Record<string, any>) => void, string][] = [
    ["a block's latitude as text", (i) => (i.blocks[1].takeoff.lat = "north"), `blocks[1].takeoff.lat must be a finite number (got "north")`],
    ["a block without its take-off point", (i) => delete i.blocks[0].takeoff, "blocks[0].takeoff must be an object with x, y, lon, lat and groundAmslM (got nothing)"],
    ["an unknown way of choosing the take-off point", (i) => (i.blocks[0].takeoffFrom = "guessed"), `blocks[0].takeoffFrom must be one of given, layout, candidate, proposed (got "guessed")`],
    ["a block number used twice", (i) => (i.blocks[1].index = 1), "blocks[1].index 1 repeats an earlier block's"],
    ["a negative range", (i) => (i.maxRangeM = -5), "maxRangeM must be a number of metres >= 0, 0 for no limit (got -5)"],
    ["a flight of a block that is not there", (i) => (i.flights[2].block = 7), "flights[2].block 7 is not one of the blocks (1, 2)"],
    ["a fractional photo count", (i) => (i.flights[0].photos = 2.5), "flights[0].photos must be a whole number >= 0 (got 2.5)"],
    ["a resumed strip 0", (i) => (i.flights[3].resumesStrip = 0), "flights[3].resumesStrip must be a strip number or null (got 0)"],
    ["flights not a list", (i) => (i.flights = { flight: 1 }), `flights must be a list (got {"flight":1})`],
    ["a leg's block as text", (i) => (i.legs[4].block = "2"), `legs[4].block must be a whole number >= 1 (got "2")`],
  ];
  for (const [what, change, message] of bad)
    it(`refuses ${what} with one line naming the field`, () => {
      const text = edited(change);
      expect(() => parseReportInput(text, "out/report-data.json")).toThrow(InputFileError);
      expect(() => parseReportInput(text, "out/report-data.json")).toThrow(`out/report-data.json: ${message}`);
    });
});

describe("blocks on the main map", () => {
  const { input } = makeBlocksInput();
  const html = renderReport(input);
  const svg = svgById(html, "map-main");
  const blocks = input.blocks!;

  it("one take-off marker per block, at its point, labelled with its block number", () => {
    const markers = byClass(svg, "g", "takeoff");
    expect(markers.length).toBe(blocks.length);
    blocks.forEach((b, i) => {
      const g = markers[i];
      expect(g.getAttribute("data-block")).toBe(String(b.index));
      expect(g.getElementsByTagName("text")[0].textContent).toBe(`Take-off ${b.index}`);
      // The triangle's apex is 9 units above the point (map.ts takeoffTriangle).
      const [apex] = subpaths(g.getElementsByTagName("path")[0].getAttribute("d")!)[0];
      const [x, y] = toMap(b.takeoff.x, b.takeoff.y);
      expect(Math.abs(apex[0] - x)).toBeLessThanOrEqual(0.05);
      expect(Math.abs(apex[1] + 9 - y)).toBeLessThanOrEqual(0.1);
    });
  });

  it("a proposed take-off point is hollow and its tooltip says the pilot must confirm access; a given one's does not", () => {
    const markers = byClass(svg, "g", "takeoff");
    const title = (g: Element) => g.getElementsByTagName("title")[0]?.textContent ?? "";
    expect(blocks[1].takeoffFrom).toBe("proposed");
    expect(title(markers[1])).toContain("proposed: the pilot must confirm access");
    expect(title(markers[1])).toContain("ground slope 3.3°");
    expect(markers[1].getElementsByTagName("path")[0].getAttribute("fill")).toBe("#fff");
    expect(title(markers[0])).not.toContain("proposed");
    expect(title(markers[0])).toContain("Take-off point of block 1");
    expect(markers[0].getElementsByTagName("path")[0].getAttribute("fill")).not.toBe("#fff");
  });

  it("one range circle per block, centred on its take-off point, of radius maxRangeM in map units", () => {
    const circles = byClass(svg, "circle", "range");
    expect(circles.length).toBe(blocks.length);
    blocks.forEach((b, i) => {
      const c = circles[i];
      const [x, y] = toMap(b.takeoff.x, b.takeoff.y);
      expect(c.getAttribute("data-block")).toBe(String(b.index));
      expect(Math.abs(Number(c.getAttribute("cx")) - x)).toBeLessThanOrEqual(0.05);
      expect(Math.abs(Number(c.getAttribute("cy")) - y)).toBeLessThanOrEqual(0.05);
      // 400 m at 1000 units per 800 m of DEM window: 500 units (written to 0.1 unit).
      expect(Number(c.getAttribute("r"))).toBeCloseTo(RANGE_M * MAIN_K, 1);
      expect(Number(c.getAttribute("r"))).toBe(500);
      expect(c.getAttribute("stroke-dasharray")).toBeTruthy();
      expect(c.getAttribute("fill")).toBe("none");
    });
  });

  it("the radius agrees with the map's own scale bar (internal consistency, not an outside reference)", () => {
    const bar = byClass(svg, "g", "scalebar")[0];
    const lengthM = Number(bar.getAttribute("data-length-m"));
    // The bar's black and white halves (map.ts scaleBar): their widths add to the bar length.
    const rects = Array.from(bar.getElementsByTagName("rect")).slice(1);
    const units = rects.reduce((a, r) => a + Number(r.getAttribute("width")), 0);
    const r = Number(byClass(svg, "circle", "range")[0].getAttribute("r"));
    expect(r / units).toBeCloseTo(RANGE_M / lengthM, 3);
  });

  it("each block's outline is the union of its strips' bands: a rectangle here, holding every one of its waypoints", () => {
    const outlines = byClass(svg, "path", "block-extent");
    expect(outlines.length).toBe(blocks.length);
    const spacing = input.summary.lineSpacingM!;
    blocks.forEach((b, i) => {
      const rings = subpaths(outlines[i].getAttribute("d")!);
      expect(outlines[i].getAttribute("data-block")).toBe(String(b.index));
      // The fixture's strips run the same x range, one spacing apart: the union of their
      // bands (each strip widened by BAND_HALF_WIDTH x spacing to each side) is one
      // rectangle of the strips' length by (count - 1) spacings plus two half widths
      // (block 2's resumed strip, cut in two pieces, still one band).
      expect(rings.length).toBe(1);
      const legs = input.legs.filter((l) => l.kind === "strip" && l.block === b.index);
      const xs = legs.flatMap((l) => [l.from[0], l.to[0]]);
      const lengthM = Math.max(...xs) - Math.min(...xs);
      const expectM2 = lengthM * ((b.strips!.length - 1) * spacing + 2 * BAND_HALF_WIDTH * spacing);
      expect(Math.abs(signedArea(rings[0])) / MAIN_K ** 2 / expectM2).toBeCloseTo(1, 3);
      // Every waypoint of the block's strips inside it (turf's point-in-polygon).
      const poly = turfPolygon([[...rings[0], rings[0][0]]]);
      for (const l of legs) for (const w of l.waypoints) expect(booleanPointInPolygon(point(toMap(w.x, w.y)), poly)).toBe(true);
      // And no strip of the other block's beyond the seam: their middle waypoints lie outside.
      const other = input.legs.filter((l) => l.kind === "strip" && l.block !== b.index);
      for (const l of other) expect(booleanPointInPolygon(point(toMap(l.waypoints[1].x, l.waypoints[1].y)), poly)).toBe(false);
    });
  });

  it("the legend shows the numbered take-off point, the proposed one, the range with its radius and the block outline", () => {
    const legend = blocksLegendSvg(html)!;
    expect(legend).not.toBeNull();
    const entries = Array.from(legend.getElementsByTagName("g")).map((g) => [g.getAttribute("data-entry"), Array.from(g.getElementsByTagName("text")).map((t) => t.textContent).pop()]);
    expect(entries).toEqual([
      ["takeoff", "take-off point (block n)"],
      ["proposed", "proposed take-off point: the pilot must confirm access"],
      ["range", "range (400 m)"],
      ["block", "block"],
    ]);
  });

  it("one block and a range: the single take-off marker as before, one range circle about it, no block outline", () => {
    const base = makeReportInput();
    const [x, y] = base.takeoff;
    const one: ReportInput = {
      ...base,
      maxRangeM: 500,
      blocks: [{ index: 1, takeoff: { x, y, lon: 15, lat: 41.5, groundAmslM: 311.25 }, takeoffFrom: "given", strips: [1, 2, 3], farthestM: 420 }],
    };
    const page = renderReport(one);
    const m = svgById(page, "map-main");
    const markers = byClass(m, "g", "takeoff");
    expect(markers.length).toBe(1);
    expect(markers[0].getElementsByTagName("text")[0].textContent).toBe("Take-off");
    expect(markers[0].getElementsByTagName("title")[0].textContent).toContain("given in the plan");
    const circles = byClass(m, "circle", "range");
    expect(circles.length).toBe(1);
    const [cx, cy] = toMap(x, y);
    expect(Math.abs(Number(circles[0].getAttribute("cx")) - cx)).toBeLessThanOrEqual(0.05);
    expect(Math.abs(Number(circles[0].getAttribute("cy")) - cy)).toBeLessThanOrEqual(0.05);
    expect(Number(circles[0].getAttribute("r"))).toBe(625); // 500 m x 1000/800
    expect(byClass(m, "path", "block-extent").length).toBe(0);
    const legend = blocksLegendSvg(page)!;
    expect(Array.from(legend.getElementsByTagName("g")).map((g) => g.getAttribute("data-entry"))).toEqual(["range"]);
  });

  it("no range limit (maxRangeM 0): no circles and no range in the legend; the blocks stay", () => {
    const { input: two } = makeBlocksInput();
    const page = renderReport({ ...two, maxRangeM: 0 });
    const m = svgById(page, "map-main");
    expect(byClass(m, "circle", "range").length).toBe(0);
    expect(byClass(m, "g", "takeoff").length).toBe(2);
    expect(byClass(m, "path", "block-extent").length).toBe(2);
    const legend = blocksLegendSvg(page)!;
    expect(Array.from(legend.getElementsByTagName("g")).map((g) => g.getAttribute("data-entry"))).toEqual(["takeoff", "proposed", "block"]);
    // The table gives the farthest distance alone.
    for (const r of flightRowsOf(page)!) expect(r.cells[8]).toMatch(/^[\d,]+\u00a0m$/);
  });
});

describe("the flights table", () => {
  const { input } = makeBlocksInput();
  const html = renderReport(input);
  const rows = flightRowsOf(html)!;
  const flights = input.flights!;

  it("one row per flight, in order, with its block", () => {
    expect(rows.map((r) => [r.flight, r.block])).toEqual(flights.map((f) => [f.flight, f.block]));
  });

  it("every number is the model's exactly, and prints as the column says", () => {
    rows.forEach((r, i) => {
      const f = flights[i];
      for (const key of ["flight", "block", "takeoffLatitude", "takeoffLongitude", "takeoffGroundAmslM", "waypoints", "photos", "lengthM", "durationS", "maxRangeM"] as const) {
        const n = r.nums.get(key);
        expect(n, `${i} ${key}`).toBeDefined();
        expect(Number(n!.value), `${i} ${key}`).toBe(f[key]);
      }
      // Latitude and longitude to 6 decimals (about 0.1 m), latitude first.
      const lat = r.nums.get("takeoffLatitude")!.text;
      const lon = r.nums.get("takeoffLongitude")!.text;
      expect(lat).toMatch(/^-?\d+\.\d{6}$/);
      expect(lon).toMatch(/^-?\d+\.\d{6}$/);
      expect(Math.abs(Number(lat) - f.takeoffLatitude)).toBeLessThanOrEqual(5e-7);
      expect(Math.abs(Number(lon) - f.takeoffLongitude)).toBeLessThanOrEqual(5e-7);
      expect(r.cells[2]).toBe(`${lat}, ${lon}`);
      expect(Number(r.nums.get("takeoffGroundAmslM")!.text)).toBe(Math.round(f.takeoffGroundAmslM * 10) / 10);
      expect(Number(r.nums.get("waypoints")!.text)).toBe(f.waypoints);
      expect(Number(r.nums.get("photos")!.text)).toBe(f.photos);
      expect(Number(r.nums.get("lengthM")!.text.replace(/,/g, ""))).toBe(Math.round(f.lengthM));
      // Duration as minutes:seconds.
      const d = /^(\d+):(\d\d)$/.exec(r.nums.get("durationS")!.text)!;
      expect(d).not.toBeNull();
      expect(Number(d[1]) * 60 + Number(d[2])).toBe(Math.round(f.durationS));
      expect(r.cells[8]).toBe(`${Math.round(f.maxRangeM)}\u00a0m of ${RANGE_M}\u00a0m`);
      expect(r.over).toBe(false);
      expect(r.cells[9]).toBe(f.resumesStrip === null ? "" : `resumes strip ${f.resumesStrip}`);
    });
    // The fixture resumes one strip, in flight 4.
    expect(rows.filter((r) => r.cells[9] !== "").map((r) => r.flight)).toEqual([4]);
  });

  it("the rows agree with the legs they describe (fixture check: waypoints, length and farthest point per flight)", () => {
    const { input: fx, flightLegs } = makeBlocksInput();
    flightLegs.forEach((legs, i) => {
      const f = fx.flights![i];
      const b = fx.blocks![f.block - 1];
      expect(legs.reduce((a, l) => a + l.waypoints.length, 0)).toBe(f.waypoints);
      expect(legs.reduce((a, l) => a + l.lengthM, 0)).toBeCloseTo(f.lengthM, 9);
      expect(legs[0].from).toEqual([b.takeoff.x, b.takeoff.y]);
      expect(legs[legs.length - 1].to).toEqual([b.takeoff.x, b.takeoff.y]);
      expect(f.maxRangeM).toBeLessThanOrEqual(RANGE_M);
    });
  });

  it("a flight past the range is marked in its row", () => {
    const { input: fx } = makeBlocksInput();
    const flightsOver = fx.flights!.map((f, i) => (i === 1 ? { ...f, maxRangeM: RANGE_M + 12.4 } : f));
    const r = flightRowsOf(renderReport({ ...fx, flights: flightsOver }))!;
    expect(r.map((x) => x.over)).toEqual([false, true, false, false, false]);
    expect(r[1].cells[8]).toBe(`412\u00a0m of ${RANGE_M}\u00a0m (beyond the range)`);
  });

  it("says each flight starts at its block's take-off point", () => {
    expect(html).toContain("The site is flown in 2 blocks; each flight starts and ends at its block's take-off point");
  });

  it("escapes what reaches attributes and text from the blocks (a hand-made input past the file checks)", () => {
    const { input: fx } = makeBlocksInput();
    const hostile = `"><script>alert(1)</script>`;
    const blocks = fx.blocks!.map((b) => ({ ...b, takeoffFrom: hostile as "given" }));
    const page = renderReport({ ...fx, blocks });
    expect(page).not.toContain(hostile);
    expect(page).toContain(`data-takeoff-from="&quot;&gt;&lt;script&gt;alert(1)&lt;/script&gt;"`);
  });
});

describe("convex hull (Andrew's monotone chain) against turf's convex", () => {
  it("a square with an inner point and a point on an edge: the four corners, counter-clockwise", () => {
    expect(convexHull([[0, 0], [2, 0], [1, 1], [2, 2], [0, 2], [1, 0]])).toEqual([[0, 0], [2, 0], [2, 2], [0, 2]]);
    expect(convexHull([[1, 1], [1, 1]])).toEqual([[1, 1]]);
    expect(convexHull([[0, 0], [1, 1], [2, 2]])).toEqual([[0, 0], [2, 2]]);
  });

  it("random point sets: the same area as @turf/convex's hull, counter-clockwise, holding every point", () => {
    const pt = fc.tuple(fc.integer({ min: -80, max: 80 }), fc.integer({ min: -80, max: 80 }));
    fc.assert(
      fc.property(fc.array(pt, { minLength: 3, maxLength: 40 }), (pts) => {
        const ours = convexHull(pts as XY[]);
        const theirs = convex(featureCollection(pts.map((p) => point(p))));
        if (ours.length < 3) return theirs === null || Math.abs(signedArea(theirs.geometry.coordinates[0] as XY[])) < 1e-9;
        const a = signedArea(ours);
        expect(a).toBeGreaterThan(0);
        expect(theirs).not.toBeNull();
        expect(a).toBeCloseTo(Math.abs(signedArea(theirs!.geometry.coordinates[0] as XY[])), 6);
        const poly = turfPolygon([[...ours, ours[0]]]);
        for (const p of pts) expect(booleanPointInPolygon(point(p), poly)).toBe(true);
        return true;
      }),
      { numRuns: 200, seed: 14 },
    );
  });
});

describe("block extents against turf's union of the strip bands", () => {
  // The reference: @turf/union (a general planar polygon clipper) over the same bands
  // (stripBand, checked above); the outline must enclose the same ground.
  const leg = (strip: number, from: XY, to: XY): ReportLeg =>
    ({ kind: "strip", strip, from, to, lengthM: Math.hypot(to[0] - from[0], to[1] - from[1]), waypoints: [], block: 1 }) as unknown as ReportLeg;
  const turfRegion = (legs: ReportLeg[], h: number): Feature<Polygon | MultiPolygon> =>
    union(featureCollection(legs.map((l) => stripBand(l.from, l.to, h)!).map((b) => turfPolygon([[...b, b[0]]]))))!;
  const area = (polys: XY[][][]) => polys.reduce((s, p) => s + p.reduce((t, r, i) => t + (i === 0 ? 1 : -1) * Math.abs(signedArea(r.slice(0, -1))), 0), 0);

  for (const headingDeg of [0, 37, 90, 151.3]) {
    it(`parallel strips at ${headingDeg} degrees, ragged ends, one cut in two and one missing: the same ground`, () => {
      const spacing = 40;
      const t = (headingDeg * Math.PI) / 180;
      const [ux, uy] = [Math.sin(t), Math.cos(t)];
      const [nx, ny] = [-uy, ux];
      // UTM-sized coordinates, as the plan's local frame has them.
      const at = (s: number, k: number): XY => [512_345.6 + s * ux + k * spacing * nx, 5_201_234.5 + s * uy + k * spacing * ny];
      const legs: ReportLeg[] = [];
      for (let k = 0; k < 9; k++) {
        if (k === 6) continue; // a strip dropped: two separate pieces of ground
        const s0 = 13 * ((k * 7) % 5), s1 = 600 - 17 * ((k * 3) % 4);
        if (k === 3) legs.push(leg(k + 1, at(s0, k), at(250, k)), leg(k + 1, at(330, k), at(s1, k)));
        else legs.push(leg(k + 1, k % 2 ? at(s1, k) : at(s0, k), k % 2 ? at(s0, k) : at(s1, k)));
      }
      const h = spacing * BAND_HALF_WIDTH;
      const [ours] = blockExtents(legs, [{ index: 1, strips: [1, 2, 3, 4, 5, 6, 7, 8, 9] } as never], spacing).map((e) => e.polygons);
      const ref = turfRegion(legs, h);
      const refPolys = (ref.geometry.type === "Polygon" ? [ref.geometry.coordinates] : ref.geometry.coordinates) as XY[][][];
      expect(ours.length).toBe(refPolys.length);
      expect(ours.reduce((n, p) => n + p.length, 0)).toBe(refPolys.reduce((n, p) => n + p.length, 0));
      // Areas to a millionth (the clipper rounds its intersections; ours are the band corners).
      expect(area(ours) / area(refPolys)).toBeCloseTo(1, 6);
      const [cx, cy] = at(300, 4);
      for (let i = 0; i < 500; i++) {
        const x = cx + (((i * 7919) % 997) / 997 - 0.5) * 800, y = cy + (((i * 104729) % 991) / 991 - 0.5) * 800;
        expect(insideEvenOdd(ours, x, y)).toBe(booleanPointInPolygon(point([x, y]), ref));
      }
    });
  }

  it("legs that are not parallel (a bend) still get the clipper's union", () => {
    const legs = [leg(1, [0, 0], [100, 0]), leg(1, [100, 0], [160, 80])];
    const [ours] = blockExtents(legs, [{ index: 1, strips: [1] } as never], 20).map((e) => e.polygons);
    const ref = turfRegion(legs, 20 * BAND_HALF_WIDTH);
    expect(area(ours)).toBeCloseTo(area([ref.geometry.coordinates as XY[][]]), 6);
  });
});

describe("strip band and durations", () => {
  it("a leg widened by h to each side: a rectangle of length x 2h whose long sides lie h from the leg", () => {
    const from: XY = [10, 20];
    const to: XY = [10 + 300 * Math.cos(0.4), 20 + 300 * Math.sin(0.4)];
    const band = stripBand(from, to, 21)!;
    expect(signedArea(band)).toBeCloseTo(300 * 42, 6);
    // Distance of each corner from the leg's line: |cross product| / length.
    for (const c of band) expect(Math.abs((to[0] - from[0]) * (c[1] - from[1]) - (to[1] - from[1]) * (c[0] - from[0])) / 300).toBeCloseTo(21, 9);
    expect(stripBand(from, from, 21)).toBeNull();
  });

  it("minutes:seconds, rounded to the second (287 s = 4 x 60 + 47)", () => {
    expect(fmtMinSec(287)).toBe("4:47");
    expect(fmtMinSec(59.6)).toBe("1:00");
    expect(fmtMinSec(3725)).toBe("62:05");
    expect(fmtMinSec(Number.NaN)).toBe("–");
  });
});
