/**
 * `report-data.json`: the report's input written beside the other outputs so that
 * `gsdplan report <out-dir>` can re-render the page without re-running the plan.
 *
 * Chosen over reading the GeoTIFFs back because the report also needs what it draws of the
 * legs' stations, the baseline comparison and the histograms, which no GeoTIFF holds. The file
 * stays compact: rasters are block-reduced to at most `maxPx` across (downsample.ts), the
 * GSD histogram is computed first at full resolution, the legs' stations give way (version 3
 * on) to what the page draws of them (ReportDrawing: each strip's binned profile, the map's
 * runs of one height-above-ground class), and every typed array is stored zlib-deflated: a
 * large one (OWN_STREAM_BYTES or more) in a stream of its own,
 * `{ "$typed": "<Uint16Array|...>", "length": n, "deflate": "<base64 of zlib-deflated little-endian bytes>" }`,
 * floating-point arrays (version 2 on) as `{ "$typed": "<Float32Array|Float64Array>", "length": n,
 * "planes": "<base64 of zlib-deflated byte planes>" }` (bytePlanes below); the smaller ones
 * (version 4 on) as places in one stream of them all, the document's `"packed": { "length":
 * <bytes>, "deflate": "<base64>" }` (written before `"input"`): `{ "$typed": ..., "length": n,
 * "packedAt": <byte offset> }`, floating-point arrays as their byte planes at `"packedPlanesAt"`.
 * Files of versions 1 to 3 (every array in a stream of its own; version 1 without planes) are
 * read as before.
 */
import { deflate, deflateSync, inflateSync } from "node:zlib";
import { promisify } from "node:util";
import { InputFileError } from "../errors.js";
import type { ProfiledLeg, ReportDrawing, ReportGrid, ReportInput, ReportRasters, StripDrawing } from "./model.js";
import { aglRange, legRuns } from "./map.js";
import { stripDrawings } from "./profiles.js";
import { REPORT_MAP_PX, blockFactor, downsampleGrid, downsampleGridAndRasters, downsampleRasters } from "./downsample.js";
import { backgroundAllowed, inBackgroundWithInput, NOT_IN_BACKGROUND, type Background, type BackgroundWithInput } from "../background.js";
import type { DemLayers } from "./demLayers.js";
import { REPORT_GSD_BINS, gsdBinEdges, histogram } from "./histogram.js";

export const REPORT_DATA_FORMAT = "gsdplan-report-data";
export const REPORT_DATA_VERSION = 4;
/**
 * The versions parseReportInput reads: 1 (every typed array under "deflate"), 2 (floating-point
 * arrays under "planes"), 3 (the legs without their stations, the page's drawing of them in
 * `drawing`) and 4 (the small arrays in one stream, `packed`).
 */
const READABLE_VERSIONS: readonly number[] = [1, 2, 3, 4];

/**
 * Bytes from which a typed array gets a zlib stream of its own; the smaller ones share one.
 * Each stream costs ~30-50 microseconds to set up whatever its size (zlib's state, Node's
 * stream object): at 4 km2 the drawing's ~1 700 small arrays (2.2 MB in all) took ~50 ms of
 * the file's ~135 ms that way, where one stream of them all takes a few milliseconds.
 */
export const OWN_STREAM_BYTES = 65536;

const TYPED = {
  Float64Array,
  Float32Array,
  Uint8Array,
  Uint16Array,
  Uint32Array,
  Int16Array,
  Int32Array,
} as const;
type TypedName = keyof typeof TYPED;

/**
 * zlib's fastest level: on the 4 km2 benchmark's 27 MB of arrays it deflates in
 * 0.42 s against 0.92 s at the default (6) for a file 1 % larger (12.89 vs 12.76 MB
 * deflated); inflating is the same either way.
 */
const DEFLATE_LEVEL = 1;

/**
 * A float array's little-endian bytes regrouped into planes, most significant byte first
 * (all the values' top bytes, then the next, ...), each byte stored as its difference from
 * the byte before it in that order, modulo 256: the idea of TIFF's floating-point predictor
 * (Adobe Photoshop TIFF Technical Note 3), run over the whole array as one row. Sign and
 * exponent bytes of heights, GSDs and station profiles barely change from one value to the
 * next, so their planes are mostly zeros that zlib passes over quickly. Measured on the
 * 4 km2 benchmark's report-data (6.6 MB of Float32 and 15.1 MB of Float64): deflated to
 * 2.5 + 2.4 MB in 57 + 109 ms, against 4.8 + 6.0 MB in 109 + 144 ms for the bytes as they
 * are; on the demo's 4.6 + 2.9 MB, 38 + 28 ms against 63 + 42 ms.
 * @example bytePlanes(new Uint8Array([1, 2, 3, 4]), 2) // [2, 2, 253, 2]: planes [2, 4] then [1, 3], differenced
 */
export function bytePlanes(bytes: Uint8Array, size: number): Uint8Array {
  const out = new Uint8Array(bytes.length);
  let p = 0;
  let prev = 0;
  for (let k = size - 1; k >= 0; k--) {
    for (let i = k; i < bytes.length; i += size) {
      const b = bytes[i];
      out[p++] = b - prev;
      prev = b;
    }
  }
  return out;
}

/**
 * The bytes bytePlanes regrouped, back in value order, into `out` (by default a new array).
 * @example fromBytePlanes(new Uint8Array([2, 2, 253, 2]), 2) // [1, 2, 3, 4]
 */
export function fromBytePlanes(planes: Uint8Array, size: number, out = new Uint8Array(planes.length)): Uint8Array {
  let p = 0;
  let prev = 0;
  for (let k = size - 1; k >= 0; k--) {
    for (let i = k; i < planes.length; i += size) {
      prev = (prev + planes[p++]) & 0xff;
      out[i] = prev;
    }
  }
  return out;
}

/**
 * Fill in what the report computes from full-resolution data (the GSD histogram), then
 * reduce the rasters to at most `maxPx` across. `renderReport` calls it too, so the HTML
 * is the same whether rendered directly or from report-data.json. `maps`: the DEM and
 * rasters already reduced by reportMaps (reportMapsInBackground), used when their sizes
 * are those reportMaps gives for this input.
 *
 * @example const compact = compactReportInput(input, 1000);
 */
export function compactReportInput(input: ReportInput, maxPx = REPORT_MAP_PX, maps?: ReportMaps): ReportInput {
  const g = input.summary.gsdCm;
  let gsdHistogram = input.gsdHistogram;
  if (!gsdHistogram) {
    const edges = gsdBinEdges(g.low, g.high, g.min, g.max, REPORT_GSD_BINS);
    gsdHistogram = histogram(input.rasters.gsdCm, input.rasters.inSite, edges);
  }
  const { dem, rasters } = maps && mapsFit(maps, input, maxPx) ? maps : reportMaps(input.dem, input.rasters, maxPx);
  return {
    ...input,
    gsdHistogram,
    dem,
    rasters,
    ...drawnLegs(input),
  };
}

/**
 * The legs without their stations and what the page draws from those (ReportDrawing): made
 * here once, so report-data.json holds the drawing (at 4 km2 2.2 MB in ~1 700 arrays, against
 * the stations' 15.5 MB in ~3 800) and the page is drawn from it alike, directly or from the
 * file. A drawing already made is kept.
 */
function drawnLegs(input: ReportInput): Pick<ReportInput, "legs" | "drawing"> {
  const withoutProfile = input.legs.map(({ profile: _, ...leg }) => leg);
  if (input.drawing) return { legs: withoutProfile, drawing: input.drawing };
  const legs = input.legs as ProfiledLeg[];
  const missing = legs.findIndex((l) => !l.profile);
  if (missing >= 0) throw new Error(`report input: leg ${missing + 1} has no station profile and the input no drawing`);
  const agl = aglRange(legs);
  return { legs: withoutProfile, drawing: { strips: stripDrawings(legs), agl, runs: legRuns(legs, agl) } };
}

/** The report's DEM and rasters, reduced. */
export interface ReportMaps {
  dem: ReportGrid;
  rasters: ReportRasters;
}

/**
 * The DEM and the rasters reduced to at most `maxPx` across, as the report draws them.
 * @example reportMaps(run.grid, run.assessment.rasters).dem.width // <= 1000
 */
export function reportMaps(dem: ReportGrid, rasters: ReportRasters, maxPx = REPORT_MAP_PX): ReportMaps {
  const kd = blockFactor(dem.width, dem.height, maxPx);
  const kr = blockFactor(rasters.width, rasters.height, maxPx);
  // On one grid (the plan's usual case) the DEM and the rasters are reduced in one pass.
  return kd === kr ? downsampleGridAndRasters(dem, rasters, kd) : { dem: downsampleGrid(dem, kd), rasters: downsampleRasters(rasters, kr) };
}

/** Whether reduced maps have the sizes reportMaps gives for this input. */
function mapsFit(maps: ReportMaps, input: ReportInput, maxPx: number): boolean {
  const fits = (full: { width: number; height: number }, small: { width: number; height: number }) => {
    const k = blockFactor(full.width, full.height, maxPx);
    return small.width === Math.ceil(full.width / k) && small.height === Math.ceil(full.height / k);
  };
  return fits(input.dem, maps.dem) && fits(input.rasters, maps.rasters) && maps.dem.transform.x0 === input.dem.transform.x0 && maps.dem.transform.y0 === input.dem.transform.y0;
}

const mapsWorkerUrl = new URL("./mapsWorker.js", import.meta.url);

/** The report's maps and the DEM's own layers drawn from the reduced DEM (demLayers.ts). */
export interface ReportMapsAndLayers extends ReportMaps {
  layers: DemLayers;
}

/**
 * The nice value of the maps' worker (threadPriority.ts): it runs beside the layout and the
 * solve, whose thread and whose code's optimisation (V8's compiler threads) come first.
 */
const MAPS_NICE = 10;

/** reportMaps and the DEM's layers on a worker thread: the DEM's part at once, the rasters' when handed over. */
export interface ReportMapsInBackground extends Background<ReportMapsAndLayers> {
  /** Hands over the plan's final rasters: result() then gives the maps. */
  withRasters: (rasters: ReportRasters) => void;
}

/**
 * Starts the report's maps on a worker thread (background.ts) as soon as the DEM is read:
 * the DEM reduced as reportMaps reduces it, and its hill shade and contours (demLayers), are
 * made while this thread lays out and solves the plan (a second core mostly idle then); the
 * rasters, handed over once final (withRasters), are reduced while this thread makes the
 * plan's statistics. The same figures as reportMaps: reducing the DEM apart from the rasters
 * adds each block's heights in the same order (downsample.ts). Only for a grid that is
 * reduced, and large enough (arrays in shared memory are read in place). Hand the rasters
 * over or cancel: the worker waits for them.
 * @example const maps = reportMapsInBackground(grid); ...; maps.withRasters(rasters); compactReportInput(input, 1000, await maps.result())
 */
export function reportMapsInBackground(dem: ReportGrid, threads?: number): ReportMapsInBackground {
  const none: ReportMapsInBackground = { ...NOT_IN_BACKGROUND, withRasters: () => {} };
  if (!backgroundAllowed(dem.width * dem.height, threads) || blockFactor(dem.width, dem.height, REPORT_MAP_PX) <= 1) return none;
  const { width, height, transform, cellSizeM, heights } = dem;
  const start = () => inBackgroundWithInput<ReportMapsAndLayers>(mapsWorkerUrl, { dem: { width, height, transform, cellSizeM, heights } satisfies ReportGrid, nice: MAPS_NICE });
  const send = (job: BackgroundWithInput<ReportMapsAndLayers>, r: ReportRasters) => {
    const { width, height, transform, gsdCm, images, flags, inSite } = r;
    job.send({ rasters: { width, height, transform, gsdCm, images, flags, inSite } satisfies ReportRasters });
  };
  if (!(heights.buffer instanceof SharedArrayBuffer)) {
    // Heights outside shared memory (a mosaic's, a reprojected DEM's) are copied to the
    // worker: started with the rasters instead, its copy is held only while the statistics
    // are made, not through the assessment's peak.
    let late: BackgroundWithInput<ReportMapsAndLayers> | undefined;
    return {
      result: async () => late?.result(),
      cancel: () => late?.cancel(),
      withRasters: (r) => {
        late = start();
        send(late, r);
      },
    };
  }
  const job = start();
  return { result: job.result, cancel: job.cancel, withRasters: (r) => send(job, r) };
}

/**
 * The report input as report-data.json text (compacted, typed arrays deflated).
 *
 * @example writeFileSync(tmp, serializeReportInput(input)); renameSync(tmp, "report-data.json");
 */
export function serializeReportInput(input: ReportInput, opts: { maxPx?: number } = {}): string {
  const parts = reportDataParts(input, opts.maxPx ?? REPORT_MAP_PX);
  return reportDataText(parts, parts.streams.map((bytes) => deflateSync(bytes, { level: DEFLATE_LEVEL })));
}

const deflateInPool = promisify(deflate);

/**
 * serializeReportInput's text, the same, its zlib streams deflated on Node's thread pool, all
 * at once: the large ones (the DEM's and the GSD's maps, ~27 ms each at 4 km2) on both cores
 * while this thread waits, where they ran one after the other on it.
 * @example await writeFile(tmp, await serializeReportInputInPool(input));
 */
export async function serializeReportInputInPool(input: ReportInput, opts: { maxPx?: number } = {}): Promise<string> {
  const parts = reportDataParts(input, opts.maxPx ?? REPORT_MAP_PX);
  return reportDataText(parts, await Promise.all(parts.streams.map((bytes) => deflateInPool(bytes, { level: DEFLATE_LEVEL }))));
}

/** How report-data.json stores one typed array: a stream of its own, or a place in the packed one. */
interface StoredArray {
  name: TypedName;
  length: number;
  /** Stored as byte planes (floating-point arrays). */
  planes: boolean;
  /** Its stream (an index of ReportDataParts.streams, from 1), or -1 when packed. */
  stream: number;
  /** Its byte offset in the packed stream, when packed. */
  at: number;
}

/** report-data.json before its streams are deflated: the compacted input, how each typed array is stored, the streams' bytes (the packed stream first). */
interface ReportDataParts {
  input: ReportInput;
  stored: Map<ArrayBufferView, StoredArray>;
  streams: Uint8Array[];
}

/**
 * The compacted input's typed arrays, in the order JSON.stringify meets them, each given a
 * stream of its own or a place in the packed stream (OWN_STREAM_BYTES), with the bytes each
 * stream deflates (floating-point arrays as byte planes). An array met twice is stored once.
 */
function reportDataParts(input: ReportInput, maxPx: number): ReportDataParts {
  const compact = compactReportInput(input, maxPx);
  const stored = new Map<ArrayBufferView, StoredArray>();
  const streams: Uint8Array[] = [new Uint8Array(0)];
  const small: Uint8Array[] = [];
  let packedBytes = 0;
  JSON.stringify(compact, (_key, value: unknown) => {
    if (!ArrayBuffer.isView(value) || value instanceof DataView) return value;
    if (stored.has(value)) return 0;
    const name = value.constructor.name as TypedName;
    if (!(name in TYPED)) throw new Error(`serializeReportInput: unsupported typed array ${name}`);
    const bytes = new Uint8Array(value.buffer, value.byteOffset, value.byteLength);
    const planes = value instanceof Float32Array || value instanceof Float64Array;
    const source = planes ? bytePlanes(bytes, value.BYTES_PER_ELEMENT) : bytes;
    const length = (value as unknown as { length: number }).length;
    if (bytes.length >= OWN_STREAM_BYTES) {
      stored.set(value, { name, length, planes, stream: streams.length, at: 0 });
      streams.push(source);
    } else {
      stored.set(value, { name, length, planes, stream: -1, at: packedBytes });
      small.push(source);
      packedBytes += source.length;
    }
    return 0;
  });
  const packed = new Uint8Array(packedBytes);
  let at = 0;
  for (const s of small) {
    packed.set(s, at);
    at += s.length;
  }
  streams[0] = packed;
  return { input: compact, stored, streams };
}

/** report-data.json's text from its parts and their streams, deflated (`deflated[i]` of `parts.streams[i]`). */
function reportDataText(parts: ReportDataParts, deflated: Uint8Array[]): string {
  const base64 = (z: Uint8Array) => Buffer.from(z.buffer, z.byteOffset, z.byteLength).toString("base64");
  const packed = { length: parts.streams[0].length, deflate: base64(deflated[0]) };
  return JSON.stringify({ format: REPORT_DATA_FORMAT, version: REPORT_DATA_VERSION, packed, input: parts.input }, (_key, value: unknown) => {
    if (ArrayBuffer.isView(value) && !(value instanceof DataView)) {
      const s = parts.stored.get(value);
      if (!s) throw new Error("serializeReportInput: a typed array the first pass did not meet");
      const { name: $typed, length } = s;
      if (s.stream < 0) return s.planes ? { $typed, length, packedPlanesAt: s.at } : { $typed, length, packedAt: s.at };
      const z = base64(deflated[s.stream]);
      return s.planes ? { $typed, length, planes: z } : { $typed, length, deflate: z };
    }
    // JSON has no NaN or Infinity; keep them distinguishable from null.
    if (typeof value === "number" && !Number.isFinite(value)) return { $number: String(value) };
    return value;
  });
}

/**
 * Read report-data.json text back into a ReportInput. Throws InputFileError naming the
 * file and the problem when the text is not a report-data file of this version.
 *
 * @example const input = parseReportInput(readFileSync(p, "utf8"), p);
 */
export function parseReportInput(text: string, file = "report-data.json"): ReportInput {
  let doc: unknown;
  // Version 4's packed stream: read before the input (it comes first), inflated once.
  let packed: Uint8Array | undefined;
  try {
    doc = JSON.parse(text, function (this: unknown, key, value: unknown) {
      if (key === "packed" && (this as { format?: unknown }).format === REPORT_DATA_FORMAT) {
        const p = value as { length?: unknown; deflate?: unknown } | null;
        if (!p || typeof p.deflate !== "string" || typeof p.length !== "number") throw new Error("packed must give its length and deflate");
        packed = inflateSync(Buffer.from(p.deflate, "base64"));
        if (packed.byteLength !== p.length) throw new Error(`packed bytes of wrong length`);
        return undefined;
      }
      if (value && typeof value === "object" && "$typed" in value) {
        const v = value as { $typed: string; length: number; deflate?: string; planes?: string; packedAt?: number; packedPlanesAt?: number };
        if (!(v.$typed in TYPED)) throw new Error(`unknown typed array ${v.$typed}`);
        const Ctor = TYPED[v.$typed as TypedName];
        const size = v.length * Ctor.BYTES_PER_ELEMENT;
        const at = v.packedPlanesAt ?? v.packedAt;
        let bytes: Uint8Array;
        if (at !== undefined) {
          if (!packed) throw new Error(`typed array ${v.$typed} packed, but no packed bytes before it`);
          if (!Number.isInteger(at) || at < 0 || !(size >= 0) || at + size > packed.byteLength) throw new Error(`typed array ${v.$typed} outside the packed bytes`);
          bytes = packed.subarray(at, at + size);
        } else {
          const stored = v.planes ?? v.deflate;
          if (typeof stored !== "string") throw new Error(`typed array ${v.$typed} without its bytes`);
          bytes = inflateSync(Buffer.from(stored, "base64"));
          if (bytes.byteLength !== size) throw new Error(`typed array of wrong length`);
        }
        // Into a fresh, aligned buffer (byte planes regrouped straight into it).
        const ab = new ArrayBuffer(bytes.byteLength);
        if (v.planes !== undefined || v.packedPlanesAt !== undefined) fromBytePlanes(bytes, Ctor.BYTES_PER_ELEMENT, new Uint8Array(ab));
        else new Uint8Array(ab).set(bytes);
        return new Ctor(ab);
      }
      if (value && typeof value === "object" && "$number" in value) return Number((value as { $number: string }).$number);
      return value;
    });
  } catch (e) {
    throw new InputFileError(file, `not a readable report-data file (${(e as Error).message})`);
  }
  const d = doc as { format?: unknown; version?: unknown; input?: Partial<ReportInput> };
  if (!d || d.format !== REPORT_DATA_FORMAT) throw new InputFileError(file, `not a ${REPORT_DATA_FORMAT} file`);
  if (typeof d.version !== "number" || !READABLE_VERSIONS.includes(d.version)) {
    throw new InputFileError(file, `report-data version ${String(d.version)} is not supported (this gsdplan reads versions ${READABLE_VERSIONS.join(" and ")})`);
  }
  const inp = d.input;
  const problem = checkShape(inp);
  if (problem) throw new InputFileError(file, problem);
  return inp as ReportInput;
}

function checkShape(inp: Partial<ReportInput> | undefined): string | null {
  if (!inp || typeof inp !== "object") return "missing the report input";
  if (typeof inp.siteName !== "string") return "missing siteName";
  const g = inp.summary?.gsdCm;
  if (!g || !["target", "low", "high"].every((k) => typeof (g as unknown as Record<string, unknown>)[k] === "number")) {
    return "summary.gsdCm must give target, low and high";
  }
  const dem = inp.dem;
  if (!dem || !(dem.heights instanceof Float32Array) || dem.heights.length !== dem.width * dem.height) return "dem heights do not match its size";
  const r = inp.rasters;
  if (!r) return "missing rasters";
  const n = r.width * r.height;
  if (!(r.gsdCm instanceof Float32Array) || r.gsdCm.length !== n) return "rasters.gsdCm does not match the raster size";
  if (!(r.images instanceof Uint16Array) || r.images.length !== n) return "rasters.images does not match the raster size";
  // Uint8 in report-data written before the keep-out bit (256), Uint16 since.
  if (!(r.flags instanceof Uint8Array || r.flags instanceof Uint16Array) || r.flags.length !== n) return "rasters.flags does not match the raster size";
  if (!(r.inSite instanceof Uint8Array) || r.inSite.length !== n) return "rasters.inSite does not match the raster size";
  if (!Array.isArray(inp.legs)) return "missing legs";
  if (inp.drawing === undefined) {
    // Version 1 and 2 files: the page's drawing is made from every leg's stations.
    if (inp.legs.some((l) => !l || !l.profile || !(l.profile.s instanceof Float64Array || l.profile.s instanceof Float32Array))) return "a leg has neither its station profile nor the input the legs' drawing";
  } else {
    const problem = drawingProblem(inp.drawing, inp.legs.length);
    if (problem) return problem;
  }
  if (!inp.site || (inp.site.type !== "Polygon" && inp.site.type !== "MultiPolygon")) return "site must be a Polygon or MultiPolygon";
  return (
    (inp.keepOut === undefined ? null : keepOutProblem(inp.keepOut)) ??
    legBlocksProblem(inp.legs) ??
    (inp.maxRangeM === undefined ? null : rangeProblem(inp.maxRangeM)) ??
    (inp.blocks === undefined ? null : blocksProblem(inp.blocks)) ??
    (inp.flights === undefined ? null : flightsProblem(inp.flights, inp.blocks))
  );
}

/** The legs' drawing's shape (ReportDrawing, version 3 on). */
function drawingProblem(d: unknown, legs: number): string | null {
  const x = d as Partial<ReportDrawing> | null;
  if (!x || typeof x !== "object") return "drawing must be an object";
  if (!Array.isArray(x.agl) || x.agl.length !== 2 || !x.agl.every(isNum)) return "drawing.agl must be two numbers";
  if (!Array.isArray(x.runs) || x.runs.length !== legs || !x.runs.every((r) => r instanceof Float64Array && r.length % 5 === 0)) return "drawing.runs must hold five numbers a run for every leg";
  if (!Array.isArray(x.strips)) return "drawing.strips must be a list";
  for (let i = 0; i < x.strips.length; i++) {
    const s = x.strips[i] as Partial<StripDrawing> | null;
    const at = `drawing.strips[${i}]`;
    if (!s || typeof s !== "object" || !isNum(s.strip)) return `${at} must be a strip's drawing`;
    const series = [s.s, s.ground, s.hardLow, s.hardHigh, s.bandLow, s.bandHigh];
    if (!series.every((a) => a instanceof Float64Array && a.length === s.s!.length)) return `${at}: its series must be arrays of one length`;
    if (!(s.flagged instanceof Float64Array) || s.flagged.length % 3 !== 0 || !(s.flight instanceof Float64Array) || s.flight.length % 2 !== 0) return `${at}: flagged must hold three numbers a stretch, flight two a waypoint`;
    if (![s.nDetail, s.nUnfly, s.sMax, s.lo, s.hi].every(isNum)) return `${at}: nDetail, nUnfly, sMax, lo and hi must be numbers`;
  }
  return null;
}

const isNum = (v: unknown) => typeof v === "number";
const isPolygons = (v: unknown) =>
  Array.isArray(v) &&
  v.every((poly) => Array.isArray(poly) && poly.every((ring) => Array.isArray(ring) && ring.every((p) => Array.isArray(p) && p.length >= 2 && isNum(p[0]) && isNum(p[1]))));

/** The keep-out zones' shape (optional key: report-data from before keep-out zones has none). */
function keepOutProblem(k: unknown): string | null {
  const zones = (k as { zones?: unknown } | null)?.zones;
  if (!Array.isArray(zones)) return "keepOut.zones must be a list";
  for (let i = 0; i < zones.length; i++) {
    const z = zones[i] as Record<string, unknown> | null;
    const at = `keepOut.zones[${i}]`;
    if (!z || typeof z !== "object") return `${at} must be an object`;
    if (typeof z.name !== "string" || typeof z.source !== "string") return `${at} must give name and source as text`;
    for (const key of ["bufferM", "siteRemovedM2", "siteRemovedPct"]) if (!isNum(z[key])) return `${at}.${key} must be a number`;
    for (const key of ["polygons", "buffered"]) if (!isPolygons(z[key])) return `${at}.${key} must be polygons of [x, y] rings`;
  }
  return null;
}

/** A value as the error line quotes it: short, one line. */
function shown(v: unknown): string {
  const t = v === undefined ? "nothing" : JSON.stringify(v) ?? String(v);
  return t.length > 40 ? `${t.slice(0, 37)}...` : t;
}

const isFiniteNum = (v: unknown): v is number => typeof v === "number" && Number.isFinite(v);
const isCount = (v: unknown): v is number => Number.isInteger(v) && (v as number) >= 0;
const isIndex = (v: unknown): v is number => Number.isInteger(v) && (v as number) >= 1;

/** The optional flight and block numbers of each leg (report-data from before blocks has neither). */
function legBlocksProblem(legs: unknown[]): string | null {
  for (let i = 0; i < legs.length; i++) {
    const l = legs[i] as Record<string, unknown> | null;
    for (const key of ["flight", "block"])
      if (l && l[key] !== undefined && !isIndex(l[key])) return `legs[${i}].${key} must be a whole number >= 1 (got ${shown(l[key])})`;
  }
  return null;
}

function rangeProblem(v: unknown): string | null {
  return isFiniteNum(v) && v >= 0 ? null : `maxRangeM must be a number of metres >= 0, 0 for no limit (got ${shown(v)})`;
}

const TAKEOFF_FROM = ["given", "layout", "candidate", "proposed"];

/** The blocks' shape (optional key: report-data from before blocks has none). */
function blocksProblem(b: unknown): string | null {
  if (!Array.isArray(b)) return `blocks must be a list (got ${shown(b)})`;
  for (let i = 0; i < b.length; i++) {
    const at = `blocks[${i}]`;
    const x = b[i] as Record<string, unknown> | null;
    if (!x || typeof x !== "object") return `${at} must be an object (got ${shown(x)})`;
    if (!isIndex(x.index)) return `${at}.index must be a whole number >= 1 (got ${shown(x.index)})`;
    const t = x.takeoff as Record<string, unknown> | null;
    if (!t || typeof t !== "object") return `${at}.takeoff must be an object with x, y, lon, lat and groundAmslM (got ${shown(t)})`;
    for (const key of ["x", "y", "lon", "lat", "groundAmslM"]) if (!isFiniteNum(t[key])) return `${at}.takeoff.${key} must be a finite number (got ${shown(t[key])})`;
    if (Math.abs(t.lat as number) > 90 || Math.abs(t.lon as number) > 180) return `${at}.takeoff must have lon in [-180, 180] and lat in [-90, 90] (got ${shown([t.lon, t.lat])})`;
    if (!TAKEOFF_FROM.includes(x.takeoffFrom as string)) return `${at}.takeoffFrom must be one of ${TAKEOFF_FROM.join(", ")} (got ${shown(x.takeoffFrom)})`;
    if (x.slopeDeg !== undefined && !isFiniteNum(x.slopeDeg)) return `${at}.slopeDeg must be a finite number when given (got ${shown(x.slopeDeg)})`;
    if (x.strips !== undefined && !(Array.isArray(x.strips) && x.strips.every(isIndex))) return `${at}.strips must be a list of strip numbers (got ${shown(x.strips)})`;
    if (!(isFiniteNum(x.farthestM) && x.farthestM >= 0)) return `${at}.farthestM must be a number of metres >= 0 (got ${shown(x.farthestM)})`;
    if (b.slice(0, i).some((y) => (y as { index: unknown }).index === x.index)) return `${at}.index ${shown(x.index)} repeats an earlier block's`;
  }
  return null;
}

/** The flights.csv rows' shape; a flight's block must be one of the blocks when they are given. */
function flightsProblem(f: unknown, blocks: unknown): string | null {
  if (!Array.isArray(f)) return `flights must be a list (got ${shown(f)})`;
  const known = Array.isArray(blocks) ? new Set(blocks.map((b) => (b as { index: unknown }).index)) : null;
  for (let i = 0; i < f.length; i++) {
    const at = `flights[${i}]`;
    const r = f[i] as Record<string, unknown> | null;
    if (!r || typeof r !== "object") return `${at} must be an object (got ${shown(r)})`;
    for (const key of ["flight", "block"]) if (!isIndex(r[key])) return `${at}.${key} must be a whole number >= 1 (got ${shown(r[key])})`;
    if (known && !known.has(r.block)) return `${at}.block ${shown(r.block)} is not one of the blocks (${[...known].map(shown).join(", ")})`;
    for (const key of ["takeoffLongitude", "takeoffLatitude", "takeoffGroundAmslM", "lengthM", "durationS", "maxRangeM"])
      if (!isFiniteNum(r[key])) return `${at}.${key} must be a finite number (got ${shown(r[key])})`;
    for (const key of ["waypoints", "photos"]) if (!isCount(r[key])) return `${at}.${key} must be a whole number >= 0 (got ${shown(r[key])})`;
    if (r.resumesStrip !== null && !isIndex(r.resumesStrip)) return `${at}.resumesStrip must be a strip number or null (got ${shown(r.resumesStrip)})`;
  }
  return null;
}
