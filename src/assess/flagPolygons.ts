import { contours } from "d3-contour";
import type { Position } from "geojson";
import type { GeoTransform } from "../dem/grid.js";
import type { FlagPolygons } from "./types.js";
import { ASSESSMENT_FLAG_KINDS, FLAG_VALUES } from "./flags.js";
import { inBackground, NOT_IN_BACKGROUND, splitAllowed, type Background } from "../background.js";

/**
 * Flagged cells as polygons, one MultiPolygon layer per flag kind, for the
 * GeoJSON and KML exports and the report map.
 *
 * d3-contour's marching squares traces the 0.5 level of a 0/1 mask per flag
 * bit. The mask is cropped to the bit's bounding box and padded by one empty
 * cell on every side, so rings close at the grid edge instead of running off
 * it. Traced vertices sit on cell edges (d3 puts value i at pixel i + 0.5),
 * with corners cut diagonally, so the outline differs from the cells by less
 * than half a cell along its length. Collinear vertices are dropped in pixel
 * space, where the coordinates are exact multiples of one half.
 */

/** Frame x/y (metres) to WGS84 longitude/latitude (degrees), e.g. LocalFrame.toWgs84. */
export type ToWgs84 = (x: number, y: number) => [number, number];

/**
 * @example
 * const layers = flagPolygons(flags, grid.width, grid.height, grid.transform, frame.toWgs84, 0.25);
 * layers.coarse?.geometry.coordinates; // MultiPolygon in WGS84
 * @returns one Feature per flag kind that has flagged cells (kinds without cells are left out),
 *   keyed by FlagKind.key; `areaM2` is the flagged cell area (cells x cellAreaM2).
 */
export function flagPolygons(
  flags: Uint16Array,
  width: number,
  height: number,
  transform: GeoTransform,
  toWgs84: ToWgs84,
  cellAreaM2: number,
): FlagPolygons {
  const out: FlagPolygons = {};
  // A plan that flags nothing (the usual aim) has no layer to trace: no pass over the cells.
  if (noneFlagged(flags)) return out;
  const { x0, y0, dx, dy } = transform;
  const { hist, rowOr, colOr } = flagTallies(flags, width, height);
  for (const kind of ASSESSMENT_FLAG_KINDS) {
    const bit = kind.bit;
    let cells = 0;
    for (let f = 1; f < FLAG_VALUES; f++) if (f & bit) cells += hist[f];
    if (cells === 0) continue;
    let c0 = 0;
    while (!(colOr[c0] & bit)) c0++;
    let c1 = width - 1;
    while (!(colOr[c1] & bit)) c1--;
    let r0 = 0;
    while (!(rowOr[r0] & bit)) r0++;
    let r1 = height - 1;
    while (!(rowOr[r1] & bit)) r1--;
    const mw = c1 - c0 + 3;
    const mh = r1 - r0 + 3;
    const mask = kindMask(flags, width, bit, c0, c1, r0, r1);
    // d3 reads values by index only, so a typed array serves as its number[].
    const traced = contours().size([mw, mh]).contour(mask as unknown as number[], 0.5);
    const toWorld = (p: Position): Position => toWgs84(x0 + (p[0] - 1 + c0) * dx, y0 + (p[1] - 1 + r0) * dy);
    const coordinates = traced.coordinates.map((polygon) => polygon.map((ring) => dropCollinear(ring).map(toWorld)));
    out[kind.key] = {
      type: "Feature",
      properties: { kind: kind.key, bit, areaM2: cells * cellAreaM2 },
      geometry: { type: "MultiPolygon", coordinates },
    };
  }
  return out;
}

/**
 * One pass for all kinds: the flag values' histogram (cell counts) and the OR of each row and
 * column (bounding boxes), instead of one scan of the grid per kind. The long loops of
 * flagPolygons are functions of their own that end with them: the engine compiles such a loop
 * mid-call, and in flagPolygons the code after it, not yet run, sent the whole function back
 * to the interpreter to be compiled again (six compiles on the demo, node --trace-opt).
 */
function flagTallies(flags: Uint16Array, width: number, height: number): { hist: Float64Array; rowOr: Uint16Array; colOr: Uint16Array } {
  const out = { hist: new Float64Array(FLAG_VALUES), rowOr: new Uint16Array(height), colOr: new Uint16Array(width) };
  const { hist, rowOr, colOr } = out;
  for (let r = 0; r < height; r++) {
    const base = r * width;
    let ro = 0;
    for (let c = 0; c < width; c++) {
      const f = flags[base + c];
      if (f === 0) continue;
      hist[f]++;
      ro |= f;
      colOr[c] |= f;
    }
    rowOr[r] = ro;
  }
  return out;
}

/** 0/1 mask of the cells carrying `bit` in columns c0..c1, rows r0..r1, padded by one empty cell on every side. */
function kindMask(flags: Uint16Array, width: number, bit: number, c0: number, c1: number, r0: number, r1: number): Uint8Array {
  const mw = c1 - c0 + 3;
  const mask = new Uint8Array(mw * (r1 - r0 + 3));
  for (let r = r0; r <= r1; r++) {
    const src = r * width;
    const dst = (r - r0 + 1) * mw + 1 - c0;
    for (let c = c0; c <= c1; c++) if (flags[src + c] & bit) mask[dst + c] = 1;
  }
  return mask;
}

/** Zero bytes that noneFlagged compares the flags with, a slice at a time. */
const ZEROS = new Uint8Array(1 << 16);

/**
 * Whether no cell carries a flag bit: the raster's bytes compared with zeros by the native
 * memcmp behind Buffer.compare, stopping at the first difference (~1-9 ms over a 4 km2
 * grid's 41 MB, against ~40 ms for flagPolygons' own pass in JavaScript).
 * @example noneFlagged(new Uint16Array(4)) // true
 */
export function noneFlagged(flags: Uint16Array): boolean {
  const bytes = Buffer.from(flags.buffer, flags.byteOffset, flags.byteLength);
  for (let o = 0; o < bytes.length; o += ZEROS.length) {
    const end = Math.min(bytes.length, o + ZEROS.length);
    if (bytes.compare(ZEROS, 0, end - o, o, end) !== 0) return false;
  }
  return true;
}

/** Remove vertices lying on the straight line through their neighbours (closed ring in, closed ring out). */
function dropCollinear(ring: Position[]): Position[] {
  const n = ring.length - 1; // last repeats first
  if (n < 4) return ring;
  const kept: Position[] = [];
  for (let i = 0; i < n; i++) {
    const a = ring[(i - 1 + n) % n];
    const b = ring[i];
    const c = ring[(i + 1) % n];
    const cross = (b[0] - a[0]) * (c[1] - b[1]) - (b[1] - a[1]) * (c[0] - b[0]);
    const dot = (b[0] - a[0]) * (c[0] - b[0]) + (b[1] - a[1]) * (c[1] - b[1]);
    if (cross === 0 && dot > 0) continue;
    kept.push(b);
  }
  if (kept.length < 3) return ring;
  kept.push(kept[0]);
  return kept;
}

/** What flagPolygonsInBackground's worker needs: the flag raster (shared memory) and the frame by its proj4 definition. */
export interface FlagPolygonsJob {
  flags: Uint16Array;
  width: number;
  height: number;
  transform: GeoTransform;
  frame: { proj4: string; epsg: number | null; name: string };
  cellAreaM2: number;
}

const workerUrl = new URL("./flagPolygonsWorker.js", import.meta.url);

/**
 * flagPolygons made on a worker thread from now on (the flags must be final and in shared
 * memory), its frame rebuilt there from the proj4 definition: the same polygons, while this
 * thread makes the statistics. Only where splitAllowed (by default on large grids; not
 * with one thread) and some cell is flagged: otherwise NOT_IN_BACKGROUND, and the caller
 * makes them itself.
 * @example const p = flagPolygonsInBackground(job, threads); ...; (await p.result()) ?? flagPolygons(...)
 */
export function flagPolygonsInBackground(job: FlagPolygonsJob, threads?: number): Background<FlagPolygons> {
  if (!splitAllowed(job.width * job.height, threads) || !(job.flags.buffer instanceof SharedArrayBuffer)) return NOT_IN_BACKGROUND;
  // Nothing flagged: flagPolygons returns no layer at once, not worth a worker's start (~0.3 s of CPU on a busy core).
  if (noneFlagged(job.flags)) return NOT_IN_BACKGROUND;
  return inBackground<FlagPolygons>(workerUrl, job);
}
