/**
 * Invalid rings are refused in one line naming the ring: holes outside the
 * outer ring, holes inside holes, rings crossing each other or themselves.
 * The outside reference is OGR/GEOS (Debian's gdal-bin): `ogrinfo -dialect
 * sqlite` with ST_IsValid / ST_IsValidReason on the same GeoJSON, which also
 * names the place of the problem.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { readSite } from "../../src/layout/site.js";
import { ringProblem } from "../../src/layout/ring-check.js";
import { InputError } from "../../src/errors.js";
import { HAS_GDAL } from "../helpers/tools.js";
import { UTM33, lonLatRing, rect } from "./frame-helper.js";

function inputError(fn: () => unknown): InputError {
  try {
    fn();
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error("expected an InputError");
}

/** Clockwise square (RFC 7946 hole winding), metres offsets. */
const cwSquare = (x0: number, y0: number, x1: number, y1: number) => [[x0, y0], [x0, y1], [x1, y1], [x1, y0], [x0, y0]];

/** Each case: local rings (metres offsets in UTM 33 around 15 E 47 N), what we say, what GEOS says. */
const CASES: { name: string; rings: number[][][]; ours: RegExp | null; geos: RegExp }[] = [
  { name: "a valid polygon with two holes", rings: [rect(0, 0, 100, 100), cwSquare(10, 10, 30, 30), cwSquare(50, 50, 80, 80)], ours: null, geos: /^Valid Geometry$/ },
  { name: "a hole outside the outer ring", rings: [rect(0, 0, 100, 100), cwSquare(200, 200, 210, 210)], ours: /site\.geojson hole 1: the hole lies outside the outer ring/, geos: /^Hole lies outside shell/ },
  { name: "a hole crossing the outer ring", rings: [rect(0, 0, 100, 100), cwSquare(50, 50, 60, 150)], ours: /site\.geojson hole 1: the hole crosses or touches the outer ring .*meets the outer ring at/, geos: /^Self-intersection\[/ },
  { name: "two holes crossing each other", rings: [rect(0, 0, 100, 100), cwSquare(20, 20, 60, 60), cwSquare(40, 40, 80, 80)], ours: /site\.geojson hole 2: the hole crosses or touches hole 1/, geos: /^Self-intersection\[/ },
  { name: "a hole inside another hole", rings: [rect(0, 0, 100, 100), cwSquare(20, 20, 80, 80), cwSquare(40, 40, 50, 50)], ours: /site\.geojson hole 2: the hole lies inside hole 1/, geos: /^Holes are nested/ },
  { name: "a bow tie", rings: [[[0, 0], [100, 100], [100, 0], [0, 100], [0, 0]]], ours: /site\.geojson outer ring: the ring self-intersects/, geos: /^Self-intersection\[/ },
  { name: "a spike (the ring runs out and back along one line)", rings: [[[0, 0], [100, 0], [100, 50], [150, 50], [100, 50], [100, 100], [0, 100], [0, 0]]], ours: /outer ring: the ring self-intersects/, geos: /^(Ring )?Self-intersection\[/ },
];

/** ST_IsValidReason for each geometry of a FeatureCollection file, in order (GDAL's SQLite dialect, GEOS). */
function ogrReasons(file: string): string[] {
  const out = execFileSync("ogrinfo", ["-q", "-dialect", "sqlite", "-sql", "SELECT ST_IsValidReason(geometry) AS r FROM " + path.basename(file, ".geojson"), file], {
    encoding: "utf8",
    stdio: ["ignore", "pipe", "ignore"],
  });
  return [...out.matchAll(/r \(String\) = (.*)/g)].map((m) => m[1].trim());
}

/** The lon/lat GEOS gives in "Reason[lon lat]". */
function geosPlace(reason: string): [number, number] {
  const m = /\[([-\d.e]+) ([-\d.e]+)\]/.exec(reason);
  if (!m) throw new Error(`no place in ${reason}`);
  return [Number(m[1]), Number(m[2])];
}

/** The lon/lat we give in "... at lon X, lat Y". */
function ourPlace(message: string): [number, number] {
  const m = /lon (-?[\d.]+), lat (-?[\d.]+)/.exec(message);
  if (!m) throw new Error(`no place in ${message}`);
  return [Number(m[1]), Number(m[2])];
}

describe("invalid rings: our verdict beside GEOS's", () => {
  for (const c of CASES) {
    it(`${c.name}: ${c.ours ? "refused" : "accepted"}`, () => {
      const text = JSON.stringify({ type: "Polygon", coordinates: c.rings.map((r) => lonLatRing(r)) });
      if (!c.ours) {
        expect(readSite(text, UTM33, { fileName: "site.geojson" }).areaM2).toBeCloseTo(10_000 - 400 - 900, -1);
        return;
      }
      const e = inputError(() => readSite(text, UTM33, { fileName: "site.geojson" }));
      expect(e.message).toMatch(c.ours);
      expect(e.message.split("\n")).toHaveLength(1);
      expect(e.message).toMatch(/allowed: /);
    });
  }

  describe.skipIf(!HAS_GDAL)("against OGR (GEOS) on the same GeoJSON", () => {
    let reasons: string[] = [];
    beforeAll(() => {
      const dir = mkdtempSync(path.join(tmpdir(), "gsdplan-rings-"));
      const file = path.join(dir, "cases.geojson");
      const features = CASES.map((c) => ({ type: "Feature", properties: { name: c.name }, geometry: { type: "Polygon", coordinates: c.rings.map((r) => lonLatRing(r)) } }));
      writeFileSync(file, JSON.stringify({ type: "FeatureCollection", features }));
      reasons = ogrReasons(file);
    });

    it("GEOS gives the reason we expect for every case (valid or not, and why)", () => {
      expect(reasons).toHaveLength(CASES.length);
      CASES.forEach((c, i) => expect(reasons[i], c.name).toMatch(c.geos));
    });

    it("where GEOS places a self-intersection, we place it too (within 1e-6 degrees, our message's rounding)", () => {
      CASES.forEach((c, i) => {
        if (!/^(Ring )?Self-intersection/.test(reasons[i]) || c.rings.length > 1) return;
        const e = inputError(() => readSite(JSON.stringify({ type: "Polygon", coordinates: c.rings.map((r) => lonLatRing(r)) }), UTM33));
        const [lon, lat] = ourPlace(e.message);
        const [glon, glat] = geosPlace(reasons[i]);
        expect(Math.abs(lon - glon), c.name).toBeLessThan(1e-6);
        expect(Math.abs(lat - glat), c.name).toBeLessThan(1e-6);
      });
    });
  });
});

describe("stricter than OGC on one point: rings may not touch", () => {
  it("a hole touching the outer ring at one corner is refused (GEOS accepts it; strips need rings apart)", () => {
    // OGC 06-103r4 6.1.11.1 lets rings touch at a point; the existing rule here refuses it.
    const text = JSON.stringify({ type: "Polygon", coordinates: [lonLatRing(rect(0, 0, 100, 100)), lonLatRing([[0, 50], [50, 40], [50, 60], [0, 50]])] });
    expect(inputError(() => readSite(text, UTM33)).message).toMatch(/hole 1: the hole crosses or touches the outer ring/);
  });
});

describe("ringProblem on large rings (grid buckets, not every pair)", () => {
  /** A star-shaped ring of n vertices (radius varies with angle: always simple). */
  function roundRing(n: number, cx = 0, cy = 0, r = 300): number[][] {
    const out: number[][] = [];
    for (let i = 0; i < n; i++) {
      const t = (2 * Math.PI * i) / n;
      const rr = r * (1 + 0.1 * Math.sin(5 * t)) + 0.3 * Math.sin(400 * t);
      out.push([cx + rr * Math.cos(t), cy + rr * Math.sin(t)]);
    }
    return out;
  }

  it("200 000 vertices, valid: no problem; two vertices swapped deep inside: a self-intersection between them", () => {
    const ring = roundRing(200_000);
    expect(ringProblem([ring])).toBeNull();
    // Swapping vertices k and k + 2 makes edges (k-1, k+2) and (k+1, k) ... cross: a kink
    // between the swapped vertices, nowhere else (plain geometry).
    const k = 123_456;
    const bad = ring.slice();
    [bad[k], bad[k + 2]] = [bad[k + 2], bad[k]];
    const p = ringProblem([bad]);
    expect(p?.kind).toBe("self");
    const xs = [bad[k - 1][0], bad[k][0], bad[k + 1][0], bad[k + 2][0], bad[k + 3][0]];
    const ys = [bad[k - 1][1], bad[k][1], bad[k + 1][1], bad[k + 2][1], bad[k + 3][1]];
    expect(p!.x).toBeGreaterThanOrEqual(Math.min(...xs));
    expect(p!.x).toBeLessThanOrEqual(Math.max(...xs));
    expect(p!.y).toBeGreaterThanOrEqual(Math.min(...ys));
    expect(p!.y).toBeLessThanOrEqual(Math.max(...ys));
  });

  it("200 000-vertex outer ring with 1 000 small holes: holes inside pass, one moved outside is found", () => {
    const outer = roundRing(200_000);
    const holes: number[][][] = [];
    for (let i = 0; i < 1000; i++) {
      const x = -150 + (i % 40) * 7.5, y = -150 + Math.floor(i / 40) * 12;
      holes.push([[x, y], [x, y + 2], [x + 2, y + 2], [x + 2, y]]);
    }
    expect(ringProblem([outer, ...holes])).toBeNull();
    holes[700] = holes[700].map(([x, y]) => [x + 1000, y]);
    expect(ringProblem([outer, ...holes])).toMatchObject({ kind: "hole-outside", ring: 701 });
  });
});
