import path from "node:path";
import type { Element } from "@xmldom/xmldom";
import { xmldom } from "../lazyModule.js";
import { InputError, InputFileError } from "../errors.js";
import type { GeoTransform } from "./grid.js";

/**
 * A GDAL VRT mosaic, as `gdalbuildvrt` writes it: one grid (size and geotransform) and per
 * band a list of sources, each a rectangle of a raster file placed on that grid. Read per
 * GDAL's VRT format description ("GDAL Virtual Format"); anything that computes values
 * (warped datasets, derived bands, pixel functions, raw bands, scaled or looked-up
 * sources) is refused in one line naming what was found.
 */
export interface VrtMosaic {
  width: number;
  height: number;
  transform: GeoTransform;
  /** EPSG codes the SRS names (its AUTHORITY / ID entries; empty when it names none). */
  srsEpsgCodes: number[];
  band: VrtBand;
}

export interface VrtBand {
  band: number;
  /** The band's NoDataValue (raw), or null. */
  noData: number | null;
  /** <Offset>/<Scale> of the band (GDAL metadata: value = raw * scale + offset), when given. */
  offset: number | null;
  scale: number | null;
  sources: VrtSource[];
}

/** A rectangle in pixels: offset and size, possibly fractional. */
export interface PixelRect {
  xOff: number;
  yOff: number;
  xSize: number;
  ySize: number;
}

export interface VrtSource {
  kind: "SimpleSource" | "ComplexSource";
  /** Resolved: absolute path, or an http(s) URL (from a /vsicurl/ name). */
  file: string;
  sourceBand: number;
  /** Null when absent (the whole source, placed at the grid's origin). */
  srcRect: PixelRect | null;
  dstRect: PixelRect | null;
  /** ComplexSource <NODATA>: raw source value that is transparent, or null. */
  noData: number | null;
}

const REFUSED_SOURCE_CHILDREN = ["LUT", "ScaleOffset", "ScaleRatio", "Exponent", "ColorTableComponent", "SrcMin", "SrcMax", "DstMin", "DstMax"];

/**
 * Parses a VRT's XML into its mosaic for one band. `vrtPath` resolves relative source names.
 * @example parseVrt(readFileSync("tiles.vrt", "utf8"), "/data/tiles.vrt", 1).band.sources.length
 */
export function parseVrt(text: string, vrtPath: string, band: number): VrtMosaic {
  const refuse = (what: string) => new InputFileError(vrtPath, `${what}; only mosaics (VRTRasterBand with SimpleSource/ComplexSource, as gdalbuildvrt writes them) are read`);
  let root: Element | null;
  try {
    root = new (xmldom().DOMParser)({ onError: (level, msg) => { if (level !== "warning") throw new Error(msg); } }).parseFromString(text, "text/xml").documentElement;
  } catch (e) {
    throw new InputFileError(vrtPath, `not well-formed XML (${(e as Error).message.split("\n")[0]})`);
  }
  if (!root || root.localName !== "VRTDataset") throw new InputFileError(vrtPath, `not a GDAL VRT (root element <${root?.localName ?? "none"}>, <VRTDataset> expected)`);
  const sub = root.getAttribute("subClass");
  if (sub) throw refuse(`a ${sub === "VRTWarpedDataset" ? "warped VRT" : "VRT of another kind"} (VRTDataset subClass="${sub}")`);

  const width = Number(root.getAttribute("rasterXSize"));
  const height = Number(root.getAttribute("rasterYSize"));
  if (!(Number.isInteger(width) && width > 0 && Number.isInteger(height) && height > 0))
    throw new InputFileError(vrtPath, `invalid raster size ${root.getAttribute("rasterXSize")} x ${root.getAttribute("rasterYSize")} in the VRT`);

  const gtText = childText(root, "GeoTransform");
  if (gtText === null) throw new InputFileError(vrtPath, "no georeferencing (the VRT has no <GeoTransform>)");
  const gt = gtText.split(",").map((s) => Number(s.trim()));
  if (gt.length !== 6 || !gt.every(Number.isFinite)) throw new InputFileError(vrtPath, `invalid <GeoTransform> "${gtText.trim()}"`);
  if (gt[2] !== 0 || gt[4] !== 0) throw new InputFileError(vrtPath, "rotated transforms are not supported: north-up only (the VRT's GeoTransform has rotation terms)");
  if (!(gt[1] > 0 && gt[5] < 0)) throw new InputFileError(vrtPath, `transforms other than north-up are not supported (cell size ${gt[1]} x ${gt[5]}): north-up only`);
  if (children(root, "GCPList").length) throw new InputFileError(vrtPath, "georeferenced by ground control points: north-up affine georeferencing is required");

  const bands = children(root, "VRTRasterBand");
  if (!bands.length) throw new InputFileError(vrtPath, "the VRT has no <VRTRasterBand>");
  if (!Number.isInteger(band) || band < 1 || band > bands.length) throw new InputError("band", band, `an integer from 1 to ${bands.length} (the VRT has ${bands.length} band${bands.length === 1 ? "" : "s"})`);
  const b = bands.find((e) => Number(e.getAttribute("band")) === band) ?? bands[band - 1];
  const bandSub = b.getAttribute("subClass");
  if (bandSub) {
    const fn = childText(b, "PixelFunctionType");
    throw refuse(`${bandSub === "VRTDerivedRasterBand" ? "a derived band" : bandSub === "VRTRawRasterBand" ? "a raw band" : "a band of another kind"} (VRTRasterBand subClass="${bandSub}"${fn ? `, pixel function "${fn.trim()}"` : ""})`);
  }
  if (childText(b, "PixelFunctionType") !== null) throw refuse(`a pixel function ("${childText(b, "PixelFunctionType")!.trim()}")`);

  const sources: VrtSource[] = [];
  for (const el of elementChildren(b)) {
    const name = el.localName;
    if (name === "SimpleSource" || name === "ComplexSource") {
      for (const c of REFUSED_SOURCE_CHILDREN) {
        const v = childText(el, c);
        if (v !== null && !(c === "ScaleOffset" && Number(v) === 0) && !(c === "ScaleRatio" && Number(v) === 1))
          throw refuse(`a ${name} that computes values (<${c}>${v.trim().slice(0, 40)}</${c}>)`);
      }
      sources.push(readSource(el, name, vrtPath));
    } else if (/Source$/.test(name ?? "")) {
      throw refuse(`a source that computes values (<${name}>)`);
    }
  }
  const noDataText = childText(b, "NoDataValue");
  const num = (t: string | null) => (t === null ? null : Number(t.trim()));
  return {
    width,
    height,
    transform: { x0: gt[0], dx: gt[1], y0: gt[3], dy: gt[5] },
    srsEpsgCodes: srsEpsgCodes(childText(root, "SRS")),
    band: { band, noData: noDataText === null || /nan/i.test(noDataText) ? null : Number(noDataText), offset: num(childText(b, "Offset")), scale: num(childText(b, "Scale")), sources },
  };
}

function readSource(el: Element, kind: "SimpleSource" | "ComplexSource", vrtPath: string): VrtSource {
  const fnEl = children(el, "SourceFilename")[0];
  if (!fnEl) throw new InputFileError(vrtPath, `a <${kind}> without <SourceFilename>`);
  const name = (fnEl.textContent ?? "").trim();
  const relative = fnEl.getAttribute("relativeToVRT") === "1" || fnEl.getAttribute("relativetoVRT") === "1";
  let file: string;
  if (/^\/vsicurl\/https?:\/\//i.test(name)) file = name.slice("/vsicurl/".length);
  else if (/^\/vsi/i.test(name)) throw new InputFileError(vrtPath, `source "${name}": GDAL virtual file systems other than /vsicurl/ are not read`);
  else if (/^https?:\/\//i.test(name)) file = name;
  else file = relative ? path.resolve(path.dirname(vrtPath), name) : path.resolve(name);
  const sb = childText(el, "SourceBand");
  const sourceBand = sb === null ? 1 : Number(sb.trim());
  if (!Number.isInteger(sourceBand) || sourceBand < 1) throw new InputFileError(vrtPath, `source "${name}": invalid <SourceBand> ${sb}`);
  const nd = kind === "ComplexSource" ? childText(el, "NODATA") : null;
  return {
    kind,
    file,
    sourceBand,
    srcRect: rect(el, "SrcRect", vrtPath),
    dstRect: rect(el, "DstRect", vrtPath),
    noData: nd === null || /nan/i.test(nd) ? null : Number(nd.trim()),
  };
}

function rect(el: Element, name: string, vrtPath: string): PixelRect | null {
  const r = children(el, name)[0];
  if (!r) return null;
  const v = ["xOff", "yOff", "xSize", "ySize"].map((k) => Number(r.getAttribute(k)));
  if (!v.every(Number.isFinite) || !(v[2] > 0 && v[3] > 0)) throw new InputFileError(vrtPath, `invalid <${name}> (${["xOff", "yOff", "xSize", "ySize"].map((k) => r.getAttribute(k)).join(", ")})`);
  return { xOff: v[0], yOff: v[1], xSize: v[2], ySize: v[3] };
}

/** Every EPSG code a WKT (or an "EPSG:n" SRS) names, in AUTHORITY["EPSG","n"] / ID["EPSG",n]. */
function srsEpsgCodes(wkt: string | null): number[] {
  if (!wkt) return [];
  const m = /^\s*EPSG:(\d+)\s*$/i.exec(wkt);
  if (m) return [Number(m[1])];
  return [...wkt.matchAll(/(?:AUTHORITY|ID)\[\s*"EPSG"\s*,\s*"?(\d+)"?\s*\]/gi)].map((x) => Number(x[1]));
}

function elementChildren(el: Element): Element[] {
  const out: Element[] = [];
  for (let n = el.firstChild; n; n = n.nextSibling) if (n.nodeType === 1) out.push(n as Element);
  return out;
}

function children(el: Element, name: string): Element[] {
  return elementChildren(el).filter((c) => c.localName === name);
}

function childText(el: Element, name: string): string | null {
  const c = children(el, name)[0];
  return c ? (c.textContent ?? "") : null;
}
