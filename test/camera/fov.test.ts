import { describe, it, expect } from "vitest";
import { dfovToHfov, hfovToDfov } from "../../src/camera/fov.js";
import { makeCamera } from "../../src/camera/makeCamera.js";
import { footprintM } from "../../src/camera/gsd.js";
import { InputError } from "../../src/errors.js";

const DEG = Math.PI / 180;

// Identity from the sensor: for a pinhole camera with sensor w x h mm and lens f,
// HFOV = 2 atan(w / 2f) and DFOV = 2 atan(sqrt(w^2 + h^2) / 2f) (similar triangles).
const SENSORS = [
  { name: "3:2, generic 1-inch type, 13.2 x 8.8 mm, 5472 x 3648 px, 8.8 mm", w: 13.2, h: 8.8, wPx: 5472, hPx: 3648, f: 8.8 },
  { name: "4:3, generic small sensor, 6.4 x 4.8 mm, 4000 x 3000 px, 4.5 mm", w: 6.4, h: 4.8, wPx: 4000, hPx: 3000, f: 4.5 },
];

describe("diagonal <-> horizontal field of view against the sensor identity", () => {
  for (const s of SENSORS) {
    it(s.name, () => {
      const hfov = (2 * Math.atan(s.w / (2 * s.f))) / DEG;
      const dfov = (2 * Math.atan(Math.hypot(s.w, s.h) / (2 * s.f))) / DEG;
      expect(dfovToHfov(dfov, s.wPx, s.hPx)).toBeCloseTo(hfov, 9);
      expect(hfovToDfov(hfov, s.wPx, s.hPx)).toBeCloseTo(dfov, 9);
      // a camera given by DFOV equals the camera given by its sensor
      const byDfov = makeCamera({ dfovDeg: dfov, imageWidthPx: s.wPx, imageHeightPx: s.hPx });
      const bySensor = makeCamera({ sensorWidthMm: s.w, sensorHeightMm: s.h, focalLengthMm: s.f, imageWidthPx: s.wPx, imageHeightPx: s.hPx });
      expect(byDfov.hfovDeg).toBeCloseTo(bySensor.hfovDeg, 9);
      expect(byDfov.ifov / bySensor.ifov).toBeCloseTo(1, 12);
    });
  }

  it("taking a diagonal angle for a horizontal one overstates the footprint by diagonal / width", () => {
    // 4:3 image: diagonal / width = 5 / 4 exactly (3-4-5 triangle); 3:2: sqrt(13) / 3 = 1.2019
    for (const [wPx, hPx, ratio] of [[4000, 3000, 1.25], [5472, 3648, Math.sqrt(13) / 3]] as const) {
      const dfov = 84;
      const right = makeCamera({ dfovDeg: dfov, imageWidthPx: wPx, imageHeightPx: hPx });
      const wrong = makeCamera({ hfovDeg: dfov, imageWidthPx: wPx, imageHeightPx: hPx });
      expect(footprintM(wrong, 100).acrossM / footprintM(right, 100).acrossM).toBeCloseTo(ratio, 9);
    }
  });

  it("bad angles or image sizes are InputErrors", () => {
    expect(() => dfovToHfov(190, 4000, 3000)).toThrowError(/^camera\.dfovDeg:/);
    expect(() => hfovToDfov(70, 0, 3000)).toThrowError(/^camera\.imageWidthPx:/);
    expect(() => dfovToHfov(80, 4000, 2.5)).toThrowError(InputError);
  });
});
