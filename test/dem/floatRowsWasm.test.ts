import { describe, it, expect } from "vitest";
import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { floatPredictorRow32, markNodata, placeFloatPredicted } from "../../src/dem/floatBlocks.js";
import { floatRows, FLOAT_ROWS_WASM } from "../../src/dem/floatRowsWasm.js";
import { wasmKernel } from "../../src/wasmKernel.js";

/**
 * The floating-point predictor's rows in WebAssembly (src/dem/floatRows.as.ts) against their
 * JavaScript twin (floatBlocks.ts floatPredictorRow32), which test/dem/predictors.test.ts
 * holds to GDAL's own reading of predictor-3 files: the same words bit for bit on any bytes,
 * for rows whose bytes are and are not a multiple of the 16-byte vector, windows of a few
 * columns and of many, and the same heights once placed.
 */

// The kernel is compiled by `npm run build` (scripts/build-wasm.mjs) into dist/.
const HAS_WASM = existsSync(fileURLToPath(new URL(`../../dist/${FLOAT_ROWS_WASM}`, import.meta.url)));
if (!HAS_WASM) {
  if (process.env.CI === "true") throw new Error("dist/dem/floatRows.wasm is required under CI=true (npm test builds it first)");
  process.stderr.write("NOTICE: dist/ not built; skipping the WebAssembly predictor rows (run npm run build)\n");
}

/** Deterministic bytes (a linear congruential generator, Numerical Recipes' constants). */
function randomBytes(n: number, seed: number): Uint8Array {
  const b = new Uint8Array(n);
  let s = seed >>> 0;
  for (let i = 0; i < n; i++) {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    b[i] = s >>> 24;
  }
  return b;
}

describe.skipIf(!HAS_WASM)("predictor-3 rows in WebAssembly", () => {
  it("is built and compiles on this engine (SIMD), so the DEM reader uses it", () => {
    expect(wasmKernel(FLOAT_ROWS_WASM)).not.toBeNull();
    expect(floatRows()).toBeDefined();
  });

  it("gives the JavaScript rows' words bit for bit", () => {
    const k = floatRows()!;
    let checked = 0;
    let nonFinite = 0;
    for (const tw of [1, 3, 4, 15, 16, 17, 64, 100, 257]) {
      for (const rows of [1, 2, 5]) {
        for (const [c0, c1] of [[0, tw], [0, 1], [Math.floor(tw / 3), tw], [1, Math.max(1, tw - 1)], [tw - 1, tw]]) {
          if (!(c1 > c0)) continue;
          const rowBytes = 4 * tw;
          const from = 3 * rowBytes;
          const bytes = randomBytes(from + rows * rowBytes + 7, tw * 1000 + rows * 10 + c0);
          const js = new Uint32Array(rows * (c1 - c0));
          const mine = bytes.slice();
          for (let r = 0; r < rows; r++) floatPredictorRow32(mine, from + r * rowBytes, rowBytes, 1, tw, c0, c1, js, r * (c1 - c0));
          const got = k.rows(bytes, from, rows, tw, c0, c1);
          expect(Array.from(got), `tw ${tw}, ${rows} rows, columns ${c0}..${c1 - 1}`).toEqual(Array.from(js));
          // With a nodata value (the first sample's, so some cell holds it), marked as
          // markNodata marks it, and every non-finite sample the random bytes make: the same bits.
          const nd = new Float32Array(js.buffer)[0];
          if (nd === nd) {
            const marked = js.slice();
            markNodata(new Float32Array(marked.buffer), 0, marked.length, nd);
            const gotMarked = k.rows(bytes, from, rows, tw, c0, c1, nd);
            expect(Array.from(gotMarked), `marked: tw ${tw}, ${rows} rows, columns ${c0}..${c1 - 1}`).toEqual(Array.from(marked));
            nonFinite += Array.from(new Float32Array(js.buffer)).filter((v) => !Number.isFinite(v)).length;
          }
          checked++;
        }
      }
    }
    expect(checked).toBeGreaterThan(100);
    expect(nonFinite).toBeGreaterThan(5);
  });

  it("places the same heights as the JavaScript rows, nodata and non-finite cells included (NaN)", () => {
    // A 40 x 9 block of heights, predicted as predictor 3 writes them, placed into a window
    // that takes columns 5..37 and rows 2..8 of it.
    const tw = 40, th = 9;
    const heights = new Float32Array(tw * th);
    for (let i = 0; i < heights.length; i++) heights[i] = 200 + 30 * Math.sin(i / 7) + (i % 5) * 0.125;
    heights[3 * tw + 6] = -9999;
    heights[4 * tw + 7] = NaN;
    heights[5 * tw + 8] = Infinity;
    const raw = new Uint8Array(heights.buffer);
    const bytes = new Uint8Array(raw.length);
    for (let r = 0; r < th; r++) {
      // Planes most significant first (byte 3 of a little-endian float first), then differenced.
      const row = new Uint8Array(4 * tw);
      for (let c = 0; c < tw; c++) for (let p = 0; p < 4; p++) row[p * tw + c] = raw[(r * tw + c) * 4 + (3 - p)];
      for (let i = row.length - 1; i > 0; i--) row[i] = (row[i] - row[i - 1]) & 255;
      bytes.set(row, r * 4 * tw);
    }
    const place = (rowsIn: "wasm" | "js", kernelBytes?: number) => {
      const outW = 50, outH = 12;
      const h = new Float32Array(outW * outH).fill(-1);
      placeFloatPredicted(bytes.slice(), tw, 100, 60, 105, 138, 62, 69, 103, 60, outW, new Uint32Array(h.buffer), h, -9999, rowsIn, kernelBytes);
      return { h };
    };
    const js = place("js");
    // All rows at once, and two rows (2 x 160 bytes) at a time, the last call taking one.
    for (const wasm of [place("wasm"), place("wasm", 400)]) {
      expect(Buffer.from(wasm.h.buffer).equals(Buffer.from(js.h.buffer))).toBe(true);
    }
    // The window's cell (row 3, column 3) is the block's (3, 6): nodata, made NaN; the
    // window's (2, 5) is the block's (2, 8). The cells outside the block are left as they were.
    expect(js.h[3 * 50 + 3]).toBeNaN();
    expect(js.h[2 * 50 + 5]).toBe(heights[2 * tw + 8]);
    expect(js.h.filter((v) => Number.isNaN(v)).length).toBe(3);
  });
});
