import { describe, it, expect } from "vitest";
import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { makeGrid } from "../../src/dem/sample.js";
import type { SolvedLeg } from "../../src/solve/types.js";
import type { Assessment } from "../../src/assess/types.js";
import { genericCamera, handLeg } from "./helpers.js";

// The sweep started ahead of its assessment (assess.ts startAssessmentSweep), as the plan
// starts it from the solved strips while it routes: taken over only when the flown legs place
// the same photos, else dropped and made afresh. Checked against the assessment made without
// it (the path every other assessment test checks), on worker threads, which run only from the
// built library (`npm test` builds it first).
const distAssess = new URL("../../dist/assess/assess.js", import.meta.url);
const HAS_DIST = existsSync(fileURLToPath(distAssess)) && existsSync(fileURLToPath(new URL("coverageWorker.js", distAssess)));
if (!HAS_DIST) {
  if (process.env.CI === "true") throw new Error("dist/ is required under CI=true (npm test builds it first)");
  process.stderr.write("NOTICE: dist/ not built; skipping the early sweep's tests (run npm run build)\n");
}

type AssessModule = typeof import("../../src/assess/assess.js");
type ThreadsModule = typeof import("../../src/assess/bandThreads.js");

const camera = genericCamera();
// 550 m x 500 m at 0.5 m: 1.1 M cells, enough for the sweep's worker threads.
const grid = makeGrid({ width: 1100, height: 1000, x0: 0, y0: 500, cellM: 0.5, heights: (x, y) => 200 + 20 * Math.sin(x / 40) * Math.cos(y / 55) });
const site = { type: "Polygon" as const, coordinates: [[[30.1, 30.1], [520.1, 30.1], [520.1, 470.1], [30.1, 470.1], [30.1, 30.1]]] };
const identity = (x: number, y: number): [number, number] => [x, y];
const band = { lowGsdM: 0.02, highGsdM: 0.026 };
const triggerM = 20;
const spacingM = 40;

/** East-west strips, each with a waypoint mid-way whose altitude `mid` sets. */
function legs(mid: (strip: number) => number): SolvedLeg[] {
  const out: SolvedLeg[] = [];
  let strip = 0;
  for (let y = 10; y <= 490; y += spacingM) {
    strip++;
    out.push(handLeg({
      from: [-20, y], to: [570, y], strip,
      waypoints: [{ s: 0, altitudeAmslM: 300 }, { s: 295, altitudeAmslM: mid(strip) }, { s: 590, altitudeAmslM: 300 }],
      stationStepM: 0.5,
    }));
  }
  return out;
}

function sameRasters(a: Assessment, b: Assessment): void {
  for (const k of ["gsdCm", "images", "flags"] as const) {
    expect(Buffer.from(a.rasters[k].buffer, a.rasters[k].byteOffset, a.rasters[k].byteLength).equals(Buffer.from(b.rasters[k].buffer, b.rasters[k].byteOffset, b.rasters[k].byteLength)), k).toBe(true);
  }
  expect(a.stats).toEqual(b.stats);
}

describe.skipIf(!HAS_DIST)("the assessment's sweep started ahead", () => {
  it("is taken over when the flown legs place the same photos, and dropped when they do not", async () => {
    const { assessPlan, siteMaskFor, startAssessmentSweep } = (await import(distAssess.href)) as AssessModule;
    const { bandPool } = (await import(new URL("../../dist/assess/bandThreads.js", import.meta.url).href)) as ThreadsModule;
    const pool = bandPool();
    try {
      const inSite = siteMaskFor(grid, site, 2);
      const opts = { triggerM, zoneHalfAcrossM: spacingM / 2, toWgs84: identity, nadirBy: "distance" as const, threads: 2, bandPool: pool, inSite, polygons: false };
      const solved = legs(() => 310);
      const fresh = assessPlan(grid, site, solved, camera, band, opts);
      expect(fresh.stats.withinBandPct).toBeGreaterThan(10);
      expect(fresh.stats.withinBandPct).toBeLessThan(100);

      // Wrapped to see which sweep the assessment finished.
      const watched = () => {
        const early = startAssessmentSweep(grid, site, solved, camera, band, opts);
        const n = { finish: 0, cancel: 0 };
        const { finish, cancel } = early.started;
        early.started.finish = () => { n.finish++; return finish(); };
        early.started.cancel = () => { n.cancel++; cancel(); };
        return { early, n };
      };

      // The same legs (copies: the photos compared, not the objects): taken over.
      const same = watched();
      const taken = assessPlan(grid, site, solved.map((l) => ({ ...l })), camera, band, { ...opts, early: same.early });
      expect(same.n).toEqual({ finish: 1, cancel: 0 });
      sameRasters(taken, fresh);

      // One strip's mid waypoint a metre higher (a strip re-flown differently): its photos
      // differ, so the early sweep is dropped and the assessment is that of the legs flown.
      const flown = legs((s) => (s === 6 ? 311 : 310));
      const other = watched();
      const redone = assessPlan(grid, site, flown, camera, band, { ...opts, early: other.early });
      expect(other.n).toEqual({ finish: 0, cancel: 1 });
      // The dropped sweep's handle lets go of its rasters.
      expect(() => other.early.started.sameExposures([])).toThrow(/cancelled/);
      sameRasters(redone, assessPlan(grid, site, flown, camera, band, opts));
      let differ = 0;
      for (let i = 0; i < fresh.rasters.gsdCm.length; i++) if (!Object.is(fresh.rasters.gsdCm[i], redone.rasters.gsdCm[i])) differ++;
      expect(differ).toBeGreaterThan(1000);

      // Other sweep options (another minimum image count sets other effect bits): dropped too.
      const third = watched();
      const fewer = assessPlan(grid, site, solved, camera, band, { ...opts, minImages: 5, early: third.early });
      expect(third.n).toEqual({ finish: 0, cancel: 1 });
      sameRasters(fewer, assessPlan(grid, site, solved, camera, band, { ...opts, minImages: 5 }));

      // The pool's workers serve a later pass after a cancelled one.
      sameRasters(assessPlan(grid, site, solved, camera, band, opts), fresh);
    } finally {
      pool.close();
    }
  }, 60_000);

  it("on one thread does all of its sweep when taken over", async () => {
    const { assessPlan, siteMaskFor, startAssessmentSweep } = (await import(distAssess.href)) as AssessModule;
    const inSite = siteMaskFor(grid, site, 1);
    const opts = { triggerM, zoneHalfAcrossM: spacingM / 2, toWgs84: identity, nadirBy: "distance" as const, threads: 1, inSite, polygons: false };
    const solved = legs((s) => 300 + s);
    const early = startAssessmentSweep(grid, site, solved, camera, band, opts);
    sameRasters(assessPlan(grid, site, solved, camera, band, { ...opts, early }), assessPlan(grid, site, solved, camera, band, opts));
  }, 60_000);
});
