/** The GSD histogram against the band, as SVG. */
import type { Histogram } from "./model.js";
import { divergingTable256, gsdScalePosition, tableColour } from "./colour.js";
import { fmt } from "./format.js";
import { niceStep, ticks } from "./nice.js";

const W = 560, H = 270, ML = 46, MR = 12, MT = 26, MB = 40;

/**
 * Bars: share of site cells per GSD bin, coloured as on the GSD map; the band shaded,
 * the target marked; the constant-altitude baseline as an outline when given.
 *
 * @example gsdHistogramSvg(h, 3, 2.7, 3.3)
 */
export function gsdHistogramSvg(h: Histogram, targetCm: number, lowCm: number, highCm: number, baseline?: Histogram): string {
  const e = h.edgesCm;
  const total = h.counts.reduce((a, b) => a + b, 0) + h.under + h.over || 1;
  const btotal = baseline ? baseline.counts.reduce((a, b) => a + b, 0) + baseline.under + baseline.over || 1 : 1;
  const pct = h.counts.map((c) => (100 * c) / total);
  const bpct = baseline && baseline.edgesCm.length === e.length ? baseline.counts.map((c) => (100 * c) / btotal) : null;
  const yMax = Math.max(1, ...pct, ...(bpct ?? [])) * 1.1;
  const x = (g: number) => ML + ((g - e[0]) / (e[e.length - 1] - e[0])) * (W - ML - MR);
  const y = (p: number) => MT + (1 - p / yMax) * (H - MT - MB);
  const table = divergingTable256();
  let bars = "";
  for (let i = 0; i < pct.length; i++) {
    const x0 = x(e[i]);
    const x1 = x(e[i + 1]);
    const c = tableColour(table, gsdScalePosition((e[i] + e[i + 1]) / 2, targetCm, lowCm, highCm));
    bars += `<rect x="${x0.toFixed(1)}" y="${y(pct[i]).toFixed(1)}" width="${Math.max(0.5, x1 - x0 - 1).toFixed(1)}" height="${(y(0) - y(pct[i])).toFixed(1)}" fill="${c}" stroke="#444" stroke-width="0.4"/>`;
  }
  let base = "";
  if (bpct) {
    let d = `M${x(e[0]).toFixed(1)},${y(0).toFixed(1)}`;
    for (let i = 0; i < bpct.length; i++) d += `V${y(bpct[i]).toFixed(1)}H${x(e[i + 1]).toFixed(1)}`;
    d += `V${y(0).toFixed(1)}`;
    base = `<path class="baseline-hist" d="${d}" fill="none" stroke="#111" stroke-width="1.4" stroke-dasharray="5 3"/>`;
  }
  let axes = "";
  for (const p of ticks(0, yMax, niceStep(yMax, 5)))
    axes += `<line x1="${ML}" x2="${W - MR}" y1="${y(p).toFixed(1)}" y2="${y(p).toFixed(1)}" stroke="#000" stroke-opacity="0.08"/><text x="${ML - 6}" y="${(y(p) + 4).toFixed(1)}" text-anchor="end">${fmt(p)}</text>`;
  for (const g of ticks(e[0], e[e.length - 1], niceStep(e[e.length - 1] - e[0], 7)))
    axes += `<line x1="${x(g).toFixed(1)}" x2="${x(g).toFixed(1)}" y1="${H - MB}" y2="${H - MB + 4}" stroke="#333"/><text x="${x(g).toFixed(1)}" y="${H - MB + 16}" text-anchor="middle">${fmt(g, 2)}</text>`;
  const outside =
    (h.under ? `${fmt((100 * h.under) / total, 1)} % of cells finer than ${fmt(e[0], 2)} · ` : "") +
    (h.over ? `${fmt((100 * h.over) / total, 1)} % coarser than ${fmt(e[e.length - 1], 2)}` : "");
  return (
    `<svg class="chart" id="gsd-histogram" viewBox="0 0 ${W} ${H}" xmlns="http://www.w3.org/2000/svg" role="img" aria-label="Histogram of GSD over the site">` +
    `<rect x="${x(lowCm).toFixed(1)}" y="${MT}" width="${(x(highCm) - x(lowCm)).toFixed(1)}" height="${H - MT - MB}" fill="#31a354" fill-opacity="0.12"/>` +
    axes +
    bars +
    base +
    `<line x1="${x(targetCm).toFixed(1)}" x2="${x(targetCm).toFixed(1)}" y1="${MT}" y2="${H - MB}" stroke="#111" stroke-width="1.5"/>` +
    `<text x="${x(targetCm).toFixed(1)}" y="${MT - 8}" text-anchor="middle">target ${fmt(targetCm, 2)}</text>` +
    `<text x="${x(lowCm).toFixed(1)}" y="${MT + 12}" text-anchor="end" class="small">band ${fmt(lowCm, 2)} </text>` +
    `<text x="${x(highCm).toFixed(1)}" y="${MT + 12}" class="small"> ${fmt(highCm, 2)}</text>` +
    `<text x="${(ML + W - MR) / 2}" y="${H - 6}" text-anchor="middle" class="small">nadir GSD, cm/px${outside ? " — " + outside : ""}${bpct ? " — dashed: one constant altitude" : ""}</text>` +
    `<text x="14" y="${(MT + (H - MT - MB) / 2).toFixed(1)}" transform="rotate(-90 14 ${(MT + (H - MT - MB) / 2).toFixed(1)})" text-anchor="middle" class="small">% of site cells</text>` +
    `</svg>`
  );
}
