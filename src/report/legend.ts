/** Legends with units, as small SVGs. */
import { divergingTable256, gsdAtScalePosition, gsdScalePosition, tableColour, viridisTable256 } from "./colour.js";
import { esc } from "./escape.js";
import { fmt } from "./format.js";
import { BLOCK_COLOUR, KEEP_OUT_COLOUR, RANGE_DASH, TAKEOFF_COLOUR, hatchPattern, keepOutHatch, takeoffTriangle } from "./map.js";
import { niceStep, ticks } from "./nice.js";

function bar(table: Uint8Array, x: number, y: number, w: number, h: number, steps = 64): string {
  let s = "";
  for (let i = 0; i < steps; i++) {
    s += `<rect x="${(x + (i * w) / steps).toFixed(1)}" y="${y}" width="${(w / steps + 0.6).toFixed(1)}" height="${h}" fill="${tableColour(table, (i + 0.5) / steps)}"/>`;
  }
  return s + `<rect x="${x}" y="${y}" width="${w}" height="${h}" fill="none" stroke="#555" stroke-width="0.6"/>`;
}

/**
 * GSD legend: the diverging bar from twice the band half-width finer to twice coarser,
 * the band marked, and the hatch that marks cells outside it.
 */
export function gsdLegend(targetCm: number, lowCm: number, highCm: number, hatchId: string): string {
  const W = 470, x0 = 20, y0 = 22, bw = 300, bh = 14;
  const table = divergingTable256();
  const pos = (g: number) => x0 + gsdScalePosition(g, targetCm, lowCm, highCm) * bw;
  const marks = [gsdAtScalePosition(0, targetCm, lowCm, highCm), lowCm, targetCm, highCm, gsdAtScalePosition(1, targetCm, lowCm, highCm)];
  let t = "";
  for (const g of marks) {
    const x = pos(g).toFixed(1);
    t += `<line x1="${x}" x2="${x}" y1="${y0 + bh}" y2="${y0 + bh + 4}" stroke="#333"/><text x="${x}" y="${y0 + bh + 15}" text-anchor="middle">${fmt(g, 2)}</text>`;
  }
  const bx = pos(lowCm), ex = pos(highCm);
  return (
    `<svg class="legend" viewBox="0 0 ${W} 72" xmlns="http://www.w3.org/2000/svg" role="img" aria-label="GSD colour scale in cm per pixel">` +
    `<defs>${hatchPattern(hatchId, "#111", 45, 6)}</defs>` +
    `<text x="${x0}" y="12" font-weight="600">Nadir GSD, cm/px</text>` +
    `<text x="${(bx + ex) / 2}" y="12" text-anchor="middle" class="small">band</text>` +
    `<path d="M${bx.toFixed(1)},${y0 - 3}V${y0 - 6}H${ex.toFixed(1)}V${y0 - 3}" fill="none" stroke="#333"/>` +
    bar(table, x0, y0, bw, bh) +
    t +
    `<rect x="${x0 + bw + 22}" y="${y0}" width="22" height="${bh}" fill="#ddd" stroke="#555" stroke-width="0.6"/>` +
    `<rect x="${x0 + bw + 22}" y="${y0}" width="22" height="${bh}" fill="url(#${esc(hatchId)})"/>` +
    `<text x="${x0 + bw + 50}" y="${y0 + 11}">outside band</text>` +
    `<text x="${x0}" y="${y0 + bh + 30}" class="small">finer ← → coarser; ends saturate at twice the band half-width</text></svg>`
  );
}

/**
 * A sequential (viridis) legend from `lo` to `hi` with nice ticks.
 *
 * @example sequentialLegend("Height above ground", "m", 80, 120)
 */
export function sequentialLegend(title: string, unit: string, lo: number, hi: number, extra = ""): string {
  const W = 470, x0 = 20, y0 = 22, bw = 300, bh = 14;
  const table = viridisTable256();
  const span = hi - lo || 1;
  const step = niceStep(span, 5);
  let t = "";
  for (const v of ticks(lo, hi, step)) {
    const x = (x0 + ((v - lo) / span) * bw).toFixed(1);
    t += `<line x1="${x}" x2="${x}" y1="${y0 + bh}" y2="${y0 + bh + 4}" stroke="#333"/><text x="${x}" y="${y0 + bh + 15}" text-anchor="middle">${fmt(v)}</text>`;
  }
  return (
    `<svg class="legend" viewBox="0 0 ${W} 72" xmlns="http://www.w3.org/2000/svg" role="img" aria-label="${esc(title)} in ${esc(unit)}">` +
    `<text x="${x0}" y="12" font-weight="600">${esc(title)}, ${esc(unit)}</text>` +
    bar(table, x0, y0, bw, bh) +
    t +
    extra +
    `</svg>`
  );
}

/**
 * Legend for keep-out zones: the zone's hatch, and the dashed buffer when any zone has one.
 * Empty when there are no zones.
 *
 * @example keepOutLegend([{ bufferM: 20 }], "hatch-keep-out-legend") // "<svg ...>keep-out zone ... buffer ...</svg>"
 */
export function keepOutLegend(zones: { bufferM: number }[], hatchId: string): string {
  if (!zones.length) return "";
  const buffers = [...new Set(zones.map((z) => z.bufferM).filter((b) => b > 0))].sort((a, b) => a - b);
  const x0 = 20, y0 = 6, sw = 22, sh = 14;
  let body =
    `<g class="legend-keep-out"><rect x="${x0}" y="${y0}" width="${sw}" height="${sh}" fill="url(#${esc(hatchId)})" stroke="${KEEP_OUT_COLOUR}" stroke-width="1.6"/>` +
    `<text x="${x0 + sw + 6}" y="${y0 + 11}">keep-out zone</text></g>`;
  if (buffers.length) {
    const x1 = 170;
    // One distance in words when all zones share it; else the range.
    const words = buffers.length === 1 ? `${fmt(buffers[0])} m` : `${fmt(buffers[0])}–${fmt(buffers[buffers.length - 1])} m`;
    body +=
      `<g class="legend-keep-out-buffer"><rect x="${x1}" y="${y0}" width="${sw}" height="${sh}" fill="${KEEP_OUT_COLOUR}" fill-opacity="0.1" stroke="${KEEP_OUT_COLOUR}" stroke-width="1.3" stroke-dasharray="6 4"/>` +
      `<text x="${x1 + sw + 6}" y="${y0 + 11}">buffer (${esc(words)}): no leg enters</text></g>`;
  }
  return (
    `<svg class="legend keep-out-legend" viewBox="0 0 470 26" xmlns="http://www.w3.org/2000/svg" role="img" aria-label="Keep-out zones${buffers.length ? " and their buffers" : ""}">` +
    `<defs>${keepOutHatch(hatchId, 6)}</defs>${body}</svg>`
  );
}

/**
 * Legend for blocks and ranges: the numbered take-off marker, a proposed (hollow) one when
 * any point was proposed, the dashed range circle with its radius, and the block outline.
 * Entries flow left to right and wrap; empty when there is nothing to explain (one block
 * and no range limit).
 *
 * @example blocksLegend({ blocks: 2, proposed: true, rangeM: 500 }) // "<svg ...>take-off point (block n) ... range (500 m) ... block</svg>"
 */
export function blocksLegend(o: { blocks: number; proposed: boolean; rangeM: number }): string {
  const W = 470, rowH = 22, sw = 26;
  const entries: { key: string; swatch: (x: number, y: number) => string; text: string }[] = [];
  const marker = (hollow: boolean, label: string) => (x: number, y: number) => {
    const cx = x + 9, cy = y + 8;
    const fill = hollow ? `fill="#fff" stroke="${TAKEOFF_COLOUR}" stroke-width="2.2"` : `fill="${TAKEOFF_COLOUR}" stroke="#fff" stroke-width="1.5"`;
    return `<path d="${takeoffTriangle(cx, cy)}" transform="translate(${cx} ${cy}) scale(0.8) translate(${-cx} ${-cy})" ${fill}/>${label ? `<text x="${x + 18}" y="${y + 12}" font-weight="600">${esc(label)}</text>` : ""}`;
  };
  if (o.blocks > 1) {
    entries.push({ key: "takeoff", swatch: marker(false, "n"), text: "take-off point (block n)" });
    if (o.proposed) entries.push({ key: "proposed", swatch: marker(true, ""), text: "proposed take-off point: the pilot must confirm access" });
  }
  if (o.rangeM > 0) {
    entries.push({
      key: "range",
      swatch: (x, y) => `<path d="M${x},${y + 14}A${sw},${sw} 0 0 1 ${x + sw},${y + 2}" fill="none" stroke="${TAKEOFF_COLOUR}" stroke-width="1.6" stroke-dasharray="${RANGE_DASH}"/>`,
      text: `range (${o.rangeM >= 1000 ? `${fmt(o.rangeM / 1000)} km` : `${fmt(o.rangeM)} m`})`,
    });
  }
  if (o.blocks > 1) {
    entries.push({
      key: "block",
      swatch: (x, y) => `<rect x="${x}" y="${y + 2}" width="${sw}" height="12" fill="${BLOCK_COLOUR}" fill-opacity="0.05" stroke="${BLOCK_COLOUR}" stroke-width="2" stroke-opacity="0.55"/>`,
      text: "block",
    });
  }
  if (!entries.length) return "";
  let x = 20, y = 4, body = "";
  for (const e of entries) {
    // About 6.2 units a character at the legend's 11 px: enough to keep entries apart.
    const w = sw + 30 + Math.ceil(e.text.length * 6.2);
    if (x > 20 && x + w > W) (x = 20), (y += rowH);
    body += `<g class="legend-entry" data-entry="${e.key}">${e.swatch(x, y)}<text x="${x + sw + 8}" y="${y + 12}">${esc(e.text)}</text></g>`;
    x += w;
  }
  return `<svg class="legend blocks-legend" viewBox="0 0 ${W} ${y + rowH}" xmlns="http://www.w3.org/2000/svg" role="img" aria-label="Blocks, their take-off points and ranges">${body}</svg>`;
}
