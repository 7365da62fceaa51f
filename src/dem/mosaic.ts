import { InputFileError } from "../errors.js";
import type { CrsInfo, GeoTransform } from "./grid.js";
import type { DemSource } from "./source.js";
import { readCells, nativeBounds, type CellWindow } from "./window.js";
import { transformBounds } from "./bounds.js";
import { cellSizeMetres } from "./cellsize.js";
import { cellReaderOf, setCellReader, type CellBlock } from "./cellReaders.js";
import { decodeWindowDirect } from "./tiles.js";
import { demHandles } from "./tiffSource.js";
import { isHttpUrl } from "./remote.js";
import { CentreLattice } from "./lattice.js";
import { MAX_SIDE_CELLS } from "./limits.js";

/**
 * A mosaic: several DEM sources seen as one raster on one grid (the mosaic's `transform`,
 * `width`, `height` and CRS), read window by window like a single GeoTIFF.
 *
 * The design, the simplest that is exact where it can be:
 * - A member on the mosaic's own cell lattice (same CRS, same cell size, origin a whole
 *   number of cells away: tiles cut from one raster, every gdalbuildvrt mosaic of such
 *   tiles) is copied cell for cell: the mosaic then holds exactly the heights of the
 *   file the tiles were cut from, and every plan over it is the plan over that file.
 * - Any other member (another CRS, another cell size, cells not aligned, a scaled VRT
 *   source) is resampled onto the mosaic grid by bilinear interpolation between its cell
 *   centres, and the mosaic says so in its warnings: between those cells the plan reads an
 *   interpolation of an interpolation. The grid of a list is its finest member's (the
 *   earliest of equals), so detail is never thrown away; a VRT's grid is its own.
 * - Where members overlap the later one wins (GDAL's VRT order); a member's nodata cells
 *   are transparent, so the one below shows through.
 * - Only members whose extent meets a window are read, each through its own windowed
 *   reader (only the blocks under the window are decoded). A member is opened on first
 *   use unless its header was needed to place it; open members are kept in a small
 *   least-recently-used set, so a folder of hundreds of tiles holds few files open.
 */

/** How one member's cells reach the mosaic grid. */
export type Placement =
  /** mosaic cell (c, r) = member cell (c - dCol, r - dRow), for member cells inside `src`. */
  | { kind: "copy"; dCol: number; dRow: number; src: CellWindow }
  /**
   * Bilinear between the member's cell centres, the member georeferenced by `transform` in
   * `crs` (its own; or the mosaic's for a VRT source scaled by SrcRect/DstRect), cells in `src`.
   */
  | { kind: "resample"; transform: GeoTransform; crs: CrsInfo; src: CellWindow };

/** One source of a mosaic, placed on the mosaic grid. */
export interface MosaicMember {
  /** File path or URL. */
  location: string;
  /** Mosaic cells the member may write (fractional edges allowed). */
  covers: { col0: number; row0: number; col1: number; row1: number };
  /** Null until the member's header has been read (a VRT source before first use). */
  place: Placement | null;
  /** Raw values transparent beside the member's own nodata (a VRT's NODATA / NoDataValue). */
  transparentRaw: number[];
  /** Opens (or returns the open) source; `place` is set by then. */
  open(): Promise<DemSource>;
}

/** What makes a mosaic beside its members. */
export interface MosaicSpec {
  /** Name for messages (the VRT file, the folder, or the list). */
  path: string;
  kind: "vrt" | "list";
  width: number;
  height: number;
  transform: GeoTransform;
  crs: CrsInfo;
  band: number;
  bands: number;
  members: MosaicMember[];
  /** Facts of the members whose headers were read (all of a list; the first of a VRT). */
  known: DemSource[];
  warnings: string[];
  close(): Promise<void>;
}

const mosaics = new WeakMap<DemSource, MosaicSpec>();

/**
 * The mosaic behind a source, or undefined for a single GeoTIFF.
 * @example const m = mosaicOf(dem); m?.members.length
 */
export function mosaicOf(source: DemSource): MosaicSpec | undefined {
  return mosaics.get(source);
}

// Members read at once. On disk one at a time: each already keeps 16 blocks in flight, and
// more only adds memory and collection work (measured: 1.3x the CPU of one file at 4, 1.0x
// at 1). Over HTTP a few at once, so that one server's latency hides another's.
const READ_CONCURRENCY_DISK = 1;
const READ_CONCURRENCY_HTTP = 4;

/**
 * The DemSource of a mosaic: header facts of the whole, cells read through readMosaicCells.
 * Vertical facts must agree between the known members (see verticalFacts).
 * @example const dem = mosaicSource(spec); await readCells(dem, { col0: 0, row0: 0, col1: 10, row1: 10 })
 */
export function mosaicSource(spec: MosaicSpec): DemSource {
  if (spec.width > MAX_SIDE_CELLS || spec.height > MAX_SIDE_CELLS)
    throw new InputFileError(spec.path, `the DEM sources span ${spec.width} x ${spec.height} cells of the mosaic's grid; at most ${MAX_SIDE_CELLS} cells per side are accepted (are they far apart, or in different places?)`);
  const v = verticalFacts(spec.path, spec.known);
  const source: DemSource = {
    path: spec.path,
    width: spec.width,
    height: spec.height,
    bands: spec.bands,
    band: spec.band,
    transform: spec.transform,
    crs: spec.crs,
    pixelIsPoint: false,
    tiled: true,
    // The statistics estimate samples blocks of this size over the mosaic.
    blockWidth: 256,
    blockHeight: 256,
    compression: "mosaic",
    compressionCode: 0,
    predictor: 1,
    sampleFormat: "float",
    bitsPerSample: 32,
    nodata: null,
    scale: 1,
    offset: 0,
    verticalUnit: v.unit,
    verticalUnitM: v.unitM,
    verticalDatum: v.datum,
    verticalCrsName: v.crsName,
    verticalEpsg: v.epsg,
    overviewCount: 0,
    warnings: [...new Set([...spec.known.flatMap((k) => k.warnings), ...spec.warnings])],
    close: () => spec.close(),
  };
  mosaics.set(source, spec);
  setCellReader(source, (win) => readMosaicCells(spec, source, win));
  return source;
}

/**
 * The vertical unit and datum shared by the members: differing datums are refused (heights
 * on EGM96 beside ellipsoidal ones are the classic crash); differing units are fine, every
 * member's heights are converted to metres.
 * @example verticalFacts("tiles/", [a, b]).datum // "egm96"
 */
export function verticalFacts(path: string, members: readonly DemSource[]): { unit: string; unitM: number; datum: DemSource["verticalDatum"]; crsName: string | null; epsg: number | null } {
  const datums = [...new Set(members.map((m) => m.verticalDatum))];
  if (datums.length > 1) {
    const by = datums.map((d) => `${d} (${members.find((m) => m.verticalDatum === d)!.path})`).join(", ");
    throw new InputFileError(path, `the DEM sources declare different vertical datums: ${by}; convert them to one datum, or give demVerticalDatum if they share one`);
  }
  const units = [...new Set(members.map((m) => m.verticalUnit))];
  const names = [...new Set(members.map((m) => m.verticalCrsName))];
  const first = members[0];
  return {
    unit: units.length === 1 ? first.verticalUnit : `metre (converted from ${units.join(", ")})`,
    unitM: units.length === 1 ? first.verticalUnitM : 1,
    datum: first.verticalDatum,
    crsName: names.length === 1 ? first.verticalCrsName : null,
    epsg: names.length === 1 ? first.verticalEpsg : null,
  };
}

/** Reads a mosaic window: members in order, later ones written over earlier ones. */
async function readMosaicCells(spec: MosaicSpec, mosaic: DemSource, win: CellWindow): Promise<CellBlock> {
  const w = win.col1 - win.col0, h = win.row1 - win.row0;
  const heights = new Float32Array(w * h).fill(NaN);
  const meets = (a: MosaicMember["covers"], b: MosaicMember["covers"]) => a.col0 < b.col1 && a.col1 > b.col0 && a.row0 < b.row1 && a.row1 > b.row0;
  const touching = spec.members.filter((m) => meets(m.covers, win));
  // A member that shares no cell of the window with another is decoded straight into the
  // output (the usual tiles); the others are read apart and written in order.
  const clip = (c: MosaicMember["covers"]) => ({ col0: Math.max(c.col0, win.col0), row0: Math.max(c.row0, win.row0), col1: Math.min(c.col1, win.col1), row1: Math.min(c.row1, win.row1) });
  const alone = touching.map((m) => !touching.some((o) => o !== m && meets(clip(m.covers), o.covers)));
  const atOnce = touching.some((m) => isHttpUrl(m.location)) ? READ_CONCURRENCY_HTTP : READ_CONCURRENCY_DISK;
  for (let i = 0; i < touching.length; i += atOnce) {
    const group = touching.slice(i, i + atOnce);
    // Read together, written in order: the later member wins where they overlap.
    const parts = await Promise.all(group.map((m, k) => readMember(m, mosaic, win, alone[i + k] ? { heights } : null)));
    for (const write of parts) write?.(heights);
  }
  return { heights };
}

type Writer = (heights: Float32Array) => void;

/**
 * Reads what one member has under the window; returns how to write it (null: nothing, or
 * written already: a member alone in its part of the window goes straight into `out`).
 */
async function readMember(m: MosaicMember, mosaic: DemSource, win: CellWindow, out: CellBlock | null): Promise<Writer | null> {
  const src = await m.open();
  const place = m.place!;
  const transparent = m.transparentRaw.map((raw) => Math.fround((raw * src.scale + src.offset) * src.verticalUnitM));
  const w = win.col1 - win.col0;
  if (place.kind === "copy") {
    const mw = {
      col0: Math.max(win.col0 - place.dCol, place.src.col0),
      row0: Math.max(win.row0 - place.dRow, place.src.row0),
      col1: Math.min(win.col1 - place.dCol, place.src.col1),
      row1: Math.min(win.row1 - place.dRow, place.src.row1),
    };
    if (!(mw.col1 > mw.col0 && mw.row1 > mw.row0)) return null;
    if (out && !transparent.length && !cellReaderOf(src)) {
      const at = { stride: w, col: mw.col0 + place.dCol - win.col0, row: mw.row0 + place.dRow - win.row0 };
      if (await decodeWindowDirect(src, demHandles(src).image, mw, out.heights, at)) return null;
    }
    const g = await readCells(src, mw);
    return (heights) => {
      for (let r = mw.row0; r < mw.row1; r++) {
        let s = (r - mw.row0) * g.width;
        let d = (r + place.dRow - win.row0) * w + (mw.col0 + place.dCol - win.col0);
        for (let c = mw.col0; c < mw.col1; c++, s++, d++) {
          const z = g.heights[s];
          if (z !== z || (transparent.length && transparent.includes(z))) continue;
          heights[d] = z;
        }
      }
    };
  }
  return resampleMember(place, src, mosaic, win, transparent);
}

/**
 * Bilinear heights of a member at the mosaic's cell centres under the window (the rule of
 * GDAL's bilinear resampling between cell centres; a centre whose four neighbours are not
 * all valid is left to the members below; within the member's outer half cell the edge
 * cell is held, as there is no neighbour beyond it).
 */
async function resampleMember(place: Extract<Placement, { kind: "resample" }>, src: DemSource, mosaic: DemSource, win: CellWindow, transparent: number[]): Promise<Writer | null> {
  const mt = mosaic.transform;
  const t = place.transform;
  const box = {
    west: mt.x0 + win.col0 * mt.dx, east: mt.x0 + win.col1 * mt.dx,
    north: mt.y0 + win.row0 * mt.dy, south: mt.y0 + win.row1 * mt.dy,
  };
  const same = place.crs.proj4 === mosaic.crs.proj4;
  const b = same ? box : transformBounds(box, mosaic.crs.proj4, place.crs.proj4);
  // The member's cells under the window, one more on every side for the bilinear neighbours.
  const mw = {
    col0: Math.max(place.src.col0, Math.floor((b.west - t.x0) / t.dx) - 1),
    col1: Math.min(place.src.col1, Math.ceil((b.east - t.x0) / t.dx) + 1),
    row0: Math.max(place.src.row0, Math.floor((b.north - t.y0) / t.dy) - 1),
    row1: Math.min(place.src.row1, Math.ceil((b.south - t.y0) / t.dy) + 1),
  };
  if (!(mw.col1 > mw.col0 && mw.row1 > mw.row0)) return null;
  const g = await readCells(src, mw);
  const gw = g.width;
  const { col0: s0, col1: s1, row0: q0, row1: q1 } = place.src;
  const w = win.col1 - win.col0, h = win.row1 - win.row0;
  const lattice = new CentreLattice(mt, win.col0, win.row0, w, h, same ? null : mosaic.crs.proj4, same ? null : place.crs.proj4);
  const gh = g.heights;
  return (heights) => {
    for (let r = win.row0; r < win.row1; r++) {
      for (let c = win.col0; c < win.col1; c++) {
        const [x, y] = lattice.at(c, r);
        let fc = (x - t.x0) / t.dx - 0.5;
        let fr = (y - t.y0) / t.dy - 0.5;
        if (!(fc >= s0 - 0.5 && fc <= s1 - 0.5 && fr >= q0 - 0.5 && fr <= q1 - 0.5)) continue;
        if (fc < s0) fc = s0;
        else if (fc > s1 - 1) fc = s1 - 1;
        if (fr < q0) fr = q0;
        else if (fr > q1 - 1) fr = q1 - 1;
        let ci = Math.floor(fc), ri = Math.floor(fr);
        if (ci > s1 - 2) ci = Math.max(s0, s1 - 2);
        if (ri > q1 - 2) ri = Math.max(q0, q1 - 2);
        const ci1 = Math.min(ci + 1, s1 - 1), ri1 = Math.min(ri + 1, q1 - 1);
        const ax = fc - ci, ay = fr - ri;
        // Indices in the window read (it holds every neighbour: padded by one, clipped at the edge).
        if (ci < mw.col0 || ci1 >= mw.col1 || ri < mw.row0 || ri1 >= mw.row1) continue;
        const k00 = (ri - mw.row0) * gw + (ci - mw.col0), k01 = (ri - mw.row0) * gw + (ci1 - mw.col0);
        const k10 = (ri1 - mw.row0) * gw + (ci - mw.col0), k11 = (ri1 - mw.row0) * gw + (ci1 - mw.col0);
        // A neighbour without data (NaN) leaves the sum NaN: the cell is left to the members below.
        const z00 = gh[k00], z01 = gh[k01], z10 = gh[k10], z11 = gh[k11];
        if (z00 !== z00 || z01 !== z01 || z10 !== z10 || z11 !== z11) continue;
        if (transparent.length && (transparent.includes(z00) || transparent.includes(z01) || transparent.includes(z10) || transparent.includes(z11))) continue;
        const z = (1 - ay) * ((1 - ax) * z00 + ax * z01) + ay * ((1 - ax) * z10 + ax * z11);
        const d = (r - win.row0) * w + (c - win.col0);
        heights[d] = z;
      }
    }
  };
}

/**
 * True when two CRSs are the same (same proj4 definition or same EPSG code).
 * @example sameCrs(tileA.crs, tileB.crs) // true for two UTM 33N tiles
 */
export function sameCrs(a: CrsInfo, b: CrsInfo): boolean {
  return a.proj4.trim() === b.proj4.trim() || (a.epsg !== null && a.epsg === b.epsg);
}

/**
 * How a member given by its own georeferencing sits on a reference grid: "copy" when it
 * is on the reference's cell lattice (same CRS, same cell size, origin whole cells away,
 * within 1e-6 of a cell), else "resample"; with the reference-lattice cells it covers.
 * @example placeOnLattice(tile, ref).place.kind // "copy"
 */
export function placeOnLattice(m: Pick<DemSource, "transform" | "crs" | "width" | "height">, ref: Pick<DemSource, "transform" | "crs">): { place: Placement; covers: MosaicMember["covers"]; why: string | null } {
  const a = m.transform, r = ref.transform;
  const src = { col0: 0, row0: 0, col1: m.width, row1: m.height };
  const oc = (a.x0 - r.x0) / r.dx, or = (a.y0 - r.y0) / r.dy;
  const near = (v: number) => Math.abs(v - Math.round(v)) < 1e-6;
  const crsSame = sameCrs(m.crs, ref.crs);
  const sizeSame = Math.abs(a.dx / r.dx - 1) < 1e-9 && Math.abs(a.dy / r.dy - 1) < 1e-9;
  if (crsSame && sizeSame && near(oc) && near(or)) {
    const dCol = Math.round(oc), dRow = Math.round(or);
    return { place: { kind: "copy", dCol, dRow, src }, covers: { col0: dCol, row0: dRow, col1: dCol + m.width, row1: dRow + m.height }, why: null };
  }
  const nb = nativeBounds(m as DemSource);
  const b = crsSame ? nb : transformBounds(nb, m.crs.proj4, ref.crs.proj4);
  return {
    place: { kind: "resample", transform: a, crs: m.crs, src },
    covers: { col0: Math.floor((b.west - r.x0) / r.dx), col1: Math.ceil((b.east - r.x0) / r.dx), row0: Math.floor((b.north - r.y0) / r.dy), row1: Math.ceil((b.south - r.y0) / r.dy) },
    why: !crsSame ? `another CRS (${m.crs.epsg !== null ? `EPSG:${m.crs.epsg}` : m.crs.name})` : !sizeSame ? `another cell size (${+a.dx.toPrecision(8)} x ${+(-a.dy).toPrecision(8)})` : "cells not aligned with the grid",
  };
}

/**
 * The member whose cells are finest on the ground (smallest cell area in metres; the
 * earliest of equals): its grid becomes a list mosaic's grid.
 * @example finestMember([coarse, fine]) // 1
 */
export function finestMember(members: readonly Pick<DemSource, "transform" | "crs" | "height">[]): number {
  let best = 0, bestArea = Infinity;
  members.forEach((m, i) => {
    const t = m.transform;
    const lat = m.crs.geographic ? t.y0 + (m.height * t.dy) / 2 : NaN;
    const [cx, cy] = cellSizeMetres(t.dx, t.dy, m.crs.geographic, m.crs.linearUnitM, lat);
    const area = cx * cy;
    if (area < bestArea * (1 - 1e-9)) {
      best = i;
      bestArea = area;
    }
  });
  return best;
}
