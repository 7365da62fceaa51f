/**
 * Keep-out zones on the report fixture (fixture.ts): a zone with a hole and a hostile
 * name, and a zone of two polygons with a 15 m buffer. The buffer is the zone's rectangles
 * grown by a disc (the Minkowski sum: straight sides moved out, corners quarter circles);
 * the site area each removes is its buffered area by the shoelace formula (Gauss's area
 * formula), every zone lying wholly inside the site. The flag raster becomes 16-bit with
 * the keep-out bit (256) on the site cells whose centre lies in a buffered zone, and the
 * summary counts them, as the assessment would.
 */
import { FLAG_FEW_IMAGES, FLAG_KEEP_OUT } from "../../src/assess/flags.js";
import type { ReportInput, ReportKeepOutZone } from "../../src/report/model.js";
import type { XY } from "../../src/layout/types.js";
import { makeReportInput } from "./fixture.js";

/** The fixture's frame (fixture.ts): DEM top-left corner and size. */
export const X0 = 500_000;
export const Y0 = 4_600_600;
export const DEM_WIDTH_M = 160 * 5;
const YB = Y0 - 120 * 5;

export const HOSTILE_ZONE = `<School & "yard">`;

/** Counter-clockwise rectangle, local metres relative to the fixture's lower-left corner. */
function rect(x0: number, y0: number, x1: number, y1: number, close = false): XY[] {
  const r: XY[] = [[X0 + x0, YB + y0], [X0 + x1, YB + y0], [X0 + x1, YB + y1], [X0 + x0, YB + y1]];
  return close ? [...r, r[0]] : r;
}

/** A rectangle grown by `d`: each corner a quarter circle of `steps` segments about it. */
function roundedRect(x0: number, y0: number, x1: number, y1: number, d: number, steps = 6): XY[] {
  const corners: [number, number, number][] = [[x1, y0, -90], [x1, y1, 0], [x0, y1, 90], [x0, y0, 180]];
  const out: XY[] = [];
  for (const [cx, cy, a0] of corners)
    for (let k = 0; k <= steps; k++) {
      const a = ((a0 + (90 * k) / steps) * Math.PI) / 180;
      out.push([X0 + cx + d * Math.cos(a), YB + cy + d * Math.sin(a)]);
    }
  return out;
}

/** Shoelace area of one ring (absolute), m²; about its first vertex, as the frame's coordinates are large. */
export function ringAreaM2(ring: XY[]): number {
  const [ox, oy] = ring[0];
  let a = 0;
  for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) a += (ring[j][0] - ox) * (ring[i][1] - oy) - (ring[i][0] - ox) * (ring[j][1] - oy);
  return Math.abs(a) / 2;
}

/** Polygons' area: each outer ring minus its holes. */
function polygonsAreaM2(polys: XY[][][]): number {
  return polys.reduce((s, p) => s + ringAreaM2(p[0]) - p.slice(1).reduce((h, r) => h + ringAreaM2(r), 0), 0);
}

/** Even-odd point in rings (W. R. Franklin's crossing test). */
function inRings(x: number, y: number, rings: XY[][]): boolean {
  let inside = false;
  for (const ring of rings)
    for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) {
      const [xi, yi] = ring[i];
      const [xj, yj] = ring[j];
      if (yi > y !== yj > y && x < ((xj - xi) * (y - yi)) / (yj - yi) + xi) inside = !inside;
    }
  return inside;
}

/** The report fixture with two keep-out zones and 16-bit flags carrying the keep-out bit. */
export function makeKeepOutInput(): ReportInput {
  const input = makeReportInput();
  // Zone A: a yard with a courtyard hole, no buffer; outer ring written with its closing repeat.
  const yard: XY[][][] = [[rect(300, 250, 420, 350, true), rect(340, 280, 380, 320).reverse()]];
  // Zone B: two plots, 15 m buffer.
  const plots: XY[][][] = [[rect(550, 150, 620, 200)], [rect(550, 380, 620, 420)]];
  const plotsBuffered: XY[][][] = [[roundedRect(550, 150, 620, 200, 15)], [roundedRect(550, 380, 620, 420, 15)]];
  if (input.site.type !== "Polygon") throw new Error("the report fixture's site is one polygon");
  const site = ringAreaM2(input.site.coordinates[0].map(([x, y]) => [x, y] as XY));
  const zone = (name: string, source: string, bufferM: number, polygons: XY[][][], buffered: XY[][][]): ReportKeepOutZone => {
    const removed = polygonsAreaM2(buffered);
    return { name, source, bufferM, polygons, buffered, siteRemovedM2: removed, siteRemovedPct: (100 * removed) / site };
  };
  const zones = [zone(HOSTILE_ZONE, "school.geojson", 0, yard, yard), zone("Road & verge", "plots.kml", 15, plots, plotsBuffered)];

  const r = input.rasters;
  const flags = Uint16Array.from(r.flags);
  for (let row = 0; row < r.height; row++)
    for (let c = 0; c < r.width; c++) {
      const i = row * r.width + c;
      const x = r.transform.x0 + (c + 0.5) * r.transform.dx;
      const y = r.transform.y0 + (row + 0.5) * r.transform.dy;
      if (r.inSite[i] && zones.some((z) => z.buffered.some((p) => inRings(x, y, p)))) flags[i] |= FLAG_KEEP_OUT | FLAG_FEW_IMAGES;
    }
  // The summary's flag counts from the new raster.
  const cellArea = Math.abs(r.transform.dx * r.transform.dy);
  let siteCells = 0;
  let flagged = 0;
  const count = (bit: number) => {
    let n = 0;
    for (let i = 0; i < flags.length; i++) if (r.inSite[i] && flags[i] & bit) n++;
    return { cells: n, areaM2: n * cellArea, pct: (100 * n) / siteCells };
  };
  for (let i = 0; i < flags.length; i++) {
    if (!r.inSite[i]) continue;
    siteCells++;
    if (flags[i]) flagged++;
  }
  const f = input.summary.flagged!;
  f.cells = flagged;
  f.areaM2 = flagged * cellArea;
  f.byKind.fewImages = count(FLAG_FEW_IMAGES);
  f.byKind.keepOut = count(FLAG_KEEP_OUT);
  return { ...input, rasters: { ...r, flags }, keepOut: { zones } };
}
