/**
 * Colour scales for the report maps, computed in CIELAB so that equal steps of the data
 * look like equal steps of colour.
 *
 * - sRGB <-> CIE 1976 L*a*b* (D65 white): the sRGB transfer curve of IEC 61966-2-1 and
 *   the CIE 15 L*a*b* formulas. Hand-written because they are a dozen lines and no
 *   colour library is among the project's dependencies.
 * - Diverging ramp: straight lines in L*a*b* from a blue end through a light neutral
 *   centre to a red end. A straight line in L*a*b* has constant CIE76 colour difference
 *   per unit step, and lightness falls evenly away from the centre on both sides, so the
 *   target GSD reads as "pale" and departures either way darken at the same rate.
 *   The end colours are the cool and warm ends of a widely used diverging map
 *   (#3b4cc0, #b40426; from memory).
 * - Sequential ramp: viridis (van der Walt and Smith, matplotlib 2015), whose design
 *   criteria are perceptual uniformity and monotonic lightness; the ten sample colours
 *   below are its usual 10-step listing (from memory), interpolated in L*a*b*.
 */

export type RGB = [number, number, number];
export type Lab = [number, number, number];

// D65 reference white, CIE 1931 2-degree observer (X, Y, Z with Y = 1).
const XN = 0.95047;
const YN = 1.0;
const ZN = 1.08883;

function srgbToLinear(c8: number): number {
  const c = c8 / 255;
  return c <= 0.04045 ? c / 12.92 : Math.pow((c + 0.055) / 1.055, 2.4);
}

function linearToSrgb(c: number): number {
  const v = c <= 0.0031308 ? 12.92 * c : 1.055 * Math.pow(c, 1 / 2.4) - 0.055;
  return Math.max(0, Math.min(255, Math.round(v * 255)));
}

const EPS = 216 / 24389;
const KAPPA = 24389 / 27;
const f = (t: number) => (t > EPS ? Math.cbrt(t) : (KAPPA * t + 16) / 116);
const finv = (t: number) => (t * t * t > EPS ? t * t * t : (116 * t - 16) / KAPPA);

/**
 * sRGB (0-255 per channel) to CIE L*a*b* (D65).
 *
 * @example srgbToLab([255, 255, 255]) // [100, 0, 0]
 */
export function srgbToLab(rgb: RGB): Lab {
  const r = srgbToLinear(rgb[0]);
  const g = srgbToLinear(rgb[1]);
  const b = srgbToLinear(rgb[2]);
  // sRGB primaries to XYZ (IEC 61966-2-1 matrix).
  const x = 0.4124564 * r + 0.3575761 * g + 0.1804375 * b;
  const y = 0.2126729 * r + 0.7151522 * g + 0.072175 * b;
  const z = 0.0193339 * r + 0.119192 * g + 0.9503041 * b;
  const fx = f(x / XN);
  const fy = f(y / YN);
  const fz = f(z / ZN);
  return [116 * fy - 16, 500 * (fx - fy), 200 * (fy - fz)];
}

/**
 * CIE L*a*b* (D65) to sRGB (0-255, rounded and clipped to the gamut).
 *
 * @example labToSrgb([53.24, 80.09, 67.2]) // [255, 0, 0]
 */
export function labToSrgb(lab: Lab): RGB {
  const fy = (lab[0] + 16) / 116;
  const fx = fy + lab[1] / 500;
  const fz = fy - lab[2] / 200;
  const x = XN * finv(fx);
  const y = YN * (lab[0] > KAPPA * EPS ? fy * fy * fy : lab[0] / KAPPA);
  const z = ZN * finv(fz);
  const r = 3.2404542 * x - 1.5371385 * y - 0.4985314 * z;
  const g = -0.969266 * x + 1.8760108 * y + 0.041556 * z;
  const b = 0.0556434 * x - 0.2040259 * y + 1.0572252 * z;
  return [linearToSrgb(r), linearToSrgb(g), linearToSrgb(b)];
}

/** Parse "#rrggbb". */
export function hexToRgb(hex: string): RGB {
  const n = parseInt(hex.slice(1), 16);
  return [(n >> 16) & 255, (n >> 8) & 255, n & 255];
}

export function rgbToHex(c: RGB): string {
  return "#" + c.map((v) => v.toString(16).padStart(2, "0")).join("");
}

/**
 * A ramp through `stops` (sRGB hex), interpolated linearly in L*a*b*, tabulated into
 * `size` entries so colouring a raster is one table lookup per cell.
 *
 * @example const table = labRamp(["#000000", "#ffffff"], 256); // table[3*i..3*i+2]
 */
export function labRamp(stops: string[], size = 256): Uint8Array {
  const labs = stops.map((s) => srgbToLab(hexToRgb(s)));
  const out = new Uint8Array(size * 3);
  for (let i = 0; i < size; i++) {
    const t = (i / (size - 1)) * (labs.length - 1);
    const k = Math.min(labs.length - 2, Math.floor(t));
    const u = t - k;
    const a = labs[k];
    const b = labs[k + 1];
    const rgb = labToSrgb([a[0] + (b[0] - a[0]) * u, a[1] + (b[1] - a[1]) * u, a[2] + (b[2] - a[2]) * u]);
    out.set(rgb, i * 3);
  }
  return out;
}

/** viridis, 10 samples from 0 to 1 (from memory, see above). */
export const VIRIDIS_STOPS = ["#440154", "#482878", "#3e4a89", "#31688e", "#26828e", "#1f9e89", "#35b779", "#6dcd59", "#b4de2c", "#fde725"];

/** Diverging stops: cool end, light neutral centre, warm end. */
export const DIVERGING_STOPS = ["#3b4cc0", "#f2f0ee", "#b40426"];

let viridisTable: Uint8Array | null = null;
let divergingTable: Uint8Array | null = null;

/** 256-entry viridis lookup table (RGB triplets). */
export function viridisTable256(): Uint8Array {
  return (viridisTable ??= labRamp(VIRIDIS_STOPS, 256));
}

/** 256-entry diverging lookup table (RGB triplets); entry 127.5 is the centre. */
export function divergingTable256(): Uint8Array {
  return (divergingTable ??= labRamp(DIVERGING_STOPS, 256));
}

/** Colour of t in [0, 1] from a table made by labRamp, as "#rrggbb". */
export function tableColour(table: Uint8Array, t: number): string {
  const n = table.length / 3;
  const i = Math.max(0, Math.min(n - 1, Math.round((Number.isFinite(t) ? t : 0) * (n - 1))));
  return rgbToHex([table[3 * i], table[3 * i + 1], table[3 * i + 2]]);
}

/**
 * Position of a GSD on the diverging scale: 0.5 at the target, 0.25 / 0.75 at the band's
 * fine / coarse edges, 0 / 1 at twice the band half-width either side (and beyond).
 *
 * @example gsdScalePosition(3.0, 3.0, 2.7, 3.3) // 0.5
 */
export function gsdScalePosition(gsdCm: number, targetCm: number, lowCm: number, highCm: number): number {
  const u = gsdCm >= targetCm ? (gsdCm - targetCm) / (highCm - targetCm) : (gsdCm - targetCm) / (targetCm - lowCm);
  return Math.max(0, Math.min(1, 0.5 + u / 4));
}

/** Inverse of gsdScalePosition (for legend ticks). */
export function gsdAtScalePosition(t: number, targetCm: number, lowCm: number, highCm: number): number {
  const u = (t - 0.5) * 4;
  return u >= 0 ? targetCm + u * (highCm - targetCm) : targetCm + u * (targetCm - lowCm);
}
