import { describe, it, expect } from "vitest";
import type { AssessmentStats } from "../../src/assess/types.js";
import { splitFlights } from "../../src/route/flights.js";
import { waypointRows } from "../../src/export/rows.js";
import { buildSummary, summaryJson } from "../../src/export/summary.js";
import { smallPlan, timedLeg } from "./legs.js";

const stats: AssessmentStats = {
  siteCells: 1000,
  cellAreaM2: 4,
  gsdCm: { min: 1.8, p5: 1.85, median: 2.01, p95: 2.18, max: 2.4 },
  withinBandPct: 93.456,
  images: { min: 1, median: 9 },
  flagged: { cells: 70, areaM2: 280, byKind: { coarse: { cells: 20, areaM2: 80, pct: 2 }, ceiling: { cells: 50, areaM2: 200, pct: 5 } }, effectCells: 20 },
  perStrip: [],
};

function summary(datum: "egm96" | "unknown" = "egm96") {
  const legs = smallPlan();
  const split = splitFlights(legs, {
    takeoff: legs[0].from,
    enduranceMin: 20,
    transitLeg: (a, b, strip) => timedLeg("transit", strip, a, b, 566, 30),
  });
  const rows = waypointRows(split.flights.map((f) => f.legs), (x, y) => [x / 1e5, y / 1e5], { datum: "egm96", undulationM: () => 48, takeoffGroundM: 440 });
  return {
    split,
    rows,
    s: buildSummary({
      name: "Test site",
      flights: split.flights,
      rows,
      photos: 42,
      headingDeg: 0,
      lineSpacingM: 50,
      triggerDistanceM: 14.6,
      speed: { speedMps: 7.3, limit: "trigger interval" },
      gsdBandCm: { target: 2, low: 1.8, high: 2.2 },
      stats,
      ceiling: { heightM: 120, reference: "ground" },
      verticalDatum: datum,
      takeoff: { lon: 12.5, lat: 47.1, groundAmslM: 440 },
      warnings: [{ code: "x", message: "a solver warning" }],
    }),
  };
}

describe("summary.json", () => {
  it("has the contract's keys", () => {
    const { s } = summary();
    for (const k of [
      "strips", "waypoints", "photos", "flights", "pathLengthM", "flightTimeS", "headingDeg", "lineSpacingM", "triggerDistanceM",
      "speedMps", "speedLimit", "gsdCm", "withinBandPct", "images", "flagged", "ceiling", "verticalDatum", "takeoff", "warnings", "cautions",
    ]) expect(s).toHaveProperty(k);
    expect(Object.keys(s.gsdCm)).toEqual(["target", "low", "high", "min", "p5", "median", "p95", "max"]);
    expect(Object.keys(s.flagged)).toEqual(["cells", "areaM2", "byKind"]);
    expect(Object.keys(s.takeoff)).toEqual(["lon", "lat", "groundAmslM"]);
  });

  it("counts strips, waypoints and path length from the legs", () => {
    const { s, rows, split } = summary();
    expect(s.strips).toBe(2);
    expect(s.waypoints).toBe(rows.length);
    expect(s.flights).toBe(1);
    expect(s.batteries).toBe(1);
    // Lengths by hand: 100 (take-off to strip 1) + 400 + 50 + 400 + back from (500150, 5216000) to take-off 150 = 1100 m.
    expect(s.pathLengthM).toBe(1100);
    expect(s.flightTimeS).toBeCloseTo(split.flights[0].timeS, 2);
    expect(s.withinBandPct).toBe(93.46);
  });

  it("carries the usual cautions and the ceiling's reference", () => {
    const { s } = summary();
    const text = s.cautions.join(" ");
    for (const phrase of [/pilot in command decides/, /permissions/, /airspace and temporary restrictions/, /not a survey of obstacles/, /vertical errors/, /visual line of sight/, /first waypoint heights on site/]) {
      expect(text).toMatch(phrase);
    }
    expect(s.cautions[0]).toMatch(/120 m above the ground straight below is a check, not legal advice/);
  });

  it("warns when the DEM's vertical datum is unknown", () => {
    expect(summary("egm96").s.warnings).toEqual(["a solver warning"]);
    expect(summary("unknown").s.warnings[1]).toMatch(/vertical datum is unknown/);
  });

  it("is valid JSON (RFC 8259), with NaN written as null", () => {
    const { s } = summary();
    const back = JSON.parse(summaryJson({ ...s, gsdCm: { ...s.gsdCm, min: NaN } }));
    expect(back.gsdCm.min).toBeNull();
    expect(back.strips).toBe(2);
  });
});
