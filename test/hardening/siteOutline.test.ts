/**
 * Site outlines that broke the tool: a cadastre parcel of 200 000 vertices
 * (was "Maximum call stack size exceeded"), holes outside their outer ring
 * (were taken as extra area by the even-odd strip rule). Through the built
 * CLI as a user runs it: the first lays out, the others are refused in one
 * line naming the file and the ring, exit code 2, nothing written.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { writeFileSync } from "node:fs";
import path from "node:path";
import proj4 from "proj4";
import { HAS_GDAL } from "../helpers/tools.js";
import { UTM33, cliAsync, ensureBuilt, expectNothingWritten, expectOneLineError, lonLatRing, smallScenario, tempDir } from "./helpers.js";

beforeAll(() => ensureBuilt(), 120_000);

/** A wobbly round parcel of n vertices around (cx, cy) in UTM 33, closed, counter-clockwise. Invented data. */
function parcel(n: number, cx: number, cy: number, radiusM: number): number[][] {
  const toLonLat = proj4(UTM33, "WGS84");
  const ring: number[][] = [];
  for (let i = 0; i < n; i++) {
    const t = (2 * Math.PI * i) / n;
    const r = radiusM * (1 + 0.08 * Math.sin(3 * t)) + 0.4 * Math.sin(250 * t) + 0.01 * Math.sin(7919 * t);
    ring.push(toLonLat.forward([cx + r * Math.cos(t), cy + r * Math.sin(t)]));
  }
  ring.push(ring[0]);
  return ring;
}

const polygonFile = (file: string, rings: number[][][]) =>
  writeFileSync(file, JSON.stringify({ type: "FeatureCollection", features: [{ type: "Feature", properties: { name: "parcel" }, geometry: { type: "Polygon", coordinates: rings } }] }));

describe.skipIf(!HAS_GDAL)("site outlines through the CLI", () => {
  it("a 200 000-vertex parcel: `gsdplan layout` lays it out and says how the outline was simplified", async () => {
    const s = smallScenario(tempDir("parcel200k"), (x) => 300 + 0.02 * (x - 500000));
    polygonFile(s.area, [parcel(200_000, 500000, 5200000, 110)]);
    const r = await cliAsync(["layout", "--plan", s.planFile]);
    expect(r.err).toBe("");
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/note: outline simplified from 200,000 to [\d,]+ vertices within 0\.05 m/);
    // pi * 110² = 3.80 ha (the wobbles average out to first order).
    const ha = Number(/site: parcel, ([\d.]+) ha/.exec(r.out)?.[1]);
    expect(ha).toBeGreaterThan(3.7);
    expect(ha).toBeLessThan(3.9);
  });

  it("a 200 000-vertex parcel with a hole outside it: refused in one line naming the file and the hole", async () => {
    const s = smallScenario(tempDir("holeout"), () => 300);
    const hole = lonLatRing(UTM33, 500300, 5200300, 500320, 5200320).reverse();
    polygonFile(s.area, [parcel(200_000, 500000, 5200000, 110), hole]);
    const out = path.join(s.dir, "out");
    const r = await cliAsync(["plan", s.planFile, "--out", out, "--quiet"]);
    expectOneLineError(r, /site\.geojson hole 1: the hole lies outside the outer ring .*allowed: holes that lie inside the outer ring/);
    expectNothingWritten(out);
  });

  it("a 200 000-vertex parcel whose outline crosses itself: refused in one line naming the ring and the place", async () => {
    const s = smallScenario(tempDir("kink200k"), () => 300);
    const ring = parcel(200_000, 500000, 5200000, 110);
    [ring[150_000], ring[150_002]] = [ring[150_002], ring[150_000]];
    polygonFile(s.area, [ring]);
    const r = await cliAsync(["layout", "--plan", s.planFile]);
    expectOneLineError(r, /site\.geojson outer ring: the ring self-intersects \(got "kink at lon [\d.]+, lat [\d.]+"/);
  });
});
