import { describe, it, expect } from "vitest";
import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { assessmentStats, statsPassBands, type StatsPassJob } from "../../src/assess/stats.js";
import { statsCells, STATS_CELLS_WASM } from "../../src/assess/statsCellsWasm.js";
import { wasmKernel } from "../../src/wasmKernel.js";
import { tallyEdges } from "../../src/assess/gsdTally.js";
import { FLAG_VALUES } from "../../src/assess/flags.js";
import { RADIX_BINS } from "../../src/assess/quantiles.js";

/**
 * The statistics' pass over the cells in WebAssembly (src/assess/statsCells.as.ts) against its
 * JavaScript twin (stats.ts statsPassCells), which test/assess/statsPass.test.ts holds to a
 * count made cell by cell: the same counts in every tally, at each thread's slot, on values
 * the plan rarely makes (negative and infinite GSD, -0, the largest image count, every flag
 * value, GSD outside the strips' span and the tally's range).
 */

// The kernel is compiled by `npm run build` (scripts/build-wasm.mjs) into dist/.
const HAS_WASM = existsSync(fileURLToPath(new URL(`../../dist/${STATS_CELLS_WASM}`, import.meta.url)));
if (!HAS_WASM) {
  if (process.env.CI === "true") throw new Error("dist/assess/statsCells.wasm is required under CI=true (npm test builds it first)");
  process.stderr.write("NOTICE: dist/ not built; skipping the WebAssembly statistics' pass (run npm run build)\n");
}

/**
 * Float32 values at and on either side of each tally edge, where the counter corrects its
 * bin by one (BinCounter.slotOf). The bin one up is taken there; the one down only for values
 * within a few float64 steps below an edge, which no float32 value near a 0.01 cm edge is
 * (the nearest lie ~1e-5 of a bin away), so that branch is kept for parity and not reached.
 */
function nearEdges(edges: Float64Array): number[] {
  const f = new Float32Array(1), u = new Uint32Array(f.buffer);
  const out: number[] = [];
  for (const e of edges) {
    f[0] = e;
    const bits = u[0];
    for (const d of [-1, 0, 1]) {
      u[0] = bits + d;
      out.push(f[0]);
    }
  }
  return out;
}

function oddRasters(n: number, seed: number, edgeValues: number[]) {
  let x = seed;
  const rnd = () => ((x = (x * 1103515245 + 12345) % 2147483648) / 2147483648);
  const gsdCm = new Float32Array(n), images = new Uint16Array(n), flags = new Uint16Array(n), inSite = new Uint8Array(n), ground = new Float32Array(n);
  const nadirStrip = new Uint16Array(n);
  const odd = [NaN, -0, 0, -1.5, Infinity, -Infinity, 1e-30, 3e30, 2.25, 2.5, 2.75];
  let g = 2.5, s = 1, f = 0, c = 7;
  for (let i = 0; i < n; i++) {
    if (rnd() < 0.03) s = Math.floor(rnd() * 9);
    if (rnd() < 0.05) f = Math.floor(rnd() * FLAG_VALUES);
    if (rnd() < 0.05) c = rnd() < 0.1 ? 65535 : Math.floor(rnd() * 20);
    g += (rnd() - 0.5) * 0.01;
    inSite[i] = rnd() < 0.9 ? 1 : 0;
    ground[i] = rnd() < 0.02 ? NaN : 100 + rnd();
    nadirStrip[i] = s;
    flags[i] = f;
    images[i] = c;
    const u = rnd();
    gsdCm[i] = u < 0.03 ? odd[Math.floor(rnd() * odd.length)] : u < 0.06 ? edgeValues[Math.floor(rnd() * edgeValues.length)] : u < 0.08 ? g * 20 : g;
  }
  return { gsdCm, images, flags, inSite, ground, nadirStrip };
}

describe.skipIf(!HAS_WASM)("the statistics' pass in WebAssembly", () => {
  it("is built and compiles on this engine, so the pass uses it", () => {
    expect(wasmKernel(STATS_CELLS_WASM)).not.toBeNull();
  });

  it("gives the JavaScript pass's statistics, with and without the strips' span and the tally", () => {
    // More cells than one chunk of the pass (8 192), the last chunk partial.
    const tally = { first: 180, stepCm: 0.01, bins: 150 };
    const r = oddRasters(3 * 8192 + 1234, 7, nearEdges(tallyEdges(tally)));
    for (const extra of [{}, { gsdTally: tally }, { stripSpanCm: [2.2, 3.2] as [number, number] }, { gsdTally: tally, stripSpanCm: [2.2, 3.2] as [number, number], gsdAtLeastCm: 2.5 }]) {
      const input = { ...r, cellAreaM2: 0.25, threads: 1, ...extra };
      const js = assessmentStats({ ...input, cellsIn: "js" });
      expect(assessmentStats({ ...input, cellsIn: "wasm" })).toEqual(js);
    }
  });

  it("adds a thread's counts at its own slot, every tally the same as the JavaScript pass's", () => {
    const n = 2 * 8192 + 77;
    const S = 9, span = 64, grid = { first: 220, stepCm: 0.01, bins: 60 };
    const edges = tallyEdges(grid);
    const r = oddRasters(n, 11, nearEdges(edges));
    const job = (cellsIn: "js" | "wasm"): StatsPassJob => ({
      ...r, strips: S, bandCells: 5000, cellsIn,
      flagHist: new Float64Array(2 * S * FLAG_VALUES), imageHist: new Float64Array(2 * 65536), inBandSeen: new Float64Array(2 * S),
      radixHist: new Uint32Array(2 * RADIX_BINS), atLeastCm: 2.5, atLeast: new Float64Array(16),
      tallyGrid: grid, tallyEdges: edges, tally: new Float64Array(2 * (grid.bins + 2)),
      spanLo: (0xc0200000 >>> 13) - 3, span, stripHist: new Uint32Array(2 * S * span), stripBelow: new Uint32Array(2 * S), stripAbove: new Uint32Array(2 * S),
      tallyOfStripBin: Int32Array.from({ length: span }, (_, b) => (b % 3 === 0 ? -1 : b % 50)),
    });
    const a = job("js"), b = job("wasm");
    const bands = Math.ceil(n / 5000);
    statsPassBands(a, new Int32Array(1), bands, 1);
    statsPassBands(b, new Int32Array(1), bands, 1);
    for (const k of ["flagHist", "imageHist", "inBandSeen", "radixHist", "atLeast", "tally", "stripHist", "stripBelow", "stripAbove"] as const) {
      const x = Array.from(a[k]!), y = Array.from(b[k]!);
      expect(y, k).toEqual(x);
      // Slot 0 untouched, slot 1 counted.
      expect(x.slice(0, x.length / 2).every((v) => v === 0), k).toBe(true);
      expect(x.some((v) => v !== 0), k).toBe(true);
    }
    expect(statsCells(b, 8192, 13)).toBeDefined();
  });
});
