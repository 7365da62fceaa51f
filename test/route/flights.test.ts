import { describe, it, expect } from "vitest";
import type { XY } from "../../src/layout/types.js";
import type { SolvedLeg } from "../../src/solve/types.js";
import { flightTimeS, splitFlights, straightTransitLeg } from "../../src/route/flights.js";
import { countRows, waypointRows } from "../../src/export/rows.js";
import { timedLeg } from "../export/legs.js";

// Four strips of 100 s each, joined by 10 s transits; every transit to or from
// take-off takes 20 s. All at one altitude, so legs join without vertical moves.
const T: XY = [0, 0];
const ALT = 500;
const starts: XY[] = [[100, 0], [150, 400], [200, 0], [250, 400]];
const ends: XY[] = [[100, 400], [150, 0], [200, 400], [250, 0]];
function path(): SolvedLeg[] {
  const legs: SolvedLeg[] = [timedLeg("transit", 1, T, starts[0], ALT, 20)];
  for (let i = 0; i < 4; i++) {
    if (i > 0) legs.push(timedLeg("transit", i + 1, ends[i - 1], starts[i], ALT, 10));
    legs.push(timedLeg("strip", i + 1, starts[i], ends[i], ALT, 100));
  }
  return legs;
}
const transitLeg = (from: XY, to: XY, strip: number) => timedLeg("transit", strip, from, to, ALT, 20);

describe("splitFlights", () => {
  it("puts everything in one flight when the battery allows", () => {
    // 20 + 4*100 + 3*10 + 20 = 470 s; 10 min less 20 % = 480 s usable.
    const r = splitFlights(path(), { takeoff: T, enduranceMin: 10, transitLeg });
    expect(r.batteries).toBe(1);
    expect(r.flights[0].timeS).toBe(470);
    expect(r.flights[0].strips).toEqual([1, 2, 3, 4]);
  });

  it("splits at strip ends by usable endurance, keeping the 20 % reserve by default", () => {
    // 5 min less 20 % = 240 s: strips 1+2 need 20+100+10+100+20 = 250 s, so one strip per flight.
    const r = splitFlights(path(), { takeoff: T, enduranceMin: 5, transitLeg });
    expect(r.flights.map((f) => f.strips)).toEqual([[1], [2], [3], [4]]);
    expect(r.flights.map((f) => f.timeS)).toEqual([140, 140, 140, 140]);
    expect(r.warnings).toEqual([]);
    // Without reserve, 300 s: two strips per flight (250 s each).
    const noReserve = splitFlights(path(), { takeoff: T, enduranceMin: 5, reservePct: 0, transitLeg });
    expect(noReserve.flights.map((f) => f.strips)).toEqual([[1, 2], [3, 4]]);
    expect(noReserve.batteries).toBe(2);
  });

  it("starts and ends every flight at the take-off point", () => {
    const r = splitFlights(path(), { takeoff: T, enduranceMin: 5, transitLeg });
    for (const f of r.flights) {
      expect(f.legs[0].from).toEqual(T);
      expect(f.legs[0].kind).toBe("transit");
      expect(f.legs[f.legs.length - 1].to).toEqual(T);
      expect(f.legs[f.legs.length - 1].kind).toBe("transit");
    }
    const rows = waypointRows(r.flights.map((f) => f.legs), (x, y) => [x / 1e5, y / 1e5], { datum: "egm96", undulationM: () => 0, takeoffGroundM: 400 });
    expect(rows.filter((x) => x.flight === 2)[0]).toMatchObject({ segment: "transit", x: 0, y: 0, strip: 2, index: 1, speedMps: 0 });
  });

  it("flies every strip left in one flight when they fit with the way back from the last, not trying the ways back between", () => {
    // The way back from strip 2's end takes 1000 s, from the others' 20 s. Strip by strip, a
    // flight would stop before strip 2; the four strips with the way back from strip 4's end
    // take 470 s of the 480 s usable: one flight, and only that way back is solved.
    const asked: XY[] = [];
    const counting = (from: XY, to: XY, strip: number) => {
      asked.push(from);
      return timedLeg("transit", strip, from, to, ALT, from[0] === ends[1][0] && from[1] === ends[1][1] ? 1000 : 20);
    };
    const r = splitFlights(path(), { takeoff: T, enduranceMin: 10, transitLeg: counting });
    expect(r.flights.map((f) => f.strips)).toEqual([[1, 2, 3, 4]]);
    expect(r.flights[0].timeS).toBe(470);
    expect(asked).toEqual([ends[3]]);
    // Without room for all four (300 s), strip by strip as before: the way back from each strip
    // end tried in turn; strip 2 alone with its way back does not fit and flies on with strip 3.
    asked.length = 0;
    const short = splitFlights(path(), { takeoff: T, enduranceMin: 5, reservePct: 0, transitLeg: counting });
    expect(short.flights.map((f) => f.strips)).toEqual([[1], [2, 3], [4]]);
    for (const e of [ends[0], ends[1], ends[2], ends[3]]) expect(asked).toContainEqual(e);
  });

  it("splits by the autopilot's waypoint limit", () => {
    // A flight of n strips has 2 + 2n rows here (take-off, strip ends, back at take-off).
    const r = splitFlights(path(), { takeoff: T, enduranceMin: 60, maxWaypoints: 6, transitLeg });
    expect(r.flights.map((f) => f.strips)).toEqual([[1, 2], [3, 4]]);
    for (const f of r.flights) {
      expect(f.waypoints).toBe(countRows(f.legs));
      expect(f.waypoints).toBeLessThanOrEqual(6);
    }
  });

  it("warns when one strip alone does not fit a battery", () => {
    const r = splitFlights(path(), { takeoff: T, enduranceMin: 2, transitLeg });
    expect(r.batteries).toBe(4);
    expect(r.warnings.map((w) => w.code)).toEqual(Array(4).fill("strip-exceeds-endurance"));
  });

  it("counts vertical moves at the climb and descent rates", () => {
    const a = timedLeg("strip", 1, [0, 0], [0, 100], 500, 10);
    const b = timedLeg("strip", 1, [0, 100], [0, 200], 530, 10);
    // 30 m climb at 3 m/s = 10 s; take-off from 400 m: 100 m climb = 33.3 s, landing 130 m at 2 m/s = 65 s.
    expect(flightTimeS([a, b], { maxClimbMps: 3, maxDescentMps: 2 })).toBeCloseTo(30, 9);
    expect(flightTimeS([a, b], { maxClimbMps: 3, maxDescentMps: 2, takeoffGroundM: 400 })).toBeCloseTo(30 + 100 / 3 + 65, 9);
  });
});

describe("straightTransitLeg", () => {
  it("is two waypoints at one altitude, timed at the speed", () => {
    // 3-4-5 triangle.
    const l = straightTransitLeg([0, 0], [300, 400], 3, { altitudeAmslM: 650, speedMps: 10, groundAt: () => 450 });
    expect(l.lengthM).toBe(500);
    expect(l.timeS).toBe(50);
    expect(l.waypoints.map((w) => [w.x, w.y, w.altitudeAmslM, w.heightAboveGroundM, w.speedMps])).toEqual([
      [0, 0, 650, 200, 0],
      [300, 400, 650, 200, 10],
    ]);
  });
});
