import { describe, it, expect } from "vitest";
import proj4 from "proj4";
import { crsFromEpsg, horizontalCrs, verticalInfo } from "../../src/dem/crs.js";
import { userDefinedProj4 } from "../../src/dem/userdefined.js";

const F = "test.tif";
const dms = (d: number, m: number, s = 0) => Math.sign(d || 1) * (Math.abs(d) + m / 60 + s / 3600);

describe("EPSG-coded CRSs through epsg-index", () => {
  it("EPSG:2227 is NAD83 / California zone 3 in US survey feet (1200/3937 m, EPSG unit 9003)", () => {
    const c = crsFromEpsg(2227, F);
    expect(c.name).toBe("NAD83 / California zone 3 (ftUS)");
    expect(c.linearUnitM).toBeCloseTo(1200 / 3937, 12);
    expect(c.geographic).toBe(false);
  });
  it("EPSG:4326 is geographic, EPSG:5773 is refused as a horizontal CRS, unknown codes are refused", () => {
    expect(crsFromEpsg(4326, F).geographic).toBe(true);
    expect(() => crsFromEpsg(5773, F)).toThrow(/not a horizontal CRS/);
    expect(() => horizontalCrs({ GTModelTypeGeoKey: 1, ProjectedCSTypeGeoKey: 32699 }, F)).toThrow(/test\.tif: unknown EPSG code 32699/);
  });
});

// Worked examples of IOGP Guidance Note 7-2 (Coordinate Conversions and Transformations
// including Formulas), from memory; each built from the GeoKeys a GeoTIFF would carry.
describe("user-defined projections from GeoKeys against IOGP GN 7-2 worked examples", () => {
  const fwd = (keys: Record<string, unknown>, lon: number, lat: number) => {
    const { proj4: def } = userDefinedProj4(keys, F);
    return proj4("+proj=longlat +ellps=WGS84 +no_defs", def).forward([lon, lat]);
  };
  // The examples are on their own datums; giving WGS84 geodetic input to an ellipsoid-only
  // definition applies no datum shift (neither side has TOWGS84), so the projection alone is tested.

  it("Transverse Mercator, OSGB 1936 / British National Grid: 50°30'N 0°30'E -> E 577274.99 N 69740.50", () => {
    const [e, n] = fwd({ ProjCoordTransGeoKey: 1, ProjNatOriginLatGeoKey: 49, ProjNatOriginLongGeoKey: -2, ProjScaleAtNatOriginGeoKey: 0.9996012717, ProjFalseEastingGeoKey: 400000, ProjFalseNorthingGeoKey: -100000, ProjLinearUnitsGeoKey: 9001, GeogEllipsoidGeoKey: 7001 }, 0.5, 50.5);
    expect(e).toBeCloseTo(577274.99, 1);
    expect(n).toBeCloseTo(69740.5, 1);
  });

  it("Lambert Conic Conformal 2SP in US survey feet, NAD27 / Texas South Central: 28°30'N 96°W -> E 2963503.91 ftUS N 254759.80 ftUS", () => {
    const keys = { ProjCoordTransGeoKey: 8, ProjStdParallel1GeoKey: dms(28, 23), ProjStdParallel2GeoKey: dms(30, 17), ProjFalseOriginLatGeoKey: dms(27, 50), ProjFalseOriginLongGeoKey: -99, ProjFalseOriginEastingGeoKey: 2000000, ProjFalseOriginNorthingGeoKey: 0, ProjLinearUnitsGeoKey: 9003, GeogEllipsoidGeoKey: 7008 };
    const [e, n] = fwd(keys, -96, 28.5);
    // proj4 returns coordinates in the CRS unit (+units=us-ft).
    expect(e).toBeCloseTo(2963503.91, 1);
    expect(n).toBeCloseTo(254759.8, 1);
    expect(userDefinedProj4(keys, F).unit.metres).toBeCloseTo(1200 / 3937, 12);
  });

  it("Oblique Stereographic, Amersfoort / RD New: 53°N 6°E -> E 196105.283 N 557057.739", () => {
    const [e, n] = fwd({ ProjCoordTransGeoKey: 16, ProjNatOriginLatGeoKey: dms(52, 9, 22.178), ProjNatOriginLongGeoKey: dms(5, 23, 15.5), ProjScaleAtNatOriginGeoKey: 0.9999079, ProjFalseEastingGeoKey: 155000, ProjFalseNorthingGeoKey: 463000, GeogEllipsoidGeoKey: 7004 }, 6, 53);
    expect(e).toBeCloseTo(196105.283, 1);
    expect(n).toBeCloseTo(557057.739, 1);
  });

  it("Polar Stereographic variant A, WGS 84 / UPS North: 73°N 44°E -> E 3320416.75 N 632668.43", () => {
    const [e, n] = fwd({ ProjCoordTransGeoKey: 15, ProjNatOriginLatGeoKey: 90, ProjStraightVertPoleLongGeoKey: 0, ProjScaleAtNatOriginGeoKey: 0.994, ProjFalseEastingGeoKey: 2000000, ProjFalseNorthingGeoKey: 2000000, GeographicTypeGeoKey: 4326 }, 44, 73);
    expect(e).toBeCloseTo(3320416.75, 1);
    expect(n).toBeCloseTo(632668.43, 1);
  });

  it("EPSG UTM conversion codes in ProjectionGeoKey (16125 = UTM zone 25S)", () => {
    const { proj4: def } = userDefinedProj4({ ProjectionGeoKey: 16125, GeogSemiMajorAxisGeoKey: 6378137, GeogInvFlatteningGeoKey: 298.257222101 }, F);
    expect(def).toMatch(/\+proj=utm \+zone=25 \+south/);
  });

  it("an unsupported method is refused naming the key", () => {
    expect(() => userDefinedProj4({ ProjCoordTransGeoKey: 23, GeogEllipsoidGeoKey: 7030 }, F)).toThrow(/ProjCoordTransGeoKey 23/);
  });
});

describe("vertical unit and datum from the GeoKeys", () => {
  it("VerticalCSTypeGeoKey 6360 (NAVD88 height (ftUS)) gives US survey feet, 1200/3937 m each", () => {
    const v = verticalInfo({ VerticalCSTypeGeoKey: 6360 }, F);
    expect(v.unit).toBe("US survey foot");
    expect(v.unitM).toBeCloseTo(1200 / 3937, 12);
    expect(v.datum).toBe("other");
    expect(v.name).toBe("NAVD88 height (ftUS)");
  });
  it("5773 EGM96 height -> egm96, 3855 EGM2008 height -> egm2008, 5703 NAVD88 height -> other, in metres", () => {
    expect(verticalInfo({ VerticalCSTypeGeoKey: 5773 }, F).datum).toBe("egm96");
    expect(verticalInfo({ VerticalCSTypeGeoKey: 3855 }, F).datum).toBe("egm2008");
    const navd = verticalInfo({ VerticalCSTypeGeoKey: 5703 }, F);
    expect([navd.datum, navd.unitM, navd.name]).toEqual(["other", 1, "NAVD88 height"]);
  });
  it("VerticalUnitsGeoKey 9002 is the international foot, 0.3048 m exactly", () => {
    expect(verticalInfo({ VerticalUnitsGeoKey: 9002 }, F).unitM).toBe(0.3048);
  });
  it("no vertical keys: unknown datum and metres, each with a warning; overrides win", () => {
    const v = verticalInfo({}, F);
    expect(v.datum).toBe("unknown");
    expect(v.warnings.join(" ")).toMatch(/vertical datum not declared/);
    expect(v.warnings.join(" ")).toMatch(/vertical unit not declared/);
    const o = verticalInfo({}, F, { verticalDatum: "egm2008", verticalUnit: "ftUS" });
    expect(o.datum).toBe("egm2008");
    expect(o.unitM).toBeCloseTo(1200 / 3937, 12);
    expect(o.warnings.join(" ")).not.toMatch(/datum not declared/);
    expect(() => verticalInfo({}, F, { verticalDatum: "navd" as never })).toThrow(/verticalDatum/);
  });
  it("an unknown vertical CRS code leaves the datum unknown with a warning", () => {
    const v = verticalInfo({ VerticalCSTypeGeoKey: 1 }, F);
    expect(v.datum).toBe("unknown");
    expect(v.warnings.join(" ")).toMatch(/unknown vertical CRS code 1/);
  });
});
