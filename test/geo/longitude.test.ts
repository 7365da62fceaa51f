import { describe, it, expect } from "vitest";
import { normaliseLonDeg, lonLatCentre } from "../../src/geo/longitude.js";

// RFC 7946 section 4: longitudes in [-180, 180]; a box crossing the
// antimeridian has west > east (section 5.2), i.e. the short way round.
describe("longitude normalisation (RFC 7946 ranges)", () => {
  it("wraps into [-180, 180]", () => {
    expect(normaliseLonDeg(190)).toBe(-170);
    expect(normaliseLonDeg(-190)).toBe(170);
    expect(normaliseLonDeg(360)).toBe(0);
    expect(normaliseLonDeg(180)).toBe(180);
    expect(normaliseLonDeg(-180)).toBe(-180);
    expect(normaliseLonDeg(540)).toBe(180);
    expect(normaliseLonDeg(269.779155)).toBeCloseTo(-90.220845, 9);
  });

  it("centre of a site across the antimeridian is near 180, not 0", () => {
    const [lon, lat] = lonLatCentre([179.8, -179.9, 179.95], [-17, -17.2, -16.9]);
    expect(Math.abs(Math.abs(lon) - 179.95)).toBeLessThan(1e-9);
    expect(lat).toBeCloseTo(-17.05, 12);
    expect(lonLatCentre([10, 12], [1, 3])).toEqual([11, 2]);
  });
});
