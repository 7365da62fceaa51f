/**
 * Sites beyond one take-off point's range and one battery: blocks with their own
 * take-off points, strips resumed across batteries, flights.csv. On the GDAL-written
 * hills fixture (fixtures/gdal/README.md) with a 200 m range and a 6 min battery, so
 * that a 0.28 km2 site needs blocks and resumed strips. Distances by GeographicLib's
 * geodesic inverse (geographiclib-geodesic, C. F. F. Karney, "Algorithms for geodesics",
 * J. Geodesy 87, 2013), independent of the plan's local frame.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { readFileSync } from "node:fs";
import path from "node:path";
import geodesic from "geographiclib-geodesic";
import { loadPlanFile, resolvePlanOptions } from "../../src/plan/options.js";
import { planMission, type PlanRun } from "../../src/plan/plan.js";
import { flightRows } from "../../src/plan/outputs.js";
import { ROOT, parseCsv, runCli, tempDir } from "./cli.js";

const G = geodesic.Geodesic.WGS84;
const PLAN = path.join(ROOT, "fixtures/e2e/hills-utm33-plan.yaml");
const RANGE_M = 200;
const ENDURANCE_MIN = 6;
const distM = (a: [number, number], b: [number, number]) => G.Inverse(a[1], a[0], b[1], b[0]).s12 as number;

async function plan(flags: Record<string, unknown>): Promise<PlanRun> {
  const f = await loadPlanFile(PLAN);
  return planMission(resolvePlanOptions(f.data, flags, f.dir));
}

describe("blocks and resumed strips (hills fixture, 200 m range, 6 min battery)", () => {
  let run: PlanRun;
  let single: PlanRun;
  beforeAll(async () => {
    run = await plan({ "aircraft.maxRangeM": RANGE_M, "aircraft.enduranceMin": ENDURANCE_MIN });
    single = await plan({ "aircraft.maxRangeM": 0, "aircraft.enduranceMin": ENDURANCE_MIN });
  }, 120_000);

  it("splits the site into blocks, each flown from its own take-off point", () => {
    expect(run.blocks.length).toBeGreaterThan(1);
    expect(new Set(run.blocks.map((b) => `${b.takeoff.lon},${b.takeoff.lat}`)).size).toBe(run.blocks.length);
    for (const f of run.flights.flights) expect(f.block).toBeGreaterThanOrEqual(1);
  });

  it("keeps every waypoint and every point of every leg (every 1 m) within the range of its flight's take-off point (GeographicLib)", () => {
    let worst = 0, points = 0;
    for (const f of run.flights.flights) {
      const t = run.frame.toWgs84(...f.takeoff!.xy);
      for (const l of f.legs) {
        const w = l.waypoints;
        for (let i = 0; i + 1 < w.length; i++) {
          const d = Math.hypot(w[i + 1].x - w[i].x, w[i + 1].y - w[i].y);
          const n = Math.max(1, Math.ceil(d));
          for (let k = 0; k <= n; k++) {
            const p = run.frame.toWgs84(w[i].x + ((w[i + 1].x - w[i].x) * k) / n, w[i].y + ((w[i + 1].y - w[i].y) * k) / n);
            worst = Math.max(worst, distM(t, p));
            points++;
          }
        }
      }
    }
    expect(points).toBeGreaterThan(5000);
    // The local frame is UTM here (scale 0.9996 near the central meridian): 0.1 % margin.
    expect(worst).toBeLessThanOrEqual(RANGE_M * 1.001);
  });

  it("flies every flight within the usable endurance (6 min less the 20 % reserve)", () => {
    for (const f of run.flights.flights) expect(f.timeS).toBeLessThanOrEqual(ENDURANCE_MIN * 60 * 0.8 + 1e-6);
    expect(run.warnings.some((w) => w.code === "strip-exceeds-endurance")).toBe(false);
  });

  it("resumes strips across batteries with the photo spacing kept: no gap, no duplicate within 0.1 m", () => {
    const resumed = run.flights.flights.filter((f) => f.resumesStrip !== undefined);
    expect(resumed.length).toBeGreaterThan(0);
    const t = run.layout.triggerM;
    for (const f of resumed) {
      const strip = f.resumesStrip!;
      // Photos of that strip from every flight, in order along the strip's line.
      const photos = run.assessment.exposures.filter((e) => e.strip === strip);
      const u = [photos[0].ux, photos[0].uy];
      const along = photos.map((p) => p.x * u[0] + p.y * u[1]).sort((a, b) => a - b);
      for (let i = 1; i < along.length; i++) {
        const gap = along[i] - along[i - 1];
        expect(gap).toBeGreaterThan(0.1);
        // Within a piece of a strip the spacing is the trigger distance; a resume point keeps it.
        if (gap < t * 1.5) expect(gap).toBeCloseTo(t, 6);
      }
    }
  });

  it("shows no cell short of images that the one-take-off plan images (block seams and resume points keep the overlap)", () => {
    const few = (r: PlanRun) => r.assessment.stats.flagged.byKind.fewImages.cells;
    expect(few(single)).toBe(0);
    expect(few(run)).toBe(0);
    expect(run.assessment.stats.images.min).toBeGreaterThanOrEqual(run.options.minImages);
  });

  it("flights.csv has the contract columns, one row per flight, and its figures agree with waypoints.csv (CLI)", () => {
    const out = tempDir("gsdplan-blocks-");
    const r = runCli(["plan", PLAN, "--out", out, "--max-range-m", String(RANGE_M), "--endurance-min", String(ENDURANCE_MIN), "--quiet"]);
    expect(r.status).toBe(0);
    const fl = parseCsv(readFileSync(path.join(out, "flights.csv"), "utf8"));
    expect(fl.header).toEqual(["flight", "block", "takeoff_longitude", "takeoff_latitude", "takeoff_ground_amsl_m", "waypoints", "photos", "length_m", "duration_s", "max_range_m", "resumes_strip"]);
    const wp = parseCsv(readFileSync(path.join(out, "waypoints.csv"), "utf8"));
    const col = (h: string[], n: string) => h.indexOf(n);
    expect(fl.rows.length).toBe(new Set(wp.rows.map((x) => x[0])).size);
    for (const row of fl.rows) {
      const rows = wp.rows.filter((x) => x[0] === row[0]);
      expect(Number(row[col(fl.header, "waypoints")])).toBe(rows.length);
      // The farthest waypoint from the take-off point (GeographicLib) is the flight's max_range_m.
      const t: [number, number] = [Number(row[2]), Number(row[3])];
      const far = Math.max(...rows.map((x) => distM(t, [Number(x[col(wp.header, "longitude")]), Number(x[col(wp.header, "latitude")])])));
      expect(Number(row[col(fl.header, "max_range_m")])).toBeCloseTo(far, -0.5);
      expect(far).toBeLessThanOrEqual(RANGE_M * 1.001);
      // altitude_takeoff_m is relative to this flight's own take-off ground.
      for (const x of rows) {
        expect(Number(x[col(wp.header, "altitude_takeoff_m")])).toBeCloseTo(Number(x[col(wp.header, "altitude_amsl_m")]) - Number(row[4]), 1);
      }
    }
    expect(fl.rows.some((x) => x[10] !== "")).toBe(true);
  }, 120_000);

  it("a given list of take-off points: each flight uses one of them (the nearest that reaches its block)", async () => {
    const cands: [number, number][] = run.blocks.map((b) => [b.takeoff.lon, b.takeoff.lat]);
    const given = await plan({ "aircraft.maxRangeM": RANGE_M, "aircraft.enduranceMin": ENDURANCE_MIN, takeoff: cands });
    const ok = new Set(cands.map(([lon, lat]) => `${lon.toFixed(7)},${lat.toFixed(7)}`));
    for (const r of flightRows(given)) expect(ok.has(`${r.takeoffLongitude.toFixed(7)},${r.takeoffLatitude.toFixed(7)}`)).toBe(true);
    expect(given.blocks.every((b) => b.takeoffFrom === "candidate")).toBe(true);
  }, 120_000);

  it("refuses a candidate take-off point off the DEM in one line naming it", async () => {
    const { InputError } = await import("../../src/errors.js");
    const cands: [number, number][] = [[run.blocks[0].takeoff.lon, run.blocks[0].takeoff.lat], [14.995, 46.955]];
    // 14.995 E lies about 380 m west of the fixture DEM's west edge (500000 E is 15 E in UTM 33N).
    const e = await plan({ "aircraft.maxRangeM": RANGE_M, takeoff: cands }).then(() => null, (err) => err);
    expect(e).toBeInstanceOf(InputError);
    expect(e.message).toMatch(/^takeoff\[1\]: the DEM has no height there \(got \[14\.995,46\.955\]; allowed: take-off points on the DEM\)$/);
  }, 120_000);
});
