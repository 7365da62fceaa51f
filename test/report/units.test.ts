import { describe, it, expect } from "vitest";
import { srgbToLab, labToSrgb, labRamp, VIRIDIS_STOPS, DIVERGING_STOPS, gsdScalePosition, gsdAtScalePosition } from "../../src/report/colour.js";
import { esc, jsonForScript } from "../../src/report/escape.js";
import { contourInterval, contourLines, maskOutline } from "../../src/report/contours.js";
import { niceFloor, niceStep } from "../../src/report/nice.js";
import { histogram } from "../../src/report/histogram.js";
import { OWN_STREAM_BYTES, bytePlanes, compactReportInput, fromBytePlanes, parseReportInput, serializeReportInput, serializeReportInputInPool } from "../../src/report/serialize.js";
import { firstDifference } from "../helpers/dist.js";
import { deflateSync, inflateSync } from "node:zlib";
import { renderReport } from "../../src/report/render.js";
import { InputFileError } from "../../src/errors.js";
import { makeReportInput } from "./fixture.js";

describe("sRGB to CIELAB (IEC 61966-2-1 sRGB, CIE 15 L*a*b*, D65)", () => {
  // Reference values as tabulated by common colour calculators for sRGB/D65 (from memory):
  // red (53.24, 80.09, 67.20), green (87.73, -86.18, 83.18), blue (32.30, 79.19, -107.86).
  const cases: [[number, number, number], [number, number, number]][] = [
    [[255, 255, 255], [100, 0, 0]],
    [[0, 0, 0], [0, 0, 0]],
    [[255, 0, 0], [53.24, 80.09, 67.2]],
    [[0, 255, 0], [87.73, -86.18, 83.18]],
    [[0, 0, 255], [32.3, 79.19, -107.86]],
  ];
  for (const [rgb, lab] of cases)
    it(`rgb(${rgb}) -> Lab(${lab})`, () => {
      const got = srgbToLab(rgb);
      for (let i = 0; i < 3; i++) expect(Math.abs(got[i] - lab[i])).toBeLessThan(0.05);
      expect(labToSrgb(got)).toEqual(rgb);
    });

  it("viridis ramp lightness rises monotonically (its published design criterion)", () => {
    const t = labRamp(VIRIDIS_STOPS, 64);
    let prev = -1;
    for (let i = 0; i < 64; i++) {
      const L = srgbToLab([t[3 * i], t[3 * i + 1], t[3 * i + 2]])[0];
      expect(L).toBeGreaterThan(prev - 0.5); // allow sRGB rounding
      prev = L;
    }
  });

  it("diverging ramp: lightest at the centre, falling on both sides", () => {
    const t = labRamp(DIVERGING_STOPS, 65);
    const L = (i: number) => srgbToLab([t[3 * i], t[3 * i + 1], t[3 * i + 2]])[0];
    for (let i = 1; i <= 32; i++) expect(L(i)).toBeGreaterThan(L(i - 1) - 0.5);
    for (let i = 33; i < 65; i++) expect(L(i)).toBeLessThan(L(i - 1) + 0.5);
  });

  it("GSD scale: target at the centre, band edges at the quarter marks, and back", () => {
    expect(gsdScalePosition(3, 3, 2.7, 3.3)).toBe(0.5);
    expect(gsdScalePosition(2.7, 3, 2.7, 3.3)).toBeCloseTo(0.25, 12);
    expect(gsdScalePosition(3.3, 3, 2.7, 3.3)).toBeCloseTo(0.75, 12);
    expect(gsdAtScalePosition(0.9, 3, 2.7, 3.3)).toBeCloseTo(3.48, 12);
  });
});

describe("escaping (HTML Standard text, attribute and script-data contexts)", () => {
  it("escapes the five HTML-significant characters", () => {
    expect(esc(`<a href="x">'&'</a>`)).toBe("&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;");
  });
  it("inline JSON cannot close its script element and parses back unchanged", () => {
    const v = { name: "</script><!-- \u2028 & >" };
    const s = jsonForScript(v);
    expect(s).not.toMatch(/[<>&\u2028]/);
    expect(JSON.parse(s)).toEqual(v);
  });
  it("a hostile site name never reaches the HTML unescaped", () => {
    const name = `<script>alert(1)</script>`;
    const html = renderReport(makeReportInput({ siteName: name, demFile: `"><img src=x onerror=alert(1)>` }));
    expect(html).not.toContain(name);
    expect(html).not.toContain("<img");
    expect(html).toContain("&lt;script&gt;alert(1)&lt;/script&gt;");
    // Exactly our two script elements.
    expect(html.match(/<script[\s>]/g)?.length).toBe(2);
  });
});

describe("nice numbers and contour intervals (1-2-5 series, common practice)", () => {
  it("picks 1, 2 or 5 x 10^k", () => {
    expect(niceStep(230, 12)).toBe(20);
    expect(niceFloor(740)).toBe(500);
    expect(niceFloor(0.3)).toBeCloseTo(0.2, 12);
  });
  it("contour interval gives 10 to 20 lines", () => {
    for (const [lo, hi] of [[212, 398], [0, 1000], [1203.5, 1210.2], [-5, 3000]]) {
      const k = contourInterval(lo, hi);
      const n = Math.floor(hi / k) - Math.ceil(lo / k) + 1;
      expect(n).toBeGreaterThanOrEqual(10);
      expect(n).toBeLessThanOrEqual(20);
      expect([1, 2, 5]).toContain(Math.round(k / Math.pow(10, Math.floor(Math.log10(k) + 1e-9))));
    }
  });
  it("contour of a plane z = x lies at the height's column (cell centres at +0.5) and avoids the frame", () => {
    const w = 10, h = 6;
    const heights = new Float32Array(w * h);
    for (let r = 0; r < h; r++) for (let c = 0; c < w; c++) heights[r * w + c] = c; // z = column index
    const lines = contourLines({ width: w, height: h, heights }, 3);
    const at3 = lines.find((l) => l.valueM === 3)!;
    expect(at3.lines.length).toBe(1);
    const l = at3.lines[0];
    for (let i = 0; i < l.length; i += 2) expect(l[i]).toBeCloseTo(3.5, 9);
  });
  it("mask outline of one cell encloses its centre", () => {
    const m = new Uint8Array(16);
    m[5] = 1;
    const rings = maskOutline(m, 4, 4);
    expect(rings.length).toBe(1);
    const xs = rings[0].filter((_, i) => i % 2 === 0);
    expect(Math.min(...xs)).toBe(1);
    expect(Math.max(...xs)).toBe(2);
  });
});

describe("histogram", () => {
  it("counts in-site finite values into half-open bins", () => {
    const h = histogram([1, 1.5, 2, 2.5, 3, NaN, 0.5, 9], [1, 1, 1, 1, 1, 1, 1, 0], [1, 2, 3]);
    expect(h.counts).toEqual([2, 2]);
    expect(h.under).toBe(1);
    expect(h.over).toBe(1);
  });
});

describe("report-data.json", () => {
  it("round-trips the report input, typed arrays included", () => {
    const input = makeReportInput();
    const back = parseReportInput(serializeReportInput(input));
    expect(back.summary).toEqual(input.summary);
    expect(back.rasters.gsdCm).toBeInstanceOf(Float32Array);
    expect(Array.from(back.rasters.flags)).toEqual(Array.from(input.rasters.flags));
    expect(back.legs.length).toBe(input.legs.length);
    // The legs go without their stations; what the page draws of them goes instead, every bit kept.
    expect(back.legs.every((l) => l.profile === undefined)).toBe(true);
    expect(back.legs[1].waypoints).toEqual(input.legs[1].waypoints);
    expect(firstDifference(back.drawing, compactReportInput(input).drawing)).toBe("");
    expect(back.drawing!.strips.length).toBeGreaterThan(1);
  });
  it("block-reduces large rasters and keeps every flag bit", () => {
    const input = makeReportInput();
    const back = parseReportInput(serializeReportInput(input, { maxPx: 40 }));
    expect(Math.max(back.rasters.width, back.rasters.height)).toBeLessThanOrEqual(40);
    let orIn = 0, orOut = 0;
    for (const f of input.rasters.flags) orIn |= f;
    for (const f of back.rasters.flags) orOut |= f;
    expect(orOut).toBe(orIn);
    expect(back.gsdHistogram!.counts).toEqual(input.gsdHistogram!.counts);
  });
  it("rejects other files with one clear InputFileError", () => {
    expect(() => parseReportInput("{}", "out/report-data.json")).toThrow(InputFileError);
    expect(() => parseReportInput("not json", "out/report-data.json")).toThrow(/out\/report-data.json/);
    expect(() => parseReportInput(JSON.stringify({ format: "gsdplan-report-data", version: 99 }))).toThrow(/version 99/);
  });

  it("float arrays go in byte planes: IEEE 754 binary32 1.0 and 2.0 (0x3F800000, 0x40000000) by hand", () => {
    // Little-endian bytes 00 00 80 3F and 00 00 00 40; planes most significant first:
    // [3F, 40] [80, 00] [00, 00] [00, 00], each byte minus the one before it (mod 256).
    const bytes = new Uint8Array(new Float32Array([1, 2]).buffer);
    expect(Array.from(bytePlanes(bytes, 4))).toEqual([0x3f, 0x01, 0x40, 0x80, 0, 0, 0, 0]);
    expect(Array.from(fromBytePlanes(bytePlanes(bytes, 4), 4))).toEqual(Array.from(bytes));
  });

  it("byte planes give back every bit: NaN payloads, -0, infinities, subnormals, odd lengths", () => {
    const f64 = new Float64Array([0, -0, 1.5, -2.25e-310, Number.MAX_VALUE, Infinity, -Infinity, NaN, 4.9e-324, 431.2734, 431.2741]);
    const raw64 = new Uint8Array(f64.buffer);
    raw64[7 * 8] = 0x5a; // a NaN with its own payload bits
    const f32 = new Float32Array([3.4e38, -1.17e-38, 1e-45, NaN, -0, 431.27, 431.28]);
    for (const [bytes, size] of [[raw64, 8], [new Uint8Array(f32.buffer), 4], [new Uint8Array(0), 4]] as const) {
      expect(Array.from(fromBytePlanes(bytePlanes(bytes, size), size))).toEqual(Array.from(bytes));
    }
  });

  it("writes float arrays as planes and the others as plain bytes, large ones in streams of their own, and reads them back bit for bit", () => {
    const input = makeReportInput();
    const compact = compactReportInput(input);
    const text = serializeReportInput(input);
    const doc = JSON.parse(text);
    expect(doc.version).toBe(4);
    // The packed stream comes before the input (the reader takes it first).
    expect(Object.keys(doc)).toEqual(["format", "version", "packed", "input"]);
    const keys = (o: object) => Object.keys(o).sort();
    const dem = compact.dem.heights, ground = compact.drawing!.strips[0].ground, images = compact.rasters.images;
    // The fixture's DEM is large enough for a stream of its own, the strips' profiles small.
    expect(dem.byteLength).toBeGreaterThanOrEqual(OWN_STREAM_BYTES);
    expect(ground.byteLength).toBeLessThan(OWN_STREAM_BYTES);
    expect(keys(doc.input.dem.heights)).toEqual(["$typed", "length", "planes"]);
    expect(keys(doc.input.drawing.strips[0].ground)).toEqual(["$typed", "length", "packedPlanesAt"]);
    expect(keys(doc.input.rasters.images)).toEqual(images.byteLength >= OWN_STREAM_BYTES ? ["$typed", "deflate", "length"] : ["$typed", "length", "packedAt"]);
    // The packed stream holds each small array's stored bytes at its offset: the profile's byte planes.
    const packed = inflate(doc.packed.deflate);
    expect(packed.length).toBe(doc.packed.length);
    const at = doc.input.drawing.strips[0].ground.packedPlanesAt;
    const groundBytes = new Uint8Array(ground.buffer, ground.byteOffset, ground.byteLength);
    expect(Array.from(packed.subarray(at, at + ground.byteLength))).toEqual(Array.from(bytePlanes(groundBytes, ground.BYTES_PER_ELEMENT)));
    const back = parseReportInput(text);
    const bits = (a: Float32Array | Float64Array) => Array.from(new Uint8Array(a.buffer, a.byteOffset, a.byteLength));
    expect(bits(back.drawing!.strips[0].ground)).toEqual(bits(ground));
    expect(bits(back.dem.heights)).toEqual(bits(input.dem.heights));
    expect(Array.from(back.rasters.images)).toEqual(Array.from(images));
  });

  it("gives the same text with its streams deflated on the thread pool", async () => {
    const input = makeReportInput();
    expect((await serializeReportInputInPool(input)) === serializeReportInput(input)).toBe(true);
  });

  it("refuses a packed array with no packed bytes before it, or reaching past them", () => {
    const doc = JSON.parse(serializeReportInput(makeReportInput()));
    const strip = doc.input.drawing.strips[0];
    const late = { format: doc.format, version: doc.version, input: doc.input, packed: doc.packed };
    expect(() => parseReportInput(JSON.stringify(late), "out/report-data.json")).toThrow(InputFileError);
    expect(() => parseReportInput(JSON.stringify(late), "out/report-data.json")).toThrow(/no packed bytes before it/);
    strip.ground.packedPlanesAt = doc.packed.length - 4;
    expect(() => parseReportInput(JSON.stringify(doc), "out/report-data.json")).toThrow(/outside the packed bytes/);
  });

  it("still reads versions 1 and 3 files, every typed array in a stream of its own (version 1 as plain deflated bytes)", () => {
    const text = serializeReportInput(makeReportInput());
    const doc = JSON.parse(text);
    const packed = inflate(doc.packed.deflate);
    const older = (version: number) =>
      JSON.stringify({ format: doc.format, version, input: doc.input }, (_k, v: unknown) => {
        const t = v as { $typed?: string; length?: number; planes?: string; packedAt?: number; packedPlanesAt?: number };
        if (!t || typeof t !== "object" || t.$typed === undefined) return v;
        const size = BYTES_PER_ELEMENT[t.$typed];
        const at = t.packedPlanesAt ?? t.packedAt;
        const stored = at !== undefined ? packed.subarray(at, at + t.length! * size) : inflate((t.planes ?? (t as { deflate: string }).deflate));
        const isPlanes = t.planes !== undefined || t.packedPlanesAt !== undefined;
        if (version === 1) return { $typed: t.$typed, length: t.length, deflate: deflateSync(isPlanes ? fromBytePlanes(stored, size) : stored).toString("base64") };
        return isPlanes ? { $typed: t.$typed, length: t.length, planes: deflateSync(stored).toString("base64") } : { $typed: t.$typed, length: t.length, deflate: deflateSync(stored).toString("base64") };
      });
    const v1 = older(1), v3 = older(3);
    for (const old of [v1, v3]) expect(old).not.toMatch(/"packed/);
    expect(v1).not.toContain('"planes"');
    expect(v3).toContain('"planes"');
    expect(parseReportInput(v1)).toEqual(parseReportInput(text));
    expect(parseReportInput(v3)).toEqual(parseReportInput(text));
  });
});

describe("report-data.json of version 2 (every leg's stations, no drawing)", () => {
  // Such files were written before the drawing: the page made from one is the page made
  // directly from the plan's input, as is the page made from version 4.
  it("gives the same page as the input itself and as version 4", () => {
    const input = makeReportInput();
    const v2 = JSON.stringify({ format: "gsdplan-report-data", version: 2, input: { ...input, drawing: undefined } }, (_k, v: unknown) => {
      if (ArrayBuffer.isView(v)) {
        const a = v as unknown as { length: number; BYTES_PER_ELEMENT: number };
        const bytes = new Uint8Array(v.buffer, v.byteOffset, v.byteLength);
        const float = v instanceof Float64Array || v instanceof Float32Array;
        return float
          ? { $typed: v.constructor.name, length: a.length, planes: deflateSync(bytePlanes(bytes, a.BYTES_PER_ELEMENT)).toString("base64") }
          : { $typed: v.constructor.name, length: a.length, deflate: deflateSync(bytes).toString("base64") };
      }
      if (typeof v === "number" && !Number.isFinite(v)) return { $number: String(v) };
      return v;
    });
    expect(v2).toContain('"profile"');
    expect(v2).not.toContain('"drawing"');
    const direct = renderReport(input);
    expect(renderReport(parseReportInput(v2)) === direct).toBe(true);
    expect(renderReport(parseReportInput(serializeReportInput(input))) === direct).toBe(true);
  });

  it("is refused, one clear error, when a leg has neither its stations nor the input a drawing", () => {
    const doc = JSON.parse(serializeReportInput(makeReportInput()));
    delete doc.input.drawing;
    expect(() => parseReportInput(JSON.stringify(doc), "out/report-data.json")).toThrow(InputFileError);
    expect(() => parseReportInput(JSON.stringify(doc), "out/report-data.json")).toThrow(/drawing/);
  });
});

const BYTES_PER_ELEMENT: Record<string, number> = { Float64Array: 8, Float32Array: 4, Uint32Array: 4, Int32Array: 4, Uint16Array: 2, Int16Array: 2, Uint8Array: 1 };

function inflate(base64: string): Buffer {
  return inflateSync(Buffer.from(base64, "base64"));
}

describe("the legs' drawing (compactReportInput)", () => {
  // Checked against the stations themselves, by what the page shows: the map's coloured runs
  // and each strip's profile figures.
  const input = makeReportInput();
  const drawing = compactReportInput(input).drawing!;
  const strips = input.legs.filter((l) => l.kind === "strip");

  it("colours the map's legs by height above ground over the strip stations' own range, in runs that follow each strip leg end to end", () => {
    let lo = Infinity, hi = -Infinity;
    for (const l of strips) for (let i = 0; i < l.profile!.s.length; i++) {
      const a = l.profile!.altitudeM[i] - l.profile!.groundM[i];
      lo = Math.min(lo, a);
      hi = Math.max(hi, a);
    }
    expect(drawing.agl).toEqual([lo, hi]);
    expect(drawing.runs.length).toBe(input.legs.length);
    input.legs.forEach((l, k) => {
      const r = drawing.runs[k];
      if (l.kind === "transit") return expect(r.length).toBe(0);
      const p = l.profile!;
      const n = p.s.length;
      expect(r.length % 5).toBe(0);
      expect([r[0], r[1]]).toEqual([p.x[0], p.y[0]]);
      expect([r[r.length - 3], r[r.length - 2]]).toEqual([p.x[n - 1], p.y[n - 1]]);
      for (let j = 5; j < r.length; j += 5) expect([r[j], r[j + 1]]).toEqual([r[j - 3], r[j - 2]]);
      // Each run takes the class (12 over the range) of the station it starts at.
      for (let j = 0; j < r.length; j += 5) {
        const i = Array.from(p.x).findIndex((x, m) => x === r[j] && p.y[m] === r[j + 1]);
        const a = p.altitudeM[i] - p.groundM[i];
        expect(r[j + 4]).toBe(Math.max(0, Math.min(11, Math.floor(((a - lo) / (hi - lo)) * 12))));
      }
    });
  });

  it("gives each strip its waypoints, its length and its flagged stations", () => {
    const numbers = [...new Set(strips.map((l) => l.strip))].sort((a, b) => a - b);
    expect(drawing.strips.map((d) => d.strip)).toEqual(numbers);
    for (const d of drawing.strips) {
      const own = strips.filter((l) => l.strip === d.strip);
      expect(d.flight.length / 2).toBe(own.reduce((n, l) => n + l.waypoints.length, 0));
      const alts = own.flatMap((l) => l.waypoints.map((w) => w.altitudeAmslM));
      expect(Array.from(d.flight.filter((_, i) => i % 2 === 1))).toEqual(alts);
      const count = (st: number) => own.reduce((n, l) => n + Array.from(l.profile!.status).filter((x) => x === st).length, 0);
      expect([d.nDetail, d.nUnfly]).toEqual([count(1), count(2)]);
      expect(d.s.length).toBeGreaterThan(10);
      // The binned ground envelope never shows lower ground than the stations have.
      expect(Math.max(...d.ground)).toBe(Math.max(...own.flatMap((l) => Array.from(l.profile!.groundM))));
    }
  });
});
