/**
 * Rasters to PNG data URIs (pngjs, synchronous), so the report embeds its maps with no
 * network and no side files. Cells outside the site or without data are transparent.
 */
import { PNG } from "pngjs";
import type { ReportRasters } from "./model.js";
import { divergingTable256, gsdScalePosition, viridisTable256 } from "./colour.js";

/**
 * Encode RGBA bytes (row-major, 4 per cell) as a `data:image/png;base64,` URI.
 *
 * @example const uri = pngDataUri(2, 1, new Uint8Array([255,0,0,255, 0,0,255,255]));
 */
export function pngDataUri(width: number, height: number, rgba: Uint8Array): string {
  const png = new PNG({ width, height });
  png.data = Buffer.from(rgba.buffer, rgba.byteOffset, rgba.byteLength);
  return "data:image/png;base64," + PNG.sync.write(png, { colorType: 6 }).toString("base64");
}

/**
 * Hill shade (0..1, NaN nodata) as grey RGBA. The grey range starts at 60, not 0, so
 * the lines and labels drawn on top stay readable in the deepest shadows.
 *
 * @example shadeRgba(hillshade()(grid))
 */
export function shadeRgba(shade: Float32Array): Uint8Array {
  const out = new Uint8Array(shade.length * 4);
  for (let i = 0; i < shade.length; i++) {
    const s = shade[i];
    if (s !== s) continue;
    const g = Math.round(60 + 195 * s);
    out[4 * i] = g;
    out[4 * i + 1] = g;
    out[4 * i + 2] = g;
    out[4 * i + 3] = 255;
  }
  return out;
}

/**
 * GSD on the diverging scale centred on the target (colour.ts gsdScalePosition).
 *
 * @example gsdRgba(rasters, 3, 2.7, 3.3)
 */
export function gsdRgba(r: ReportRasters, targetCm: number, lowCm: number, highCm: number): Uint8Array {
  const table = divergingTable256();
  const out = new Uint8Array(r.width * r.height * 4);
  for (let i = 0; i < r.gsdCm.length; i++) {
    const v = r.gsdCm[i];
    if (!r.inSite[i] || v !== v) continue;
    const k = Math.round(gsdScalePosition(v, targetCm, lowCm, highCm) * 255);
    out[4 * i] = table[3 * k];
    out[4 * i + 1] = table[3 * k + 1];
    out[4 * i + 2] = table[3 * k + 2];
    out[4 * i + 3] = 255;
  }
  return out;
}

/**
 * Image count on viridis, 0 at the dark end and `maxCount` (or more) at the light end.
 *
 * @example imagesRgba(rasters, 12)
 */
export function imagesRgba(r: ReportRasters, maxCount: number): Uint8Array {
  const table = viridisTable256();
  const out = new Uint8Array(r.width * r.height * 4);
  const m = Math.max(1, maxCount);
  for (let i = 0; i < r.images.length; i++) {
    if (!r.inSite[i]) continue;
    const k = Math.round(Math.min(1, r.images[i] / m) * 255);
    out[4 * i] = table[3 * k];
    out[4 * i + 1] = table[3 * k + 1];
    out[4 * i + 2] = table[3 * k + 2];
    out[4 * i + 3] = 255;
  }
  return out;
}
