import { describe, it, expect } from "vitest";
import { extremaInRadius, makeGrid } from "../../src/dem/sample.js";
import { maxGroundInRadius } from "../../src/solve/clearance.js";
import { discBlocks } from "../../src/solve/discBlocks.js";

/*
 * The blocks a disc covers, classed once per part of a block (discBlocks.ts), checked by
 * plain geometry at stations drawn within each part: an inside block has every cell centre
 * within the radius, and every block with a cell centre within the radius is inside or rim.
 * Then the solver's disc maximum built on them against the plain scan of every cell
 * (extremaInRadius) along lines of stations, on square and on oblong cells.
 */

describe("a disc's blocks by the station's place within its block", () => {
  for (const [k, adx, ady, radiusM] of [[5, 0.5, 0.5, 16.2], [4, 0.3, 0.7, 11], [4, 1, 1, 31.5]] as const) {
    it(`k ${k}, cells ${adx} x ${ady} m, radius ${radiusM} m`, () => {
      const pw = 1000;
      const d = discBlocks({}, k, pw, adx, ady, radiusM);
      let seed = 5;
      const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
      let checked = 0;
      for (let p = 0; p < d.bins * d.bins; p++) {
        const ix = p % d.bins, iy = Math.floor(p / d.bins);
        const inside = new Set(d.inside.subarray(d.insideAt[p], d.insideAt[p + 1]));
        const rim = new Set(d.rim.subarray(d.rimAt[p], d.rimAt[p + 1]));
        for (const o of inside) expect(rim.has(o)).toBe(false);
        for (let t = 0; t < 3; t++) {
          // A station in part p, in cell-centre units from its block's first centre.
          const sx = ((ix + rnd()) * k) / d.bins, sy = ((iy + rnd()) * k) / d.bins;
          for (let dbr = -d.reach - 1; dbr <= d.reach + 1; dbr++) {
            for (let dbc = -d.reach - 1; dbc <= d.reach + 1; dbc++) {
              let all = true, any = false;
              for (let r = 0; r < k; r++) {
                for (let c = 0; c < k; c++) {
                  const dist = Math.hypot((dbc * k + c - sx) * adx, (dbr * k + r - sy) * ady);
                  if (dist <= radiusM) any = true;
                  else all = false;
                }
              }
              const o = dbr * pw + dbc;
              if (inside.has(o)) expect(all, `part ${p} block ${dbr},${dbc}`).toBe(true);
              if (any) expect(inside.has(o) || rim.has(o), `part ${p} block ${dbr},${dbc}`).toBe(true);
              checked++;
            }
          }
        }
      }
      expect(checked).toBeGreaterThan(10000);
      // The classes are tight: more of the disc's blocks count whole than are scanned.
      expect(d.inside.length).toBeGreaterThan(d.rim.length);
    });
  }
});

describe("maxGroundInRadius on the disc's blocks equals the full disc scan along lines of stations", () => {
  for (const [cellX, cellY, radiusM, holes] of [[0.5, 0.5, 16.2, 0], [0.5, 0.5, 16.2, 6], [0.4, 0.7, 12.5, 4]] as const) {
    it(`cells ${cellX} x ${cellY} m, radius ${radiusM} m, ${holes} nodata cells`, () => {
      const width = 300, height = 260;
      let seed = 17 + holes;
      const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
      const square = makeGrid({ width, height, x0: 1000, y0: 5000 + height * cellY, cellM: cellX, heights: new Float32Array(width * height) });
      const grid = { ...square, transform: { x0: 1000, y0: 5000 + height * cellY, dx: cellX, dy: -cellY }, cellSizeM: [cellX, cellY] as [number, number] };
      for (let r = 0; r < height; r++) {
        for (let c = 0; c < width; c++) {
          const x = c * cellX, y = r * cellY;
          grid.heights[r * width + c] = 30 * Math.sin(x / 19) * Math.cos(y / 13) + 0.4 * x + 4 * rnd();
        }
      }
      for (let i = 0; i < holes; i++) grid.heights[Math.floor(rnd() * grid.heights.length)] = NaN;
      // Lines of stations every half metre at several headings, from edge to edge and past it.
      const xs: number[] = [], ys: number[] = [];
      for (const deg of [0, 17, 45, 90, 133]) {
        const a = (deg * Math.PI) / 180;
        const cx = 1000 + (width * cellX) / 2, cy = 5000 + (height * cellY) / 2;
        for (let s = -90; s <= 90; s += 0.5) {
          xs.push(cx + s * Math.sin(a) + 3 * Math.cos(a));
          ys.push(cy + s * Math.cos(a) - 3 * Math.sin(a));
        }
      }
      const n = xs.length;
      const want = new Float64Array(n), got = new Float64Array(n);
      extremaInRadius(grid, xs, ys, radiusM, want);
      maxGroundInRadius(grid, xs, ys, radiusM, got);
      let known = 0, nan = 0;
      for (let i = 0; i < n; i++) {
        expect([i, got[i]]).toEqual([i, want[i]]);
        if (want[i] === want[i]) known++;
        else nan++;
      }
      expect(known).toBeGreaterThan(700);
      expect(nan).toBeGreaterThan(50);
    });
  }
});
