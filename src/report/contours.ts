/**
 * Contour lines and mask outlines from d3-contour's marching squares.
 *
 * d3-contour returns filled MultiPolygons whose rings also run along the grid's frame and
 * around nodata holes (it treats invalid values as -Infinity). For lines we cut those
 * rings into polylines and drop the stretches that run along the frame or hug nodata, so
 * only true isolines remain. Coordinates come back in the grid's column/row space
 * (0..width, 0..height; cell centres at +0.5), which the map converts to its own units.
 */
import { contours } from "d3-contour";
import type { ReportGrid } from "./model.js";

export type Polyline = number[]; // flat [c0, r0, c1, r1, ...]

export interface ContourLine {
  valueM: number;
  lines: Polyline[];
}

/**
 * A contour interval of 1, 2 or 5 x 10^k giving about 10 to 20 lines over [minM, maxM]
 * (the one whose line count is nearest 15).
 *
 * @example contourInterval(212, 398) // 10 (18 lines)
 */
export function contourInterval(minM: number, maxM: number): number {
  const span = maxM - minM;
  if (!(span > 0)) return 1;
  let best = 1;
  let bestScore = Infinity;
  const k0 = Math.floor(Math.log10(span / 15));
  for (let k = k0 - 1; k <= k0 + 1; k++)
    for (const m of [1, 2, 5]) {
      const step = m * Math.pow(10, k);
      const count = Math.floor(maxM / step) - Math.ceil(minM / step) + 1;
      const score = Math.abs(count - 15) + (count < 10 || count > 20 ? 100 : 0);
      if (score < bestScore) {
        bestScore = score;
        best = step;
      }
    }
  return +best.toPrecision(12);
}

/**
 * Contour lines of the heights at multiples of `intervalM`.
 *
 * @example const lines = contourLines(dem, 10);
 */
export function contourLines(grid: Pick<ReportGrid, "width" | "height" | "heights">, intervalM: number): ContourLine[] {
  const { width: w, height: h, heights } = grid;
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < heights.length; i++) {
    const v = heights[i];
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  if (!(hi > lo)) return [];
  const levels: number[] = [];
  for (let v = Math.ceil(lo / intervalM) * intervalM; v <= hi; v += intervalM) levels.push(+v.toPrecision(12));
  // Cells whose 2x2 neighbourhood holds nodata: a ring vertex there is an artefact.
  const gen = contours().size([w, h]).thresholds(levels);
  const values = Array.from(heights);
  const out: ContourLine[] = [];
  for (const mp of gen(values)) {
    const lines: Polyline[] = [];
    for (const poly of mp.coordinates) for (const ring of poly) splitRing(ring as [number, number][], w, h, heights, lines);
    if (lines.length) out.push({ valueM: mp.value, lines });
  }
  return out;
}

/**
 * Outline rings of the cells where `mask` is non-zero, on cell edges. Rings are flat
 * [c, r, ...] closed loops (outer rings and holes alike; draw with fill-rule evenodd).
 *
 * @example const rings = maskOutline(flags.map((f) => f & 8), w, h);
 */
export function maskOutline(mask: ArrayLike<number>, w: number, h: number): Polyline[] {
  const values = new Array<number>(w * h);
  let any = false;
  for (let i = 0; i < w * h; i++) {
    values[i] = mask[i] ? 1 : 0;
    if (mask[i]) any = true;
  }
  if (!any) return [];
  // Unsmoothed: vertices sit half-way between a 1 and a 0 cell centre, i.e. on the cell
  // boundary, with corners cut diagonally (a staircase with chamfers).
  const mp = contours().size([w, h]).smooth(false).contour(values, 0.5);
  const rings: Polyline[] = [];
  for (const poly of mp.coordinates)
    for (const ring of poly) {
      const flat: number[] = [];
      for (const [c, r] of ring as [number, number][]) flat.push(c, r);
      rings.push(flat);
    }
  return rings;
}

function splitRing(ring: [number, number][], w: number, h: number, heights: Float32Array, out: Polyline[]): void {
  const n = ring.length;
  let cur: number[] = [];
  const flush = () => {
    if (cur.length >= 4) out.push(cur);
    cur = [];
  };
  for (let i = 0; i + 1 < n; i++) {
    const a = ring[i];
    const b = ring[i + 1];
    const bad = artefact(a, w, h, heights) && artefact(b, w, h, heights);
    if (bad) {
      flush();
      continue;
    }
    if (cur.length === 0) cur.push(a[0], a[1]);
    cur.push(b[0], b[1]);
  }
  flush();
}

/** On the frame, or next to a nodata cell. */
function artefact(p: [number, number], w: number, h: number, heights: Float32Array): boolean {
  const [x, y] = p;
  if (x <= 0 || y <= 0 || x >= w || y >= h) return true;
  // The sample cells nearest the vertex (cell centres at +0.5).
  const c0 = Math.max(0, Math.min(w - 1, Math.floor(x - 0.5)));
  const c1 = Math.max(0, Math.min(w - 1, Math.ceil(x - 0.5)));
  const r0 = Math.max(0, Math.min(h - 1, Math.floor(y - 0.5)));
  const r1 = Math.max(0, Math.min(h - 1, Math.ceil(y - 0.5)));
  const a = heights[r0 * w + c0], b = heights[r0 * w + c1], c = heights[r1 * w + c0], d = heights[r1 * w + c1];
  return a !== a || b !== b || c !== c || d !== d;
}
