import { describe, it, expect } from "vitest";
import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { makeGrid } from "../../src/dem/sample.js";
import type { Exposure } from "../../src/assess/types.js";
import type { computeCoverage as ComputeCoverage } from "../../src/assess/coverage.js";
import { genericCamera } from "./helpers.js";

// Worker threads run only from the built library (`npm test` builds it first).
const distCoverage = new URL("../../dist/assess/coverage.js", import.meta.url);
const HAS_DIST = existsSync(fileURLToPath(distCoverage)) && existsSync(fileURLToPath(new URL("coverageWorker.js", distCoverage)));
if (!HAS_DIST) {
  // Like the outside tools (test/helpers/tools.ts): under CI a missing build fails instead of skipping.
  if (process.env.CI === "true") throw new Error("dist/ is required under CI=true (npm test builds it first)");
  process.stderr.write("NOTICE: dist/ not built; skipping the threaded coverage comparison (run npm run build)\n");
}

describe.skipIf(!HAS_DIST)("coverage split over worker threads", () => {
  it("gives the same rasters as one thread", async () => {
    const { computeCoverage } = (await import(distCoverage.href)) as { computeCoverage: typeof ComputeCoverage };
    const grid = makeGrid({ width: 1100, height: 1000, x0: 0, y0: 500, cellM: 0.5, heights: (x, y) => 200 + 20 * Math.sin(x / 40) * Math.cos(y / 55) });
    const inSite = new Uint8Array(grid.width * grid.height).fill(1);
    const ex: Exposure[] = [];
    const h = (30 * Math.PI) / 180;
    for (let j = 0; j < 14; j++) for (let k = 0; k < 25; k++) {
      ex.push({ x: 20 + k * 22 * Math.sin(h) + j * 40 * Math.cos(h), y: -100 + k * 22 * Math.cos(h) - j * 40 * Math.sin(h) + 300, altitudeAmslM: 300 + (k % 3), ux: Math.sin(h), uy: Math.cos(h), strip: j + 1 });
    }
    const camera = genericCamera();
    const one = computeCoverage(grid, inSite, ex, camera, { threads: 1 });
    const three = computeCoverage(grid, inSite, ex, camera, { threads: 3 });
    let seen = 0;
    for (let i = 0; i < one.images.length; i++) if (one.images[i] > 0) seen++;
    expect(seen).toBeGreaterThan(100_000);
    expect(Buffer.from(three.images.buffer).equals(Buffer.from(one.images.buffer))).toBe(true);
    expect(Buffer.from(three.gsdCm.buffer).equals(Buffer.from(one.gsdCm.buffer))).toBe(true);
    expect(Buffer.from(three.nadirStrip.buffer).equals(Buffer.from(one.nadirStrip.buffer))).toBe(true);
    // The plan's own choice (nearest by distance, run by run) and its effect flags, shared the same way.
    const effects = { lowGsdCm: 2.0, highGsdCm: 2.6, minImages: 3 };
    const oneD = computeCoverage(grid, inSite, ex, camera, { threads: 1, nadirBy: "distance", effects });
    const twoD = computeCoverage(grid, inSite, ex, camera, { threads: 2, nadirBy: "distance", effects });
    for (const k of ["images", "gsdCm", "nadirStrip", "flags"] as const) {
      expect(Buffer.from(twoD[k]!.buffer).equals(Buffer.from(oneD[k]!.buffer)), k).toBe(true);
    }
    expect(oneD.flags!.some((f) => f !== 0)).toBe(true);
    // The seen cells per band and strip, counted with the effects: the same from either
    // split, and the same per strip as a count over the rasters.
    expect(Array.from(twoD.seenByBand!.counts)).toEqual(Array.from(oneD.seenByBand!.counts));
    const { counts, strips } = oneD.seenByBand!;
    const direct = new Array(strips).fill(0);
    for (let i = 0; i < inSite.length; i++) if (inSite[i] && !Number.isNaN(oneD.gsdCm[i])) direct[oneD.nadirStrip[i]]++;
    const summed = new Array(strips).fill(0);
    for (let b = 0; b < counts.length; b += strips) for (let st = 0; st < strips; st++) summed[st] += counts[b + st];
    expect(summed).toEqual(direct);
    expect(direct.filter((c) => c > 0).length).toBeGreaterThan(10);
    // The statistics taken from the table equal those that count the cells themselves, ...
    const { assessmentStats } = (await import(new URL("../../dist/assess/stats.js", import.meta.url).href)) as typeof import("../../src/assess/stats.js");
    const statsIn = { gsdCm: oneD.gsdCm, images: oneD.images, flags: oneD.flags!, inSite, ground: grid.heights, nadirStrip: oneD.nadirStrip, cellAreaM2: 0.25, maxStrip: strips - 1 };
    const st = assessmentStats(statsIn);
    // ... whether the pass over the cells runs on one thread or takes the bands on three.
    expect(assessmentStats({ ...statsIn, seenByBand: twoD.seenByBand, threads: 1 })).toEqual(st);
    expect(assessmentStats({ ...statsIn, seenByBand: twoD.seenByBand, threads: 3 })).toEqual(st);
    // ... and with the strips' first pass counted in it (their finer bins), the quantiles' second
    // pass then shared between two of those threads.
    const spans = { stripSpanCm: [0.25, 20] as [number, number] };
    expect(assessmentStats({ ...statsIn, seenByBand: twoD.seenByBand, threads: 3, ...spans })).toEqual(st);
    expect(assessmentStats({ ...statsIn, seenByBand: twoD.seenByBand, threads: 1, ...spans })).toEqual(st);
    // Each strip's GSD quantiles (taken by strips on three threads above) against a sort of
    // the strip's values: type 7 of Hyndman & Fan (1996), numpy's default.
    const type7 = (v: number[], p: number) => {
      const h = (v.length - 1) * p;
      const lo = v[Math.floor(h)];
      return lo + (h - Math.floor(h)) * (v[Math.min(v.length - 1, Math.floor(h) + 1)] - lo);
    };
    expect(st.perStrip.length).toBeGreaterThan(10);
    for (const ps of st.perStrip) {
      const v: number[] = [];
      for (let i = 0; i < inSite.length; i++) if (inSite[i] && oneD.nadirStrip[i] === ps.strip && !Number.isNaN(oneD.gsdCm[i])) v.push(oneD.gsdCm[i]);
      v.sort((a, b) => a - b);
      const want = [0, 0.05, 0.5, 0.95, 1].map((p) => type7(v, p));
      const got = [ps.gsdCm.min, ps.gsdCm.p5, ps.gsdCm.median, ps.gsdCm.p95, ps.gsdCm.max];
      got.forEach((g, k) => expect(g, `strip ${ps.strip} q${k}`).toBeCloseTo(want[k], 9));
    }
    // Seen cells at or above a GSD, counted in the same pass on one thread or three.
    const atCm = st.gsdCm.p95;
    let direct95 = 0;
    for (let i = 0; i < inSite.length; i++) if (inSite[i] && oneD.gsdCm[i] >= atCm) direct95++;
    expect(direct95).toBeGreaterThan(1000);
    for (const threads of [1, 3]) expect(assessmentStats({ ...statsIn, seenByBand: twoD.seenByBand, threads, gsdAtLeastCm: atCm }).gsdAtLeast).toEqual({ cm: atCm, cells: direct95 });
    // Cells with an effect bit (coarse 1, fine 2, too few images 4), read off the flag histogram.
    let effect = 0;
    for (let i = 0; i < inSite.length; i++) if (inSite[i] && oneD.flags![i] & 7) effect++;
    expect(effect).toBeGreaterThan(1000);
    expect(st.flagged.effectCells).toBe(effect);
    // A table for another number of strips is refused rather than misread.
    expect(() => assessmentStats({ ...statsIn, maxStrip: strips })).not.toThrow();
    expect(() => assessmentStats({ ...statsIn, maxStrip: strips, seenByBand: twoD.seenByBand })).toThrow(/strips/);
  });

  it("runs the sweep and the statistics on one pool's worker, with the same figures", async () => {
    const { computeCoverage } = (await import(distCoverage.href)) as { computeCoverage: typeof ComputeCoverage };
    const { assessmentStats } = (await import(new URL("../../dist/assess/stats.js", import.meta.url).href)) as typeof import("../../src/assess/stats.js");
    const { bandPool } = (await import(new URL("../../dist/assess/bandThreads.js", import.meta.url).href)) as typeof import("../../src/assess/bandThreads.js");
    const grid = makeGrid({ width: 1000, height: 1100, x0: 0, y0: 550, cellM: 0.5, heights: (x, y) => 180 + 15 * Math.cos(x / 33) * Math.sin(y / 47) });
    const inSite = new Uint8Array(grid.width * grid.height).fill(1);
    const ex: Exposure[] = [];
    for (let j = 0; j < 12; j++) for (let k = 0; k < 24; k++) ex.push({ x: 30 + j * 40, y: 520 - k * 22, altitudeAmslM: 280 + (j % 2), ux: 0, uy: -1, strip: j + 1 });
    const camera = genericCamera();
    const effects = { lowGsdCm: 2.0, highGsdCm: 2.6, minImages: 3 };
    const alone = computeCoverage(grid, inSite, ex, camera, { threads: 2, nadirBy: "distance", effects });
    const pool = bandPool();
    // Started ahead of the pass (as the plan does at its route stage): the pass takes that worker.
    pool.start(1);
    expect(pool.workers.length).toBe(1);
    const worker = pool.workers[0];
    const pooled = computeCoverage(grid, inSite, ex, camera, { threads: 2, nadirBy: "distance", effects, bandPool: pool });
    expect(pool.workers).toEqual([worker]);
    for (const k of ["images", "gsdCm", "nadirStrip", "flags"] as const) {
      expect(Buffer.from(pooled[k]!.buffer).equals(Buffer.from(alone[k]!.buffer)), k).toBe(true);
    }
    const statsIn = (c: typeof alone) => ({ gsdCm: c.gsdCm, images: c.images, flags: c.flags!, inSite, ground: grid.heights, nadirStrip: c.nadirStrip, cellAreaM2: 0.25, maxStrip: c.seenByBand!.strips - 1, seenByBand: c.seenByBand });
    const own = assessmentStats({ ...statsIn(alone), threads: 2 });
    expect(own.perStrip.length).toBe(12);
    // The statistics' pass takes its bands on the same worker, which stays in the pool until closed.
    expect(assessmentStats({ ...statsIn(pooled), threads: 2, bandPool: pool })).toEqual(own);
    expect(pool.workers).toEqual([worker]);
    pool.close();
    expect(pool.workers.length).toBe(0);
  });
});
