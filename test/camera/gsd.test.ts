import { describe, it, expect } from "vitest";
import { makeCamera } from "../../src/camera/makeCamera.js";
import { groundSampleDistanceM, heightForGsdM, footprintM, pixelPitchMm } from "../../src/camera/gsd.js";
import { InputError } from "../../src/errors.js";

const DEG = Math.PI / 180;

describe("GSD and footprint against a textbook example", () => {
  // Wolf & DeWitt, Elements of Photogrammetry (from memory): a 152.4 mm lens at
  // 1524 m above flat ground gives photo scale f/H = 1:10 000. On the 230 x 230 mm
  // film format of aerial survey cameras (common practice), scanned at 20 um
  // (11 500 px), one pixel is 0.02 mm * 10 000 = 0.2 m and a photo covers 2.3 km.
  const survey = makeCamera({ sensorWidthMm: 230, sensorHeightMm: 230, focalLengthMm: 152.4, imageWidthPx: 11500, imageHeightPx: 11500 });

  it("scale 1:10 000 at 1524 m", () => {
    const gsd = groundSampleDistanceM(survey, 1524);
    const scale = pixelPitchMm(survey)! / 1000 / gsd;
    expect(1 / scale).toBeCloseTo(10000, 6);
    expect(gsd).toBeCloseTo(0.2, 12);
  });

  it("footprint 2.3 km x 2.3 km and the inverse height", () => {
    const fp = footprintM(survey, 1524);
    expect(fp.acrossM).toBeCloseTo(2300, 9);
    expect(fp.alongM).toBeCloseTo(2300, 9);
    expect(heightForGsdM(survey, 0.2)).toBeCloseTo(1524, 9);
  });
});

describe("similar triangles: GSD = 2 H tan(HFOV/2) / px (any photogrammetry text)", () => {
  // A sensor-and-lens camera and the same camera given by its HFOV must agree, and both
  // must match the identity, at narrow to very wide angles.
  const sensorW = 13.2;
  const widthPx = 5472;
  for (const f of [36, 15.9, 8.8, 6.6, 3.81]) {
    const hfov = 2 * Math.atan(sensorW / (2 * f)); // 20.9, 45.1, 73.7, 90, 120 degrees
    it(`f = ${f} mm (HFOV ${(hfov / DEG).toFixed(1)} deg) at 50, 120, 400 m`, () => {
      const bySensor = makeCamera({ sensorWidthMm: sensorW, sensorHeightMm: 8.8, focalLengthMm: f, imageWidthPx: widthPx, imageHeightPx: 3648 });
      const byFov = makeCamera({ hfovDeg: hfov / DEG, imageWidthPx: widthPx, imageHeightPx: 3648 });
      for (const h of [50, 120, 400]) {
        const identity = (2 * h * Math.tan(hfov / 2)) / widthPx;
        expect(groundSampleDistanceM(bySensor, h) / identity).toBeCloseTo(1, 12);
        expect(groundSampleDistanceM(byFov, h) / identity).toBeCloseTo(1, 12);
        // footprint width = image width px * GSD (domain notes) = 2 H tan(HFOV/2)
        expect(footprintM(bySensor, h).acrossM / (2 * h * Math.tan(hfov / 2))).toBeCloseTo(1, 12);
      }
    });
  }

  it("generic 1-inch camera at 100 m: GSD 2.74 cm, footprint 150 m x 100 m (3:2)", () => {
    // hand: p = 13.2/5472 = 2.4123 um; GSD = 100 * 2.4123e-3 / 8.8 = 0.027412 m;
    // across = 5472 * 0.027412 = 150.0 m (= 100 * 13.2 / 8.8); along = 3648 * 0.027412 = 100.0 m
    const c = makeCamera({ sensorWidthMm: 13.2, sensorHeightMm: 8.8, focalLengthMm: 8.8, imageWidthPx: 5472, imageHeightPx: 3648 });
    expect(groundSampleDistanceM(c, 100)).toBeCloseTo(0.027412, 6);
    const fp = footprintM(c, 100);
    expect(fp.acrossM).toBeCloseTo(150, 9);
    expect(fp.alongM).toBeCloseTo(100, 9);
  });
});

describe("camera orientation: long side across the track unless portrait (common practice)", () => {
  it("portrait swaps the footprint", () => {
    const base = { sensorWidthMm: 13.2, sensorHeightMm: 8.8, focalLengthMm: 8.8, imageWidthPx: 5472, imageHeightPx: 3648 };
    const land = footprintM(makeCamera(base), 100);
    const port = footprintM(makeCamera({ ...base, portrait: true }), 100);
    expect(land.acrossM).toBeGreaterThan(land.alongM);
    expect(port.acrossM).toBeCloseTo(land.alongM, 9);
    expect(port.alongM).toBeCloseTo(land.acrossM, 9);
  });

  it("a camera described with its short side as 'width' still puts the long side across", () => {
    const c = makeCamera({ sensorWidthMm: 8.8, sensorHeightMm: 13.2, focalLengthMm: 8.8, imageWidthPx: 3648, imageHeightPx: 5472 });
    const fp = footprintM(c, 100);
    expect(fp.acrossM).toBeCloseTo(150, 9);
    expect(fp.alongM).toBeCloseTo(100, 9);
  });
});

describe("pixel pitch and bad heights", () => {
  it("pitch = sensor width / px; unknown for a camera given by FOV", () => {
    expect(pixelPitchMm(makeCamera({ sensorWidthMm: 13.2, sensorHeightMm: 8.8, focalLengthMm: 8.8, imageWidthPx: 5472, imageHeightPx: 3648 }))).toBeCloseTo(0.0024123, 7);
    expect(pixelPitchMm(makeCamera({ hfovDeg: 70, imageWidthPx: 4000, imageHeightPx: 3000 }))).toBeUndefined();
  });

  it("non-positive height or GSD is an InputError", () => {
    const c = makeCamera({ hfovDeg: 70, imageWidthPx: 4000, imageHeightPx: 3000 });
    expect(() => groundSampleDistanceM(c, 0)).toThrowError(InputError);
    expect(() => footprintM(c, -10)).toThrowError(/^heightM:/);
    expect(() => heightForGsdM(c, 0)).toThrowError(/^gsdM:/);
  });
});
