/**
 * How the plan composes flights (src/plan/plan.ts hands splitFlights a transit
 * maker that runs the solver). Regression: when a strip began or ended over the
 * take-off point, a zero-length transit was asked for; the solver has no
 * stations on it, its time came out NaN, summary.flightTimeS was null and the
 * NaN comparison split flights needlessly (found on the bundled demo).
 * Rule checked (issue 6, Outputs): each flight starts and ends at the take-off
 * point, and the flight time is a number.
 */
import { describe, it, expect } from "vitest";
import { splitFlights } from "../../src/route/flights.js";
import type { XY } from "../../src/layout/types.js";
import { leg } from "../export/legs.js";

const T: XY = [0, 0];
const ALT = 150;
const flat = (from: XY, to: XY) => [{ t: 0, altM: ALT, groundM: 50 }, { t: 1, altM: ALT, groundM: 50 }];

describe("splitFlights as the plan uses it", () => {
  // Two strips: the first starts away from take-off, the second ends over it.
  const path = () => [
    leg("transit", 1, T, [0, 100], flat(T, [0, 100])),
    leg("strip", 1, [0, 100], [400, 100], flat([0, 100], [400, 100])),
    leg("transit", 2, [400, 100], [400, 0], flat([400, 100], [400, 0])),
    leg("strip", 2, [400, 0], T, flat([400, 0], T)),
  ];
  const transitLeg = (from: XY, to: XY, strip: number) => {
    // The solver cannot plan a leg of no length: asking for one is the bug.
    if (Math.hypot(to[0] - from[0], to[1] - from[1]) < 0.01) throw new Error(`zero-length transit asked for (strip ${strip})`);
    return leg("transit", strip, from, to, flat(from, to));
  };

  it("asks for no zero-length transit when the last strip ends over take-off; the flight ends there", () => {
    const r = splitFlights(path(), { takeoff: T, enduranceMin: 60, transitLeg, maxClimbMps: 3, maxDescentMps: 2, takeoffGroundM: 50 });
    expect(r.flights).toHaveLength(1);
    const legs = r.flights[0].legs;
    expect(legs[legs.length - 1].to).toEqual(T);
    expect(legs[0].from).toEqual(T);
    expect(Number.isFinite(r.flights[0].timeS)).toBe(true);
  });

  it("asks for none either when a later flight's first strip starts over take-off", () => {
    // Endurance for about one strip per flight; strip 2 starts over take-off, so the
    // second flight needs no transit out.
    const rev = [
      leg("transit", 1, T, [0, 100], flat(T, [0, 100])),
      leg("strip", 1, [0, 100], [400, 100], flat([0, 100], [400, 100])),
      leg("transit", 2, [400, 100], T, flat([400, 100], T)),
      leg("strip", 2, T, [400, 0], flat(T, [400, 0])),
    ];
    const r = splitFlights(rev, { takeoff: T, enduranceMin: 2, reservePct: 0, transitLeg });
    expect(r.flights.length).toBe(2);
    for (const f of r.flights) {
      expect(f.legs[0].from).toEqual(T);
      expect(f.legs[f.legs.length - 1].to).toEqual(T);
      expect(Number.isFinite(f.timeS)).toBe(true);
    }
  });
});
