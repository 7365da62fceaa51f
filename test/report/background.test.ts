import { describe, it, expect } from "vitest";
import { Worker } from "node:worker_threads";
import { builtModule, firstDifference } from "../helpers/dist.js";
import { makeReportInput } from "./fixture.js";
import { renderReport } from "../../src/report/render.js";
import { DATA_BY_CALLER, DATA_BY_WORKER, type reportFilesInBackground as Background } from "../../src/report/background.js";
import { demLayers } from "../../src/report/demLayers.js";
import { makeGrid } from "../../src/dem/sample.js";
import { compactReportInput, reportMaps, serializeReportInput, type reportMapsInBackground as MapsInBackground } from "../../src/report/serialize.js";
import type { ReportRasters } from "../../src/report/model.js";
import { inSharedMemory } from "../../src/background.js";

const built = builtModule("report/background.js", ["renderWorker.js"]);
const builtMaps = builtModule("report/serialize.js", ["mapsWorker.js"]);

describe.skipIf(!built.available)("report files made in a worker thread", () => {
  it("are the page rendered on this thread, character for character and as UTF-8 bytes, and report-data.json's text", async () => {
    const { reportFilesInBackground } = (await import(built.href)) as { reportFilesInBackground: typeof Background };
    const input = makeReportInput({ siteName: "Worker check" });
    const page = reportFilesInBackground(input);
    const html = await page.html();
    expect(html.length).toBeGreaterThan(10_000);
    expect(html).toContain("Worker check");
    expect(html).toBe(renderReport(input));
    // Its bytes (what report.html holds) are the page's UTF-8, characters beyond Latin-1 and all.
    const bytes = await page.bytes();
    expect(Buffer.from(bytes).equals(Buffer.from(renderReport(input), "utf8"))).toBe(true);
    expect(/[^\u0000-\u00ff]/.test(html)).toBe(true);
    // report-data.json: serializeReportInput's text, as this thread writes it.
    const data = await page.data();
    expect(data.length).toBeGreaterThan(10_000);
    expect(Buffer.from(data).equals(Buffer.from(serializeReportInput(input), "utf8"))).toBe(true);
  });

  it("come from the worker itself: its one message holds the page and, unless the calling thread claimed it first, report-data.json", async () => {
    const input = makeReportInput({ siteName: "Worker message" });
    const run = async (claimed: boolean) => {
      const claim = new Int32Array(new SharedArrayBuffer(4));
      if (claimed) claim[0] = DATA_BY_CALLER;
      const w = new Worker(new URL("renderWorker.js", built.href), { workerData: { ...inSharedMemory({ input }), claim } });
      const m = await new Promise<{ page: Uint8Array; data?: Uint8Array }>((resolve, reject) => {
        w.once("message", resolve);
        w.once("error", reject);
      });
      await w.terminate();
      return { m, claim: claim[0] };
    };
    const free = await run(false);
    expect(Buffer.from(free.m.page).equals(Buffer.from(renderReport(input), "utf8"))).toBe(true);
    expect(Buffer.from(free.m.data!).equals(Buffer.from(serializeReportInput(input), "utf8"))).toBe(true);
    expect(free.claim).toBe(DATA_BY_WORKER);
    // Claimed by the calling thread: the page only, the claim left as it was.
    const taken = await run(true);
    expect(Buffer.from(taken.m.page).equals(Buffer.from(renderReport(input), "utf8"))).toBe(true);
    expect(taken.m.data).toBeUndefined();
    expect(taken.claim).toBe(DATA_BY_CALLER);
  });
});

describe("the page's input moved into shared memory (inSharedMemory)", () => {
  it("holds the same values, every typed array on one SharedArrayBuffer that a message shares", () => {
    const whole = Float64Array.from({ length: 40 }, (_, i) => 1000 + i / 3);
    const profile = { s: whole.subarray(3, 17), status: Uint8Array.of(0, 1, 2), cause: Uint8Array.of(5) };
    const already = new Float32Array(new SharedArrayBuffer(8)).fill(7);
    const kept = new Map([["a", 1]]);
    const input = { legs: [{ strip: 1, profile }, { strip: 2, profile }], heights: Float32Array.of(1.5, NaN, -2), flags: Uint16Array.of(65535, 3), already, kept, name: "x" };
    const out = inSharedMemory(input);
    const views = [out.legs[0].profile.s, out.legs[0].profile.status, out.legs[0].profile.cause, out.heights, out.flags];
    const buffer = views[0].buffer;
    expect(buffer).toBeInstanceOf(SharedArrayBuffer);
    for (const v of views) {
      expect(v.buffer).toBe(buffer);
      // 8-byte aligned, so every element type can view it.
      expect(v.byteOffset % 8).toBe(0);
    }
    expect(Array.from(out.legs[0].profile.s)).toEqual(Array.from(profile.s));
    expect(out.legs[0].profile.s).toBeInstanceOf(Float64Array);
    expect(Array.from(out.legs[0].profile.status)).toEqual([0, 1, 2]);
    expect(Array.from(out.heights)).toEqual([1.5, NaN, -2]);
    expect(out.flags).toBeInstanceOf(Uint16Array);
    expect(Array.from(out.flags)).toEqual([65535, 3]);
    // An array met twice is moved once; arrays already shared and non-plain objects are kept.
    expect(out.legs[1].profile).not.toBe(profile);
    expect(out.legs[1].profile.s).toBe(out.legs[0].profile.s);
    expect(out.already).toBe(already);
    expect(out.kept).toBe(kept);
    expect(out.name).toBe("x");
    // The input itself is left as it was.
    expect(input.legs[0].profile.s.buffer).toBe(whole.buffer);
    // A clone (what a message to a worker makes) shares the values: a write shows through.
    const clone = structuredClone(out);
    clone.heights[0] = 99;
    expect(out.heights[0]).toBe(99);
    expect(inSharedMemory({ a: 1, b: [2] })).toEqual({ a: 1, b: [2] });
  });
});

describe("the report's DEM layers made beforehand", () => {
  it("give the page the report draws itself, and layers of another DEM are not used", () => {
    const input = makeReportInput({ siteName: "Layers check" });
    const own = renderReport(input);
    const reduced = compactReportInput(input).dem;
    expect(renderReport(input, demLayers(reduced))).toBe(own);
    // Layers of other ground (the heights raised 40 m): drawn from the wrong DEM, they must
    // not reach the page; a wrong key makes the page draw its own.
    const other = demLayers({ ...reduced, heights: reduced.heights.map((z) => z + 40) });
    expect(other.contours.svg).not.toBe(demLayers(reduced).contours.svg);
    expect(renderReport(input, { ...other, key: "another DEM" })).toBe(own);
  });
});

describe.skipIf(!builtMaps.available)("the report's maps reduced in a worker thread", () => {
  it("are the maps reduced on this thread, with the DEM's layers", async () => {
    const { reportMapsInBackground } = (await import(builtMaps.href)) as { reportMapsInBackground: typeof MapsInBackground };
    const W = 1500, H = 1100;
    const dem = makeGrid({ width: W, height: H, x0: 500000, y0: 6000000, cellM: 1, heights: (x, y) => 300 + 25 * Math.sin(x / 90) + 10 * Math.cos(y / 70) });
    const n = W * H;
    const rasters: ReportRasters = {
      width: W, height: H, transform: dem.transform,
      gsdCm: new Float32Array(n), images: new Uint16Array(n), flags: new Uint16Array(n), inSite: new Uint8Array(n),
    };
    for (let i = 0; i < n; i++) {
      const c = i % W, r = Math.floor(i / W);
      rasters.inSite[i] = (c - 700) ** 2 + (r - 550) ** 2 < 450 ** 2 ? 1 : 0;
      rasters.gsdCm[i] = rasters.inSite[i] ? 2.5 + 0.3 * Math.sin(i / 977) : NaN;
      rasters.images[i] = rasters.inSite[i] ? (i * 7) % 19 : 0;
      rasters.flags[i] = rasters.inSite[i] ? (i * 13) % 7 === 0 ? 2 : 0 : 0;
    }
    const here = reportMaps(dem, rasters);
    expect(here.dem.width).toBe(750);
    // Heights in shared memory: the worker reduces the DEM as it starts and the rasters when
    // they are handed over; other heights (copied to the worker): all once the rasters come.
    const shared = new Float32Array(new SharedArrayBuffer(4 * n));
    shared.set(dem.heights);
    for (const heights of [shared, dem.heights]) {
      const job = reportMapsInBackground({ ...dem, heights });
      job.withRasters(rasters);
      const maps = await job.result();
      expect(maps).toBeDefined();
      expect(firstDifference(maps!.dem, here.dem)).toBe("");
      expect(firstDifference(maps!.rasters, here.rasters)).toBe("");
      // With the DEM's layers drawn from the reduced DEM, as the page draws them from the full one.
      expect(maps!.layers).toEqual(demLayers(here.dem));
      expect(maps!.layers.contours.svg.length).toBeGreaterThan(1000);
    }
    // One thread requested: no worker.
    const one = reportMapsInBackground(dem, 1);
    one.withRasters(rasters);
    expect(await one.result()).toBeUndefined();
  });

  it("are not made when the plan stops before its rasters (the worker, waiting for them, is stopped)", async () => {
    const { reportMapsInBackground } = (await import(builtMaps.href)) as { reportMapsInBackground: typeof MapsInBackground };
    const dem = makeGrid({ width: 1500, height: 1100, x0: 500000, y0: 6000000, cellM: 1, heights: (x, y) => 300 + x / 100 + y / 50 });
    const heights = new Float32Array(new SharedArrayBuffer(4 * dem.heights.length));
    heights.set(dem.heights);
    for (const d of [{ ...dem, heights }, dem]) {
      const job = reportMapsInBackground(d);
      job.cancel();
      expect(await job.result()).toBeUndefined();
    }
  });

  it("are used by compactReportInput only when they fit its input", () => {
    const input = makeReportInput({ siteName: "Maps check" });
    const own = compactReportInput(input, 100);
    expect(compactReportInput(input, 100, reportMaps(input.dem, input.rasters, 100))).toEqual(own);
    // Maps of another size (reduced for 50 px): ignored, the input's own are made.
    const other = reportMaps(input.dem, input.rasters, 50);
    expect(other.dem.width).not.toBe(own.dem.width);
    expect(compactReportInput(input, 100, other)).toEqual(own);
  });
});
