import { describe, it, expect } from "vitest";
import { makeCamera, type CameraSpec } from "../../src/camera/makeCamera.js";
import { DEFAULT_EXPOSURE_S, DEFAULT_MIN_INTERVAL_S } from "../../src/camera/defaults.js";
import { InputError } from "../../src/errors.js";

// A generic 20 MP camera with a 1-inch-type sensor (13.2 x 8.8 mm, 5472 x 3648 px) and an 8.8 mm lens.
const ONE_INCH = { sensorWidthMm: 13.2, sensorHeightMm: 8.8, focalLengthMm: 8.8, imageWidthPx: 5472, imageHeightPx: 3648 };

/** Expect an InputError whose field is `field`. */
function expectFieldError(spec: unknown, field: string): void {
  let err: unknown;
  try {
    makeCamera(spec as CameraSpec);
  } catch (e) {
    err = e;
  }
  expect(err).toBeInstanceOf(InputError);
  expect((err as InputError).field).toBe(field);
  expect((err as InputError).message.startsWith(`${field}:`)).toBe(true);
}

describe("makeCamera", () => {
  it("from sensor and lens: ifov = p / f, HFOV = 2 atan(w / 2f) (pinhole camera)", () => {
    const c = makeCamera(ONE_INCH);
    // p = 13.2 mm / 5472 = 2.4123 um; ifov = 0.0024123 / 8.8 = 2.7412e-4
    expect(c.ifov).toBeCloseTo(13.2 / 5472 / 8.8, 12);
    // HFOV = 2 atan(6.6 / 8.8) = 2 atan(0.75) = 73.740 degrees
    expect(c.hfovDeg).toBeCloseTo(73.7398, 3);
    expect(c.portrait).toBe(false);
  });

  it("timing defaults are the documented assumptions: 1/1000 s exposure, 2 s interval", () => {
    const c = makeCamera(ONE_INCH);
    expect(c.exposureS).toBe(DEFAULT_EXPOSURE_S);
    expect(DEFAULT_EXPOSURE_S).toBe(0.001);
    expect(c.minIntervalS).toBe(DEFAULT_MIN_INTERVAL_S);
    expect(DEFAULT_MIN_INTERVAL_S).toBe(2);
    const d = makeCamera({ ...ONE_INCH, exposureS: 1 / 2000, minIntervalS: 0.7, portrait: true });
    expect([d.exposureS, d.minIntervalS, d.portrait]).toEqual([1 / 2000, 0.7, true]);
  });

  it("both sensor and FOV, or neither: InputError", () => {
    expectFieldError({ ...ONE_INCH, hfovDeg: 70 }, "camera.hfovDeg");
    expectFieldError({ imageWidthPx: 4000, imageHeightPx: 3000 }, "camera");
    expectFieldError({ hfovDeg: 70, dfovDeg: 80, imageWidthPx: 4000, imageHeightPx: 3000 }, "camera.dfovDeg");
  });

  it("non-positive or missing focal length, sensor or image size: InputError naming the field", () => {
    expectFieldError({ ...ONE_INCH, focalLengthMm: 0 }, "camera.focalLengthMm");
    expectFieldError({ ...ONE_INCH, focalLengthMm: -8.8 }, "camera.focalLengthMm");
    expectFieldError({ ...ONE_INCH, focalLengthMm: undefined }, "camera.focalLengthMm");
    expectFieldError({ ...ONE_INCH, sensorWidthMm: 0 }, "camera.sensorWidthMm");
    expectFieldError({ ...ONE_INCH, sensorHeightMm: -1 }, "camera.sensorHeightMm");
    expectFieldError({ ...ONE_INCH, imageWidthPx: 0 }, "camera.imageWidthPx");
    expectFieldError({ ...ONE_INCH, imageHeightPx: -3648 }, "camera.imageHeightPx");
    expectFieldError({ ...ONE_INCH, imageWidthPx: 5472.5 }, "camera.imageWidthPx");
    expectFieldError({ ...ONE_INCH, imageWidthPx: "5472" }, "camera.imageWidthPx");
    expectFieldError({ ...ONE_INCH, exposureS: 0 }, "camera.exposureS");
    expectFieldError({ ...ONE_INCH, minIntervalS: -2 }, "camera.minIntervalS");
    expectFieldError({ ...ONE_INCH, portrait: "yes" }, "camera.portrait");
  });

  it("field of view out of (0, 180): InputError", () => {
    expectFieldError({ hfovDeg: 0, imageWidthPx: 4000, imageHeightPx: 3000 }, "camera.hfovDeg");
    expectFieldError({ hfovDeg: 180, imageWidthPx: 4000, imageHeightPx: 3000 }, "camera.hfovDeg");
    expectFieldError({ dfovDeg: -5, imageWidthPx: 4000, imageHeightPx: 3000 }, "camera.dfovDeg");
  });

  it("sensor height inconsistent with square pixels (more than 5 %): InputError", () => {
    // 13.2 mm / 5472 px = 2.41 um but 12 mm / 3648 px = 3.29 um
    expectFieldError({ ...ONE_INCH, sensorHeightMm: 12 }, "camera.sensorHeightMm");
    // a rounded published figure (8.8 -> 8.9 mm, 1.1 %) is accepted
    expect(() => makeCamera({ ...ONE_INCH, sensorHeightMm: 8.9 })).not.toThrow();
  });

  it("an error message is one line with the value and what is allowed", () => {
    try {
      makeCamera({ ...ONE_INCH, focalLengthMm: -3 });
    } catch (e) {
      expect((e as Error).message).toBe("camera.focalLengthMm: invalid value (got -3; allowed: a number > 0)");
    }
    expect.assertions(1);
  });
});
