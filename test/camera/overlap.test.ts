import { describe, it, expect } from "vitest";
import { stripSpacingM, triggerDistanceM } from "../../src/camera/overlap.js";
import { InputError } from "../../src/errors.js";

// spacing = footprint across * (1 - side overlap); trigger = footprint along * (1 - front overlap)
// (domain notes, common practice)
describe("strip spacing and trigger distance from overlap", () => {
  it("150 m x 100 m footprint at 70 % side / 80 % front: 45 m and 20 m", () => {
    expect(stripSpacingM(150, 70)).toBeCloseTo(45, 12);
    expect(triggerDistanceM(100, 80)).toBeCloseTo(20, 12);
    expect(stripSpacingM(150, 0)).toBe(150);
  });

  it("overlap of 100 % or more, or negative, is an InputError naming the field", () => {
    for (const pct of [100, 120, -1, Number.NaN]) {
      expect(() => stripSpacingM(150, pct)).toThrowError(/^sideOverlapPct:/);
      expect(() => triggerDistanceM(100, pct)).toThrowError(/^frontOverlapPct:/);
    }
    expect(() => stripSpacingM(150, 99.5)).not.toThrow();
    expect(() => stripSpacingM(0, 70)).toThrowError(InputError);
    expect(() => triggerDistanceM(-5, 70)).toThrowError(/^footprintAlongM:/);
  });
});
