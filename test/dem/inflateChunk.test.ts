import { describe, it, expect } from "vitest";
import { deflateSync, inflateSync } from "node:zlib";
import { blockChunk } from "../../src/dem/inflateChunk.js";

// The chunk option only sizes zlib's output buffers (Node's zlib documentation, "Class:
// Options", chunkSize): the inflated bytes must be those of zlib's default chunks whether the
// block comes out as large as announced, shorter (a strip at the raster's foot) or longer.
describe("block-sized inflate chunks", () => {
  const bytes = (n: number) => Uint8Array.from({ length: n }, (_, i) => (i * 7919) % 251 ^ (i >> 9));
  it("inflate to the same bytes as zlib's default chunks, whatever the block's true size", () => {
    const announced = 256 * 256 * 4;
    for (const n of [announced, announced - 4096, announced + 100_000, 1]) {
      const packed = deflateSync(bytes(n));
      const out = inflateSync(packed, blockChunk(announced));
      expect(out.length).toBe(n);
      expect(Buffer.compare(out, inflateSync(packed))).toBe(0);
    }
  });
  it("asks for one byte more than the block, and nothing for unknown or implausible sizes", () => {
    expect(blockChunk(262144)).toEqual({ chunkSize: 262145 });
    expect(blockChunk(10)).toEqual({ chunkSize: 64 });
    for (const bad of [0, -1, NaN, Infinity, 2 ** 40]) expect(blockChunk(bad)).toEqual({});
  });
});
