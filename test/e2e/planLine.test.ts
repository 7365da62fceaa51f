import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { execFileSync } from "node:child_process";
import { readFileSync, rmSync } from "node:fs";
import path from "node:path";
import type { Feature, LineString } from "geojson";
import { fromArrayBuffer } from "geotiff";
import { HAS_GDAL, HAS_PROJ } from "../helpers/tools.js";
import { ROOT, runCli, tempDir, type CliResult } from "./cli.js";
import { cs2csFromWgs84, gdalinfoJson } from "./reference.js";

// Line sites over fixtures/gdal/hills_utm33_f32.tif (UTM 33N, 1 m cells; GDAL-written, see
// fixtures/gdal/README.md). The fixture lines' UTM vertices are in the plan files' comments;
// the WGS84 copies were made with PROJ cs2cs. Camera: 120 m footprint across at 3 cm/px,
// side overlap 65 % -> spacing 120 x 0.35 = 42 m (strip spacing = footprint x (1 - side
// overlap), common practice); lineWidthM 100 -> ceil(100 / 42) = 3 strips.
const LINE_UTM: [number, number][] = [[500250, 5200250], [500500, 5200350], [500600, 5200550], [500750, 5200550]];
const SHARP_UTM: [number, number][] = [[500250, 5200250], [500480, 5200520], [500510, 5200520], [500740, 5200250]];
const SPACING_M = 42;
const WIDTH_M = 100;

async function readTif(file: string): Promise<{ data: ArrayLike<number>; w: number; h: number }> {
  const buf = readFileSync(file);
  const tiff = await fromArrayBuffer(buf.buffer.slice(buf.byteOffset, buf.byteOffset + buf.byteLength));
  const img = await tiff.getImage();
  return { data: (await img.readRasters({ interleave: true })) as unknown as ArrayLike<number>, w: img.getWidth(), h: img.getHeight() };
}

/** Strip legs of plan.geojson as [start, end] in UTM 33N (PROJ cs2cs), with their strip numbers. */
function stripLegsUtm(out: string): { strip: number; a: [number, number]; b: [number, number] }[] {
  const fc = JSON.parse(readFileSync(path.join(out, "plan.geojson"), "utf8"));
  const legs = (fc.features as Feature<LineString>[]).filter((f) => f.properties?.layer === "leg" && f.properties?.segment === "strip");
  const ends = cs2csFromWgs84(32633, legs.flatMap((f) => {
    const c = f.geometry.coordinates;
    return [[c[0][0], c[0][1]], [c[c.length - 1][0], c[c.length - 1][1]]] as [number, number][];
  }));
  return legs.map((f, i) => ({ strip: f.properties!.strip as number, a: ends[2 * i], b: ends[2 * i + 1] }));
}

/** Planar distance from p to segment ab, and the index of the nearest segment of a polyline (plain plane geometry). */
function nearestSegment(line: [number, number][], p: [number, number]): { i: number; d: number; side: number } {
  let best = { i: -1, d: Infinity, side: 0 };
  for (let i = 0; i + 1 < line.length; i++) {
    const [a, b] = [line[i], line[i + 1]];
    const vx = b[0] - a[0], vy = b[1] - a[1];
    const t = Math.max(0, Math.min(1, ((p[0] - a[0]) * vx + (p[1] - a[1]) * vy) / (vx * vx + vy * vy)));
    const d = Math.hypot(p[0] - a[0] - t * vx, p[1] - a[1] - t * vy);
    if (d < best.d) best = { i, d, side: Math.sign(vx * (p[1] - a[1]) - vy * (p[0] - a[0])) };
  }
  return best;
}

describe.skipIf(!HAS_GDAL || !HAS_PROJ)("plan: a site along a line (hills UTM 33N)", () => {
  let out: string;
  let run: CliResult;
  beforeAll(() => {
    out = tempDir("gsdplan-line-");
    run = runCli(["plan", "fixtures/line/hills-line-plan.yaml", "--out", out]);
  }, 120_000);
  afterAll(() => rmSync(out, { recursive: true, force: true }));

  it("plans, and says the heading follows the line", () => {
    expect(run.status, run.stderr).toBe(0);
    const summary = JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8"));
    expect(summary.headingReason).toBe("heading follows the line");
    expect(summary.strips).toBe(3);
  });

  it("every cell of the OGR-buffered width is seen by minImages photos and is within band unless flagged", async () => {
    // Reference: OGR/SpatiaLite ST_Buffer of the line in UTM 33N by half the width, flat ends
    // (the site's ends are flat: see src/layout/lineSite.ts), rasterised by gdal_rasterize
    // (cell centres inside) on the plan's own raster grid.
    const buffer = path.join(out, "ref-buffer.geojson");
    execFileSync("ogr2ogr", [
      "-f", "GeoJSON", buffer, path.join(ROOT, "fixtures/line/hills-line.geojson"), "-dialect", "sqlite", "-sql",
      `SELECT BufferOptions_SetEndCapStyle('FLAT') AS flat, ST_Buffer(ST_Transform(geometry, 32633), ${WIDTH_M / 2}) AS geometry FROM "hills-line"`,
    ]);
    const info = gdalinfoJson(path.join(out, "gsd.tif"));
    const [x0, dx, , y0, , dy] = info.geoTransform;
    const [w, h] = info.size;
    const mask = path.join(out, "ref-mask.tif");
    execFileSync("gdal_rasterize", ["-q", "-burn", "1", "-ot", "Byte", "-init", "0", "-a_srs", "EPSG:32633", "-te", `${x0}`, `${y0 + h * dy}`, `${x0 + w * dx}`, `${y0}`, "-ts", `${w}`, `${h}`, buffer, mask]);
    const ref = await readTif(mask);
    const gsd = await readTif(path.join(out, "gsd.tif"));
    const images = await readTif(path.join(out, "images.tif"));
    const flags = await readTif(path.join(out, "flags.tif"));
    const summary = JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8"));
    // The band: target 3 cm/px +- 10 % (the plan file), as summary.json states it.
    const [lo, hi] = [summary.gsdCm.low, summary.gsdCm.high];
    expect([lo, hi]).toEqual([2.7, 3.3]);
    let cells = 0, short = 0, outOfBandUnflagged = 0, notInSite = 0;
    for (let i = 0; i < ref.data.length; i++) {
      if (ref.data[i] !== 1) continue;
      cells++;
      if (Number.isNaN(gsd.data[i])) {
        notInSite++;
        continue;
      }
      if (images.data[i] < 3) short++; // minImages: 3 in the plan file
      const g = gsd.data[i];
      if ((g < lo - 1e-6 || g > hi + 1e-6) && flags.data[i] === 0) outOfBandUnflagged++;
    }
    // 100 m x about 643 m of line: about 64 000 cells (SpatiaLite gives 64 082 m2 for the buffer).
    expect(cells).toBeGreaterThan(60_000);
    expect(notInSite).toBe(0);
    expect(short).toBe(0);
    expect(outOfBandUnflagged).toBe(0);
    // The site's area against OGR's buffer: our disc at a bend circumscribes OGR's (30 segments a
    // quarter), so ours is no smaller and larger by well under 0.1 %.
    const ogrArea = Number(/area_m2 \(Real\) = ([\d.]+)/.exec(execFileSync("ogrinfo", ["-dialect", "sqlite", "-sql", `SELECT BufferOptions_SetEndCapStyle('FLAT') AS flat, ST_Area(ST_Buffer(ST_Transform(geometry, 32633), ${WIDTH_M / 2})) AS area_m2 FROM "hills-line"`, path.join(ROOT, "fixtures/line/hills-line.geojson")], { encoding: "utf8" }))![1]);
    expect(ogrArea).toBeCloseTo(64_081.8, 0);
    expect(summary.areaM2).toBeGreaterThanOrEqual(ogrArea - 1);
    expect(summary.areaM2 / ogrArea - 1).toBeLessThan(1e-3);
  });

  it("strips sit one camera spacing apart across the line, centred on it", () => {
    // Offsets measured by plane geometry on UTM 33N (the DEM's CRS) from the legs' ends by PROJ
    // cs2cs. Each strip leg's midpoint lies on an offset line: -42, 0 or +42 m from the line,
    // within 0.05 m (cs2cs prints 7 decimals of a degree, about 1 cm).
    const legs = stripLegsUtm(out);
    const offsetsByStrip = new Map<number, number[]>();
    for (const l of legs) {
      const mid: [number, number] = [(l.a[0] + l.b[0]) / 2, (l.a[1] + l.b[1]) / 2];
      const { d, side } = nearestSegment(LINE_UTM, mid);
      offsetsByStrip.set(l.strip, [...(offsetsByStrip.get(l.strip) ?? []), side * d]);
    }
    const perStrip = [...offsetsByStrip.values()].map((ds) => {
      for (const d of ds) expect(d).toBeCloseTo(ds[0], 1);
      return ds[0];
    }).sort((a, b) => a - b);
    expect(perStrip.length).toBe(3);
    expect(perStrip[0]).toBeCloseTo(-SPACING_M, 1);
    expect(perStrip[1]).toBeCloseTo(0, 1);
    expect(perStrip[2]).toBeCloseTo(SPACING_M, 1);
    // One straight piece per segment of the line on every strip (3 segments).
    for (const s of offsetsByStrip.keys()) expect(legs.filter((l) => l.strip === s).length).toBe(3);
  });
});

describe.skipIf(!HAS_GDAL || !HAS_PROJ)("plan: a line with a bend sharper than the strip offset", () => {
  let out: string;
  let run: CliResult;
  beforeAll(() => {
    out = tempDir("gsdplan-line-sharp-");
    run = runCli(["plan", "fixtures/line/hills-line-sharp-plan.yaml", "--out", out]);
  }, 120_000);
  afterAll(() => rmSync(out, { recursive: true, force: true }));

  it("warns at the bend, naming its place (the fixture's top vertices, by PROJ cs2cs)", () => {
    expect(run.status, run.stderr).toBe(0);
    const summary = JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8"));
    const warning = (summary.warnings as string[]).find((m) => /bends tighter than the strip offset/.test(m));
    expect(warning).toBeDefined();
    const [lon, lat] = /lon ([\d.]+), lat ([\d.]+)/.exec(warning!)!.slice(1).map(Number);
    // The top's two vertices (500480 or 500510 E, 5200520 N) in WGS84 by cs2cs; the message gives 6 decimals.
    const tops = SHARP_UTM.slice(1, 3);
    const [[x, y]] = cs2csFromWgs84(32633, [[lon, lat]]);
    expect(Math.min(...tops.map((t) => Math.hypot(t[0] - x, t[1] - y)))).toBeLessThan(0.2);
  });

  it("no strip piece folds back: every piece runs the same way along the line as its strip's others", () => {
    // Plane geometry on UTM 33N: the sign of each piece's direction against its nearest segment
    // of the line; a folded piece would run against its strip.
    const legs = stripLegsUtm(out);
    const bySign = new Map<number, Set<number>>();
    for (const l of legs) {
      const mid: [number, number] = [(l.a[0] + l.b[0]) / 2, (l.a[1] + l.b[1]) / 2];
      const { i } = nearestSegment(SHARP_UTM, mid);
      const [p, q] = [SHARP_UTM[i], SHARP_UTM[i + 1]];
      const dot = (l.b[0] - l.a[0]) * (q[0] - p[0]) + (l.b[1] - l.a[1]) * (q[1] - p[1]);
      bySign.set(l.strip, (bySign.get(l.strip) ?? new Set()).add(Math.sign(dot)));
    }
    expect(bySign.size).toBe(3);
    for (const signs of bySign.values()) expect(signs.size).toBe(1);
    // The inside strip lost the top piece: 2 pieces, the others 3.
    expect([...bySign.keys()].map((s) => legs.filter((l) => l.strip === s).length).sort()).toEqual([2, 3, 3]);
  });
});

describe("plan: a line site without lineWidthM", () => {
  it("exits 2 naming lineWidthM", () => {
    const r = runCli(["plan", "fixtures/line/hills-line-nowidth-plan.yaml", "--out", tempDir("gsdplan-line-nowidth-")]);
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/lineWidthM: the area is a line/);
  });
});
