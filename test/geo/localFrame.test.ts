import { describe, it, expect } from "vitest";
import { localFrameFor, toWgs84Many, fromWgs84Many, frameFromProj4, MAX_FRAME_SCALE_ERROR } from "../../src/geo/localFrame.js";
import { InputError } from "../../src/errors.js";
import type { CrsInfo } from "../../src/dem/grid.js";
import epsg3857 from "epsg-index/s/3857.json" with { type: "json" };
import { HAS_CS2CS, cs2cs, seededRandom } from "./projCli.js";
import proj4 from "proj4";
import { Geodesic } from "geographiclib-geodesic";

const WGS84 = "+proj=longlat +datum=WGS84 +no_defs";

// OSGB36 / British National Grid with the OSGB-published 7-parameter Helmert
// shift (as PROJ writes EPSG 27700 with transformation 1314), so proj4 needs no grid file.
const BNG: CrsInfo = {
  proj4: "+proj=tmerc +lat_0=49 +lon_0=-2 +k=0.9996012717 +x_0=400000 +y_0=-100000 +ellps=airy +towgs84=446.448,-125.157,542.06,0.15,0.247,0.842,-20.489 +units=m +no_defs",
  epsg: 27700,
  name: "OSGB36 / British National Grid",
  geographic: false,
  linearUnitM: 1,
};

function randomPoints(seed: number, lon0: number, lon1: number, lat0: number, lat1: number, n: number): [number, number][] {
  const r = seededRandom(seed);
  return Array.from({ length: n }, () => [lon0 + (lon1 - lon0) * r(), lat0 + (lat1 - lat0) * r()] as [number, number]);
}

describe("localFrameFor: which frame a site gets", () => {
  it("no DEM CRS: the UTM zone of the centre (WGS84, EPSG 326xx/327xx)", () => {
    const f = localFrameFor(15.2, 52.1);
    expect(f).toMatchObject({ epsg: 32633, source: "utm", name: "WGS 84 / UTM zone 33N" });
    expect(localFrameFor(-80, -2).epsg).toBe(32717);
  });

  it("UTM's scale factor 0.9996 on the central meridian (the UTM definition)", () => {
    expect(localFrameFor(15, 45).scaleFactor).toBeCloseTo(0.9996, 6);
  });

  it("a projected metric DEM CRS is kept", () => {
    const f = localFrameFor(-1.5, 53, BNG);
    expect(f.source).toBe("dem");
    expect(f.epsg).toBe(27700);
    expect(f.proj4).toBe(BNG.proj4);
  });

  it("a feet DEM CRS is kept with its unit taken as metres: frame metres = DEM feet x 0.3048006096 (exactly, PROJ applies false origins in metres)", () => {
    const ft: CrsInfo = { ...BNG, proj4: BNG.proj4.replace("+units=m", "+units=us-ft"), linearUnitM: 1200 / 3937 };
    const f = localFrameFor(-1.5, 53, ft);
    expect(f.source).toBe("dem-metres");
    expect(f.fromNative).toMatchObject({ sx: 1200 / 3937, sy: 1200 / 3937, ox: 0, oy: 0 });
    // The same point through the BNG definition in metres (proj4 as the reference).
    const [x, y] = frameFromProj4(BNG.proj4, 27700, "BNG").fromWgs84(-1.5, 53);
    const [fx, fy] = f.fromWgs84(-1.5, 53);
    expect(Math.abs(fx - x)).toBeLessThan(1e-6);
    expect(Math.abs(fy - y)).toBeLessThan(1e-6);
  });

  it("a geographic DEM gets a local equirectangular frame on its degrees: affine, true to scale at the centre (GeographicLib geodesics)", () => {
    const geo: CrsInfo = { proj4: WGS84, epsg: 4326, name: "WGS 84", geographic: true, linearUnitM: Number.NaN };
    const f = localFrameFor(7.45, 46.55, geo, { west: 7.42, east: 7.48, south: 46.52, north: 46.58 });
    expect(f.source).toBe("local-eqc");
    const a = f.fromNative!;
    // Affine per axis: the frame coordinates of any lon/lat equal ox + sx * lon, oy + sy * lat.
    for (const [lon, lat] of randomPoints(3, 7.42, 7.48, 46.52, 46.58, 50)) {
      const [x, y] = f.fromWgs84(lon, lat);
      expect(Math.abs(x - (a.ox + a.sx * lon))).toBeLessThan(1e-6);
      expect(Math.abs(y - (a.oy + a.sy * lat))).toBeLessThan(1e-6);
      const [lonB, latB] = f.toWgs84(x, y);
      expect(Math.abs(lonB - lon)).toBeLessThan(1e-11);
      expect(Math.abs(latB - lat)).toBeLessThan(1e-11);
    }
    // Distances against the WGS84 geodesic (GeographicLib, Karney 2013): short lines near the
    // centre within 1e-5 relative, and 3 km lines across the window within the 0.5 % the frame chooser allows
    // (here far less: east-west scale drifts by tan(46.55) x 3e-5 rad = 0.003 %).
    const g = Geodesic.WGS84;
    for (const [lon1, lat1, lon2, lat2, tol] of [
      [7.45, 46.55, 7.4513, 46.55, 1e-5], [7.45, 46.55, 7.45, 46.5509, 1e-5], [7.43, 46.53, 7.47, 46.56, 1e-4], [7.42, 46.58, 7.48, 46.58, 1e-3],
    ]) {
      const d = g.Inverse(lat1, lon1, lat2, lon2).s12!;
      const [x1, y1] = f.fromWgs84(lon1, lat1);
      const [x2, y2] = f.fromWgs84(lon2, lat2);
      expect(Math.abs(Math.hypot(x2 - x1, y2 - y1) / d - 1)).toBeLessThan(tol);
    }
  });

  it("a geographic DEM on another datum: the frame carries it (proj4's Helmert shift), still affine on the DEM's own degrees", () => {
    const ed50: CrsInfo = { proj4: "+proj=longlat +ellps=intl +towgs84=-87,-98,-121,0,0,0,0 +no_defs", epsg: 4230, name: "ED50", geographic: true, linearUnitM: Number.NaN };
    const f = localFrameFor(7.45, 46.55, ed50);
    expect(f.source).toBe("local-eqc");
    const a = f.fromNative!;
    const toEd50 = proj4("WGS84", ed50.proj4);
    for (const [lon, lat] of randomPoints(5, 7.44, 7.46, 46.54, 46.56, 20)) {
      const [x, y] = f.fromWgs84(lon, lat);
      const [elon, elat] = toEd50.forward([lon, lat]);
      expect(Math.abs(x - (a.ox + a.sx * elon))).toBeLessThan(1e-5);
      expect(Math.abs(y - (a.oy + a.sy * elat))).toBeLessThan(1e-5);
    }
  });

  it("a geographic DEM over a window too wide for one equirectangular frame falls back to UTM, saying why", () => {
    const geo: CrsInfo = { proj4: WGS84, epsg: 4326, name: "WGS 84", geographic: true, linearUnitM: Number.NaN };
    // 60 N, 1 degree of latitude each way: east-west scale off by tan(60) x 0.0175 = 3 %.
    const f = localFrameFor(10, 60, geo, { west: 9, east: 11, south: 59, north: 61 });
    expect(f.source).toBe("utm");
    expect(f.reason).toMatch(/scale at the site is/);
  });

  it("Web Mercator is metric in name only: at 60 N its scale is 1/cos(60) = 2, so the frame divides it out; on the equator its north-south scale differs from east-west, so UTM is used", () => {
    // Mercator point scale sec(lat) on the sphere (Snyder, Map Projections: A Working Manual, 1987, from memory)
    const merc: CrsInfo = { proj4: epsg3857.proj4, epsg: 3857, name: epsg3857.name, geographic: false, linearUnitM: 1 };
    // Conformal, so the DEM's own CRS divided by its point scale at the site is true to scale
    // over a small window: the DEM's cells are kept (no resampling).
    const f = localFrameFor(10, 60, merc, { west: 9.98, east: 10.02, south: 59.99, north: 60.01 });
    expect(f.source).toBe("dem-scaled");
    expect(f.fromNative!.sx).toBeCloseTo(1 / 1.9966, 3);
    expect(Math.abs(f.scaleFactor - 1)).toBeLessThan(MAX_FRAME_SCALE_ERROR);
    // Against GeographicLib's geodesic: a 1 km east-west line at 60 N measures 1 km in the frame within 0.3 %.
    const d = Geodesic.WGS84.Inverse(60, 10, 60, 10.01796).s12!;
    const [x1, y1] = f.fromWgs84(10, 60), [x2, y2] = f.fromWgs84(10.01796, 60);
    expect(Math.abs(Math.hypot(x2 - x1, y2 - y1) / d - 1)).toBeLessThan(0.003);
    // Even on the equator it fails: its northing grows at the sphere's a = 6 378 137 m per radian
    // while the ellipsoid's meridian radius there is a(1 - e^2) = 6 335 439 m (WGS84 constants,
    // NIMA TR8350.2), a scale of 1.00674.
    const eq = localFrameFor(10, 0, merc);
    expect(eq.source).toBe("utm");
    expect(eq.reason).toMatch(/scale at the site is 1\.0067/);
    expect(MAX_FRAME_SCALE_ERROR).toBe(0.005);
  });

  it("beyond UTM's limits: UPS North / South (EPSG 32661 / 32761)", () => {
    expect(localFrameFor(10, 86)).toMatchObject({ epsg: 32661, source: "ups" });
    expect(localFrameFor(10, -85)).toMatchObject({ epsg: 32761, source: "ups" });
    // UPS scale factor at the pole is 0.994 (its definition)
    expect(localFrameFor(0, 90).scaleFactor).toBeCloseTo(0.994, 4);
  });

  it("bad centre coordinates are InputErrors naming the field", () => {
    expect(() => localFrameFor(Number.NaN, 10)).toThrowError(InputError);
    expect(() => localFrameFor(10, 95)).toThrowError(/^site centre latitude:/);
  });

  it("toWgs84Many / fromWgs84Many agree with the per-point transforms and fill given arrays", () => {
    const f = localFrameFor(15.2, 52.1);
    const lons = Float64Array.of(15, 15.5, 16.1);
    const lats = Float64Array.of(52, 52.3, 51.9);
    const out = { x: new Float64Array(3), y: new Float64Array(3) };
    const { x, y } = fromWgs84Many(f, lons, lats, out);
    expect(x).toBe(out.x);
    for (let i = 0; i < 3; i++) {
      const [xi, yi] = f.fromWgs84(lons[i], lats[i]);
      expect(x[i]).toBe(xi);
      expect(y[i]).toBe(yi);
    }
    const back = toWgs84Many(f, x, y);
    for (let i = 0; i < 3; i++) {
      expect(back.lon[i]).toBeCloseTo(lons[i], 10);
      expect(back.lat[i]).toBeCloseTo(lats[i], 10);
    }
    expect(() => fromWgs84Many(f, lons, lats.subarray(1))).toThrowError(RangeError);
  });

  it("an unusable proj4 string is an InputError", () => {
    expect(() => frameFromProj4("+proj=nonsense", null, "x")).toThrowError(InputError);
  });
});

describe.skipIf(!HAS_CS2CS)("frame transforms against PROJ cs2cs (Debian proj-bin)", () => {
  const cases: { name: string; lon: [number, number]; lat: [number, number]; crs?: CrsInfo; expectEpsg: number }[] = [
    { name: "UTM 33N (central Europe)", lon: [12.2, 17.8], lat: [47, 55], expectEpsg: 32633 },
    { name: "UTM 17S (Andes/Ecuador)", lon: [-83.8, -78.2], lat: [-8, -0.1], expectEpsg: 32717 },
    { name: "UTM 54N (Japan)", lon: [138.2, 143.8], lat: [34, 44], expectEpsg: 32654 },
    { name: "UTM 32N wide (Norway exception, 3-12 E)", lon: [3, 12], lat: [56, 64], expectEpsg: 32632 },
    { name: "UTM 60S (Fiji, astride the antimeridian)", lon: [177, 183], lat: [-19, -15], expectEpsg: 32760 },
    { name: "UPS North", lon: [-180, 180], lat: [84.5, 89.9], expectEpsg: 32661 },
    { name: "British National Grid (national grid, Helmert to WGS84)", lon: [-6, 1.5], lat: [50, 58], crs: BNG, expectEpsg: 27700 },
  ];
  for (const [k, c] of cases.entries()) {
    it(`${c.name}: 200 points forward and back within 1 mm`, () => {
      const cLon = (c.lon[0] + c.lon[1]) / 2;
      const cLat = (c.lat[0] + c.lat[1]) / 2;
      const f = localFrameFor(cLon, cLat, c.crs);
      expect(f.epsg).toBe(c.expectEpsg);
      const pts = randomPoints(100 + k, c.lon[0], c.lon[1], c.lat[0], c.lat[1], 200);
      // cs2cs wants longitudes in [-180, 180]; ours wrap themselves, so give them raw.
      const ref = cs2cs(WGS84, f.proj4, pts.map(([lo, la]) => [lo > 180 ? lo - 360 : lo, la]));
      const { x, y } = fromWgs84Many(f, pts.map((p) => p[0]), pts.map((p) => p[1]));
      let worst = 0;
      for (let i = 0; i < pts.length; i++) worst = Math.max(worst, Math.hypot(x[i] - ref[i][0], y[i] - ref[i][1]));
      expect(worst).toBeLessThan(1e-3);
      // inverse: PROJ's inverse of PROJ's forward, back to the same lon/lat
      const back = toWgs84Many(f, ref.map((r) => r[0]), ref.map((r) => r[1]));
      const refBack = cs2cs(f.proj4, WGS84, ref, 9);
      for (let i = 0; i < pts.length; i++) {
        expect(Math.abs(back.lat[i] - refBack[i][1])).toBeLessThan(1e-8);
        let dLon = Math.abs(back.lon[i] - refBack[i][0]);
        if (dLon > 180) dLon = 360 - dLon;
        expect(dLon).toBeLessThan(1e-8 / Math.cos((back.lat[i] * Math.PI) / 180));
        expect(back.lon[i]).toBeGreaterThanOrEqual(-180);
        expect(back.lon[i]).toBeLessThanOrEqual(180);
      }
    });
  }

  it("antimeridian: 179.9 E and 179.9 W in zone 60 are 2 x 0.1 degrees apart in x, not 359.8", () => {
    const f = localFrameFor(180, -17);
    const [[xe], [xw]] = cs2cs(WGS84, f.proj4, [[179.9, -17], [-179.9, -17]]);
    const [x1] = f.fromWgs84(179.9, -17);
    const [x2] = f.fromWgs84(-179.9, -17);
    expect(Math.abs(x1 - xe)).toBeLessThan(1e-3);
    expect(Math.abs(x2 - xw)).toBeLessThan(1e-3);
    // 0.2 degrees of longitude at 17 S is about 21.3 km
    expect(x2 - x1).toBeGreaterThan(21000);
    expect(x2 - x1).toBeLessThan(21500);
  });
});
