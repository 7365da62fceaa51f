import { describe, it, expect } from "vitest";
import { egm96UndulationM, egm96UndulationManyM, orthometricToEllipsoidal, EGM2008_APPROXIMATION_WARNING, type HeightDatum } from "../../src/geo/geoid.js";
import { InputError } from "../../src/errors.js";
import { HAS_CCT, projEgm96UndulationsM, seededRandom } from "./projCli.js";

// NGA's EGM96 test points (the OUTINTPT.DAT check values distributed with the
// EGM96 interpolation program; from memory). East longitudes as NGA gives them.
const NGA_POINTS: [lat: number, lonEast: number, nM: number][] = [
  [38.628155, 269.779155, -31.628],
  [-14.621217, 305.021114, -2.969],
  [46.874319, 102.448729, -43.575],
  [-23.617446, 133.874712, 15.871],
  [38.625473, 359.9995, 50.066],
  [-0.466744, 0.0023, 17.329],
];

describe("EGM96 undulation against NGA's test points (from memory)", () => {
  for (const [lat, lon, n] of NGA_POINTS) {
    it(`${lat} N ${lon} E -> ${n} m within 0.1 m`, () => {
      expect(Math.abs(egm96UndulationM(lat, lon) - n)).toBeLessThan(0.1);
      // same place with the longitude given west of Greenwich
      expect(egm96UndulationM(lat, lon - 360)).toBeCloseTo(egm96UndulationM(lat, lon), 9);
    });
  }

  it("vectorised form gives the same values and passes NaN through", () => {
    const lats = Float64Array.from([...NGA_POINTS.map((p) => p[0]), Number.NaN]);
    const lons = Float64Array.from([...NGA_POINTS.map((p) => p[1]), 0]);
    const out = egm96UndulationManyM(lats, lons);
    NGA_POINTS.forEach(([lat, lon], i) => expect(out[i]).toBe(egm96UndulationM(lat, lon)));
    expect(out[NGA_POINTS.length]).toBeNaN();
  });

  it("stays within EGM96's published range, about -107 m to +85 m", () => {
    // range as stated by NGA for EGM96 (from memory): low south of India, high over New Guinea
    const r = seededRandom(7);
    let lo = Infinity;
    let hi = -Infinity;
    for (let i = 0; i < 2000; i++) {
      const n = egm96UndulationM(-90 + 180 * r(), -180 + 360 * r());
      lo = Math.min(lo, n);
      hi = Math.max(hi, n);
    }
    expect(lo).toBeGreaterThan(-107.5);
    expect(hi).toBeLessThan(85.5);
    // the extremes themselves (from memory): about -107 m south of India and Sri Lanka,
    // about +85 m over New Guinea
    expect(egm96UndulationM(4.75, 78.75)).toBeLessThan(-106);
    expect(egm96UndulationM(-8, 147.25)).toBeGreaterThan(84);
  });
});

describe.skipIf(!HAS_CCT)("EGM96 undulation against PROJ's egm96_15.gtx (Debian proj-bin, proj-data)", () => {
  it("300 random points within 0.05 m", () => {
    // Both use NGA's 15' grid with bilinear interpolation, so they should agree to
    // centimetres (measured: under 5 mm); the 0.05 m allows for the two packages'
    // different storage of the grid (centimetre text values vs. float32 in the .gtx).
    const r = seededRandom(42);
    const pts: [number, number][] = [];
    for (let i = 0; i < 300; i++) pts.push([-180 + 360 * r(), -89 + 178 * r()]);
    const ref = projEgm96UndulationsM(pts);
    // sign check against NGA: PROJ's grid at the first NGA point is negative, as NGA's -31.628
    expect(projEgm96UndulationsM([[269.779155 - 360, 38.628155]])[0]).toBeCloseTo(-31.6, 0);
    let worst = 0;
    pts.forEach(([lon, lat], i) => (worst = Math.max(worst, Math.abs(egm96UndulationM(lat, lon) - ref[i]))));
    expect(worst).toBeLessThan(0.05);
  });
});

describe("orthometricToEllipsoidal: h = H + N", () => {
  it("egm96 adds the undulation (h = H + N, NGA EGM96 documentation)", () => {
    const [lat, lon, n] = NGA_POINTS[0];
    const { heightM, warning } = orthometricToEllipsoidal(200, lat, lon, "egm96");
    expect(Math.abs(heightM - (200 + n))).toBeLessThan(0.1);
    expect(warning).toBeUndefined();
  });

  it("ellipsoid passes through", () => {
    expect(orthometricToEllipsoidal(123.4, 10, 20, "ellipsoid")).toEqual({ heightM: 123.4 });
  });

  it("egm2008 is approximated with EGM96 and says so", () => {
    const r = orthometricToEllipsoidal(100, 46.874319, 102.448729, "egm2008");
    expect(Math.abs(r.heightM - (100 - 43.575))).toBeLessThan(0.1);
    expect(r.warning).toBe(EGM2008_APPROXIMATION_WARNING);
    expect(r.warning).toMatch(/EGM96/);
  });

  it("bad datum or latitude is an InputError naming the field", () => {
    expect(() => orthometricToEllipsoidal(1, 0, 0, "navd88" as HeightDatum)).toThrowError(/^vertical datum:/);
    expect(() => orthometricToEllipsoidal(1, 95, 0, "egm96")).toThrowError(InputError);
    expect(() => egm96UndulationM(-91, 0)).toThrowError(/^latitude:/);
  });
});
