import { describe, it, expect } from "vitest";
import { orientedRectColSpan, orientedRectColSpans } from "../../src/assess/orientedRect.js";

/*
 * Reference: the definition, cell by cell: cell c of a row has its centre (x0 + (c + 0.5) dx,
 * rowY) inside the rectangle centred on (px, py), turned to (ux, uy), when its offsets along
 * (ux, uy) and across (uy, -ux) are within the half sizes. Random rectangles, so no centre
 * falls on an edge to within rounding.
 */
function definition(rowY: number, px: number, py: number, ux: number, uy: number, hA: number, hC: number, x0: number, dx: number, width: number): [number, number] {
  let lo = width, hi = -1;
  for (let c = 0; c < width; c++) {
    const x = x0 + (c + 0.5) * dx - px, y = rowY - py;
    if (Math.abs(x * ux + y * uy) <= hA && Math.abs(x * uy - y * ux) <= hC) {
      lo = Math.min(lo, c);
      hi = Math.max(hi, c);
    }
  }
  return hi < 0 ? [0, -1] : [lo, hi];
}

describe("orientedRectColSpans: the cells of a run of rows inside a turned rectangle", () => {
  it("equal the definition cell by cell, and orientedRectColSpan row by row", () => {
    let s = 7;
    const rnd = () => ((s = (s * 1103515245 + 12345) % 2147483648) / 2147483648);
    const width = 120, x0 = 1000, dx = 0.5, y0 = 2060, dy = -0.5;
    const spans = new Int32Array(2 * 80), one = new Int32Array(2);
    let nonEmpty = 0, empty = 0;
    for (let t = 0; t < 60; t++) {
      const h = rnd() * 2 * Math.PI;
      const ux = t % 10 === 0 ? 0 : Math.sin(h), uy = t % 10 === 0 ? 1 : Math.cos(h);
      const px = x0 + rnd() * width * dx, py = y0 + (10 + rnd() * 60) * dy;
      const hA = 2 + rnd() * 15, hC = 1 + rnd() * 10;
      const rA = Math.floor(rnd() * 40), rB = rA + Math.floor(rnd() * 79);
      orientedRectColSpans(y0, dy, rA, rB, px, py, ux, uy, hA, hC, x0, dx, width, spans);
      for (let r = rA; r <= rB; r++) {
        const rowY = y0 + (r + 0.5) * dy;
        const want = definition(rowY, px, py, ux, uy, hA, hC, x0, dx, width);
        const got = [spans[2 * (r - rA)], spans[2 * (r - rA) + 1]];
        // An empty span is any first column past the last.
        if (want[0] > want[1]) expect([t, r, got[0] > got[1]]).toEqual([t, r, true]);
        else expect([t, r, ...got]).toEqual([t, r, ...want]);
        orientedRectColSpan(rowY, px, py, ux, uy, hA, hC, x0, dx, width, one);
        expect([t, r, one[0], one[1]]).toEqual([t, r, ...got]);
        if (want[0] <= want[1]) nonEmpty++;
        else empty++;
      }
    }
    expect(nonEmpty).toBeGreaterThan(500);
    expect(empty).toBeGreaterThan(100);
  });
});
