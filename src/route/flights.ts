/**
 * Splits the solved path into flights (one battery each) at strip ends, by
 * usable endurance and the autopilot's waypoint budget. Every flight starts
 * and ends at the take-off point.
 *
 * The legs to and from take-off are made by the caller's `transitLeg`
 * function, so the integrator can have the solver fly them over the terrain
 * (the better choice), or use `straightTransitLeg` below: two waypoints at one
 * safe altitude the caller names. The path's own first leg (the solver's
 * transit from take-off) is kept for the first flight.
 */
import type { XY } from "../layout/types.js";
import type { SolvedLeg, SolveWarning, StationProfile, Waypoint } from "../solve/types.js";
import { countRows, legsJoin } from "./waypointCount.js";
import { cutLegAt, type ResumableLeg } from "./resume.js";

export interface Flight {
  /** 1-based. */
  index: number;
  /** 1-based block the flight belongs to (1 when the site is one block). */
  block?: number;
  /** The flight's take-off point (local frame) and its ground height, when blocks have their own. */
  takeoff?: { xy: XY; groundM: number };
  /** Transit from take-off, strips and their connecting transits, transit back to take-off. */
  legs: SolvedLeg[];
  /** Strip numbers flown, in order. */
  strips: number[];
  /** Leg times plus the vertical moves between legs and at take-off and landing. */
  timeS: number;
  lengthM: number;
  /** Distinct waypoints (rows of waypoints.csv). */
  waypoints: number;
  /** The strip this flight resumes where an earlier flight left it (absent: it starts at a strip's start). */
  resumesStrip?: number;
}

export interface FlightSplitOptions {
  takeoff: XY;
  enduranceMin: number;
  /** Percent of endurance kept in reserve (default 20). */
  reservePct?: number;
  /** Autopilot waypoint limit per flight; null or undefined: none. */
  maxWaypoints?: number | null;
  /**
   * Makes a transit leg from `from` to `to`; `strip` is the number the leg carries; `joinM`
   * is the height of the path where the leg meets it (its end going out, its start coming back).
   */
  transitLeg: (from: XY, to: XY, strip: number, direction: "out" | "back", joinM?: number) => SolvedLeg;
  /**
   * Trigger distance, metres: with it, a strip too long for what is left of a battery is
   * flown up to a point and the next flight resumes there (photos keep this spacing across
   * the cut). Without it flights split at strip ends only.
   */
  triggerM?: number;
  /** For the time of vertical moves: climb and descent rates, m/s. */
  maxClimbMps?: number;
  maxDescentMps?: number;
  /** Ground at take-off (same datum as the legs): adds the climb after take-off and the descent to land. */
  takeoffGroundM?: number;
}

export interface FlightSplit {
  flights: Flight[];
  /** Equal to flights.length: one battery per flight. */
  batteries: number;
  warnings: SolveWarning[];
}

/**
 * @example
 *   const { flights, batteries } = splitFlights(solved.legs, {
 *     takeoff: layout.takeoff, enduranceMin: 20, reservePct: 20, maxWaypoints: 99,
 *     transitLeg: (a, b, strip) => straightTransitLeg(a, b, strip, { altitudeAmslM: 650, speedMps: 12 }),
 *   });
 */
export function splitFlights(legs: readonly SolvedLeg[], o: FlightSplitOptions): FlightSplit {
  const usableS = o.enduranceMin * 60 * (1 - (o.reservePct ?? 20) / 100);
  const maxWp = o.maxWaypoints ?? Infinity;
  const warnings: SolveWarning[] = [];
  const blocks = stripBlocks(legs);
  const flights: SolvedLeg[][] = [];
  let current: SolvedLeg[] = [];

  // Trying flights asks for the same legs to and from take-off again and again (every
  // extension tried ends with the leg back from the same strip end): solve each once.
  const solved = new Map<string, SolvedLeg>();
  const transitLeg: FlightSplitOptions["transitLeg"] = (from, to, strip, direction, joinM) => {
    const key = `${from[0]},${from[1]},${to[0]},${to[1]},${strip},${direction},${joinM}`;
    let leg = solved.get(key);
    if (!leg) solved.set(key, (leg = o.transitLeg(from, to, strip, direction, joinM)));
    return leg;
  };
  const opening = (b: Block, first: boolean): SolvedLeg[] => {
    if (first && b.leading.length && near(b.leading[0].from, o.takeoff)) return [...b.leading, ...b.body];
    if (near(o.takeoff, b.body[0].from)) return [...b.body];
    return [transitLeg(o.takeoff, b.body[0].from, b.strip, "out", b.body[0].waypoints[0]?.altitudeAmslM), ...b.body];
  };
  const close = (f: SolvedLeg[]): SolvedLeg[] => {
    const last = f[f.length - 1];
    // A flight whose last strip ends over the take-off point needs no leg back: a
    // zero-length transit has no stations, so its altitudes and time come out NaN.
    if (near(last.to, o.takeoff)) return f;
    return [...f, transitLeg(last.to, o.takeoff, last.strip, "back", last.waypoints[last.waypoints.length - 1]?.altitudeAmslM)];
  };
  const fits = (f: SolvedLeg[]) => flightTimeS(f, o) <= usableS && countRows(f) <= maxWp;
  /**
   * The longest start of `body` that fits after `head`: whole legs, then part of the next
   * strip leg cut at the farthest point that still fits (bisection, at least one trigger
   * distance in), with the rest to resume; null when not even that fits.
   */
  const fillWith = (head: SolvedLeg[], body: SolvedLeg[]): { taken: SolvedLeg[]; rest: SolvedLeg[] } | null => {
    if (!o.triggerM) return null;
    let i = 0;
    while (i < body.length && fits(close([...head, ...body.slice(0, i + 1)]))) i++;
    const leg = body[i];
    const whole = body.slice(0, i);
    const minM = o.triggerM;
    if (leg && leg.kind === "strip" && leg.lengthM > 2 * minM) {
      const cutFits = (s: number) => {
        const parts = cutLegAt(leg, s, o.triggerM!);
        return parts && fits(close([...head, ...whole, parts[0]])) ? parts : null;
      };
      if (cutFits(minM)) {
        let lo = minM, hi = leg.lengthM - minM;
        if (cutFits(hi)) lo = hi;
        else for (let k = 0; k < 12 && hi - lo > o.triggerM / 2; k++) {
          const mid = (lo + hi) / 2;
          if (cutFits(mid)) lo = mid;
          else hi = mid;
        }
        const parts = cutLegAt(leg, lo, o.triggerM)!;
        return { taken: [...whole, parts[0]], rest: [parts[1], ...body.slice(i + 1)] };
      }
    }
    // Whole legs only: worth it when they end a strip piece (not in the middle of a bridge).
    if (i > 0 && whole[whole.length - 1].kind === "strip") return { taken: whole, rest: body.slice(i) };
    return null;
  };

  // Every strip left flown in the flight being made, when they fit with the way back from the
  // last: the ways back from the strips between are then not tried (each a transit solved to
  // be dropped: at 4 km2 all 156 tried were, each block's flight ending with the layout's own
  // leg back). Where they fit only so, the flight takes them all, where trying strip by strip
  // would have stopped at a strip whose way back is long: the legs flown fit the battery
  // either way.
  const after = (bi: number): SolvedLeg[] => blocks.slice(bi + 1).flatMap((x) => [...x.leading, ...x.body]);
  let restTaken = false;
  const takesRest = (legs: SolvedLeg[], bi: number): boolean => {
    if (bi + 1 >= blocks.length) return false;
    const all = [...legs, ...after(bi)];
    if (!fits(close(all))) return false;
    current = all;
    restTaken = true;
    return true;
  };
  blocks.forEach((b, bi) => {
    if (restTaken) return;
    let rest: Block = b;
    let first = bi === 0;
    for (;;) {
      if (current.length) {
        const extended = [...current, ...rest.leading, ...rest.body];
        if (takesRest(extended, bi)) return;
        if (fits(close(extended))) {
          current = extended;
          return;
        }
        const part = fillWith([...current, ...rest.leading], rest.body);
        if (part) {
          flights.push(close([...current, ...rest.leading, ...part.taken]));
          current = [];
          rest = { strip: rest.strip, leading: [], body: part.rest };
          continue;
        }
        flights.push(close(current));
      }
      current = opening(rest, first);
      first = false;
      if (takesRest(current, bi)) return;
      if (fits(close(current))) return;
      // Too long for a whole battery: fly as much as fits and resume the rest in the next flight.
      const head = current.slice(0, current.length - rest.body.length);
      const part = fillWith(head, rest.body);
      if (!part) {
        warnAlone(rest);
        return;
      }
      flights.push(close([...head, ...part.taken]));
      current = [];
      rest = { strip: rest.strip, leading: [], body: part.rest };
    }
  });
  if (current.length) flights.push(close(current));

  function warnAlone(b: Block): void {
    const alone = close(current);
    if (flightTimeS(alone, o) > usableS) {
      warnings.push({
        code: "strip-exceeds-endurance",
        message: `strip ${b.strip} alone needs ${(flightTimeS(alone, o) / 60).toFixed(1)} min with its transits, more than the usable ${(usableS / 60).toFixed(1)} min (endurance less ${o.reservePct ?? 20} % reserve)${o.triggerM ? ", and not even one trigger distance of it fits with the way there and back" : ""}; shorten the strips or split the site`,
      });
    }
    if (countRows(alone) > maxWp) {
      warnings.push({
        code: "strip-exceeds-waypoints",
        message: `strip ${b.strip} alone needs ${countRows(alone)} waypoints with its transits, more than the autopilot's ${maxWp}`,
      });
    }
  }

  const out = flights.map((f, i) => ({
    index: i + 1,
    ...(resumedStart(f) ? { resumesStrip: firstStrip(f) } : {}),
    legs: f,
    strips: [...new Set(f.filter((l) => l.kind === "strip").map((l) => l.strip))],
    timeS: flightTimeS(f, o),
    lengthM: f.reduce((a, l) => a + l.lengthM, 0),
    waypoints: countRows(f),
  }));
  return { flights: out, batteries: out.length, warnings };
}

/** True when flight f's first strip leg is the rest of a strip cut at a battery's end. */
function resumedStart(f: SolvedLeg[]): boolean {
  const s = f.find((l) => l.kind === "strip") as ResumableLeg | undefined;
  return s?.resumes === true;
}

function firstStrip(f: SolvedLeg[]): number {
  return f.find((l) => l.kind === "strip")?.strip ?? f[0].strip;
}

interface Block {
  strip: number;
  /** Transits before the block's first strip leg (replaced when a flight starts here). */
  leading: SolvedLeg[];
  body: SolvedLeg[];
}

/** Groups consecutive legs by strip number: a strip, the gaps cut in it, and the transits leading in. */
function stripBlocks(legs: readonly SolvedLeg[]): Block[] {
  const blocks: Block[] = [];
  for (const leg of legs) {
    let b = blocks[blocks.length - 1];
    if (!b || b.strip !== leg.strip) {
      b = { strip: leg.strip, leading: [], body: [] };
      blocks.push(b);
    }
    if (!b.body.length && leg.kind === "transit") b.leading.push(leg);
    else b.body.push(leg);
  }
  // A block of transits only (no photos) flies on with the next block.
  for (let i = blocks.length - 2; i >= 0; i--) {
    if (!blocks[i].body.length) {
      blocks[i + 1].leading.unshift(...blocks[i].leading);
      blocks.splice(i, 1);
    }
  }
  return blocks.filter((b) => b.body.length);
}

function near(a: XY, b: XY): boolean {
  return Math.hypot(a[0] - b[0], a[1] - b[1]) <= 0.01;
}

/** Leg times, plus vertical moves where legs meet at different altitudes, plus take-off climb and landing descent. */
export function flightTimeS(legs: readonly SolvedLeg[], o: Pick<FlightSplitOptions, "maxClimbMps" | "maxDescentMps" | "takeoffGroundM">): number {
  const climb = o.maxClimbMps ?? Infinity;
  const descent = o.maxDescentMps ?? Infinity;
  const vertical = (dz: number) => (dz > 0 ? dz / climb : -dz / descent);
  let t = 0;
  for (let i = 0; i < legs.length; i++) {
    t += legs[i].timeS;
    if (i > 0 && !legsJoin(legs[i - 1], legs[i])) {
      const a = legs[i - 1].waypoints[legs[i - 1].waypoints.length - 1];
      const b = legs[i].waypoints[0];
      if (a && b) t += vertical(b.altitudeAmslM - a.altitudeAmslM);
    }
  }
  if (o.takeoffGroundM !== undefined && legs.length) {
    const first = legs[0].waypoints[0];
    const lastLeg = legs[legs.length - 1];
    const last = lastLeg.waypoints[lastLeg.waypoints.length - 1];
    if (first) t += vertical(first.altitudeAmslM - o.takeoffGroundM);
    if (last) t += vertical(o.takeoffGroundM - last.altitudeAmslM);
  }
  return t;
}

export interface StraightTransitOptions {
  /** The safe altitude to fly at, metres (the legs' datum). */
  altitudeAmslM: number;
  speedMps: number;
  /** Ground height at a local point, for the waypoints' AGL; omitted: NaN. */
  groundAt?: (x: number, y: number) => number;
}

/**
 * A straight transit leg of two waypoints at one altitude. The caller must
 * choose an altitude that clears everything between the ends (for example
 * the highest ground in a buffer around the line plus clearance, under the
 * ceiling); this function does not look at the terrain.
 *
 * @example straightTransitLeg([0, 0], [300, 400], 1, { altitudeAmslM: 650, speedMps: 10 }).lengthM // 500
 */
export function straightTransitLeg(from: XY, to: XY, strip: number, p: StraightTransitOptions): SolvedLeg {
  const lengthM = Math.hypot(to[0] - from[0], to[1] - from[1]);
  const ground = (xy: XY) => (p.groundAt ? p.groundAt(xy[0], xy[1]) : NaN);
  const wp = (xy: XY, s: number, speedMps: number): Waypoint => ({
    x: xy[0],
    y: xy[1],
    s,
    altitudeAmslM: p.altitudeAmslM,
    groundAmslM: ground(xy),
    heightAboveGroundM: p.altitudeAmslM - ground(xy),
    speedMps,
  });
  const f64 = (a: number, b: number) => Float64Array.of(a, b);
  const g0 = ground(from);
  const g1 = ground(to);
  const profile: StationProfile = {
    s: f64(0, lengthM),
    x: f64(from[0], to[0]),
    y: f64(from[1], to[1]),
    groundM: f64(g0, g1),
    hardLowM: f64(NaN, NaN),
    hardHighM: f64(NaN, NaN),
    bandLowM: f64(NaN, NaN),
    bandHighM: f64(NaN, NaN),
    altitudeM: f64(p.altitudeAmslM, p.altitudeAmslM),
    status: new Uint8Array(2),
    cause: new Uint8Array(2),
  };
  return {
    kind: "transit",
    strip,
    from,
    to,
    waypoints: [wp(from, 0, 0), wp(to, lengthM, p.speedMps)],
    profile,
    lengthM,
    timeS: lengthM / p.speedMps,
  };
}

/**
 * Farthest horizontal distance of a flight's path from a point, metres: legs are straight
 * between waypoints, so the farthest point of a leg is one of its waypoints.
 * @example farthestWaypointM(flight.legs, takeoff) // 289.1
 */
export function farthestWaypointM(legs: readonly SolvedLeg[], from: XY): number {
  let far = 0;
  for (const l of legs) for (const w of l.waypoints) far = Math.max(far, Math.hypot(w.x - from[0], w.y - from[1]));
  return far;
}
