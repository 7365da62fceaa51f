import { describe, it, expect } from "vitest";
import { PNG } from "pngjs";
import { encodePngRgba, pngDataUri } from "../../src/report/png.js";
import { seededRandom } from "../geo/projCli.js";

/** A seeded generator (mulberry32), so a failure can be replayed. */
const rng = seededRandom;

/** Pictures that favour each filter type in turn: noise, flat runs, gradients, hard edges, transparency. */
function picture(w: number, h: number, kind: number, seed: number): Uint8Array {
  const r = rng(seed);
  const px = new Uint8Array(w * h * 4);
  for (let y = 0; y < h; y++)
    for (let x = 0; x < w; x++)
      for (let c = 0; c < 4; c++) {
        const i = (y * w + x) * 4 + c;
        px[i] =
          kind === 0 ? Math.floor(r() * 256)
          : kind === 1 ? (r() < 0.5 ? 0 : 255)
          : kind === 2 ? (x * 7 + c * 30) & 255
          : kind === 3 ? (y * 5 + x * 3 + c) & 255
          : kind === 4 ? ((x + y) % 9 < 4 ? 200 : 20)
          : (x - w / 2) ** 2 + (y - h / 2) ** 2 < (w * h) / 8 ? Math.floor(60 + 150 * Math.sin(x / 3 + y / 5) ** 2) : 0;
      }
  return px;
}

// pngjs (the PNG library the report used before) is the reference: with adaptive filtering,
// level 9 and the RLE strategy it writes these very bytes, and its decoder (PNG
// specification, filter types 0-4) reads the pixels back.
describe("encodePngRgba", () => {
  for (let kind = 0; kind < 6; kind++)
    for (const [w, h] of [[1, 1], [1, 7], [13, 1], [37, 29], [120, 64]]) {
      it(`picture ${kind}, ${w} x ${h}: the bytes pngjs writes, pixels read back`, () => {
        const px = picture(w, h, kind, kind * 100 + w + h);
        const ours = encodePngRgba(w, h, px);
        const ref = new PNG({ width: w, height: h });
        ref.data = Buffer.from(px);
        expect(ours.equals(PNG.sync.write(ref, { colorType: 6 }))).toBe(true);
        const back = PNG.sync.read(ours);
        expect([back.width, back.height]).toEqual([w, h]);
        expect(Buffer.from(back.data).equals(Buffer.from(px))).toBe(true);
      });
    }

  it("a data URI of base64 PNG bytes", () => {
    const px = new Uint8Array([255, 0, 0, 255, 0, 0, 255, 128]);
    const uri = pngDataUri(2, 1, px);
    expect(uri.startsWith("data:image/png;base64,")).toBe(true);
    expect(Buffer.from(uri.slice(22), "base64").equals(encodePngRgba(2, 1, px))).toBe(true);
  });

  it("refuses a pixel buffer of the wrong size", () => {
    expect(() => encodePngRgba(2, 2, new Uint8Array(12))).toThrow(/RGBA/);
  });
});
