import { describe, it, expect } from "vitest";
import { exposuresFromLegs } from "../../src/assess/exposures.js";
import { InputError } from "../../src/errors.js";
import { handLeg } from "./helpers.js";

describe("exposures from the final waypoints", () => {
  // Leg heading north-east, 100 m long; the path climbs 10 m over the first 40 m, then holds.
  const from: [number, number] = [10, 20];
  const to: [number, number] = [10 + 60, 20 + 80];
  const leg = handLeg({
    from,
    to,
    strip: 3,
    waypoints: [
      { s: 0, altitudeAmslM: 300 },
      { s: 40, altitudeAmslM: 310 },
      { s: 100, altitudeAmslM: 310 },
    ],
    // A solver profile that disagrees with the waypoints: the check must ignore it.
    stationStepM: 5,
  });
  leg.profile.altitudeM.fill(999);

  it("places a photo every trigger distance with the straight-segment altitude", () => {
    const ex = exposuresFromLegs([leg], 15);
    expect(ex.map((e) => Math.round(((e.x - 10) / 0.6) * 1e9) / 1e9)).toEqual([0, 15, 30, 45, 60, 75, 90]);
    // Linear between (0, 300) and (40, 310): 0.25 m per metre; flat after 40 m.
    expect(ex.map((e) => e.altitudeAmslM)).toEqual([300, 303.75, 307.5, 310, 310, 310, 310]);
    for (const e of ex) {
      expect(e.ux).toBeCloseTo(0.6, 12);
      expect(e.uy).toBeCloseTo(0.8, 12);
      expect(e.strip).toBe(3);
      // On the leg line: y - 20 = (x - 10) * 4 / 3.
      expect(e.y - 20).toBeCloseTo(((e.x - 10) * 4) / 3, 9);
    }
  });

  it("centred phase spreads the remainder over both ends", () => {
    const ex = exposuresFromLegs([leg], 30);
    // 100 m / 30 m: photos at 5, 35, 65, 95.
    expect(ex.map((e) => Math.round((e.x - 10) / 0.6))).toEqual([0, 30, 60, 90]);
    const c = exposuresFromLegs([leg], 30, { phase: "centred" });
    expect(c.map((e) => Math.round(((e.x - 10) / 0.6) * 1e6) / 1e6)).toEqual([5, 35, 65, 95]);
    expect(c[1].altitudeAmslM).toBeCloseTo(300 + 35 * 0.25, 12);
  });

  it("skips transit legs and no-photo stretches", () => {
    const transit = handLeg({ from, to, strip: 1, kind: "transit", waypoints: [{ s: 0, altitudeAmslM: 300 }, { s: 100, altitudeAmslM: 300 }] });
    const gappy = Object.assign({}, leg, { noPhotoIntervals: [[20, 50]] as [number, number][] });
    expect(exposuresFromLegs([transit], 15)).toHaveLength(0);
    const ex = exposuresFromLegs([gappy], 15);
    expect(ex.map((e) => Math.round((e.x - 10) / 0.6))).toEqual([0, 15, 60, 75, 90]);
  });

  it("refuses a non-positive trigger distance", () => {
    expect(() => exposuresFromLegs([leg], 0)).toThrow(InputError);
  });
});
