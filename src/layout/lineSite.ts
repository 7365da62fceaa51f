/**
 * A line site: a LineString (a road, a pipeline, a river bank) imaged over a
 * width centred on it. The site is the line buffered by half the width on the
 * local frame, with flat ends and round joins, and becomes an ordinary Site so
 * the assessment, flags, exports and the report treat it like any polygon.
 *
 * Flat ends: a line site is a stretch with a start and an end (a road between
 * two chainages); a round cap would ask for a half disc past each end that
 * nobody asked for. The strips still run on half a footprint past the ends,
 * as at a polygon's edges. Round joins: the imaged width at a bend is every
 * point within half the width of the line (the buffer's own definition; OGC
 * ST_Buffer's default join), which the outside of a turn needs.
 *
 * Why not turf's buffer: it reads coordinates as WGS84 degrees and buffers on
 * a sphere; our local frame is metres. The pieces here (one rectangle per
 * segment, one polygon circumscribing a disc per interior vertex) are merged
 * with turf's `union`, which is planar polygon clipping and works on metres.
 */
import type { MultiPolygon, Polygon, Position } from "geojson";
import { featureCollection, polygon as turfPolygon } from "@turf/helpers";
import { union } from "@turf/union";
import { InputError } from "../errors.js";
import type { LocalFrame } from "../geo/frame.js";
import type { Site, XY } from "./types.js";
import type { LonLatLine } from "./site-parse.js";
import { siteFromLonLat } from "./site.js";

/** Corners of the polygon standing in for a disc at a bend. */
const DISC_CORNERS = 64;

export interface LineSiteOptions {
  /** Width imaged, centred on the line, metres (`lineWidthM`). */
  widthM: number;
  name: string;
  /** File named in messages. */
  source?: string;
}

/**
 * Validates WGS84 lines, projects them and buffers them by half the width.
 * The disc at each bend is a polygon circumscribing the disc, so the site errs
 * outward (by widthM / 2 x (1 / cos(pi / 64) - 1), 0.12 % of the half width).
 * @example lineSiteFromLonLat([[[15, 47], [15.01, 47], [15.01, 47.01]]], frame, { widthM: 60, name: "road" }).line.widthM // 60
 */
export function lineSiteFromLonLat(lines: readonly LonLatLine[], frame: Pick<LocalFrame, "fromWgs84" | "toWgs84">, opts: LineSiteOptions): Site & { line: NonNullable<Site["line"]> } {
  const source = opts.source ?? "site";
  if (!(Number.isFinite(opts.widthM) && opts.widthM > 0)) throw new InputError("lineWidthM", opts.widthM, "a width in metres > 0");
  if (!Array.isArray(lines) || lines.length === 0) throw new InputError(source, lines, "a LineString or MultiLineString");
  const local = lines.map((line, li) => {
    const label = lines.length > 1 ? `${source} line ${li + 1}` : `${source} line`;
    if (!Array.isArray(line)) throw new InputError(label, line, "a list of [longitude, latitude] positions", "malformed line");
    const out: XY[] = [];
    for (const p of line) {
      if (!Array.isArray(p) || !Number.isFinite(p[0]) || !Number.isFinite(p[1])) throw new InputError(label, p, "[longitude, latitude] number pairs", "malformed position");
      if (Math.abs(p[0]) > 180 || Math.abs(p[1]) > 90) {
        throw new InputError(label, [p[0], p[1]], "WGS84 longitude/latitude in degrees (|lon| <= 180, |lat| <= 90)", "the site must be WGS84 (RFC 7946), reproject it first");
      }
      const xy = frame.fromWgs84(p[0], p[1]);
      const last = out[out.length - 1];
      // Repeats (and points within a millimetre) give no direction: dropped.
      if (!last || Math.hypot(xy[0] - last[0], xy[1] - last[1]) > 1e-3) out.push([xy[0], xy[1]]);
    }
    if (out.length < 2) throw new InputError(label, line, "a line of at least 2 distinct positions", "the line has no length");
    return out;
  });
  const buffered = bufferLinesLocal(local, opts.widthM / 2);
  const lonLat = buffered.map((rings) => rings.map((ring) => ring.map(([x, y]) => frame.toWgs84(x, y) as number[])));
  const site = siteFromLonLat(lonLat, frame, { name: opts.name, source });
  return { ...site, line: { local, widthM: opts.widthM } };
}

/**
 * Polylines buffered by `halfWidthM` with flat ends and round joins, on the
 * plane: polygons of rings (outer first), each ring closed.
 * @example bufferLinesLocal([[[0, 0], [100, 0]]], 10) // one 100 x 20 rectangle
 */
export function bufferLinesLocal(lines: readonly (readonly XY[])[], halfWidthM: number): number[][][][] {
  const parts: ReturnType<typeof turfPolygon>[] = [];
  const rDisc = halfWidthM / Math.cos(Math.PI / DISC_CORNERS);
  for (const line of lines) {
    for (let i = 0; i + 1 < line.length; i++) {
      const [a, b] = [line[i], line[i + 1]];
      const len = Math.hypot(b[0] - a[0], b[1] - a[1]);
      const nx = (-(b[1] - a[1]) / len) * halfWidthM;
      const ny = ((b[0] - a[0]) / len) * halfWidthM;
      parts.push(turfPolygon([[[a[0] - nx, a[1] - ny], [b[0] - nx, b[1] - ny], [b[0] + nx, b[1] + ny], [a[0] + nx, a[1] + ny], [a[0] - nx, a[1] - ny]]]));
      if (i > 0) {
        const ring: Position[] = [];
        for (let k = 0; k < DISC_CORNERS; k++) {
          const t = (2 * Math.PI * k) / DISC_CORNERS;
          ring.push([a[0] + rDisc * Math.cos(t), a[1] + rDisc * Math.sin(t)]);
        }
        ring.push(ring[0]);
        parts.push(turfPolygon([ring]));
      }
    }
  }
  const merged = parts.length === 1 ? parts[0] : union(featureCollection(parts));
  if (!merged) return [];
  const g = merged.geometry as Polygon | MultiPolygon;
  return g.type === "Polygon" ? [g.coordinates] : g.coordinates;
}

/**
 * Refuses a line without `lineWidthM`, and `lineWidthM` / `lineStrips` with a
 * polygon site (they say nothing about a polygon).
 * @example checkLineKeys({ polygons: [], lines: [line] }, undefined, undefined) // throws: lineWidthM is required
 */
export function checkLineKeys(parsed: { polygons: readonly unknown[]; lines: readonly unknown[] }, lineWidthM: number | undefined, lineStrips: number | undefined): void {
  const isLine = parsed.polygons.length === 0 && parsed.lines.length > 0;
  if (isLine && lineWidthM === undefined) {
    throw new InputError("lineWidthM", lineWidthM, "a width in metres > 0", "the area is a line: lineWidthM (--line-width-m) is required");
  }
  if (!isLine && lineWidthM !== undefined) throw new InputError("lineWidthM", lineWidthM, "only with an area that is a LineString or MultiLineString", "the area is a polygon");
  if (!isLine && lineStrips !== undefined) throw new InputError("lineStrips", lineStrips, "only with an area that is a LineString or MultiLineString", "the area is a polygon");
}
