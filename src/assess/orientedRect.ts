/**
 * Which grid cells of one row have their centre inside an oriented rectangle.
 *
 * Footprints and station zones are rectangles turned to the track heading. A
 * bounding box of a diagonal rectangle holds up to twice its area (and far
 * more for the long, thin station zones), so each row is clipped to the exact
 * span instead: the rectangle is convex, so its intersection with a
 * horizontal line is one interval, found from the two slab constraints
 * |along| <= halfAlong and |across| <= halfAcross.
 */

/**
 * Column span [out[0], out[1]] (inclusive; empty when out[0] > out[1]) of the
 * cells whose centre x lies in the rectangle on the horizontal line y = rowY.
 * The rectangle is centred on (px, py), halfAlongM along the unit vector
 * (ux, uy) and halfAcrossM along (uy, -ux). Columns are clamped to [0, width - 1].
 * (orientedRectColSpans for one row at rowY: rowY + 0.5 * 0 is rowY.)
 * @example
 * const span = new Int32Array(2);
 * orientedRectColSpan(y, px, py, 1, 0, 10, 5, grid.transform.x0, grid.transform.dx, grid.width, span);
 * for (let c = span[0]; c <= span[1]; c++) { ... }
 */
export function orientedRectColSpan(
  rowY: number,
  px: number,
  py: number,
  ux: number,
  uy: number,
  halfAlongM: number,
  halfAcrossM: number,
  x0: number,
  dx: number,
  width: number,
  out: Int32Array,
): void {
  orientedRectColSpans(rowY, 0, 0, 0, px, py, ux, uy, halfAlongM, halfAcrossM, x0, dx, width, out);
}

/**
 * orientedRectColSpan for rows rA..rB whose centre lines lie at y0 + (r + 0.5) dy: row r's
 * span in out[2 (r - rA)] and out[2 (r - rA) + 1]. One call for a run of rows: too large for
 * the engine to inline, the one-row call boxed its nine numbers for every row of every
 * footprint (the coverage sweep: ~0.5 M calls a thread at 4 km2).
 * @example orientedRectColSpans(grid.transform.y0, grid.transform.dy, 10, 41, px, py, 1, 0, 10, 5, x0, dx, width, spans)
 */
export function orientedRectColSpans(
  y0: number,
  dy: number,
  rA: number,
  rB: number,
  px: number,
  py: number,
  ux: number,
  uy: number,
  halfAlongM: number,
  halfAcrossM: number,
  x0: number,
  dx: number,
  width: number,
  out: Int32Array,
): void {
  for (let r = rA, o = 0; r <= rB; r++, o += 2) {
    const dY = y0 + (r + 0.5) * dy - py;
    let lo = -Infinity;
    let hi = Infinity;
    // Slab 1: |(X - px) ux + dY uy| <= halfAlong.
    const aY = dY * uy;
    if (Math.abs(ux) < 1e-12) {
      if (Math.abs(aY) > halfAlongM) lo = Infinity;
    } else {
      const t1 = (-halfAlongM - aY) / ux;
      const t2 = (halfAlongM - aY) / ux;
      lo = Math.max(lo, Math.min(t1, t2));
      hi = Math.min(hi, Math.max(t1, t2));
    }
    // Slab 2: across unit (vx, vy) = (uy, -ux): |(X - px) uy - dY ux| <= halfAcross.
    const cY = -dY * ux;
    if (Math.abs(uy) < 1e-12) {
      if (Math.abs(cY) > halfAcrossM) lo = Infinity;
    } else {
      const t1 = (-halfAcrossM - cY) / uy;
      const t2 = (halfAcrossM - cY) / uy;
      lo = Math.max(lo, Math.min(t1, t2));
      hi = Math.min(hi, Math.max(t1, t2));
    }
    if (!(lo <= hi)) {
      out[o] = 0;
      out[o + 1] = -1;
      continue;
    }
    // Cell c has its centre at x0 + (c + 0.5) dx (dx > 0).
    let c0 = Math.ceil((px + lo - x0) / dx - 0.5);
    let c1 = Math.floor((px + hi - x0) / dx - 0.5);
    if (c0 < 0) c0 = 0;
    if (c1 > width - 1) c1 = width - 1;
    out[o] = c0;
    out[o + 1] = c1;
  }
}

/**
 * Row range [out[0], out[1]] (inclusive, clamped) of the cells whose centre y can lie in
 * an oriented rectangle centred on py (rows grow southwards, dy < 0).
 * @example orientedRectRowRange(py, 1, 0, 10, 5, y0, dy, height, rows)
 */
export function orientedRectRowRange(
  py: number,
  ux: number,
  uy: number,
  halfAlongM: number,
  halfAcrossM: number,
  y0: number,
  dy: number,
  height: number,
  out: Int32Array,
): void {
  const ext = Math.abs(uy) * halfAlongM + Math.abs(ux) * halfAcrossM;
  // Row r has its centre at y0 + (r + 0.5) dy; dy < 0, so the top edge gives the smallest row.
  let r0 = Math.ceil((py + ext - y0) / dy - 0.5);
  let r1 = Math.floor((py - ext - y0) / dy - 0.5);
  if (r0 < 0) r0 = 0;
  if (r1 > height - 1) r1 = height - 1;
  out[0] = r0;
  out[1] = r1;
}
