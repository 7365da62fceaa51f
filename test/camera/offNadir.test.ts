import { describe, it, expect } from "vitest";
import { makeCamera } from "../../src/camera/makeCamera.js";
import { groundSampleDistanceM } from "../../src/camera/gsd.js";
import { offNadirEdgeGsdM } from "../../src/camera/offNadir.js";
import { InputError } from "../../src/errors.js";

const DEG = Math.PI / 180;
const cam = makeCamera({ sensorWidthMm: 13.2, sensorHeightMm: 8.8, focalLengthMm: 8.8, imageWidthPx: 5472, imageHeightPx: 3648 });

/**
 * Independent check by ray casting (the collinearity condition: image point,
 * perspective centre and ground point on one line; Wolf & DeWitt, Elements of
 * Photogrammetry, from memory). Camera at height H, rolled by `tilt` about the
 * along-track (y) axis; image point (u, v) in units of the focal length.
 * Returns the ground point (X, Y) where the ray meets z = 0.
 */
function groundPoint(h: number, tilt: number, u: number, v: number): [number, number] {
  // ray in camera axes: (u, v, -1); roll about y by `tilt`
  const dx = u * Math.cos(tilt) + Math.sin(tilt);
  const dy = v;
  const dz = u * Math.sin(tilt) - Math.cos(tilt);
  const t = -h / dz;
  return [t * dx, t * dy];
}

describe("GSD at the image's across-track edge", () => {
  it("untilted over flat ground it equals the nadir GSD: a vertical photo has one scale f/H (Wolf & DeWitt, from memory)", () => {
    const e = offNadirEdgeGsdM(cam, 100);
    const nadir = groundSampleDistanceM(cam, 100);
    expect(e.acrossM).toBeCloseTo(nadir, 12);
    expect(e.alongM).toBeCloseTo(nadir, 12);
    // edge ray = half the HFOV: atan(6.6 / 8.8) = 36.87 degrees
    expect(e.rayAngleDeg).toBeCloseTo(36.8699, 3);
  });

  for (const tiltDeg of [0, 5, 15, 30]) {
    it(`matches ray casting through the edge pixel with ${tiltDeg} degrees of roll`, () => {
      const h = 120;
      const p = cam.ifov; // pixel size in focal lengths
      const uEdge = (cam.imageWidthPx / 2) * p;
      const t = tiltDeg * DEG;
      // the outermost pixel spans u in [uEdge - p, uEdge]; its centre is uEdge - p/2
      const uc = uEdge - p / 2;
      const [xa] = groundPoint(h, t, uc - p / 2, 0);
      const [xb] = groundPoint(h, t, uc + p / 2, 0);
      const [, ya] = groundPoint(h, t, uc, -p / 2);
      const [, yb] = groundPoint(h, t, uc, p / 2);
      const e = offNadirEdgeGsdM(cam, h, tiltDeg);
      // the formula is the derivative at the edge; the pixel is 3e-4 of f wide, so agree to 0.1 %
      expect((xb - xa) / e.acrossM).toBeCloseTo(1, 3);
      expect((yb - ya) / e.alongM).toBeCloseTo(1, 3);
      if (tiltDeg > 0) expect(e.acrossM).toBeGreaterThan(groundSampleDistanceM(cam, h));
    });
  }

  it("portrait uses the short side's half-angle", () => {
    const port = makeCamera({ sensorWidthMm: 13.2, sensorHeightMm: 8.8, focalLengthMm: 8.8, imageWidthPx: 5472, imageHeightPx: 3648, portrait: true });
    // atan(4.4 / 8.8) = 26.565 degrees
    expect(offNadirEdgeGsdM(port, 100).rayAngleDeg).toBeCloseTo(26.5651, 3);
  });

  it("a tilt that sends the edge ray above the horizon is an InputError", () => {
    expect(() => offNadirEdgeGsdM(cam, 100, 60)).toThrowError(InputError);
    expect(() => offNadirEdgeGsdM(cam, 100, -1)).toThrowError(/^tiltDeg:/);
    expect(() => offNadirEdgeGsdM(cam, 0)).toThrowError(/^heightM:/);
  });
});
