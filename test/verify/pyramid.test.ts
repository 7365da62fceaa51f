import { describe, it, expect } from "vitest";
import { BLOCK0, buildPyramid } from "../../src/verify/pyramid.js";

/**
 * The pyramid against its definition, cell by cell: a level-0 block (bi, bj) holds the
 * centres of columns 8 bi .. 8 bi + 8 and rows 8 bj .. 8 bj + 8 within the grid (its quads'
 * corners, neighbouring blocks sharing an edge); its max and min are those of the heights
 * with a value, `unusable` says one is missing and `unknown` that the DEM's own heights miss one.
 */
function bruteLevel0(z: Float32Array, demZ: Float32Array, width: number, height: number) {
  const bw = Math.max(1, Math.ceil((width - 1) / BLOCK0));
  const bh = Math.max(1, Math.ceil((height - 1) / BLOCK0));
  const out = { max: [] as number[], min: [] as number[], unusable: [] as number[], unknown: [] as number[] };
  for (let bj = 0; bj < bh; bj++) {
    for (let bi = 0; bi < bw; bi++) {
      let mx = -Infinity, mn = Infinity, bad = 0, unk = 0;
      for (let r = bj * BLOCK0; r <= Math.min(bj * BLOCK0 + BLOCK0, height - 1); r++) {
        for (let c = bi * BLOCK0; c <= Math.min(bi * BLOCK0 + BLOCK0, width - 1); c++) {
          const v = z[r * width + c];
          if (Number.isNaN(v)) bad = 1;
          else { mx = Math.max(mx, v); mn = Math.min(mn, v); }
          if (Number.isNaN(demZ[r * width + c])) unk = 1;
        }
      }
      out.max.push(mx); out.min.push(mn); out.unusable.push(bad); out.unknown.push(unk);
    }
  }
  return out;
}

describe("the verifier's block pyramid (verify/pyramid.ts)", () => {
  for (const [width, height] of [[37, 29], [33, 17], [9, 9], [1, 12], [20, 1]] as const) {
    it(`on ${width} x ${height} centres with holes and assumed ground: level 0 as defined, each level up the 2 x 2 merge`, () => {
      const n = width * height;
      const z = new Float32Array(n);
      const demZ = new Float32Array(n);
      let s = 11;
      for (let i = 0; i < n; i++) {
        s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
        z[i] = 300 + (s % 1000) / 10;
        if (s % 401 === 0) z[i] = NaN; // no height
        // The DEM's own height: none where z has none, nor where z carries an assumed one.
        demZ[i] = s % 307 === 0 ? NaN : z[i];
      }
      const p = buildPyramid(z, demZ, width, height);
      const want = bruteLevel0(z, demZ, width, height);
      const l0 = p.levels[0];
      expect(Array.from(l0.max)).toEqual(want.max.map((v) => Math.fround(v)));
      expect(Array.from(l0.min)).toEqual(want.min.map((v) => Math.fround(v)));
      expect(Array.from(l0.unusable)).toEqual(want.unusable);
      expect(Array.from(l0.unknown)).toEqual(want.unknown);
      if (width * height > 500) expect(want.unusable.some((b) => b === 1) && want.unusable.some((b) => b === 0) && want.unknown.some((b) => b === 1)).toBe(true);
      for (let k = 1; k < p.levels.length; k++) {
        const lo = p.levels[k - 1], hi = p.levels[k];
        expect(hi.size).toBe(lo.size * 2);
        for (let bj = 0; bj < hi.bh; bj++) {
          for (let bi = 0; bi < hi.bw; bi++) {
            let mx = -Infinity, mn = Infinity, bad = 0, unk = 0;
            for (const [ci, cj] of [[2 * bi, 2 * bj], [2 * bi + 1, 2 * bj], [2 * bi, 2 * bj + 1], [2 * bi + 1, 2 * bj + 1]]) {
              if (ci >= lo.bw || cj >= lo.bh) continue;
              const q = cj * lo.bw + ci;
              mx = Math.max(mx, lo.max[q]); mn = Math.min(mn, lo.min[q]); bad |= lo.unusable[q]; unk |= lo.unknown[q];
            }
            const b = bj * hi.bw + bi;
            expect([hi.max[b], hi.min[b], hi.unusable[b], hi.unknown[b]]).toEqual([mx, mn, bad, unk]);
          }
        }
      }
      const top = p.levels[p.levels.length - 1];
      expect([top.bw, top.bh]).toEqual([1, 1]);
      // Without assumed ground the plan passes one array as both (makeSurface): the same
      // level 0 as the definition gives for it, unknown exactly where unusable.
      const one = buildPyramid(z, z, width, height).levels[0];
      const wantOne = bruteLevel0(z, z, width, height);
      expect(Array.from(one.max)).toEqual(wantOne.max.map((v) => Math.fround(v)));
      expect(Array.from(one.min)).toEqual(wantOne.min.map((v) => Math.fround(v)));
      expect(Array.from(one.unusable)).toEqual(wantOne.unusable);
      expect(Array.from(one.unknown)).toEqual(wantOne.unknown);
      if (width * height > 500) expect(wantOne.unknown.some((b) => b === 1)).toBe(true);
    });
  }
});
