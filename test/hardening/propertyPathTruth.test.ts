/**
 * Property test: the plan's promises hold on the whole flown path, against the DEM itself.
 *
 * Random terrains with the features that break station-only checks: one-cell walls (a
 * 30-60 m step between two neighbouring cell centres), masts (one or two cells, 80 m),
 * pits and nodata holes, on 1-2 m cells; random valid plans. For every plan written, the
 * path between consecutive waypoints (straight, constant gradient) is sampled every 5 cm
 * and at each sample:
 * - clearance: altitude >= the highest ground within the safety radius + clearance +
 *   obstacle margin, the highest ground taken exactly on the DEM's bilinear surface (cell
 *   centres inside the disc and the disc's rim: a bilinear patch has no interior maximum);
 * - ceiling (ground reference): altitude <= ground below + ceiling;
 * - unknown ground: a disc touching nodata.
 * A breach must be one the plan declared (a ceiling-breach warning for the ceiling, an
 * unknown-ground warning for nodata); clearance must never break. The reference is the
 * exact disc search (dem/discExact.ts), which the solver does not use on these fine DEMs
 * (it widens its discs by a cell diagonal instead), so the two are independent paths.
 */
import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { HAS_GDAL } from "../helpers/tools.js";
import { InputError, InputFileError } from "../../src/errors.js";
import { planMission, type PlanRun } from "../../src/plan/plan.js";
import { discExtremaExact } from "../../src/dem/discExact.js";
import { sampleBilinear } from "../../src/dem/sample.js";
import { tempDir } from "./helpers.js";
import { planArb, writeCase, type Terrain } from "./property.helpers.js";

/** Terrain with hostile features: walls, masts, pits (offsets in metres from the centre). */
interface HostileTerrain extends Terrain {
  walls: { x: number; stepM: number }[];
  masts: { x: number; y: number; cells: 1 | 2 }[];
  pits: { x: number; y: number }[];
}

const hostileArb: fc.Arbitrary<HostileTerrain> = fc.record({
  baseM: fc.integer({ min: 0, max: 1500 }),
  slope: fc.tuple(fc.double({ min: -0.2, max: 0.2, noNaN: true }), fc.double({ min: -0.2, max: 0.2, noNaN: true })),
  hills: fc.array(fc.record({ x: fc.integer({ min: -100, max: 100 }), y: fc.integer({ min: -100, max: 100 }), sigmaM: fc.integer({ min: 10, max: 60 }), ampM: fc.integer({ min: -40, max: 80 }) }), { maxLength: 3 }),
  holes: fc.array(fc.record({ x: fc.integer({ min: -80, max: 80 }), y: fc.integer({ min: -80, max: 80 }), radiusM: fc.integer({ min: 3, max: 12 }) }), { maxLength: 1 }),
  walls: fc.array(fc.record({ x: fc.integer({ min: -60, max: 60 }), stepM: fc.integer({ min: 30, max: 60 }) }), { minLength: 1, maxLength: 2 }),
  masts: fc.array(fc.record({ x: fc.integer({ min: -70, max: 70 }), y: fc.integer({ min: -70, max: 70 }), cells: fc.constantFrom(1 as const, 2 as const) }), { maxLength: 2 }),
  pits: fc.array(fc.record({ x: fc.integer({ min: -70, max: 70 }), y: fc.integer({ min: -70, max: 70 }) }), { maxLength: 2 }),
});

const CELL_M = 1.5;

/** Height at a cell centre (dx, dy from the centre): the base terrain plus the hostile features. */
function hostileHeight(t: HostileTerrain, dx: number, dy: number): number {
  for (const h of t.holes) if ((dx - h.x) ** 2 + (dy - h.y) ** 2 < h.radiusM ** 2) return NaN;
  let z = t.baseM + t.slope[0] * dx + t.slope[1] * dy;
  for (const h of t.hills) z += h.ampM * Math.exp(-((dx - h.x) ** 2 + (dy - h.y) ** 2) / (2 * h.sigmaM ** 2));
  // A wall: every centre east of x is higher, so the whole step lies within one cell.
  for (const w of t.walls) if (dx > w.x) z += w.stepM;
  for (const m of t.masts) if (Math.abs(dx - m.x) < (m.cells * CELL_M) / 2 && Math.abs(dy - m.y) < CELL_M / 2) z += 80;
  for (const p of t.pits) if (Math.abs(dx - p.x) < CELL_M / 2 && Math.abs(dy - p.y) < CELL_M / 2) z -= 30;
  return z;
}

/** Every breach of the exact check on the flown path, by kind. */
function pathBreaches(run: PlanRun): { clearance: number[]; ceiling: string[]; unknown: string[] } {
  const o = run.options;
  const floor = o.clearance.minM + o.clearance.obstacleMarginM + (o.demAccuracyM ?? 0);
  const out = { clearance: [] as number[], ceiling: [] as string[], unknown: [] as string[] };
  const mx = new Float64Array(1), mn = new Float64Array(1), g = new Float64Array(1);
  for (const flight of run.flights.flights) {
    for (const leg of flight.legs) {
      const w = leg.waypoints;
      for (let i = 1; i < w.length; i++) {
        const len = Math.hypot(w[i].x - w[i - 1].x, w[i].y - w[i - 1].y);
        const n = Math.max(1, Math.ceil(len / 0.05));
        for (let k = 0; k <= n; k++) {
          const f = k / n;
          const x = w[i - 1].x + f * (w[i].x - w[i - 1].x), y = w[i - 1].y + f * (w[i].y - w[i - 1].y);
          // On a vertical move (len 0) the lower end is the binding one.
          const z = len > 0 ? w[i - 1].altitudeAmslM + f * (w[i].altitudeAmslM - w[i - 1].altitudeAmslM) : Math.min(w[i - 1].altitudeAmslM, w[i].altitudeAmslM);
          const where = `${leg.kind} ${leg.strip}`;
          if (o.clearance.safetyRadiusM > 0) discExtremaExact(run.grid, [x], [y], o.clearance.safetyRadiusM, mx, mn);
          else mx[0] = sampleBilinear(run.grid, [x], [y], g)[0];
          if (mx[0] !== mx[0]) { out.unknown.push(where); continue; }
          if (o.ceiling.reference === "ground") {
            const ground = sampleBilinear(run.grid, [x], [y], g)[0];
            if (z > ground + o.ceiling.heightM + 1e-6) out.ceiling.push(where);
          }
        }
      }
    }
  }
  return out;
}

describe.skipIf(!HAS_GDAL)("property: clearance, ceiling and known ground hold on the whole path over walls, masts, pits and holes", () => {
  it("random hostile terrains x random plans (16 runs): no undeclared breach, clearance never broken", async () => {
    let planned = 0;
    const internal: string[] = [];
    const refused: string[] = [];
    await fc.assert(
      fc.asyncProperty(hostileArb, planArb, async (terrain, draw) => {
        const dir = tempDir("prop-truth");
        let run: PlanRun;
        try {
          const opts = writeCase(dir, terrain, {
            ...draw,
            siteM: Math.min(draw.siteM, 140),
            // Plans that can be flown at all (the refusals are tested elsewhere): a reachable
            // target height, and a slowest speed under the photo speed the camera allows.
            ceilingM: Math.max(draw.ceilingM, draw.targetHeightM + 40),
            minSpeedMps: 0.3,
            // Clearance just under the target height and a safety radius of 10-30 m, so the
            // clearance floor, not the detail band, holds the path down over most ground.
            clearanceM: Math.floor(0.9 * draw.targetHeightM),
            obstacleMarginM: 0,
            safetyRadiusM: 10 + (draw.safetyRadiusM % 21),
          }, { cellM: CELL_M, cells: 200, height: (dx, dy) => hostileHeight(terrain, dx, dy) });
          run = await planMission(opts);
        } catch (e) {
          if (e instanceof InputError || e instanceof InputFileError) { refused.push(e.message); return; }
          internal.push((e as Error).message);
          return;
        }
        planned++;
        const b = pathBreaches(run);
        const warned = (code: string) => run.warnings.some((w) => w.code === code);
        expect(b.clearance.length, `clearance broken on the path by up to ${Math.max(0, ...b.clearance.slice(0, 1000)).toFixed(2)} m`).toBe(0);
        if (b.ceiling.length) expect(warned("ceiling-breach"), `ceiling broken on ${b.ceiling[0]} without a warning`).toBe(true);
        if (b.unknown.length) expect(warned("unknown-ground"), `path over unknown ground on ${b.unknown[0]} without a warning`).toBe(true);
      }),
      { numRuns: 16, seed: 1107, endOnFailure: true },
    );
    expect(internal, internal.join(" | ")).toEqual([]);
    expect(planned, `refused: ${refused.join(" | ")}`).toBeGreaterThanOrEqual(12);
  }, 300_000);
});
