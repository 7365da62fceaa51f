/**
 * GeoTIFF DEMs over HTTP: a local server started by the test (loopback only, see
 * httpServer.ts) serves the fixtures. The plan from a URL must equal the plan from the same
 * file on disk, the bytes fetched must stay under twice the compressed size of the blocks
 * the window needs (from the file's own TileByteCounts, read with the geotiff package), and
 * servers without Range support or that stall give one-line errors within the time-out.
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { execFile } from "node:child_process";
import { existsSync, statSync } from "node:fs";
import path from "node:path";
import { promisify } from "node:util";
import { fromFile } from "geotiff";
import { serveFiles, type FileServer } from "./httpServer.js";
import { openDem } from "../../src/dem/source.js";
import { readCells } from "../../src/dem/window.js";
import { InputFileError } from "../../src/errors.js";
import { loadPlanFile, resolvePlanOptions } from "../../src/plan/options.js";
import { planMission, type PlanRun } from "../../src/plan/plan.js";

const ROOT = path.resolve("fixtures");
const PLAN = "fixtures/mosaic/mosaic-plan.yaml";
const TILES = ["hills_a_nw.tif", "hills_b_ne.tif", "hills_c_sw.tif", "hills_d_se.tif"].map((f) => `mosaic/tiles/${f}`);

async function plan(dem: string | string[]): Promise<PlanRun> {
  const file = await loadPlanFile(PLAN);
  return planMission(resolvePlanOptions(file.data, { dem }, file.dir));
}

/** Waypoints equal within 1 cm (issue 13: "same waypoints within 0.01 m"). */
function expectSameRows(a: PlanRun, b: PlanRun): void {
  expect(a.rows.length).toBeGreaterThan(5);
  expect(a.rows.length).toBe(b.rows.length);
  for (let i = 0; i < a.rows.length; i++) {
    const p = a.rows[i], q = b.rows[i];
    expect([p.flight, p.strip, p.index, p.segment]).toEqual([q.flight, q.strip, q.index, q.segment]);
    for (const k of ["x", "y", "altitudeAmslM", "groundAmslM", "heightAboveGroundM"] as const) expect(Math.abs(p[k] - q[k])).toBeLessThan(0.01);
  }
}

/**
 * Compressed bytes of the blocks of `file` that a cell window meets, from the TIFF's
 * TileByteCounts / StripByteCounts (TIFF 6.0, sections 15 and 3), read with the geotiff package.
 */
async function blockBytes(file: string, win: { col0: number; row0: number; col1: number; row1: number }): Promise<number> {
  const tiff = await fromFile(file);
  try {
    const img = await tiff.getImage(0);
    const fd = img.fileDirectory;
    const counts = (await fd.loadValue(img.isTiled ? "TileByteCounts" : "StripByteCounts")) as ArrayLike<number>;
    const tw = img.getTileWidth(), th = img.getTileHeight();
    const across = Math.ceil(img.getWidth() / tw);
    let sum = 0;
    for (let ty = Math.floor(win.row0 / th); ty < Math.ceil(win.row1 / th); ty++)
      for (let tx = Math.floor(win.col0 / tw); tx < Math.ceil(win.col1 / tw); tx++) sum += Number(counts[ty * across + tx]);
    return sum;
  } finally {
    await tiff.close();
  }
}

/** The DEM cells a plan read, in the file's own cell indices (the grid keeps the DEM's cells). */
function windowOf(run: PlanRun, file: { x0: number; y0: number; dx: number; dy: number }) {
  const n = run.grid.native!;
  const col0 = Math.round((n.transform.x0 - file.x0) / file.dx), row0 = Math.round((n.transform.y0 - file.y0) / file.dy);
  return { col0, row0, col1: col0 + run.grid.width, row1: row0 + run.grid.height };
}

describe("a GeoTIFF over HTTP with Range support", () => {
  let srv: FileServer;
  beforeAll(async () => {
    srv = await serveFiles(ROOT, "range");
  });
  afterAll(() => srv.close());

  it("plans the same waypoints as the same file on disk, fetching under 2x the compressed blocks the window needs", async () => {
    const file = path.join(ROOT, "gdal/hills_utm33_f32.tif");
    const disk = await plan(file);
    srv.reset();
    const remote = await plan(srv.url("gdal/hills_utm33_f32.tif"));
    expectSameRows(remote, disk);
    const d = await openDem(file);
    const win = windowOf(disk, d.transform);
    await d.close();
    const need = await blockBytes(file, win);
    // The bound; and since the window meets 6 of the file's 16 blocks (about half its
    // bytes), also well under the whole file: the blocks it does not meet stay unfetched.
    expect(srv.bytesSent).toBeLessThan(2 * need);
    expect(srv.bytesSent).toBeLessThan(0.8 * statSync(file).size);
    expect(srv.ranges.every((r) => /^bytes=\d+-\d+$/.test(r))).toBe(true);
  }, 120_000);

  it("four COG tiles by URL plan as the same tiles on disk; the overviews of tile d_se are never fetched", async () => {
    const disk = await plan(TILES.map((t) => path.join(ROOT, t)));
    srv.reset();
    const remote = await plan(TILES.map((t) => srv.url(t)));
    expectSameRows(remote, disk);
    let need = 0;
    for (const t of TILES) {
      const d = await openDem(path.join(ROOT, t));
      const nt = disk.grid.native!.transform;
      // The window on this tile's cells, clipped to the tile.
      const c0 = Math.round((nt.x0 - d.transform.x0) / d.transform.dx), r0 = Math.round((nt.y0 - d.transform.y0) / d.transform.dy);
      const win = { col0: Math.max(0, c0), row0: Math.max(0, r0), col1: Math.min(d.width, c0 + disk.grid.width), row1: Math.min(d.height, r0 + disk.grid.height) };
      await d.close();
      if (win.col1 > win.col0 && win.row1 > win.row0) need += await blockBytes(path.join(ROOT, t), win);
    }
    expect(srv.bytesSent).toBeLessThan(2 * need);
  }, 120_000);

  it("reads only the header when opened, and only the blocks of a small window", async () => {
    const file = path.join(ROOT, "gdal/hills_utm33_f32.tif");
    srv.reset();
    const dem = await openDem(srv.url("gdal/hills_utm33_f32.tif"));
    try {
      const header = srv.bytesSent;
      // The header (and the 16-byte probe) only: well under one 256 x 256 Float32 block.
      expect(header).toBeLessThan(40_000);
      const win = { col0: 300, row0: 300, col1: 310, row1: 310 };
      await readCells(dem, win);
      expect(srv.bytesSent - header).toBeLessThan(2 * (await blockBytes(file, win)));
    } finally {
      await dem.close();
    }
  });

  it("a missing file is one line naming the URL and the HTTP status", async () => {
    const url = srv.url("gdal/no_such.tif");
    await expect(openDem(url)).rejects.toThrow(new InputFileError(url, "HTTP 404 Not Found (a partial answer, 206, was expected)"));
  });
});

describe("servers that cannot serve a GeoTIFF by ranges", () => {
  it("a server that ignores Range (200 with the whole file) is refused in one line", async () => {
    const srv = await serveFiles(ROOT, "no-range");
    try {
      const url = srv.url("gdal/hills_utm33_f32.tif");
      const err = await openDem(url).catch((e) => e);
      expect(err).toBeInstanceOf(InputFileError);
      expect(err.message).toMatch(/ignores HTTP Range requests \(it answered 200 with the whole file, 554789 bytes\)/);
      expect(err.message.split("\n")).toHaveLength(1);
      // One request: no retry, no second try through geotiff.
      expect(srv.requests).toBe(1);
    } finally {
      await srv.close();
    }
  });

  for (const mode of ["stall", "stall-body"] as const) {
    it(`a server that ${mode === "stall" ? "never answers" : "stops in the middle of a body"} fails in one line within the time-out and its retries`, async () => {
      const srv = await serveFiles(ROOT, mode);
      try {
        const url = srv.url("gdal/hills_utm33_f32.tif");
        const t0 = performance.now();
        const err = await openDem(url, { http: { timeoutMs: 300, retries: 1 } }).catch((e) => e);
        const s = (performance.now() - t0) / 1000;
        expect(err).toBeInstanceOf(InputFileError);
        expect(err.message).toBe(`${url}: no answer within 0.3 s (2 attempts)`);
        // Two attempts of 0.3 s and one 0.2 s pause; a second for a slow machine.
        expect(s).toBeGreaterThan(0.6);
        expect(s).toBeLessThan(1.8);
        expect(srv.requests).toBe(2);
      } finally {
        await srv.close();
      }
    });
  }

  it("gsdplan inspect on such a URL exits 2 with one line", async () => {
    const cli = "dist/bundle/main.js";
    if (!existsSync(cli)) await promisify(execFile)("npm", ["run", "build"]);
    const srv = await serveFiles(ROOT, "no-range");
    try {
      // Asynchronous child: the server answers from this process meanwhile.
      const r = await promisify(execFile)(process.execPath, [cli, "inspect", srv.url("gdal/hills_utm33_f32.tif")]).then(
        () => ({ code: 0, stderr: "" }),
        (e: { code: number; stderr: string }) => e,
      );
      expect(r.code).toBe(2);
      const lines = r.stderr.trimEnd().split("\n");
      expect(lines).toHaveLength(1);
      expect(lines[0]).toMatch(/^gsdplan: http:\/\/127\.0\.0\.1:\d+\/gdal\/hills_utm33_f32\.tif: the server ignores HTTP Range requests/);
    } finally {
      await srv.close();
    }
  }, 120_000);
});
