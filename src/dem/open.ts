import { closeSync, openSync, readFileSync, readSync, readdirSync, statSync } from "node:fs";
import path from "node:path";
import { InputError, InputFileError } from "../errors.js";
import type { DemSource, OpenDemOptions } from "./source.js";
import { openTiffFile, openTiffUrl } from "./tiffSource.js";
import { isHttpUrl } from "./remote.js";
import { parseVrt, type VrtSource } from "./vrt.js";
import { finestMember, mosaicSource, placeOnLattice, verticalFacts, type MosaicMember, type Placement } from "./mosaic.js";

/** One source after folders are expanded. */
interface Entry {
  kind: "tiff" | "url" | "vrt";
  location: string;
}

// Open member files kept at once (least recently used closed first), and headers read at once.
const OPEN_MEMBERS = 32;
const HEADER_CONCURRENCY = 8;

/**
 * openDem's work: expands folders, opens one source as itself and several as a mosaic.
 * @example const dem = await openSources(["a.tif", "b.tif"], {})
 */
export async function openSources(spec: string | readonly string[], opts: OpenDemOptions): Promise<DemSource> {
  const list = typeof spec === "string" ? [spec] : [...spec];
  if (!list.length) throw new InputError("dem", spec, "a file, folder or http(s) URL, or a list of them", "empty list");
  const entries = list.flatMap(expand);
  if (entries.length === 1) return openEntry(entries[0], opts);
  const name = list.length === 1 ? list[0] : `${entries.length} DEM sources (${entries[0].location} ... ${entries[entries.length - 1].location})`;
  return openListMosaic(name, entries, opts);
}

function expand(spec: string): Entry[] {
  if (isHttpUrl(spec)) {
    if (/\.vrt(\?|#|$)/i.test(spec)) throw new InputFileError(spec, "a VRT over HTTP is not read; give the URLs of the GeoTIFFs it names");
    return [{ kind: "url", location: spec }];
  }
  let st;
  try {
    st = statSync(spec);
  } catch {
    throw new InputFileError(spec, "cannot open the file (missing or unreadable)");
  }
  if (st.isDirectory()) {
    // Sorted by name in code-unit order: the same order on every machine and locale.
    const files = readdirSync(spec).filter((f) => /\.tiff?$/i.test(f)).sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
    if (!files.length) throw new InputFileError(spec, "the folder holds no .tif or .tiff file");
    return files.map((f) => ({ kind: "tiff" as const, location: path.join(spec, f) }));
  }
  return [{ kind: /\.vrt$/i.test(spec) || looksLikeXml(spec) ? "vrt" : "tiff", location: spec }];
}

/** A file whose first non-blank byte is "<" is XML (a VRT given another extension). */
function looksLikeXml(file: string): boolean {
  let fd: number | undefined;
  try {
    fd = openSync(file, "r");
    const buf = Buffer.alloc(64);
    const n = readSync(fd, buf, 0, 64, 0);
    return /^(\uFEFF)?\s*</.test(buf.subarray(0, n).toString("utf8"));
  } catch {
    return false;
  } finally {
    if (fd !== undefined) closeSync(fd);
  }
}

function openEntry(e: Entry, opts: OpenDemOptions): Promise<DemSource> {
  if (e.kind === "url") return openTiffUrl(e.location, opts);
  if (e.kind === "vrt") return openVrtMosaic(e.location, opts);
  return openTiffFile(e.location, opts);
}

/**
 * Opens members on demand and keeps at most OPEN_MEMBERS of them open, closing the least
 * recently used first (a window reads at most four members at once, far fewer).
 */
class MemberPool {
  private readonly open = new Map<string, DemSource>();
  private readonly pending = new Map<string, Promise<DemSource>>();
  private closed = false;

  /** The open source for `key`, opened with `make` when not open. */
  async get(key: string, make: () => Promise<DemSource>): Promise<DemSource> {
    if (this.closed) throw new Error("the DEM mosaic is closed");
    const have = this.open.get(key);
    if (have) {
      this.open.delete(key);
      this.open.set(key, have);
      return have;
    }
    let p = this.pending.get(key);
    if (!p) {
      p = make().finally(() => this.pending.delete(key));
      this.pending.set(key, p);
      const s = await p;
      this.open.set(key, s);
      await this.trim();
      return s;
    }
    return p;
  }

  private async trim(): Promise<void> {
    for (const [k, s] of this.open) {
      if (this.open.size <= OPEN_MEMBERS) break;
      this.open.delete(k);
      await s.close();
    }
  }

  async closeAll(): Promise<void> {
    this.closed = true;
    const all = [...this.open.values()];
    this.open.clear();
    await Promise.all(all.map((s) => s.close().catch(() => undefined)));
  }
}

/** A member whose reads go through the pool. */
function pooledMember(pool: MemberPool, location: string, make: () => Promise<DemSource>, base: Omit<MosaicMember, "open" | "location">): MosaicMember {
  const m: MosaicMember = {
    ...base,
    location,
    open: () => pool.get(location, make),
  };
  return m;
}

/**
 * A list of sources (tiles, folders' files, VRTs, URLs) as one mosaic: every header is
 * read now (to place the member), cells later and only where a window needs them.
 */
async function openListMosaic(name: string, entries: Entry[], opts: OpenDemOptions): Promise<DemSource> {
  const pool = new MemberPool();
  const heads: DemSource[] = new Array(entries.length);
  try {
    for (let i = 0; i < entries.length; i += HEADER_CONCURRENCY) {
      await Promise.all(
        entries.slice(i, i + HEADER_CONCURRENCY).map(async (e, k) => {
          heads[i + k] = await pool.get(keyOf(i + k, e), () => openEntry(e, opts));
        }),
      );
    }
    const ref = heads[finestMember(heads)];
    const placed = heads.map((h) => placeOnLattice(h, ref));
    const col0 = Math.min(...placed.map((p) => p.covers.col0)), row0 = Math.min(...placed.map((p) => p.covers.row0));
    const col1 = Math.max(...placed.map((p) => p.covers.col1)), row1 = Math.max(...placed.map((p) => p.covers.row1));
    const t = ref.transform;
    const members = entries.map((e, i) => {
      const p = placed[i];
      // Placements relative to the reference's origin, moved to the mosaic's (col0, row0).
      const place: Placement = p.place.kind === "copy" ? { ...p.place, dCol: p.place.dCol - col0, dRow: p.place.dRow - row0 } : p.place;
      const covers = { col0: p.covers.col0 - col0, row0: p.covers.row0 - row0, col1: p.covers.col1 - col0, row1: p.covers.row1 - row0 };
      return pooledMember(pool, keyOf(i, e), () => openEntry(e, opts), { covers, place, transparentRaw: [] });
    });
    const resampled = entries.map((e, i) => ({ e, why: placed[i].why })).filter((x) => x.why);
    const warnings = resampled.length
      ? [
          `heights of ${resampled.length} of ${entries.length} DEM sources were resampled bilinearly onto the grid of ${entries[heads.indexOf(ref)].location} ` +
            `(${resampled.slice(0, 3).map((x) => `${path.basename(x.e.location)}: ${x.why}`).join("; ")}${resampled.length > 3 ? "; ..." : ""}): ` +
            "between their cells the heights are an interpolation of an interpolation",
        ]
      : [];
    return mosaicSource({
      path: name,
      kind: "list",
      width: col1 - col0,
      height: row1 - row0,
      transform: { x0: t.x0 + col0 * t.dx, y0: t.y0 + row0 * t.dy, dx: t.dx, dy: t.dy },
      crs: ref.crs,
      band: opts.band ?? 1,
      bands: Math.min(...heads.map((h) => h.bands)),
      members,
      known: heads,
      warnings,
      close: () => pool.closeAll(),
    });
  } catch (e) {
    await pool.closeAll();
    throw e;
  }
}

/** Pool key: a file may be listed twice (it then wins twice, harmlessly). */
function keyOf(i: number, e: Entry): string {
  return `${i}\u0000${e.location}`;
}

/**
 * A GDAL VRT mosaic: its own grid and CRS, members placed by SrcRect/DstRect as GDAL does.
 * The CRS and vertical facts come from the first source's header (the VRT's SRS, when it
 * names EPSG codes, must name the first source's); the other sources are opened only when
 * a window first meets them.
 */
async function openVrtMosaic(vrtPath: string, opts: OpenDemOptions): Promise<DemSource> {
  let text: string;
  try {
    text = readFileSync(vrtPath, "utf8");
  } catch {
    throw new InputFileError(vrtPath, "cannot open the file (missing or unreadable)");
  }
  const vrt = parseVrt(text, vrtPath, opts.band ?? 1);
  const sources = vrt.band.sources;
  if (!sources.length) throw new InputFileError(vrtPath, "the VRT band has no sources");
  const pool = new MemberPool();
  try {
    const memberOpts = (s: VrtSource): OpenDemOptions => ({ ...opts, band: s.sourceBand });
    const openMember = (s: VrtSource) => (isHttpUrl(s.file) ? openTiffUrl(s.file, memberOpts(s)) : openTiffFile(s.file, memberOpts(s)));
    const first = await pool.get(keyOf(0, { kind: "tiff", location: sources[0].file }), () => openMember(sources[0]));
    if (first.crs.epsg !== null && vrt.srsEpsgCodes.length && !vrt.srsEpsgCodes.includes(first.crs.epsg))
      throw new InputFileError(vrtPath, `the VRT's SRS (EPSG:${vrt.srsEpsgCodes.join("/")}) differs from its first source's CRS (EPSG:${first.crs.epsg}, ${first.path})`);
    const crs = first.crs;
    const known: DemSource[] = [first];
    const transparentRaw = (s: VrtSource) => [s.noData, vrt.band.noData].filter((v): v is number => v !== null && Number.isFinite(v));
    const resampled: string[] = [];

    const members = sources.map((s, i) => {
      const key = keyOf(i, { kind: "tiff", location: s.file });
      const m: MosaicMember = {
        location: s.file,
        covers: s.dstRect ? { col0: s.dstRect.xOff, row0: s.dstRect.yOff, col1: s.dstRect.xOff + s.dstRect.xSize, row1: s.dstRect.yOff + s.dstRect.ySize } : { col0: 0, row0: 0, col1: vrt.width, row1: vrt.height },
        place: null,
        transparentRaw: transparentRaw(s),
        open: async () => {
          const src = await pool.get(key, () => openMember(s));
          if (!m.place) {
            checkVrtMember(vrtPath, src, first, vrt.band);
            m.place = vrtPlacement(s, src, vrt.transform, crs);
            if (!s.dstRect) m.covers = { col0: 0, row0: 0, col1: src.width, row1: src.height };
          }
          return src;
        },
      };
      return m;
    });
    // Place what can be placed from the VRT alone; a source without rectangles needs its header.
    for (const [i, s] of sources.entries()) {
      if (s.srcRect && s.dstRect) {
        const p = vrtPlacement(s, null, vrt.transform, crs);
        if (p.kind === "resample") resampled.push(path.basename(s.file));
        if (i === 0) {
          checkVrtMember(vrtPath, first, first, vrt.band);
          members[0].place = p;
        }
      } else {
        await members[i].open();
        if (members[i].place!.kind === "resample") resampled.push(path.basename(s.file));
      }
    }
    const warnings = resampled.length
      ? [`heights of ${resampled.length} of ${sources.length} VRT sources (${resampled.slice(0, 3).join(", ")}${resampled.length > 3 ? ", ..." : ""}) were resampled bilinearly onto the VRT's grid (SrcRect and DstRect of different sizes or off the cell lattice): between their cells the heights are an interpolation of an interpolation`]
      : [];
    return mosaicSource({
      path: vrtPath,
      kind: "vrt",
      width: vrt.width,
      height: vrt.height,
      transform: vrt.transform,
      crs,
      band: vrt.band.band,
      bands: 1,
      members,
      known,
      warnings,
      close: () => pool.closeAll(),
    });
  } catch (e) {
    await pool.closeAll();
    throw e;
  }
}

/**
 * A VRT source on the VRT grid. Same-size rectangles a whole number of cells apart are a
 * copy; otherwise the source's cells are georeferenced by the rectangles (as GDAL places
 * them, ignoring the source's own georeferencing) and resampled.
 */
function vrtPlacement(s: VrtSource, src: DemSource | null, vt: { x0: number; y0: number; dx: number; dy: number }, crs: DemSource["crs"]): Placement {
  const sr = s.srcRect ?? { xOff: 0, yOff: 0, xSize: src!.width, ySize: src!.height };
  const dr = s.dstRect ?? { xOff: 0, yOff: 0, xSize: sr.xSize, ySize: sr.ySize };
  const whole = (v: number) => Math.abs(v - Math.round(v)) < 1e-9;
  const inside = {
    col0: Math.max(0, Math.floor(sr.xOff)), row0: Math.max(0, Math.floor(sr.yOff)),
    col1: Math.ceil(sr.xOff + sr.xSize), row1: Math.ceil(sr.yOff + sr.ySize),
  };
  if (src) {
    inside.col1 = Math.min(inside.col1, src.width);
    inside.row1 = Math.min(inside.row1, src.height);
  }
  if (sr.xSize === dr.xSize && sr.ySize === dr.ySize && whole(sr.xOff) && whole(sr.yOff) && whole(dr.xOff) && whole(dr.yOff))
    return { kind: "copy", dCol: Math.round(dr.xOff - sr.xOff), dRow: Math.round(dr.yOff - sr.yOff), src: inside };
  const kx = dr.xSize / sr.xSize, ky = dr.ySize / sr.ySize;
  return {
    kind: "resample",
    transform: { x0: vt.x0 + (dr.xOff - sr.xOff * kx) * vt.dx, y0: vt.y0 + (dr.yOff - sr.yOff * ky) * vt.dy, dx: vt.dx * kx, dy: vt.dy * ky },
    crs,
    src: inside,
  };
}

/** A VRT source must agree with the first on vertical facts and with the band's scale/offset. */
function checkVrtMember(vrtPath: string, src: DemSource, first: DemSource, band: { scale: number | null; offset: number | null }): void {
  verticalFacts(vrtPath, [first, src]);
  if ((band.scale !== null && band.scale !== src.scale) || (band.offset !== null && band.offset !== src.offset))
    throw new InputFileError(vrtPath, `the VRT band's scale/offset (${band.scale ?? 1} / ${band.offset ?? 0}) differ from those of its source ${src.path} (${src.scale} / ${src.offset})`);
  // A source's own CRS is not checked: GDAL places VRT sources by their rectangles alone.
}
