/**
 * What each strip family of a cross-strip plan adds: strips, photos, flight time and
 * the per-cell median image count of each family flown alone, next to both together.
 * The counts come from the same independent check as the plan's (assessPlan), run
 * once per family on that family's flown legs.
 */
import { assessPlan } from "../assess/assess.js";
import type { AssessedLeg } from "../assess/exposures.js";
import { stripFamilies } from "./crossStrips.js";
import type { PlanRun } from "./plan.js";

export interface FamilyFigures {
  headingDeg: number;
  strips: number;
  photos: number;
  flights: number;
  flightTimeS: number;
  /** Median images per site cell with this family alone. */
  imagesMedian: number;
}

export interface CrossStripFigures {
  first: FamilyFigures;
  second: FamilyFigures;
  /** Median images per site cell with both families (the plan's own figure). */
  imagesMedianBoth: number;
}

/**
 * Per-family figures of a plan run with cross strips, or null when the run has one family.
 * @example crossStripFigures(run)?.second.photos
 */
export function crossStripFigures(run: PlanRun): CrossStripFigures | null {
  const headingDeg = run.layout.headingDeg;
  const family = stripFamilies(run.layout.legs, headingDeg);
  if (![...family.values()].includes(2)) return null;
  const flights = run.flights.flights;
  const of = (n: 1 | 2): FamilyFigures => {
    const own = flights.filter((f) => f.strips.length > 0 && family.get(f.strips[0]) === n);
    const legs = own.flatMap((f) => f.legs) as AssessedLeg[];
    // Photos and cells as the plan's check counts them; only the image count is read here.
    const alone = assessPlan(run.grid, run.site.local, legs, run.camera, run.requirement, {
      triggerM: run.layout.triggerM,
      minImages: run.options.minImages,
      zoneHalfAcrossM: run.layout.spacingM / 2,
      toWgs84: run.frame.toWgs84,
      nadirBy: "distance",
      polygons: false,
    });
    return {
      headingDeg: n === 1 ? headingDeg : (headingDeg + 90) % 180,
      strips: [...family.values()].filter((v) => v === n).length,
      photos: run.assessment.exposures.filter((e) => family.get(e.strip) === n).length,
      flights: own.length,
      flightTimeS: own.reduce((s, f) => s + f.timeS, 0),
      imagesMedian: alone.stats.images.median,
    };
  };
  return { first: of(1), second: of(2), imagesMedianBoth: run.assessment.stats.images.median };
}
