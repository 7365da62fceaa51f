/**
 * The colour table of flags.tif, so a GIS draws the flag bits in colour without styling.
 *
 * Rule: a cell takes the colour of the most severe flag it carries, in FLAG_PRIORITY order:
 * first what makes the plan unsafe or blind (no legal, safe height; no DEM data), then lost
 * detail (coarser than the band, too few images, hidden by a keep-out zone), then the
 * solver's causes (clearance or climb, ceiling, relief), last the harmless "finer than
 * the band". A cell without flags is light grey (a TIFF colour map has no alpha, so it
 * cannot be transparent); nodata is white, and GDAL shows the nodata entry transparent.
 * The colours per kind are the HTML report's flag map colours (report/render.ts), so the
 * two read alike.
 */
import { ASSESSMENT_FLAG_KINDS, type FlagKind } from "../assess/flags.js";

type Rgb = [number, number, number];

/** Colour per flag kind (keyed by FlagKind so a new kind cannot be missed). */
const FLAG_RGB: Record<FlagKind["key"], Rgb> = {
  coarse: [0xb4, 0x04, 0x26],
  fine: [0x3b, 0x4c, 0xc0],
  fewImages: [0x7b, 0x32, 0x94],
  ceiling: [0xe6, 0x61, 0x01],
  clearance: [0x8c, 0x51, 0x0a],
  nodata: [0x44, 0x44, 0x44],
  unflyable: [0xd6, 0x27, 0x28],
  relief: [0x1b, 0x78, 0x37],
  keepOut: [0x01, 0x66, 0x5e],
};

/** Most severe first; every kind of ASSESSMENT_FLAG_KINDS appears once (a test checks). */
export const FLAG_PRIORITY: readonly FlagKind["key"][] = ["unflyable", "nodata", "coarse", "fewImages", "keepOut", "clearance", "ceiling", "relief", "fine"];

export const NO_FLAG_RGB: Rgb = [0xe0, 0xe0, 0xe0];
const NODATA_RGB: Rgb = [0xff, 0xff, 0xff];

/**
 * The colour of one flags.tif value: the most severe kind's, or NO_FLAG_RGB without flags.
 * @example flagColour(1 | 8) // [180, 4, 38] (coarse outranks ceiling)
 */
export function flagColour(value: number): Rgb {
  for (const key of FLAG_PRIORITY) {
    const kind = ASSESSMENT_FLAG_KINDS.find((k) => k.key === key)!;
    if (value & kind.bit) return FLAG_RGB[key];
  }
  return NO_FLAG_RGB;
}

/**
 * The TIFF ColorMap (TIFF 6.0 section 5) for UInt16 flags: 3 x 65536 16-bit entries, all
 * reds, then greens, then blues; 8-bit colours scaled by 257 so 255 becomes 65535, as GDAL
 * reads them back.
 * @example flagColorMap(255)[1] // red of value 1, 0xb4 * 257
 */
export function flagColorMap(nodata: number): Uint16Array {
  const n = 65536;
  const map = new Uint16Array(3 * n);
  // Colours depend on the known bits only; work them out once per distinct combination.
  const known = ASSESSMENT_FLAG_KINDS.reduce((m, k) => m | k.bit, 0);
  const cache = new Map<number, Rgb>();
  for (let v = 0; v < n; v++) {
    const bits = v & known;
    let rgb = v === nodata ? NODATA_RGB : cache.get(bits);
    if (!rgb) {
      rgb = flagColour(bits);
      cache.set(bits, rgb);
    }
    map[v] = rgb[0] * 257;
    map[n + v] = rgb[1] * 257;
    map[2 * n + v] = rgb[2] * 257;
  }
  return map;
}
