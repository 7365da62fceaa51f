/**
 * Keep-out zones in the report: report-data.json round trip, the zones on every map, their
 * legend and table, and the 16-bit flag raster with the keep-out bit (256). The maps are
 * read back with @xmldom/xmldom as XML (an SVG document must be well-formed XML, SVG 1.1
 * section 1.2), their path data by the SVG 1.1 path grammar (section 8.3: M moveto,
 * L lineto, Z closepath; our writer emits "x,y" pairs).
 */
import { describe, it, expect } from "vitest";
import { DOMParser, type Element } from "@xmldom/xmldom";
import { ASSESSMENT_FLAG_KINDS, FLAG_KEEP_OUT } from "../../src/assess/flags.js";
import { parseReportInput, serializeReportInput } from "../../src/report/serialize.js";
import { renderReport } from "../../src/report/render.js";
import { esc } from "../../src/report/escape.js";
import { InputFileError } from "../../src/errors.js";
import type { ReportInput, ReportLeg } from "../../src/report/model.js";
import type { XY } from "../../src/layout/types.js";
import { makeReportInput } from "./fixture.js";
import { DEM_WIDTH_M, HOSTILE_ZONE, X0, Y0, makeKeepOutInput } from "./keepOutFixture.js";

/** What the page has only when the plan has zones (the keep-out flag kind's row is always in the flags table). */
const NO_ZONE_MARKUP = ["keep-out-zone", "keep-out-legend", 'data-layer="keep-out"', 'data-toggle="keep-out"', "keep-out-table", "hatch-keep-out"];

/** The <svg> element with this id, parsed as XML. */
function svgById(html: string, id: string): Element {
  const m = new RegExp(`<svg class="map" id="${id}"[\\s\\S]*?</svg>`).exec(html);
  expect(m, id).not.toBeNull();
  const doc = new DOMParser().parseFromString(m![0], "image/svg+xml");
  return doc.documentElement as unknown as Element;
}

function byClass(root: Element, tag: string, cls: string): Element[] {
  return Array.from(root.getElementsByTagName(tag)).filter((e) => (e.getAttribute("class") ?? "").split(/\s+/).includes(cls)) as Element[];
}

/** Subpaths of M/L/Z path data as vertex lists. */
function subpaths(d: string): [number, number][][] {
  return d
    .split("M")
    .filter((s) => s.length)
    .map((s) => {
      expect(s.endsWith("Z"), s.slice(-20)).toBe(true);
      return s
        .replace(/Z$/, "")
        .split("L")
        .map((p) => p.split(",").map(Number) as [number, number]);
    });
}

/** A ring's vertices without a closing repeat of the first. */
function openRing(ring: XY[]): XY[] {
  const n = ring.length;
  return n > 1 && ring[0][0] === ring[n - 1][0] && ring[0][1] === ring[n - 1][1] ? ring.slice(0, -1) : ring;
}

describe("report-data.json with keep-out zones", () => {
  it("round-trips the zones and the 16-bit flags with the keep-out bit", () => {
    const input = makeKeepOutInput();
    const back = parseReportInput(serializeReportInput(input));
    expect(back.keepOut).toEqual(input.keepOut);
    expect(back.rasters.flags).toBeInstanceOf(Uint16Array);
    expect(Array.from(back.rasters.flags)).toEqual(Array.from(input.rasters.flags));
    expect(back.rasters.flags.some((f) => (f & FLAG_KEEP_OUT) !== 0)).toBe(true);
  });

  it("block reduction keeps bit 256 (the OR of the block)", () => {
    const input = makeKeepOutInput();
    const back = parseReportInput(serializeReportInput(input, { maxPx: 40 }));
    expect(back.rasters.width).toBeLessThanOrEqual(40);
    expect(back.rasters.flags).toBeInstanceOf(Uint16Array);
    let orIn = 0, orOut = 0;
    for (const f of input.rasters.flags) orIn |= f;
    for (const f of back.rasters.flags) orOut |= f;
    expect(orIn & FLAG_KEEP_OUT).toBe(FLAG_KEEP_OUT);
    expect(orOut).toBe(orIn);
  });

  it("reads report-data written before zones (no keepOut key, 8-bit flags), also block-reduced", () => {
    const old = makeReportInput();
    expect(old.rasters.flags).toBeInstanceOf(Uint8Array);
    const back = parseReportInput(serializeReportInput(old));
    expect(back.keepOut).toBeUndefined();
    expect(back.rasters.flags).toBeInstanceOf(Uint8Array);
    const small = parseReportInput(serializeReportInput(old, { maxPx: 40 }));
    let orIn = 0, orOut = 0;
    for (const f of old.rasters.flags) orIn |= f;
    for (const f of small.rasters.flags) orOut |= f;
    expect(orOut).toBe(orIn);
    const html = renderReport(back);
    for (const s of NO_ZONE_MARKUP) expect(html).not.toContain(s);
  });

  it("rejects a malformed zone with one InputFileError naming the field", () => {
    const input = makeKeepOutInput();
    const text = serializeReportInput(input).replace(/"polygons":\[\[\[\[/, '"polygons":[[[["x",');
    expect(() => parseReportInput(text, "out/report-data.json")).toThrow(InputFileError);
    expect(() => parseReportInput(text, "out/report-data.json")).toThrow(/keepOut\.zones\[0\]\.polygons/);
  });
});

describe("keep-out zones on the report's maps", () => {
  const input = makeKeepOutInput();
  const zones = input.keepOut!.zones;
  const html = renderReport(input);

  it("the main map: one hatched path per zone, a subpath per ring with the ring's vertices where they belong", () => {
    const svg = svgById(html, "map-main");
    // The main view is 1000 units across the DEM window (mapView): k = 1000 / width in metres,
    // x from the window's west edge, y down from its north edge, to 0.1 unit.
    const k = 1000 / DEM_WIDTH_M;
    const groups = byClass(svg, "g", "keep-out-zone");
    expect(groups.length).toBe(zones.length);
    zones.forEach((z, i) => {
      const g = groups[i];
      expect(g.getAttribute("data-zone")).toBe(String(i));
      const areas = byClass(g, "path", "zone-area");
      expect(areas.length).toBe(1);
      expect(areas[0].getAttribute("fill")).toBe("url(#hatch-keep-out-main)");
      expect(areas[0].getAttribute("fill-rule")).toBe("evenodd");
      const rings = z.polygons.flat();
      const subs = subpaths(areas[0].getAttribute("d")!);
      expect(subs.length).toBe(rings.length);
      rings.forEach((ring, j) => {
        const want = openRing(ring);
        expect(subs[j].length, `zone ${i} ring ${j}`).toBe(want.length);
        want.forEach(([x, y], v) => {
          expect(Math.abs(subs[j][v][0] - (x - X0) * k)).toBeLessThanOrEqual(0.05 + 1e-9);
          expect(Math.abs(subs[j][v][1] - (Y0 - y) * k)).toBeLessThanOrEqual(0.05 + 1e-9);
        });
      });
      // The buffer: dashed, only where the zone has one, with the buffered rings' vertices.
      const buffers = byClass(g, "path", "zone-buffer");
      expect(buffers.length).toBe(z.bufferM > 0 ? 1 : 0);
      if (z.bufferM > 0) {
        expect(buffers[0].getAttribute("stroke-dasharray")).toMatch(/\d/);
        const bRings = z.buffered.flat();
        const bs = subpaths(buffers[0].getAttribute("d")!);
        expect(bs.map((s) => s.length)).toEqual(bRings.map((r) => openRing(r).length));
      }
    });
  });

  it("its own hatch: a colour and an angle the out-of-band hatch does not use", () => {
    const patterns = (id: string) => {
      const m = new RegExp(`<pattern id="${id}"[^>]*patternTransform="rotate\\((-?[\\d.]+)\\)"><line [^>]*stroke="([^"]+)"`).exec(html);
      expect(m, id).not.toBeNull();
      return { angle: Number(m![1]), colour: m![2] };
    };
    const zone = patterns("hatch-keep-out-gsd");
    const outBand = patterns("hatch-outband");
    expect(zone.angle).not.toBe(outBand.angle);
    expect(zone.colour).not.toBe(outBand.colour);
    // Nor the colour of any flag kind's hatch on the flags map.
    const flagColours = [...html.matchAll(/<pattern id="hatch-flag-[^"]+"[^>]*><line [^>]*stroke="([^"]+)"/g)].map((m) => m[1]);
    expect(flagColours.length).toBeGreaterThan(0);
    expect(flagColours).not.toContain(zone.colour);
  });

  it("drawn above the site, the rasters and the flags, below the legs", () => {
    const order = (id: string, before: RegExp, after?: RegExp) => {
      const svg = new RegExp(`<svg class="map" id="${id}"[\\s\\S]*?</svg>`).exec(html)![0];
      const at = svg.indexOf('data-layer="keep-out"');
      expect(at, id).toBeGreaterThan(0);
      let last = -1;
      for (const m of svg.matchAll(new RegExp(before.source, "g"))) last = m.index!;
      expect(last, `${id}: ${before}`).toBeGreaterThan(0);
      expect(last, `${id}: ${before}`).toBeLessThan(at);
      if (after) expect(svg.search(after), `${id}: ${after}`).toBeGreaterThan(at);
    };
    order("map-main", /class="site"/, /data-layer="legs"/);
    order("map-gsd", /class="raster"/);
    order("map-images", /class="raster"/);
    order("map-flags", /class="flag-layer"/);
    // Every map has the pattern its zones use.
    for (const m of ["main", "gsd", "images", "flags"]) expect(html).toContain(`<pattern id="hatch-keep-out-${m}"`);
  });

  it("a legend entry for the zones, and one for the buffer when a zone has one", () => {
    const legends = [...html.matchAll(/<svg class="legend keep-out-legend"[\s\S]*?<\/svg>/g)].map((m) => m[0]);
    expect(legends.length).toBe(2); // under the main map and the flags map
    for (const l of legends) {
      expect(l).toContain(">keep-out zone<");
      expect(l).toContain("buffer (15 m)");
    }
    const noBuffer = renderReport({ ...input, keepOut: { zones: [zones[0]] } });
    const l = /<svg class="legend keep-out-legend"[\s\S]*?<\/svg>/.exec(noBuffer)![0];
    expect(l).toContain(">keep-out zone<");
    expect(l).not.toContain("buffer");
  });

  it("a table row per zone: name (escaped), file, buffer, site area removed in m² and %", () => {
    const table = /<table class="zones" id="keep-out-table">[\s\S]*?<\/table>/.exec(html)![0];
    const rows = [...table.matchAll(/<tr data-zone="(\d+)">([\s\S]*?)<\/tr>/g)];
    expect(rows.length).toBe(zones.length);
    // HTML Standard: text content escapes <, > and &; our esc() also escapes quotes.
    expect(html).not.toContain(HOSTILE_ZONE);
    expect(rows[0][2]).toContain("<td>&lt;School &amp; &quot;yard&quot;&gt;</td>");
    expect(rows[1][2]).toContain("<td>Road &amp; verge</td>");
    zones.forEach((z, i) => {
      const row = rows[i][2];
      expect(row).toContain(`<code>${esc(z.source)}</code>`);
      expect(row).toContain(`data-key="keepOut.zones.${i}.siteRemovedM2" data-value="${z.siteRemovedM2}"`);
      expect(row).toContain(`data-key="keepOut.zones.${i}.siteRemovedPct" data-value="${z.siteRemovedPct}"`);
      expect(row).toContain(z.bufferM > 0 ? "15 m" : ">none<");
    });
    // Zone B: two 70 x 50 m and 70 x 40 m plots grown by 15 m. A rectangle grown by d has
    // area w h + 2 d (w + h) + pi d^2 (Steiner's formula for a convex set); drawn with 6 chords
    // a corner, each corner's quarter circle (pi d^2 / 4) becomes a fan of 6 triangles of
    // (d^2 / 2) sin(pi / 12) each (elementary geometry).
    const grown = (w: number, h: number, d: number) => w * h + 2 * d * (w + h) + Math.PI * d * d - 4 * (d * d / 2) * (Math.PI / 2 - 6 * Math.sin(Math.PI / 12));
    expect(zones[1].siteRemovedM2).toBeCloseTo(grown(70, 50, 15) + grown(70, 40, 15), 6);
    expect(rows[1][2]).toContain(`${Math.round(zones[1].siteRemovedM2).toLocaleString("en-GB")} m²`);
  });

  it("no zones: no layer, legend, toggle or table", () => {
    const none = renderReport({ ...input, keepOut: { zones: [] } });
    for (const s of NO_ZONE_MARKUP) expect(none).not.toContain(s);
  });
});

describe("the keep-out flag (bit 256) in the flags map and table", () => {
  const input = makeKeepOutInput();
  const html = renderReport(input);
  const kind = ASSESSMENT_FLAG_KINDS.find((k) => k.key === "keepOut");

  it("is a kind the report iterates, with bit 256", () => {
    expect(kind?.bit).toBe(256);
  });

  it("has its hatched layer on the flags map and a row with label, explanation and remedy", () => {
    const svg = svgById(html, "map-flags");
    const layer = Array.from(svg.getElementsByTagName("g")).find((g) => g.getAttribute("data-kind") === "keepOut");
    expect(layer).toBeDefined();
    const d = layer!.getElementsByTagName("path")[0].getAttribute("d")!;
    expect(subpaths(d).length).toBeGreaterThan(0);
    const row = /<tr class="(flag-[a-z]+)" data-kind="keepOut">([\s\S]*?)<\/tr>/.exec(html);
    expect(row).not.toBeNull();
    expect(row![1]).toBe("flag-present");
    expect(row![2]).toContain(esc(kind!.label));
    expect(row![2]).toContain(esc(kind!.explanation));
    expect(row![2]).toContain(esc(kind!.remedy));
    expect(row![2]).toContain(`data-key="flagged.byKind.keepOut.areaM2" data-value="${input.summary.flagged!.byKind.keepOut.areaM2}"`);
  });
});

describe("transits routed around a zone", () => {
  it("are drawn through their waypoints, not straight from end to end", () => {
    const input: ReportInput = makeKeepOutInput();
    // A transit around the yard's south side: from west of it to east of it, two corners.
    const pts: XY[] = [[X0 + 250, Y0 - 600 + 300], [X0 + 300, Y0 - 600 + 240], [X0 + 420, Y0 - 600 + 240], [X0 + 470, Y0 - 600 + 300]];
    const leg: ReportLeg = {
      ...input.legs[0],
      kind: "transit",
      from: pts[0],
      to: pts[3],
      lengthM: 0,
      waypoints: pts.map(([x, y], i) => ({ x, y, s: i, altitudeAmslM: 400, groundAmslM: 300, heightAboveGroundM: 100 })),
    };
    const html = renderReport({ ...input, legs: [leg] });
    const svg = svgById(html, "map-main");
    const transit = byClass(svg, "path", "transit")[0].getAttribute("d")!;
    const k = 1000 / DEM_WIDTH_M;
    const drawn = transit.split(/[ML]/).filter(Boolean).map((p) => p.split(",").map(Number));
    expect(drawn.length).toBe(pts.length);
    pts.forEach(([x, y], i) => {
      expect(Math.abs(drawn[i][0] - (x - X0) * k)).toBeLessThanOrEqual(0.05 + 1e-9);
      expect(Math.abs(drawn[i][1] - (Y0 - y) * k)).toBeLessThanOrEqual(0.05 + 1e-9);
    });
  });
});
