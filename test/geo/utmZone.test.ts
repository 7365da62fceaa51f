import { describe, it, expect } from "vitest";
import { utmZoneOf, utmZone } from "../../src/geo/utmZone.js";
import { InputError } from "../../src/errors.js";
import epsg32633 from "epsg-index/s/32633.json" with { type: "json" };
import epsg32717 from "epsg-index/s/32717.json" with { type: "json" };

describe("utmZoneOf: the UTM grid's zones (NGA/DMA TM 8358.2, from memory)", () => {
  it("regular 6-degree zones from 180 W, north and south", () => {
    // zone = floor((lon + 180) / 6) + 1; zone 33 spans 12-18 E
    expect(utmZoneOf(15, 52)).toMatchObject({ zone: 33, south: false, epsg: 32633 });
    expect(utmZoneOf(-80, -2)).toMatchObject({ zone: 17, south: true, epsg: 32717 });
    expect(utmZoneOf(-180, 10).zone).toBe(1);
    expect(utmZoneOf(-174.0001, 10).zone).toBe(1);
    expect(utmZoneOf(-174, 10).zone).toBe(2);
    expect(utmZoneOf(179.99, -17).zone).toBe(60);
  });

  it("longitude 180 is zone 60; longitudes outside [-180, 180] wrap", () => {
    expect(utmZoneOf(180, 0).zone).toBe(60);
    expect(utmZoneOf(195, 0).zone).toBe(utmZoneOf(-165, 0).zone); // 3
    expect(utmZoneOf(-190, 0).zone).toBe(59);
  });

  it("southern Norway exception: 56-64 N, 3-12 E is zone 32", () => {
    expect(utmZoneOf(5, 60).zone).toBe(32); // would be 31
    expect(utmZoneOf(3, 56).zone).toBe(32);
    expect(utmZoneOf(2.99, 60).zone).toBe(31);
    expect(utmZoneOf(5, 64).zone).toBe(31); // band W starts at 64 N
    expect(utmZoneOf(5, 55.99).zone).toBe(31);
  });

  it("Svalbard exception: 72-84 N uses zones 31, 33, 35, 37 (limits 9, 21, 33 E)", () => {
    expect(utmZoneOf(8.9, 78).zone).toBe(31);
    expect(utmZoneOf(9, 78).zone).toBe(33);
    expect(utmZoneOf(20.9, 78).zone).toBe(33);
    expect(utmZoneOf(21, 78).zone).toBe(35);
    expect(utmZoneOf(33, 78).zone).toBe(37);
    expect(utmZoneOf(41.9, 78).zone).toBe(37);
    expect(utmZoneOf(42, 78).zone).toBe(38);
    expect(utmZoneOf(15, 71.9).zone).toBe(33); // ordinary zone below 72 N
  });

  it("the proj4 definition matches the EPSG registry's (epsg-index)", () => {
    const strip = (s: string) => s.replace(" +type=crs", "");
    expect(utmZone(33, false).proj4).toBe(strip(epsg32633.proj4));
    expect(utmZone(17, true).proj4).toBe(strip(epsg32717.proj4));
    expect(utmZone(33, false).name).toBe(epsg32633.name);
    expect(utmZone(17, true).name).toBe(epsg32717.name);
  });

  it("beyond 84 N and 80 S: InputError pointing to UPS", () => {
    // UTM covers 80 S to 84 N (NGA/DMA TM 8358.2, from memory); the caps are UPS.
    expect(() => utmZoneOf(10, 84.5)).toThrowError(InputError);
    expect(() => utmZoneOf(10, 84.5)).toThrowError(/latitude.*32661/);
    expect(() => utmZoneOf(10, -80.5)).toThrowError(/latitude.*32761/);
    expect(utmZoneOf(10, 84).zone).toBe(33); // the limits themselves are UTM
    expect(utmZoneOf(10, -80).zone).toBe(32);
  });

  it("bad input names the field", () => {
    expect(() => utmZoneOf(Number.NaN, 10)).toThrowError(/^longitude:/);
    expect(() => utmZoneOf(10, 91)).toThrowError(/^latitude:/);
  });
});
