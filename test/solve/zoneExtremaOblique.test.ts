import { describe, it, expect } from "vitest";
import { extremaInOrientedRect, makeGrid } from "../../src/dem/sample.js";
import { zoneExtremaAlongLine } from "../../src/solve/zoneExtrema.js";
import { stationsAlongLeg } from "../../src/solve/stations.js";
import { zoneExtremaSortedReference } from "./zoneExtremaSortedReference.js";

/*
 * zoneExtremaAlongLine on legs at any heading against two references: the
 * former general path (every band cell sorted along the leg,
 * zoneExtremaSortedReference, kept beside this test) and extremaInOrientedRect
 * (src/dem/sample.ts), which tests every cell of each zone's bounding box
 * station by station. The results must be the same bits (NaN where a zone
 * meets nodata or leaves the grid), not equal within a tolerance.
 */

/** The small pseudo-random generator of zoneExtrema.test.ts, for repeatable cases. */
function rng(seed: number): () => number {
  let s = seed;
  return () => (s = (s * 1103515245 + 12345) % 2147483648) / 2147483648;
}

interface Case {
  cellM: number;
  size: number;
  headingRad: number;
  from: [number, number];
  lengthM: number;
  stepM: number;
  halfAlongM: number;
  halfAcrossM: number;
  quantised: boolean;
}

/** Index of the first value whose bits differ, -1 when all are the same. */
function firstDifference(a: Float64Array, b: Float64Array): number {
  const ua = new Uint32Array(a.buffer, a.byteOffset, a.length * 2), ub = new Uint32Array(b.buffer, b.byteOffset, b.length * 2);
  for (let j = 0; j < ua.length; j++) if (ua[j] !== ub[j]) return j >> 1;
  return -1;
}

function run(c: Case, seed: number): { n: number; nan: number } {
  const rnd = rng(seed);
  // Grid corner at projected coordinates of the size a UTM zone gives (rounding as in real use).
  const x0 = 500000 + Math.floor(rnd() * 1000) * c.cellM, y0 = 5200000 + Math.floor(rnd() * 1000) * c.cellM;
  const grid = makeGrid({
    width: c.size, height: c.size, x0, y0, cellM: c.cellM,
    heights: (x, y) => {
      const z = 30 * Math.sin((x - x0) / 13) * Math.cos((y - y0) / 9) + 4 * rnd();
      // Quantised: many equal heights. "+ 0" turns -0 into 0: a tie of 0 and -0 comes out as
      // either, by the order the cells are visited, which differs between the three methods.
      return c.quantised ? Math.round(z / 2) * 2 + 0 : z;
    },
  });
  // Nodata: scattered cells and a few rectangular holes.
  const H = grid.heights;
  for (let k = 0; k < 4; k++) H[Math.floor(rnd() * H.length)] = NaN;
  for (let k = 0; k < 2; k++) {
    const r0 = Math.floor(rnd() * c.size), c0 = Math.floor(rnd() * c.size), hh = 1 + Math.floor(rnd() * 6), ww = 1 + Math.floor(rnd() * 6);
    for (let r = r0; r < Math.min(c.size, r0 + hh); r++) for (let q = c0; q < Math.min(c.size, c0 + ww); q++) H[r * c.size + q] = NaN;
  }
  const from: [number, number] = [x0 + c.from[0], y0 - c.from[1]];
  const to: [number, number] = [from[0] + c.lengthM * Math.cos(c.headingRad), from[1] + c.lengthM * Math.sin(c.headingRad)];
  const st = stationsAlongLeg({ kind: "strip", strip: 1, from, to, lengthM: c.lengthM }, c.stepM, c.halfAcrossM, c.halfAlongM);
  const n = st.s.length;
  const got = [new Float64Array(n), new Float64Array(n)];
  const ref = [new Float64Array(n), new Float64Array(n)];
  const scan = [new Float64Array(n), new Float64Array(n)];
  zoneExtremaAlongLine(grid, st.x, st.y, st.ux, st.uy, c.halfAlongM, c.halfAcrossM, got[0], got[1]);
  zoneExtremaSortedReference(grid, st.x, st.y, st.ux, st.uy, c.halfAlongM, c.halfAcrossM, ref[0], ref[1]);
  extremaInOrientedRect(grid, st.x, st.y, st.ux, st.uy, c.halfAlongM, c.halfAcrossM, scan[0], scan[1]);
  for (let m = 0; m < 2; m++) {
    const d = firstDifference(got[m], ref[m]);
    expect(d < 0 ? "same" : `${m ? "min" : "max"} at station ${d}: ${got[m][d]} vs sorted ${ref[m][d]}`).toBe("same");
    const e = firstDifference(got[m], scan[m]);
    expect(e < 0 ? "same" : `${m ? "min" : "max"} at station ${e}: ${got[m][e]} vs scan ${scan[m][e]}`).toBe("same");
  }
  let nan = 0;
  for (let i = 0; i < n; i++) if (Number.isNaN(got[0][i])) nan++;
  return { n, nan };
}

describe("zoneExtremaAlongLine at any heading equals the sorted band and the per-station scan, bit for bit", () => {
  it("random headings, zone sizes, nodata holes, legs partly off the grid", () => {
    const rnd = rng(2024);
    let stations = 0, nan = 0;
    for (let k = 0; k < 48; k++) {
      const cellM = [0.5, 1, 0.5, 0.25][k % 4];
      const size = cellM === 0.25 ? 320 : 200;
      const side = size * cellM;
      const headingRad = rnd() * 2 * Math.PI;
      // Mostly a leg about the middle of the grid, its zones reaching the border at times;
      // every fourth from anywhere up to a quarter of the grid outside it, leaving it.
      const wild = k % 4 === 3;
      const lengthM = side * (wild ? 0.3 + rnd() : 0.2 + 0.4 * rnd());
      const mid = [(0.3 + 0.4 * rnd()) * side, (0.3 + 0.4 * rnd()) * side];
      const from: [number, number] = wild
        ? [(rnd() * 1.5 - 0.25) * side, (rnd() * 1.5 - 0.25) * side]
        : [mid[0] - (lengthM / 2) * Math.cos(headingRad), mid[1] + (lengthM / 2) * Math.sin(headingRad)];
      const c: Case = {
        cellM, size, headingRad, from, lengthM,
        stepM: [0.5, 0.37, 1, cellM][Math.floor(rnd() * 4)],
        halfAlongM: cellM * (1 + rnd() * 24),
        halfAcrossM: cellM * (1 + rnd() * 30),
        quantised: k % 3 === 0,
      };
      const r = run(c, 1000 + k);
      stations += r.n;
      nan += r.nan;
    }
    // The comparison is neither all NaN nor free of nodata.
    expect(nan).toBeGreaterThan(0);
    expect(nan).toBeLessThan(stations / 2);
  });

  it("zone edges on cell centres (3-4-5 heading, 45 degrees, near an axis)", () => {
    // A 3-4-5 heading from a cell centre puts whole lines of cell centres at distances along
    // and across that are multiples of 2.5 m (at 0.5 m cells): zone edges of such lengths
    // fall on cell centres, up to rounding, and the rectangle test must settle them.
    const cases: Case[] = [
      { cellM: 0.5, size: 200, headingRad: Math.atan2(3, 4), from: [20.25, 80.25], lengthM: 70, stepM: 0.5, halfAlongM: 10, halfAcrossM: 12.5, quantised: false },
      { cellM: 0.5, size: 200, headingRad: Math.atan2(4, -3), from: [80.25, 90.25], lengthM: 70, stepM: 2.5, halfAlongM: 7.5, halfAcrossM: 5, quantised: true },
      // Short zones, edges 2 (4) m along from a cell centre on the 3-4-5 heading.
      { cellM: 0.5, size: 200, headingRad: Math.atan2(4, 3), from: [28.75, 64.25], lengthM: 45.3, stepM: 0.5, halfAlongM: 2, halfAcrossM: 3.69, quantised: false },
      { cellM: 1, size: 200, headingRad: Math.atan2(4, 3), from: [57.5, 128.5], lengthM: 90.7, stepM: 1, halfAlongM: 4, halfAcrossM: 7.38, quantised: false },
      { cellM: 0.5, size: 200, headingRad: Math.PI / 4, from: [10.25, 90.25], lengthM: 100, stepM: 0.5, halfAlongM: 12 * Math.SQRT2, halfAcrossM: 10 * Math.SQRT2, quantised: false },
      { cellM: 0.5, size: 200, headingRad: -3 * Math.PI / 4, from: [90, 10], lengthM: 100, stepM: Math.SQRT1_2, halfAlongM: 8, halfAcrossM: 20, quantised: true },
      // Almost along an axis (not exactly: the general path, not the axis one).
      { cellM: 0.5, size: 200, headingRad: 1e-7, from: [5.25, 50.25], lengthM: 90, stepM: 0.5, halfAlongM: 10.25, halfAcrossM: 15, quantised: false },
      { cellM: 0.5, size: 200, headingRad: Math.PI / 2 + 1e-9, from: [50, 95], lengthM: 90, stepM: 0.5, halfAlongM: 9, halfAcrossM: 15.25, quantised: true },
    ];
    let nan = 0, stations = 0;
    cases.forEach((c, k) => {
      const r = run(c, 77 + k);
      nan += r.nan;
      stations += r.n;
    });
    expect(nan).toBeLessThan(stations);
  });
});
