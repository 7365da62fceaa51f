import { describe, it, expect } from "vitest";
import { groundSpeed } from "../../src/camera/speed.js";
import { InputError } from "../../src/errors.js";

// speed = min(cruise, trigger / min interval, blur px * GSD / exposure) (domain notes:
// photo-rate and motion-blur limits, common practice). Numbers derived by hand.
describe("ground speed: each limit binding in turn", () => {
  it("cruise binds", () => {
    // interval 20 m / 1 s = 20 m/s; blur 0.5 * 0.03 m / 0.0005 s = 30 m/s; cruise 12 -> 12
    const s = groundSpeed({ cruiseMps: 12, triggerM: 20, minIntervalS: 1, exposureS: 0.0005, gsdM: 0.03 });
    expect(s.limit).toBe("cruise");
    expect(s.speedMps).toBeCloseTo(12, 12);
    expect(s.limits.interval).toBeCloseTo(20, 12);
    expect(s.limits.blur).toBeCloseTo(30, 12);
  });

  it("photo interval binds", () => {
    // interval 18 m / 2 s = 9 m/s; blur 0.5 * 0.025 / 0.001 = 12.5 m/s; cruise 15 -> 9
    const s = groundSpeed({ cruiseMps: 15, triggerM: 18, minIntervalS: 2, exposureS: 0.001, gsdM: 0.025 });
    expect(s.limit).toBe("interval");
    expect(s.speedMps).toBeCloseTo(9, 12);
    expect(s.limits.blur).toBeCloseTo(12.5, 12);
  });

  it("motion blur binds, and the default allowance is half a pixel", () => {
    // blur 0.5 * 0.01 m / (1/250 s) = 1.25 m/s; interval 30 / 1.5 = 20 m/s; cruise 10 -> 1.25
    const s = groundSpeed({ cruiseMps: 10, triggerM: 30, minIntervalS: 1.5, exposureS: 1 / 250, gsdM: 0.01 });
    expect(s.limit).toBe("blur");
    expect(s.speedMps).toBeCloseTo(1.25, 12);
    // allowing a full pixel doubles it: 2.5 m/s
    expect(groundSpeed({ cruiseMps: 10, triggerM: 30, minIntervalS: 1.5, exposureS: 1 / 250, gsdM: 0.01, blurPx: 1 }).speedMps).toBeCloseTo(2.5, 12);
  });

  it("bad values are InputErrors naming the field", () => {
    const ok = { cruiseMps: 10, triggerM: 30, minIntervalS: 1.5, exposureS: 0.001, gsdM: 0.02 };
    for (const k of ["cruiseMps", "triggerM", "minIntervalS", "exposureS", "gsdM", "blurPx"] as const) {
      expect(() => groundSpeed({ ...ok, [k]: 0 })).toThrowError(new RegExp(`^${k}:`));
    }
    expect(() => groundSpeed({ ...ok, cruiseMps: Number.NaN })).toThrowError(InputError);
  });
});
