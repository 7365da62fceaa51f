/**
 * Blocks on the report fixture (fixture.ts): its strips, lower half flown from one take-off
 * point and upper half from another, in five flights of about three strips each. The first
 * strip of block 2 is split at its middle waypoint: flight 3 flies it up to there and flight 4
 * resumes it. Transits go straight from each take-off point to the first strip and back. The
 * flights' rows are computed from these legs as flights.csv computes them: waypoints of the
 * flight, photos at the trigger distance, length, time at the fixture's ground speed, and the
 * farthest waypoint from the flight's take-off point.
 */
import type { ReportBlock, ReportFlight, ReportInput, ReportLeg, ReportProfile } from "../../src/report/model.js";
import type { XY } from "../../src/layout/types.js";
import { makeReportInput } from "./fixture.js";

/** The fixture's frame (fixture.ts): DEM top-left corner and size. */
export const X0 = 500_000;
export const Y0 = 4_600_600;
export const DEM_WIDTH_M = 160 * 5;
/** Main map units per metre: the main map is 1000 units across the DEM window (render.ts). */
export const MAIN_K = 1000 / DEM_WIDTH_M;
export const RANGE_M = 400;

/**
 * Take-off points as WGS84 degrees: the fixture's (summary.takeoff) and one to the north. The
 * fixture has no real frame, so these only feed the table (invented, like the fixture).
 */
const LONLAT: [number, number][] = [
  [15.0, 41.5],
  [15.0, 41.50243],
];

function emptyProfile(): ReportProfile {
  const f = () => new Float64Array(0);
  return { s: f(), x: f(), y: f(), groundM: f(), hardLowM: f(), hardHighM: f(), bandLowM: f(), bandHighM: f(), altitudeM: f(), status: new Uint8Array(0), cause: new Uint8Array(0) };
}

function transit(from: XY, to: XY, strip: number): ReportLeg {
  return { kind: "transit", strip, from, to, lengthM: Math.hypot(to[0] - from[0], to[1] - from[1]), waypoints: [], profile: emptyProfile() };
}

/** A strip leg cut at station `i` (a waypoint's station): both pieces keep that station. */
function splitStrip(leg: ReportLeg, i: number): [ReportLeg, ReportLeg] {
  const p = leg.profile!;
  const part = (a: number, b: number): ReportLeg => {
    const sl = <T extends Float64Array | Float32Array | Uint8Array>(v: T) => v.slice(a, b) as T;
    const s0 = p.s[a];
    const s = Float64Array.from(sl(p.s), (v) => v - s0);
    const from: XY = [p.x[a], p.y[a]];
    const to: XY = [p.x[b - 1], p.y[b - 1]];
    const waypoints = leg.waypoints.filter((w) => w.s >= s0 - 1e-9 && w.s <= p.s[b - 1] + 1e-9).map((w) => ({ ...w, s: w.s - s0 }));
    return {
      ...leg, from, to, lengthM: s[s.length - 1], waypoints,
      profile: { s, x: sl(p.x), y: sl(p.y), groundM: sl(p.groundM), hardLowM: sl(p.hardLowM), hardHighM: sl(p.hardHighM), bandLowM: sl(p.bandLowM), bandHighM: sl(p.bandHighM), altitudeM: sl(p.altitudeM), status: sl(p.status), cause: sl(p.cause) },
    };
  };
  return [part(0, i + 1), part(i, p.s.length)];
}

export interface BlocksFixture {
  input: ReportInput;
  /** Each flight's legs, in order. */
  flightLegs: ReportLeg[][];
}

/** The report fixture flown in two blocks, five flights, one strip resumed; range 400 m. */
export function makeBlocksInput(): BlocksFixture {
  const base = makeReportInput();
  const strips = base.legs.filter((l) => l.kind === "strip");
  const half = Math.ceil(strips.length / 2);
  const groups = [strips.slice(0, half), strips.slice(half)];
  // Each block's take-off point: the middle of its strips.
  const takeoffs: XY[] = groups.map((g) => {
    const ys = g.map((l) => l.from[1]);
    return [X0 + 415, (Math.min(...ys) + Math.max(...ys)) / 2];
  });
  // Flights of strips: block 1 in threes; block 2's first strip split, then threes.
  const b2 = groups[1];
  const mid = b2[0].waypoints[Math.floor(b2[0].waypoints.length / 2)];
  const midStation = Math.round(mid.s / (b2[0].profile!.s[1] - b2[0].profile!.s[0]));
  const [firstPiece, resumed] = splitStrip(b2[0], midStation);
  const plan: { block: number; legs: ReportLeg[]; resumes: number | null }[] = [
    { block: 1, legs: groups[0].slice(0, 3), resumes: null },
    { block: 1, legs: groups[0].slice(3), resumes: null },
    { block: 2, legs: [firstPiece], resumes: null },
    { block: 2, legs: [resumed, ...b2.slice(1, 3)], resumes: b2[0].strip },
    { block: 2, legs: b2.slice(3), resumes: null },
  ];
  const speed = base.summary.speedMps!;
  const trigger = base.summary.triggerDistanceM!;
  const flightLegs: ReportLeg[][] = [];
  const flights: ReportFlight[] = [];
  plan.forEach((f, fi) => {
    const t = takeoffs[f.block - 1];
    const legs: ReportLeg[] = [];
    let at = t;
    for (const s of f.legs) {
      legs.push(transit(at, s.from, s.strip), s);
      at = s.to;
    }
    legs.push(transit(at, t, f.legs[f.legs.length - 1].strip));
    const tagged = legs.map((l) => ({ ...l, flight: fi + 1, block: f.block }));
    flightLegs.push(tagged);
    const lengthM = legs.reduce((a, l) => a + l.lengthM, 0);
    let far = 0;
    for (const l of legs) for (const w of l.waypoints) far = Math.max(far, Math.hypot(w.x - t[0], w.y - t[1]));
    flights.push({
      flight: fi + 1,
      block: f.block,
      takeoffLongitude: LONLAT[f.block - 1][0],
      takeoffLatitude: LONLAT[f.block - 1][1],
      takeoffGroundAmslM: f.block === 1 ? 311.25 : 318.5,
      waypoints: legs.reduce((a, l) => a + l.waypoints.length, 0),
      // A photo at each end and every trigger distance between (the fixture's placement).
      photos: f.legs.reduce((a, l) => a + Math.floor(l.lengthM / trigger) + 1, 0),
      lengthM,
      durationS: lengthM / speed,
      maxRangeM: far,
      resumesStrip: f.resumes,
    });
  });
  const blocks: ReportBlock[] = groups.map((g, i) => {
    let far = 0;
    for (const l of g) for (const p of [l.from, l.to]) far = Math.max(far, Math.hypot(p[0] - takeoffs[i][0], p[1] - takeoffs[i][1]));
    return {
      index: i + 1,
      takeoff: { x: takeoffs[i][0], y: takeoffs[i][1], lon: LONLAT[i][0], lat: LONLAT[i][1], groundAmslM: i === 0 ? 311.25 : 318.5 },
      // One point given by the user, one proposed by the tool.
      takeoffFrom: i === 0 ? "candidate" : "proposed",
      ...(i === 1 ? { slopeDeg: 3.25 } : {}),
      strips: g.map((l) => l.strip),
      farthestM: far,
    };
  });
  const summary = { ...base.summary, flights: flights.length, batteries: flights.length };
  return {
    input: { ...base, summary, legs: flightLegs.flat(), takeoff: takeoffs[0], blocks, maxRangeM: RANGE_M, flights },
    flightLegs,
  };
}
